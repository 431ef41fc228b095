"""The nodes of the protection tree: supply, boards, devices and circuits.

Every node is plain data validated by pydantic v2: unknown fields are refused,
measured values are strict numbers (a quoted ``"30"`` is not 30 mA), and
choices are literals.
"""

from __future__ import annotations

from typing import Annotated, ClassVar, Literal

from pydantic import (
    AfterValidator,
    BaseModel,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from model.site.ocpd import FaultLevel, FuseType, KiloAmps, OvercurrentData
from model.site.terms import (
    CircuitUse,
    Curve,
    Delay,
    LoadFlag,
    LocationFlag,
    NodeId,
    StrictModel,
    Waveform,
    finite,
)

WAY_MAX = 12


def _way_ok(v: str) -> str:
    if any(ord(c) < 32 or ord(c) == 127 for c in v):
        raise ValueError("a way is one line of text, without tabs or line breaks")
    if v != v.strip():
        raise ValueError("a way does not begin or end with a space")
    return v


#: The way of a board a device sits in or a circuit leaves from, as the inspector
#: numbers it: short text such as '3', '12' or 'L1-4'; empty when not given.
Way = Annotated[str, StringConstraints(max_length=WAY_MAX), AfterValidator(_way_ok)]


def _way() -> str:
    return Field(
        default="",
        description=f"The board's way it is in, as numbered on site (e.g. '3', 'L1-4'); "
        f"up to {WAY_MAX} characters, empty when not given.",
    )


_SettingA = Annotated[float, Field(gt=0, le=1_000_000)]


class _NodeBase(StrictModel):
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


class OriginNode(FaultLevel, _NodeBase):
    """The supply: the point where the installation begins."""

    kind: Literal["origin"]


class BoardNode(FaultLevel, _NodeBase):
    """A distribution board or consumer unit: a place that groups devices."""

    kind: Literal["board"]
    place: Annotated[str, StringConstraints(max_length=200)] = Field(
        default="", description="Where the board is (e.g. 'garage, left of door')."
    )
    conditional_ka: KiloAmps | None = Field(
        default=None,
        description="The assembly's conditional short-circuit rating with its maker's "
        "devices (BS EN 61439-3 Annex ZB). [kA]",
    )


class SwitchNode(_NodeBase):
    """An isolator or main switch with no protective function."""

    kind: Literal["switch"]
    way: Way = _way()
    rated_a: Annotated[float, Field(gt=0, le=6300)] | None = Field(
        default=None, description="Rated current. [A]"
    )


class FuseNode(OvercurrentData, _NodeBase):
    """A fuse (including the supply cut-out fuse)."""

    kind: Literal["fuse"]
    way: Way = _way()
    fuse_type: FuseType | None = Field(
        default=None,
        description="gG (any gG link to IEC 60269-1: BS 88-2, BS 88-3, NH, D), bs3036 "
        "(semi-enclosed), bs1361 or other.",
    )
    rated_a: Annotated[float, Field(gt=0, le=6300)] = Field(description="Rated current. [A]")


class McbNode(OvercurrentData, _NodeBase):
    """A circuit-breaker giving overcurrent protection only."""

    kind: Literal["mcb"]
    way: Way = _way()
    rated_a: Annotated[float, Field(gt=0, le=6300)] = Field(description="Rated current. [A]")
    curve: Curve | None = Field(default=None, description="Tripping curve.")


class _ResidualBase(_NodeBase):
    idn_ma: Annotated[float, Field(description="Rated residual operating current IΔn. [mA]")]
    waveform: Waveform = Field(description="Waveform type (IEC 60755 / IEC 62423): AC, A, F or B.")

    @field_validator("idn_ma")
    @classmethod
    def _idn_sane(cls, v: float) -> float:
        finite(v, "idn_ma")
        if 0 < v < 1:
            raise ValueError(
                f"idn_ma {v} looks like amps; give the rating in mA (e.g. 30 for a 30 mA device)"
            )
        if not 6 <= v <= 30_000:
            raise ValueError(f"idn_ma {v} is outside 6 to 30000 mA")
        return v


class _RcdBase(_ResidualBase):
    #: The choices this kind allows where it allows fewer than its field's type
    #: (a form offers only these): a set delay is declared only on a cbr.
    CHOICE_LIMITS: ClassVar[dict[str, tuple[str, ...]]] = {"delay": ("general", "S")}

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
        if self.delay not in self.CHOICE_LIMITS.get("delay", (self.delay,)):
            raise ValueError("delay 'set' is only for a cbr with a declared setting")
        return self

    kind: str


class RccbNode(_RcdBase):
    """Residual-current circuit-breaker without overcurrent protection (IEC 61008-1)."""

    kind: Literal["rccb"]
    way: Way = _way()


class RcboNode(OvercurrentData, _RcdBase):
    """Residual-current circuit-breaker with overcurrent protection (IEC 61009-1)."""

    kind: Literal["rcbo"]
    way: Way = _way()
    curve: Curve | None = Field(default=None, description="Tripping curve.")


class SrcdNode(_RcdBase):
    """Socket-outlet incorporating an RCD."""

    kind: Literal["srcd"]


class PrcdNode(_RcdBase):
    """Portable RCD (plug-in or in-line)."""

    kind: Literal["prcd"]


class CbrNode(OvercurrentData, _RcdBase):
    """Industrial breaker with residual-current relay (IEC 60947-2 Annex B / M)."""

    kind: Literal["cbr"]
    CHOICE_LIMITS: ClassVar[dict[str, tuple[str, ...]]] = {}
    way: Way = _way()
    ir_a: _SettingA | None = Field(default=None, description="Long-time current setting Ir. [A]")
    isd_a: _SettingA | None = Field(
        default=None, description="Short-time pick-up current setting Isd. [A]"
    )
    tsd_s: Annotated[float, Field(gt=0, le=10)] | None = Field(
        default=None, description="Short-time delay setting tsd. [s]"
    )
    ii_a: _SettingA | None = Field(
        default=None, description="Instantaneous pick-up current setting Ii. [A]"
    )
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
        for name in ("isd_a", "ii_a"):
            value = getattr(self, name)
            if value is not None and self.ir_a is not None and value < self.ir_a:
                raise ValueError(f"{name} {value:g} A is below the setting ir_a {self.ir_a:g} A")
        if self.tsd_s is not None and self.isd_a is None:
            raise ValueError("tsd_s applies only with a short-time pick-up isd_a")
        return self


class RcmNode(_ResidualBase):
    """Residual-current monitor: warns only, never disconnects; gives no protection."""

    kind: Literal["rcm"]
    way: Way = _way()


class CircuitNode(_NodeBase):
    """A final circuit, or an item of equipment fed by one."""

    kind: Literal["circuit"]
    way: Way = _way()
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
