"""What loses supply when a device trips."""

from __future__ import annotations

from dataclasses import dataclass

from model.site.models import SiteFile
from model.site.tree import SiteIndex


@dataclass(frozen=True)
class TripImpact:
    """The effect of one device opening."""

    device: str
    lost: tuple[str, ...]
    lighting_lost: tuple[str, ...]
    lighting_kept: tuple[str, ...]

    @property
    def all_lighting_lost(self) -> bool:
        return bool(self.lighting_lost) and not self.lighting_kept


def trip_impact(site: SiteFile | SiteIndex, device: str) -> TripImpact:
    """Every circuit below ``device`` (in tree order), and which lighting circuits stay on."""
    idx = site if isinstance(site, SiteIndex) else SiteIndex.build(site)
    if device not in idx.by_id:
        raise KeyError(device)
    below = set(idx.descendants(device))
    lost = tuple(c for c in idx.circuits() if c in below)
    lights = [c for c in idx.circuits() if idx.by_id[c].use == "lighting"]
    return TripImpact(
        device=device,
        lost=lost,
        lighting_lost=tuple(c for c in lights if c in below),
        lighting_kept=tuple(c for c in lights if c not in below),
    )
