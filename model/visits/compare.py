"""Two visits of one site side by side: readings, devices tested, and findings.

:func:`compare_visits` puts each device's readings on two visits next to each
other with the change, lists the devices tested on only one of them (and those
tested on neither), and runs every check on the site as it stood at each visit
(its history cut to end there) to tell which findings are new, gone or
unchanged.  Findings are matched by rule and the nodes they name.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

from model.rules.bands import numeric_value, value_unit
from model.rules.checks import analyse
from model.rules.findings import CAUTION, Finding
from model.site.history import (
    cut_at,
    find_visit,
    known_visits_text,
    ordered_visits,
    visits_before,
)
from model.site.models import Reading, SiteFile, Visit
from model.site.terms import DID_NOT_TRIP, TEST_NAMES, TEST_VALUE_KEYS
from model.site.tree import SiteIndex

#: The values compared, in the order shown.
COMPARED_KEYS: tuple[str, ...] = (*TEST_VALUE_KEYS, "waveform", "not_tested")

Presence = Literal["both", "added", "removed", "neither"]


class CompareError(ValueError):
    """The visits asked for cannot be compared; ``str()`` is one line for a user."""


@dataclass(frozen=True, slots=True)
class ValueChange:
    """One value of one device on the two visits.

    ``change`` is new minus old in the value's unit (ms for trip times, mA for
    the ramp test), ``change_pct`` the same as a percentage of the old value;
    both None unless both values are numbers.
    """

    key: str
    old: float | str | None
    new: float | str | None
    change: float | None
    change_pct: float | None
    unit: str

    @property
    def differs(self) -> bool:
        return self.old != self.new

    def as_json(self) -> dict[str, Any]:
        return {
            "key": self.key,
            "from": self.old,
            "to": self.new,
            "change": self.change,
            "change_pct": self.change_pct,
            "unit": self.unit,
        }


@dataclass(frozen=True, slots=True)
class DeviceComparison:
    """One residual-current device on the two visits."""

    device: str
    label: str
    board: str
    presence: Presence
    values: tuple[ValueChange, ...]

    @property
    def changed(self) -> bool:
        return any(v.differs for v in self.values)

    def as_json(self) -> dict[str, Any]:
        return {
            "device": self.device,
            "label": self.label,
            "board": self.board,
            "presence": self.presence,
            "changed": self.changed,
            "values": [v.as_json() for v in self.values],
        }


@dataclass
class VisitComparison:
    """Everything that differs between two visits of one site."""

    site_name: str
    from_id: str
    from_date: str
    to_id: str
    to_date: str
    devices: list[DeviceComparison] = field(default_factory=list)
    findings_new: list[Finding] = field(default_factory=list)
    findings_gone: list[Finding] = field(default_factory=list)
    findings_unchanged: list[Finding] = field(default_factory=list)
    caution: str = CAUTION
    #: Every node's label (its id where it has none), to name nodes for people.
    node_labels: dict[str, str] = field(default_factory=dict)

    def _with(self, presence: Presence) -> list[str]:
        return [d.device for d in self.devices if d.presence == presence]

    @property
    def added(self) -> list[str]:
        """Devices with a reading on the later visit only."""
        return self._with("added")

    @property
    def removed(self) -> list[str]:
        """Devices with a reading on the earlier visit only."""
        return self._with("removed")

    @property
    def untested(self) -> list[str]:
        """Devices in the tree with a reading on neither visit."""
        return self._with("neither")

    def title(self) -> str:
        """'Site: visit a (date) → visit b (date)'; a visit named by its date shows it once."""

        def when(vid: str, date: str) -> str:
            return f"visit {vid}" if vid == date else f"visit {vid} ({date})"

        return (
            f"{self.site_name}: {when(self.from_id, self.from_date)} → "
            f"{when(self.to_id, self.to_date)}"
        )

    def device(self, device_id: str) -> DeviceComparison:
        for d in self.devices:
            if d.device == device_id:
                return d
        raise KeyError(device_id)

    def as_json(self) -> dict[str, Any]:
        return {
            "site": self.site_name,
            "from": {"id": self.from_id, "date": self.from_date},
            "to": {"id": self.to_id, "date": self.to_date},
            "caution": self.caution,
            "devices": [d.as_json() for d in self.devices],
            "added": self.added,
            "removed": self.removed,
            "untested": self.untested,
            "findings": {
                "new": [f.as_json() for f in self.findings_new],
                "gone": [f.as_json() for f in self.findings_gone],
                "unchanged": [f.as_json() for f in self.findings_unchanged],
            },
        }


def _pick(site: SiteFile, visit_id: str | None, default: Visit | None, which: str) -> Visit:
    known = known_visits_text(site)
    if visit_id is None:
        if default is None:
            raise CompareError(
                f"the site has fewer than two visits to compare (known visits: {known})"
            )
        return default
    v = find_visit(site, visit_id)
    if v is None:
        raise CompareError(f"no visit {visit_id!r} for --{which}; known visits: {known}")
    return v


def _value_change(key: str, old: Reading | None, new: Reading | None) -> ValueChange:
    a = None if old is None else getattr(old, key)
    b = None if new is None else getattr(new, key)
    unit = value_unit(key)
    na, nb = numeric_value(a), numeric_value(b)
    change = pct = None
    if na is not None and nb is not None and unit:
        change = nb - na
        pct = 100.0 * change / na if na else None
    return ValueChange(key, a, b, change, pct, unit)


def _further_changes(old: Reading | None, new: Reading | None) -> tuple[ValueChange, ...]:
    """The values of further test waveforms, keyed 'x1_0 (half-wave)'."""
    waves: list[str] = []
    for r in (old, new):
        for f in r.further if r is not None else []:
            if f.waveform not in waves:
                waves.append(f.waveform)
    out: list[ValueChange] = []
    for wf in waves:
        a = old.results_for(wf) if old is not None else None
        b = new.results_for(wf) if new is not None else None
        for k in (*TEST_NAMES, "ramp_ma", "test_current"):
            va = None if a is None else getattr(a, k)
            vb = None if b is None else getattr(b, k)
            if va is None and vb is None:
                continue
            unit = value_unit(k)
            na, nb = numeric_value(va), numeric_value(vb)
            change = pct = None
            if na is not None and nb is not None and unit:
                change = nb - na
                pct = 100.0 * change / na if na else None
            out.append(ValueChange(f"{k} ({wf})", va, vb, change, pct, unit))
    return tuple(out)


def _match(
    old: list[Finding], new: list[Finding]
) -> tuple[list[Finding], list[Finding], list[Finding]]:
    """(new, gone, unchanged): findings paired by (rule, nodes), in order within each key."""
    pending: dict[tuple[str, tuple[str, ...]], list[Finding]] = {}
    for f in old:
        pending.setdefault((f.rule, f.nodes), []).append(f)
    fresh: list[Finding] = []
    same: list[Finding] = []
    for f in new:
        bucket = pending.get((f.rule, f.nodes))
        if bucket:
            bucket.pop(0)
            same.append(f)
        else:
            fresh.append(f)
    gone = [f for fs in pending.values() for f in fs]
    return fresh, gone, same


def compare_visits(
    site: SiteFile, from_id: str | None = None, to_id: str | None = None
) -> VisitComparison:
    """Compare two visits of a site (default: the two latest, older first).

    Raises :class:`CompareError` for an unknown visit id or a site with fewer
    than two visits (when an id is not given).
    """
    order = ordered_visits(site)
    v_to = _pick(site, to_id, order[-1] if order else None, "to")
    if from_id is None:
        before_to = visits_before(site, v_to.id)
        if not before_to:
            raise CompareError(
                f"no visit earlier than {v_to.id!r} to compare with "
                f"(known visits: {known_visits_text(site)})"
            )
        v_from = before_to[0]
    else:
        v_from = _pick(site, from_id, None, "from")

    idx = SiteIndex.build(site)
    devices: list[DeviceComparison] = []
    for dev in idx.rcds():
        old = v_from.readings.get(dev)
        new = v_to.readings.get(dev)
        presence: Presence
        if old is not None and new is not None:
            presence = "both"
        elif new is not None:
            presence = "added"
        elif old is not None:
            presence = "removed"
        else:
            presence = "neither"
        values = tuple(
            _value_change(k, old, new)
            for k in COMPARED_KEYS
            if (old is not None and old.recorded(k)) or (new is not None and new.recorded(k))
        ) + _further_changes(old, new)
        devices.append(
            DeviceComparison(dev, idx.label(dev), idx.board_of.get(dev, idx.root), presence, values)
        )

    before = analyse(cut_at(site, v_from.id)).findings
    after = analyse(cut_at(site, v_to.id)).findings
    fresh, gone, same = _match(before, after)
    return VisitComparison(
        site_name=site.site.name,
        from_id=v_from.id,
        from_date=v_from.date,
        to_id=v_to.id,
        to_date=v_to.date,
        devices=devices,
        findings_new=fresh,
        findings_gone=gone,
        findings_unchanged=same,
        node_labels={n: idx.label(n) for n in idx.by_id},
    )


def change_text(v: ValueChange) -> str:
    """The change of one value for people: '+11 ms (+55 %)', 'new', 'now did not trip'."""
    if v.change is not None:
        pct = "" if v.change_pct is None else f" ({v.change_pct:+.0f} %)"
        return f"{v.change:+g} {v.unit}{pct}"
    if not v.differs:
        return "same"
    if v.old is None:
        return "new"
    if v.new is None:
        return "not recorded now"
    if v.new == DID_NOT_TRIP:
        return "now did not trip"
    return "changed"
