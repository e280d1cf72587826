"""Material catalogs: the built-in library plus a firm's own materials, keyed by slug."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache


@dataclass(frozen=True, slots=True)
class MaterialSpec:
    """What the calculators need to know of a library material (SI)."""

    slug: str
    name: str
    kind: str  # "conductivity" | "fixed_r"
    conductivity_w_mk: float | None
    r_si: float | None
    vapour_mu: float | None = None
    vapour_sd_m: float | None = None
    source: str = ""


Catalog = Mapping[str, MaterialSpec]


@lru_cache
def builtin_catalog() -> dict[str, MaterialSpec]:
    """The built-in library from server/data/materials.csv (read once per process)."""
    from server.services.material_data import load_builtin_materials

    return {
        row.slug: MaterialSpec(
            slug=row.slug,
            name=row.name,
            kind=row.kind,
            conductivity_w_mk=row.conductivity_w_mk,
            r_si=row.r_si,
            vapour_mu=row.vapour_mu,
            vapour_sd_m=row.vapour_sd_m,
            source=row.source,
        )
        for row in load_builtin_materials()
    }
