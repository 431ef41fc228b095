"""How model values are shown on screen: severity marks, kind and node titles, the caution."""

from __future__ import annotations

from typing import Any

from model.plan.changes import PLAN_CAUTION
from model.rules.findings import CAUTION
from model.site.terms import RCD_KINDS

#: Our marks for the worst severity on a node (glyph, style: resolve with ``tui.themes.tone``).
SEVERITY_MARK: dict[str, tuple[str, str]] = {
    "urgent": ("◆", "bold $tw-urgent"),
    "required": ("▲", "bold $tw-required"),
    "advisory": ("●", "$tw-advisory"),
    "investigate": ("◇", "$tw-investigate"),
}
NO_MARK = ("·", "$tw-none")

#: Each kind of node as offered to the inspector (when adding a node, in form titles).
KIND_TITLES: dict[str, str] = {
    "origin": "origin (the supply)",
    "board": "board / consumer unit",
    "switch": "switch / isolator",
    "fuse": "fuse",
    "mcb": "MCB (overcurrent only)",
    "rccb": "RCCB (residual current only)",
    "rcbo": "RCBO (residual + overcurrent)",
    "srcd": "socket-outlet RCD",
    "prcd": "portable RCD",
    "cbr": "CBR (breaker + RC relay)",
    "rcm": "RCM (monitor, no protection)",
    "circuit": "circuit / equipment",
}

#: The letter that picks each kind in the add menu (one each, none shared).
KIND_KEYS: dict[str, str] = {
    "board": "b",
    "switch": "w",
    "fuse": "f",
    "mcb": "m",
    "rccb": "r",
    "rcbo": "o",
    "srcd": "s",
    "prcd": "p",
    "cbr": "k",
    "rcm": "n",
    "circuit": "c",
}

#: The caution in a form that fits an 80-column line; it keeps "not a certificate".
CAUTION_SHORT = "Supports, never replaces, your judgement and local rules. Not a certificate."
CAUTION_TINY = "Aid to judgement only; follow local rules. Not a certificate."

LIVE_TEST_CAUTION = (
    "Live test: warn occupants, keep clear of exposed metalwork; competent persons only."
)


#: The plan caution (``model.plan.changes.PLAN_CAUTION``) where the full text would take
#: too many lines: it keeps every duty of the full one.
PLAN_CAUTION_SHORT = (
    "A plan supports, never replaces, a competent person's design to local rules: check "
    "each change, isolate and prove dead, test every changed device after installation."
)
#: Screen width from which the full plan caution is shown.
FULL_PLAN_CAUTION_WIDTH = 120


def plan_caution_for_width(width: int) -> str:
    """The full plan caution on a wide screen, its short form on a narrow one."""
    return PLAN_CAUTION if width >= FULL_PLAN_CAUTION_WIDTH else PLAN_CAUTION_SHORT


def caution_for_width(width: int) -> str:
    """The longest form of the caution that fits ``width`` cells."""
    for text in (CAUTION, CAUTION_SHORT, CAUTION_TINY):
        if len(text) <= width:
            return text
    return CAUTION_TINY


def _num(v: float) -> str:
    return f"{v:g}"


def node_summary(node: Any) -> str:
    """The key rating of a node, e.g. '30 mA A general', '100 mA AC S', '32 A sockets'."""
    kind = node.kind
    if kind == "origin":
        return "supply"
    if kind == "board":
        return str(node.place or "board")
    if kind in RCD_KINDS:
        delay = node.delay
        if delay == "set":
            delay = f"set {_num(node.delay_ms)} ms" if node.delay_ms is not None else "set"
        text = f"{_num(node.idn_ma)} mA {node.waveform} {delay}"
        if kind == "rcbo" and node.rated_a is not None:
            text += f" · {node.curve or ''}{_num(node.rated_a)} A"
        return text
    if kind == "rcm":
        return f"{_num(node.idn_ma)} mA {node.waveform} monitor"
    if kind == "circuit":
        rated = f"{_num(node.rated_a)} A " if node.rated_a is not None else ""
        return f"{rated}{node.use}"
    if kind == "mcb":
        return f"{node.curve or ''}{_num(node.rated_a)} A"
    if kind in ("fuse", "switch"):
        return f"{_num(node.rated_a)} A" if node.rated_a is not None else kind
    return str(kind)


def node_title(node: Any) -> str:
    """The label, or the id where there is none."""
    return str(node.label) if node.label else str(node.id)
