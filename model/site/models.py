"""The site file: the site's details, the tree of nodes and the visits' readings.

This is the persisted form of a site file (format ``tripwise.site``, version 2).
Tree-wide rules (one origin, known parents, no cycles, readings only for
residual-current devices) are checked on the whole document in
:class:`SiteFile`.  The nodes are in :mod:`model.site.nodes`, the vocabulary in
:mod:`model.site.terms`.
"""

from __future__ import annotations

import datetime as dt
import re
from typing import Annotated, Any, Literal

from pydantic import (
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from model.site.nodes import ALLOWED_CHILDREN, Node
from model.site.ocpd import Measurement
from model.site.readings import Reading as Reading
from model.site.readings import WaveformResults as WaveformResults
from model.site.readings import blank as blank
from model.site.terms import (
    FORMAT_NAME,
    FORMAT_VERSION,
    OVERCURRENT_KINDS,
    RCD_KINDS,
    Earthing,
    NodeId,
    RuleSetName,
    StrictModel,
    choices_of,
    or_list,
)


class TrendSettings(StrictModel):
    """Thresholds for flagging a trip time that has grown since the previous visit.

    A growth is judged against the test's band: it is flagged when it is more
    than ``min_ms`` and either rises by more than ``limit_share_pct`` of the
    band's maximum time or brings the time into the top ``top_pct`` of the
    band.  Where the band has no maximum, or both band settings are empty,
    the relative rule applies: more than ``growth_pct`` and more than ``min_ms``.
    """

    growth_pct: Annotated[float, Field(gt=0, le=10_000)] = Field(
        default=50.0,
        description="Growth that is flagged where the band has no maximum time (or both "
        "band settings are empty). [%]",
    )
    min_ms: Annotated[float, Field(ge=0, le=10_000)] = Field(
        default=10.0, description="Smallest growth that is flagged. [ms]"
    )
    limit_share_pct: Annotated[float, Field(gt=0, le=100)] | None = Field(
        default=25.0,
        description="A rise by more than this share of the band's maximum time is flagged; "
        "empty: not used. [%]",
    )
    top_pct: Annotated[float, Field(gt=0, le=100)] | None = Field(
        default=20.0,
        description="A time that rises into this top part of the band (from its minimum, or "
        "0 ms, to its maximum) is flagged; empty: not used. [%]",
    )

    def band_rule(self) -> bool:
        """True when growth is judged against the band (either band setting is set)."""
        return self.limit_share_pct is not None or self.top_pct is not None


class SiteInfo(StrictModel):
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
        known = choices_of(RuleSetName)
        if isinstance(v, str) and v not in known:
            raise ValueError(f"unknown rule set {v!r}; choose {or_list(map(repr, known))}")
        return v


_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


class Visit(StrictModel):
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
    measurements: dict[NodeId, Measurement] = Field(
        default_factory=dict,
        description="Measured Zs by circuit id and prospective fault current by board or "
        "origin id; the latest visit's value wins over the node's.",
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


class SiteFile(StrictModel):
    """A whole site file."""

    format: Literal["tripwise.site"] = Field(description="Always 'tripwise.site'.")
    version: Literal[2] = Field(description="Format version.")
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
        problems.extend(_measurement_problems(vi, v, by_id))
    problems.extend(_maker_problems(sf, by_id))
    return problems


def _measurement_problems(vi: int, v: Visit, by_id: dict[str, Any]) -> list[str]:
    out: list[str] = []
    for nid, m in v.measurements.items():
        where = f"visits[{vi}].measurements.{nid}"
        node = by_id.get(nid)
        if node is None:
            out.append(f"{where}: no node with id {nid!r}")
            continue
        if m.zs_ohm is not None and node.kind != "circuit":
            out.append(f"{where}: zs_ohm is measured at a circuit, not a {node.kind}")
        if m.pscc_ka is not None and node.kind not in ("board", "origin"):
            out.append(f"{where}: pscc_ka is measured at a board or the origin, not a {node.kind}")
    return out


def _maker_problems(sf: SiteFile, by_id: dict[str, Any]) -> list[str]:
    """Makers' selectivity and back-up rows must name an overcurrent device above."""
    out: list[str] = []
    for i, n in enumerate(sf.nodes):
        rows = [("maker_selectivity", r.upstream) for r in getattr(n, "maker_selectivity", ())] + [
            ("maker_backup", r.upstream) for r in getattr(n, "maker_backup", ())
        ]
        for field_name, up in rows:
            above: set[str] = set()
            cur = n.parent
            while cur is not None and cur in by_id and cur not in above:
                above.add(cur)
                cur = by_id[cur].parent
            if up not in above or by_id[up].kind not in OVERCURRENT_KINDS:
                out.append(
                    f"nodes[{i}] ({n.id}).{field_name}: {up!r} is not an overcurrent device "
                    "upstream of this one"
                )
    return out


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


def site_to_dict(site: SiteFile) -> dict[str, Any]:
    """The JSON form of a site, defaults left out, keys in file order.

    What a site file holds before it becomes text: the site file
    (:mod:`model.storage.codec`) and the edits of the recovery journal
    (:mod:`model.site.ops`) both write a site in this form.
    """
    d = site.model_dump(mode="json", exclude_defaults=True)
    d["format"] = FORMAT_NAME
    d["version"] = FORMAT_VERSION
    return {k: d[k] for k in ("format", "version", "site", "nodes", "visits") if k in d}
