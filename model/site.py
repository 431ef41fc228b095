"""Site data: the protection tree, the site's supply facts and the visits' readings.

This is the persisted form of a site file (format ``tripwise.site``, version 1).
Everything here is plain data validated by pydantic v2: unknown fields are
refused, measured values are strict numbers (a quoted ``"30"`` is not 30 mA),
and choices are literals.  Tree-wide rules (one origin, known parents, no
cycles, readings only for residual-current devices) are checked on the whole
document in :class:`SiteFile`.

Glossary of field names used across the project: ``idn_ma`` rated residual
operating current [mA], ``rated_a`` rated current [A], ``trip_ms`` trip time
[ms], ``zs_ohm`` earth fault loop impedance [Ω], ``ra_ohm`` earth electrode
plus protective conductor resistance [Ω], ``ze_ohm`` external loop impedance
[Ω], ``u0_v`` nominal line-to-earth voltage [V], ``leakage_ma`` standing
protective-conductor current [mA].
"""

from __future__ import annotations

import datetime as dt
import math
import re
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

FORMAT_NAME = "tripwise.site"
FORMAT_VERSION = 1

NodeId = Annotated[
    str,
    StringConstraints(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$"),
    Field(description="Short unique id chosen by the user (letters, digits, . _ -; max 40)."),
]

Earthing = Literal["TN-S", "TN-C-S", "TT", "IT"]
RuleSetName = Literal["uk-bs7671-2022", "iec-60364"]
Waveform = Literal["AC", "A", "F", "B"]
Delay = Literal["general", "S", "set"]
CircuitUse = Literal[
    "sockets",
    "lighting",
    "cooker",
    "shower",
    "water-heater",
    "heating",
    "ev-charger",
    "outdoor",
    "fixed-equipment",
    "other",
]
LoadFlag = Literal[
    "ev-no-dc-detect",
    "ev-dc-detect-6ma",
    "inverter",
    "drive-1ph",
    "drive-3ph",
    "it-equipment",
]
LocationFlag = Literal["bathroom", "outdoor", "agricultural", "swimming-pool", "sauna", "wet-area"]
TestWaveform = Literal["AC", "half-wave", "smooth-dc"]
TestName = Literal["half_0", "half_180", "x1_0", "x1_180", "x5_0", "x5_180"]

#: The explicit "did not trip" state of a timed test.  Recorded as this string,
#: never as a number: an instrument that stops at its maximum test time has not
#: measured a trip time.
DID_NOT_TRIP = "did not trip"

TripResult = Annotated[float, Field(strict=True, gt=0, le=10_000)] | Literal["did not trip"]

TEST_NAMES: tuple[TestName, ...] = ("half_0", "half_180", "x1_0", "x1_180", "x5_0", "x5_180")

#: Kinds that are residual-current *protective* devices (an RCM is not).
RCD_KINDS = frozenset({"rccb", "rcbo", "srcd", "prcd", "cbr"})
#: Kinds that give overcurrent protection.
OVERCURRENT_KINDS = frozenset({"fuse", "mcb", "rcbo", "cbr"})

_STRICT = ConfigDict(extra="forbid", strict=True, validate_default=True)


def _finite(value: float | None, name: str) -> float | None:
    if value is not None and not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number")
    return value


class _Base(BaseModel):
    model_config = _STRICT


class _NodeBase(_Base):
    id: NodeId
    parent: NodeId | None = Field(
        default=None, description="Id of the node that supplies this one; null only for the origin."
    )
    label: Annotated[str, StringConstraints(max_length=200)] = Field(
        default="", description="What the inspector calls it on site (free text)."
    )
    notes: Annotated[str, StringConstraints(max_length=4000)] = Field(
        default="", description="Free notes."
    )


class OriginNode(_NodeBase):
    """The supply: the point where the installation begins."""

    kind: Literal["origin"]


class BoardNode(_NodeBase):
    """A distribution board or consumer unit: a place that groups devices."""

    kind: Literal["board"]
    place: Annotated[str, StringConstraints(max_length=200)] = Field(
        default="", description="Where the board is (e.g. 'garage, left of door')."
    )


class SwitchNode(_NodeBase):
    """An isolator or main switch with no protective function."""

    kind: Literal["switch"]
    rated_a: Annotated[float, Field(gt=0, le=6300)] | None = Field(
        default=None, description="Rated current. [A]"
    )


class FuseNode(_NodeBase):
    """A fuse (including the supply cut-out fuse)."""

    kind: Literal["fuse"]
    rated_a: Annotated[float, Field(gt=0, le=6300)] = Field(description="Rated current. [A]")


class McbNode(_NodeBase):
    """A circuit-breaker giving overcurrent protection only."""

    kind: Literal["mcb"]
    rated_a: Annotated[float, Field(gt=0, le=6300)] = Field(description="Rated current. [A]")
    curve: Literal["B", "C", "D"] | None = Field(default=None, description="Tripping curve.")


class _ResidualBase(_NodeBase):
    idn_ma: Annotated[float, Field(description="Rated residual operating current IΔn. [mA]")]
    waveform: Waveform = Field(description="Waveform type (IEC 60755 / IEC 62423): AC, A, F or B.")

    @field_validator("idn_ma")
    @classmethod
    def _idn_sane(cls, v: float) -> float:
        _finite(v, "idn_ma")
        if 0 < v < 1:
            raise ValueError(
                f"idn_ma {v} looks like amps; give the rating in mA (e.g. 30 for a 30 mA device)"
            )
        if not 6 <= v <= 30_000:
            raise ValueError(f"idn_ma {v} is outside 6 to 30000 mA")
        return v


class _RcdBase(_ResidualBase):
    delay: Delay = Field(
        default="general",
        description="general (no intentional delay), S (time-delayed), or set (declared setting).",
    )
    rated_a: Annotated[float, Field(gt=0, le=6300)] | None = Field(
        default=None, description="Rated current In. [A]"
    )

    @model_validator(mode="after")
    def _delay_rules(self) -> _RcdBase:
        if self.delay == "S":
            if self.idn_ma <= 30:
                raise ValueError(
                    f"type S exists only for IΔn above 30 mA (IEC 61008-1), not {self.idn_ma:g} mA"
                )
            if self.rated_a is not None and self.rated_a < 25:
                raise ValueError(
                    f"type S exists only for In of 25 A or more (IEC 61008-1), not {self.rated_a:g} A"
                )
        if self.delay == "set" and self.kind != "cbr":
            raise ValueError("delay 'set' is only for a cbr with a declared setting")
        return self

    kind: str


class RccbNode(_RcdBase):
    """Residual-current circuit-breaker without overcurrent protection (IEC 61008-1)."""

    kind: Literal["rccb"]


class RcboNode(_RcdBase):
    """Residual-current circuit-breaker with overcurrent protection (IEC 61009-1)."""

    kind: Literal["rcbo"]
    curve: Literal["B", "C", "D"] | None = Field(default=None, description="Tripping curve.")


class SrcdNode(_RcdBase):
    """Socket-outlet incorporating an RCD."""

    kind: Literal["srcd"]


class PrcdNode(_RcdBase):
    """Portable RCD (plug-in or in-line)."""

    kind: Literal["prcd"]


class CbrNode(_RcdBase):
    """Industrial breaker with residual-current relay (IEC 60947-2 Annex B / M)."""

    kind: Literal["cbr"]
    delay_ms: Annotated[float, Field(gt=0, le=10_000)] | None = Field(
        default=None,
        description="Declared limiting non-actuating time when delay is 'set'. [ms]",
    )
    max_break_ms: Annotated[float, Field(gt=0, le=10_000)] | None = Field(
        default=None,
        description="Declared maximum break time at IΔn when delay is 'set'. [ms]",
    )

    @model_validator(mode="after")
    def _set_needs_ms(self) -> CbrNode:
        if self.delay == "set" and self.delay_ms is None:
            raise ValueError("a cbr with delay 'set' needs delay_ms (the declared setting)")
        if self.delay != "set" and (self.delay_ms is not None or self.max_break_ms is not None):
            raise ValueError("delay_ms and max_break_ms apply only when delay is 'set'")
        if (
            self.delay_ms is not None
            and self.max_break_ms is not None
            and self.max_break_ms < self.delay_ms
        ):
            raise ValueError("max_break_ms cannot be shorter than delay_ms")
        return self


class RcmNode(_ResidualBase):
    """Residual-current monitor: warns only, never disconnects; gives no protection."""

    kind: Literal["rcm"]


class CircuitNode(_NodeBase):
    """A final circuit, or an item of equipment fed by one."""

    kind: Literal["circuit"]
    use: CircuitUse = Field(description="What the circuit supplies.")
    rated_a: Annotated[float, Field(gt=0, le=6300)] | None = Field(
        default=None, description="Rating of the circuit's protective device. [A]"
    )
    loads: list[LoadFlag] = Field(
        default_factory=list, description="Loads on the circuit that matter for the RCD type."
    )
    location: list[LocationFlag] = Field(
        default_factory=list, description="Special locations the circuit serves."
    )
    concealed_shallow: bool = Field(
        default=False,
        description="Cables concealed < 50 mm in walls without earthed covering or protection.",
    )
    leakage_ma: Annotated[float, Field(ge=0, le=10_000)] | None = Field(
        default=None, description="Estimated standing protective-conductor current. [mA]"
    )
    zs_ohm: Annotated[float, Field(gt=0, le=100_000)] | None = Field(
        default=None, description="Measured earth fault loop impedance Zs. [Ω]"
    )

    @field_validator("loads", "location")
    @classmethod
    def _no_repeats(cls, v: list[str]) -> list[str]:
        if len(set(v)) != len(v):
            raise ValueError("flags must not repeat")
        return v


Node = Annotated[
    OriginNode
    | BoardNode
    | SwitchNode
    | FuseNode
    | McbNode
    | RccbNode
    | RcboNode
    | SrcdNode
    | PrcdNode
    | CbrNode
    | RcmNode
    | CircuitNode,
    Field(discriminator="kind"),
]

RcdNode = RccbNode | RcboNode | SrcdNode | PrcdNode | CbrNode

NODE_CLASSES: dict[str, type[BaseModel]] = {
    "origin": OriginNode,
    "board": BoardNode,
    "switch": SwitchNode,
    "fuse": FuseNode,
    "mcb": McbNode,
    "rccb": RccbNode,
    "rcbo": RcboNode,
    "srcd": SrcdNode,
    "prcd": PrcdNode,
    "cbr": CbrNode,
    "rcm": RcmNode,
    "circuit": CircuitNode,
}

#: Which kinds may be fed by which.  A circuit may feed socket or portable RCDs
#: and the equipment beyond them ("what the circuit feeds").
ALLOWED_CHILDREN: dict[str, frozenset[str]] = {
    "origin": frozenset(NODE_CLASSES) - {"origin"},
    "board": frozenset(NODE_CLASSES) - {"origin"},
    "switch": frozenset(NODE_CLASSES) - {"origin"},
    "fuse": frozenset(NODE_CLASSES) - {"origin"},
    "mcb": frozenset(NODE_CLASSES) - {"origin"},
    "rccb": frozenset(NODE_CLASSES) - {"origin"},
    "rcbo": frozenset(NODE_CLASSES) - {"origin"},
    "cbr": frozenset(NODE_CLASSES) - {"origin"},
    "rcm": frozenset(NODE_CLASSES) - {"origin"},
    "srcd": frozenset({"circuit", "prcd"}),
    "prcd": frozenset({"circuit"}),
    "circuit": frozenset({"srcd", "prcd", "circuit"}),
}


class TrendSettings(_Base):
    """Thresholds for flagging a trip time that has grown since the previous visit."""

    growth_pct: Annotated[float, Field(gt=0, le=10_000)] = Field(
        default=50.0, description="Growth that is flagged. [%]"
    )
    min_ms: Annotated[float, Field(ge=0, le=10_000)] = Field(
        default=10.0, description="Smallest growth that is flagged. [ms]"
    )


class SiteInfo(_Base):
    """Facts about the site and its supply."""

    name: Annotated[str, StringConstraints(min_length=1, max_length=200)] = Field(
        description="Site name."
    )
    address: Annotated[str, StringConstraints(max_length=500)] = Field(default="", description="")
    client: Annotated[str, StringConstraints(max_length=200)] = Field(default="", description="")
    earthing: Earthing = Field(description="Earthing system: TN-S, TN-C-S, TT or IT.")
    u0_v: Annotated[float, Field(ge=50, le=1000)] = Field(
        default=230.0, description="Nominal line-to-earth voltage U0. [V]"
    )
    ze_ohm: Annotated[float, Field(gt=0, le=100_000)] | None = Field(
        default=None, description="Measured external earth fault loop impedance Ze. [Ω]"
    )
    ra_ohm: Annotated[float, Field(gt=0, le=100_000)] | None = Field(
        default=None,
        description="Measured resistance of the earth electrode and protective conductor RA (TT). [Ω]",
    )
    rules: RuleSetName = Field(default="uk-bs7671-2022", description="Rule set the checks apply.")
    domestic: bool = Field(
        default=True, description="A dwelling (the lighting rule of BS 7671 411.3.4 applies)."
    )
    trend: TrendSettings = Field(default_factory=TrendSettings, description="Trend thresholds.")
    notes: Annotated[str, StringConstraints(max_length=20_000)] = Field(default="", description="")

    @field_validator("rules", mode="before")
    @classmethod
    def _known_rules(cls, v: Any) -> Any:
        if isinstance(v, str) and v not in ("uk-bs7671-2022", "iec-60364"):
            raise ValueError(f"unknown rule set {v!r}; choose 'uk-bs7671-2022' or 'iec-60364'")
        return v


class Reading(_Base):
    """One device's results on one visit."""

    half_0: TripResult | None = Field(
        default=None, description="½ IΔn at 0°. [ms] or 'did not trip'"
    )
    half_180: TripResult | None = Field(default=None, description="½ IΔn at 180°.")
    x1_0: TripResult | None = Field(
        default=None, description="1 × IΔn at 0°. [ms] or 'did not trip'"
    )
    x1_180: TripResult | None = Field(default=None, description="1 × IΔn at 180°.")
    x5_0: TripResult | None = Field(
        default=None, description="5 × IΔn at 0°. [ms] or 'did not trip'"
    )
    x5_180: TripResult | None = Field(default=None, description="5 × IΔn at 180°.")
    ramp_ma: Annotated[float, Field(strict=True, gt=0, le=100_000)] | None = Field(
        default=None, description="Ramp test trip current. [mA]"
    )
    button: Literal["worked", "failed"] | None = Field(
        default=None, description="Integral test button."
    )
    waveform: TestWaveform = Field(default="AC", description="Test current waveform used.")
    note: Annotated[str, StringConstraints(max_length=2000)] = Field(default="", description="")
    not_tested: Annotated[str, StringConstraints(min_length=1, max_length=500)] | None = Field(
        default=None, description="Reason the device was not tested (instead of readings)."
    )

    @model_validator(mode="after")
    def _not_tested_excludes_values(self) -> Reading:
        if self.not_tested is not None and self.has_values():
            raise ValueError("a reading marked not_tested cannot also carry test values")
        return self

    def has_values(self) -> bool:
        """True when any test value is recorded."""
        return any(getattr(self, t) is not None for t in TEST_NAMES) or (
            self.ramp_ma is not None or self.button is not None
        )


_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


class Visit(_Base):
    """One inspection visit and the readings taken on it."""

    id: NodeId = Field(description="Unique visit id (e.g. the date).")
    date: str = Field(description="Visit date, YYYY-MM-DD.")
    inspector: Annotated[str, StringConstraints(max_length=200)] = Field(default="", description="")
    instrument: Annotated[str, StringConstraints(max_length=200)] = Field(
        default="", description="Test instrument (free text)."
    )
    notes: Annotated[str, StringConstraints(max_length=20_000)] = Field(default="", description="")
    readings: dict[NodeId, Reading] = Field(
        default_factory=dict, description="Readings by residual-current device id."
    )

    @field_validator("date")
    @classmethod
    def _iso_date(cls, v: str) -> str:
        if not _DATE_RE.match(v):
            raise ValueError(f"date {v!r} must be YYYY-MM-DD")
        try:
            dt.date.fromisoformat(v)
        except ValueError as exc:
            raise ValueError(f"date {v!r} is not a real date") from exc
        return v


class SiteFile(_Base):
    """A whole site file."""

    format: Literal["tripwise.site"] = Field(description="Always 'tripwise.site'.")
    version: Literal[1] = Field(description="Format version.")
    site: SiteInfo
    nodes: list[Node] = Field(description="The protection tree as a flat list.")
    visits: list[Visit] = Field(default_factory=list, description="Visits, oldest first.")

    @model_validator(mode="after")
    def _tree_rules(self) -> SiteFile:
        problems = tree_problems(self)
        if problems:
            raise ValueError("; ".join(problems))
        return self

    def node(self, node_id: str) -> Any:
        """The node with this id (KeyError when absent)."""
        for n in self.nodes:
            if n.id == node_id:
                return n
        raise KeyError(node_id)

    def latest_visit(self) -> Visit | None:
        """The most recent visit by date (the later one in the list on a tie)."""
        if not self.visits:
            return None
        best = self.visits[0]
        for v in self.visits[1:]:
            if v.date >= best.date:
                best = v
        return best


def tree_problems(sf: SiteFile) -> list[str]:
    """Every whole-document problem, each naming the node or visit it concerns."""
    problems: list[str] = []
    by_id: dict[str, Any] = {}
    for i, n in enumerate(sf.nodes):
        if n.id in by_id:
            problems.append(f"nodes[{i}] ({n.id}): duplicate id {n.id!r}")
        else:
            by_id[n.id] = n
    origins = [n for n in sf.nodes if n.kind == "origin"]
    if len(origins) != 1:
        problems.append(f"nodes: need exactly one origin, found {len(origins)}")
    for i, n in enumerate(sf.nodes):
        if n.kind == "origin":
            if n.parent is not None:
                problems.append(f"nodes[{i}] ({n.id}): the origin cannot have a parent")
            continue
        if n.parent is None:
            problems.append(f"nodes[{i}] ({n.id}): parent is missing (only the origin has none)")
        elif n.parent not in by_id:
            problems.append(f"nodes[{i}] ({n.id}): unknown parent {n.parent!r}")
        elif n.parent == n.id:
            problems.append(f"nodes[{i}] ({n.id}): a node cannot be its own parent")
        else:
            parent_kind = by_id[n.parent].kind
            if n.kind not in ALLOWED_CHILDREN[parent_kind]:
                problems.append(
                    f"nodes[{i}] ({n.id}): a {n.kind} cannot be fed by a {parent_kind} ({n.parent})"
                )
    if not problems:
        problems.extend(_cycles(sf, by_id))
    seen_visits: set[str] = set()
    for vi, v in enumerate(sf.visits):
        if v.id in seen_visits:
            problems.append(f"visits[{vi}] ({v.id}): duplicate visit id")
        seen_visits.add(v.id)
        for dev in v.readings:
            node = by_id.get(dev)
            if node is None:
                problems.append(f"visits[{vi}].readings.{dev}: no node with id {dev!r}")
            elif node.kind not in RCD_KINDS:
                problems.append(
                    f"visits[{vi}].readings.{dev}: readings are for residual-current devices, "
                    f"not a {node.kind}"
                )
    return problems


def _cycles(sf: SiteFile, by_id: dict[str, Any]) -> list[str]:
    state: dict[str, int] = {}
    out: list[str] = []
    for n in sf.nodes:
        path: list[str] = []
        cur: str | None = n.id
        while cur is not None and state.get(cur, 0) == 0:
            state[cur] = 1
            path.append(cur)
            cur = by_id[cur].parent
        if cur is not None and state.get(cur) == 1:
            loop = path[path.index(cur) :] if cur in path else [cur]
            out.append(f"nodes ({cur}): cycle {' -> '.join(loop + [cur])}")
        for p in path:
            state[p] = 2
    return out
