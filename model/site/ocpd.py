"""Overcurrent data of the site file: device ratings, makers' data, fault levels.

Every field here is optional (format version 2), so a version 1 file means
exactly what it meant.  Makers' catalogue curves are never built in: the user
types the points or limits from the maker's data, and the checks use them in
place of the standard's band.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, StringConstraints, field_validator

from model.site.terms import NodeId, StrictModel

#: Fuse families: ``gG`` is any gG link to IEC 60269-1 (BS 88-2, BS 88-3, NH, D ...);
#: ``bs3036`` semi-enclosed (rewirable); ``bs1361`` cartridge; ``other`` anything else.
FuseType = Literal["gG", "bs3036", "bs1361", "other"]

KiloAmps = Annotated[float, Field(gt=0, le=500)]
Amps = Annotated[float, Field(gt=0, le=1_000_000)]
Source = Annotated[str, StringConstraints(max_length=300)]


class CurvePoint(StrictModel):
    """One point of a maker's time-current band: at ``i_a`` the device operates
    no sooner than ``min_s`` and no later than ``max_s``."""

    i_a: Amps = Field(description="Current. [A]")
    min_s: Annotated[float, Field(gt=0, le=100_000)] = Field(
        description="Shortest operating (or pre-arcing) time at this current. [s]"
    )
    max_s: Annotated[float, Field(gt=0, le=100_000)] = Field(
        description="Longest operating (clearing) time at this current. [s]"
    )


class SelectivityLimit(StrictModel):
    """A row of the maker's selectivity table: this device under ``upstream`` is
    selective up to ``limit_a``."""

    upstream: NodeId = Field(description="Id of the upstream overcurrent device.")
    limit_a: Amps = Field(description="Selectivity limit current from the maker's table. [A]")
    source: Source = Field(default="", description="Where the value comes from (table, edition).")


class BackupLimit(StrictModel):
    """A tested back-up combination: this device, protected by ``upstream``, may
    be installed where the prospective fault current is up to ``up_to_ka``."""

    upstream: NodeId = Field(description="Id of the upstream device giving back-up protection.")
    up_to_ka: KiloAmps = Field(description="Fault level the combination is rated for. [kA]")
    source: Source = Field(default="", description="Where the value comes from (table, edition).")


class OvercurrentData(StrictModel):
    """Optional maker's and table data of any overcurrent device (fuse, mcb, rcbo, cbr)."""

    breaking_ka: KiloAmps | None = Field(
        default=None, description="Rated breaking capacity (Icn of a breaker, Icu of a cbr). [kA]"
    )
    maker_curve: list[CurvePoint] = Field(
        default_factory=list,
        description="Maker's time-current band, points in rising current; overrides the "
        "standard band.",
    )
    maker_selectivity: list[SelectivityLimit] = Field(
        default_factory=list, description="Maker's selectivity limits under upstream devices."
    )
    maker_backup: list[BackupLimit] = Field(
        default_factory=list, description="Maker's tested back-up combinations."
    )
    ia_a: Amps | None = Field(
        default=None,
        description="Current that operates the device within the required disconnection "
        "time, from the maker or the wiring rules' table. [A]",
    )
    zs_max_ohm: Annotated[float, Field(gt=0, le=100_000)] | None = Field(
        default=None,
        description="Maximum Zs from the wiring rules' table or the maker, at operating "
        "temperature. [Ω]",
    )

    @field_validator("maker_curve")
    @classmethod
    def _curve_rises(cls, v: list[CurvePoint]) -> list[CurvePoint]:
        for i, p in enumerate(v):
            if p.min_s > p.max_s:
                raise ValueError(
                    f"point {i + 1} ({p.i_a:g} A): min_s {p.min_s:g} s is longer than "
                    f"max_s {p.max_s:g} s"
                )
            if i and p.i_a <= v[i - 1].i_a:
                raise ValueError(
                    f"point {i + 1}: currents must rise ({p.i_a:g} A after {v[i - 1].i_a:g} A)"
                )
            if i and (p.min_s > v[i - 1].min_s or p.max_s > v[i - 1].max_s):
                raise ValueError(
                    f"point {i + 1} ({p.i_a:g} A): a higher current cannot take longer"
                )
        if len(v) == 1:
            raise ValueError("give at least two points")
        return v


class FaultLevel(StrictModel):
    """The prospective fault current where a board or the origin is."""

    pscc_ka: KiloAmps | None = Field(
        default=None,
        description="Prospective fault current measured or declared here (the larger of "
        "the short-circuit and earth-fault values). [kA]",
    )


class Measurement(StrictModel):
    """Values measured on a visit at a circuit (Zs) or at a board or the origin (PSCC)."""

    zs_ohm: Annotated[float, Field(strict=True, gt=0, le=100_000)] | None = Field(
        default=None, description="Measured earth fault loop impedance, at a circuit. [Ω]"
    )
    pscc_ka: Annotated[float, Field(strict=True, gt=0, le=500)] | None = Field(
        default=None, description="Measured prospective fault current, at a board or origin. [kA]"
    )
    warm: bool = Field(
        default=False,
        description="Measured with the conductors at operating temperature (else taken cold).",
    )
    note: Annotated[str, StringConstraints(max_length=2000)] = Field(default="", description="")
