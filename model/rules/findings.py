"""What the checks produce: findings, pair analyses, and the whole analysis.

Severity levels (our own four, worst first):

``urgent``
    Danger is likely now: a device that did not trip, a TT circuit with no
    residual-current protection.  Make safe before leaving site.
``required``
    Does not meet the rule it names; remedial work is needed.
``advisory``
    Works, but falls short of good practice or rests on guidance rather than a
    rule (selectivity, DC blinding, resilience).  Recommend improvement.
``investigate``
    The data cannot settle it: a missing reading, an oddly sensitive device, a
    trend.  Look further before deciding.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field, fields
from typing import Any, Literal

from model.site.terms import choices_of
from model.site.tree import SiteIndex

Severity = Literal["urgent", "required", "advisory", "investigate"]
SEVERITIES: tuple[Severity, ...] = choices_of(Severity)
SEVERITY_RANK: dict[str, int] = {s: i for i, s in enumerate(SEVERITIES)}

#: Shown with every conclusion the tool prints, in every output.
CAUTION = (
    "These results support, and do not replace, the judgement of a competent person "
    "working to the local wiring rules and licensed practice. This is not a certificate."
)


@dataclass(slots=True, unsafe_hash=True)
class Finding:
    """One thing the checks found, with the source it rests on.

    Treat as read-only (not frozen only because frozen construction is slow at
    scale: a large site has thousands of findings); ``dataclasses.replace``
    makes a changed copy.
    """

    rule: str
    severity: Severity
    nodes: tuple[str, ...]
    board: str
    message: str
    action: str
    source: str
    basis: str = "standard"
    measured: str | None = None
    band: str | None = None
    visit: str | None = None

    def as_json(self) -> dict[str, Any]:
        # A plain dict of the fields (dataclasses.asdict deep-copies every value:
        # several times slower on a large site, for the same result).
        d = {name: getattr(self, name) for name in _FINDING_FIELDS}
        d["nodes"] = list(self.nodes)
        return d

    def sort_key(self) -> tuple[int, str, str, tuple[str, ...]]:
        return (SEVERITY_RANK[self.severity], self.board, self.rule, self.nodes)


_FINDING_FIELDS: tuple[str, ...] = tuple(f.name for f in fields(Finding))


@dataclass(slots=True, unsafe_hash=True)
class CurrentRange:
    """An open range of residual current (lo_ma, hi_ma) where selectivity is not guaranteed."""

    lo_ma: float
    hi_ma: float

    def as_json(self) -> dict[str, Any]:
        return {"lo_ma": self.lo_ma, "hi_ma": self.hi_ma}

    def text(self) -> str:
        return f"{fmt_ma(self.lo_ma)} to {fmt_ma(self.hi_ma)}"


@dataclass(slots=True, unsafe_hash=True)
class MeasuredMargin:
    """Selectivity judged from readings taken on site (an estimate from measurements).

    Treat as read-only, like :class:`Finding`.
    """

    selective: bool | None
    down_slowest_ms: float | None
    up_fastest_ms: float | None
    margin_ms: float | None
    explanation: str

    def as_json(self) -> dict[str, Any]:
        return asdict(self)


@dataclass(slots=True, unsafe_hash=True)
class PairAnalysis:
    """A series pair of residual-current devices (upstream above downstream).

    Treat as read-only, like :class:`Finding` (one per pair: thousands on a large site).
    """

    up: str
    down: str
    ratio: float
    up_delayed: bool
    rule_ok: bool
    rule_notes: tuple[str, ...]
    i_max_ma: float
    ranges: tuple[CurrentRange, ...]
    measured: MeasuredMargin | None
    verdict: Literal["selective", "selective-in-practice", "not-guaranteed", "not-selective"]
    explanation: str
    #: What would close the gap, fitted to the pair ('' where the pair is selective).
    action: str = ""

    def as_json(self) -> dict[str, Any]:
        return {
            "up": self.up,
            "down": self.down,
            "ratio": self.ratio,
            "up_delayed": self.up_delayed,
            "rule_ok": self.rule_ok,
            "rule_notes": list(self.rule_notes),
            "i_max_ma": self.i_max_ma,
            "ranges": [r.as_json() for r in self.ranges],
            "measured": None if self.measured is None else self.measured.as_json(),
            "verdict": self.verdict,
            "explanation": self.explanation,
            "action": self.action,
        }


@dataclass
class Analysis:
    """Everything the checks say about one site."""

    rules: str
    findings: list[Finding] = field(default_factory=list)
    pairs: list[PairAnalysis] = field(default_factory=list)
    caution: str = CAUTION
    #: Series pairs of overcurrent devices (``model.rules.overcurrent.pairs.OcPair``).
    oc_pairs: list[Any] = field(default_factory=list)
    #: The rest of the overcurrent analysis (``checks.overcurrent.OcAnalysis``).
    oc: Any = field(default=None, repr=False, compare=False)
    #: The tree index the checks read (reused by reports instead of building another).
    index: SiteIndex | None = field(default=None, repr=False, compare=False)

    def worst_by_node(self) -> dict[str, Severity]:
        """The worst severity of the findings that name each node."""
        out: dict[str, Severity] = {}
        for f in self.findings:
            for n in f.nodes:
                cur = out.get(n)
                if cur is None or SEVERITY_RANK[f.severity] < SEVERITY_RANK[cur]:
                    out[n] = f.severity
        return out

    def counts(self) -> dict[str, int]:
        c: dict[str, int] = {s: 0 for s in SEVERITIES}
        for f in self.findings:
            c[f.severity] += 1
        return c

    def pair(self, up: str, down: str) -> PairAnalysis | None:
        for p in self.pairs:
            if p.up == up and p.down == down:
                return p
        return None

    def as_json(self) -> dict[str, Any]:
        return {
            "rules": self.rules,
            "caution": self.caution,
            "counts": self.counts(),
            "findings": [f.as_json() for f in self.findings],
            "pairs": [p.as_json() for p in self.pairs],
            "oc_pairs": [p.as_json() for p in self.oc_pairs],
        }


def fmt_ma(value_ma: float) -> str:
    """A computed current for people, one format everywhere (charts, documents, app, CLI).

    Up to 1 A in mA, from 1 A in A; three significant figures below 100 of
    the unit, whole numbers from 100 up; never an exponent:
    6 mA, 10.5 mA, 150 mA, 1 A, 1.5 A, 22.5 A, 1095 A, 10950 A.
    A recorded value is printed as recorded, not through this.
    """
    if not math.isfinite(value_ma):
        return "—"
    value, unit = (value_ma / 1000.0, "A") if value_ma >= 999.5 else (value_ma, "mA")
    if abs(value) >= 99.95:
        text = str(round(value))
    else:
        text = f"{value:.3g}"
        if "e" in text:  # below 0.001 of the unit: plain decimals, no exponent
            text = f"{value:.6f}".rstrip("0").rstrip(".") or "0"
    return f"{text} {unit}"


def fmt_ratio(ratio: float) -> str:
    """An IΔn ratio for people, rounded down to 3 figures: '2.99:1', never '3:1' below 3.

    Rounding down keeps a ratio that fails a limit from printing as one that
    meets it (2.996 is '2.99:1').
    """
    if ratio <= 0 or not math.isfinite(ratio):
        return f"{ratio:g}:1"
    step = 10.0 ** (math.floor(math.log10(ratio)) - 2)
    floored = (
        math.floor(ratio / step * (1 + 1e-9)) * step
    )  # as close to a limit as the check reads it
    return f"{float(f'{floored:.3g}'):g}:1"


def device_text(node: Any) -> str:
    """A residual-current device's rating for people: '30 mA, Type A, general'."""
    delay = {"general": "general", "S": "type S", "set": "set delay"}[str(node.delay)]
    if str(node.delay) == "set" and getattr(node, "delay_ms", None) is not None:
        delay += f" {node.delay_ms:g} ms"
    return f"{node.idn_ma:g} mA, Type {node.waveform}, {delay}"
