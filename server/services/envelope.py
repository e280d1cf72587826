"""The House page's envelope table: each surface as calc/house figures it.

The rows of :func:`server.services.houses.surface_rows` (each assembly's R, U and code verdict)
are joined with the as-found figures of :func:`server.services.comparison.compute_house` on the
house's own document (:func:`server.services.house_document.house_document`), so what lies
behind a surface, its b (ISO 13789), its ground U (ISO 13370) and its UA are the calculation's
own figures, never a second formula. Upgrades and packages are left out of that run: the
envelope is the house as found, and a broken upgrade must not hide it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from server.documents.house import HouseFigures, HouseResult, SpaceFigures, SurfaceFigures
from server.errors import InputError
from server.models import House, Surface
from server.services import houses as svc
from server.services.catalog import Catalog
from server.services.comparison import compute_house
from server.services.house_document import house_document

GROUND_KINDS = ("slab", "basement_floor", "basement_wall")


@dataclass
class AsFound:
    """The house's as-found figures by surface slug, or why they could not be computed."""

    figures: HouseFigures | None
    error: str | None = None
    by_id: dict[str, SurfaceFigures] = field(default_factory=dict)
    spaces: dict[str, SpaceFigures] = field(default_factory=dict)


def as_found_of(figures: HouseFigures) -> AsFound:
    """The as-found figures of a computed house, by surface and space id."""
    return AsFound(
        figures,
        None,
        {s.id: s for s in figures.surfaces},
        {s.id: s for s in figures.spaces},
    )


def as_found_run(house: House, catalog: Catalog) -> tuple[HouseResult | None, AsFound]:
    """compute_house of the house's document with no upgrades or packages: the whole result
    (None when it fails) and its as-found figures (or why they could not be computed)."""
    try:
        doc = house_document(house)
        doc = doc.model_copy(update={"upgrades": [], "packages": []})
        result = compute_house(doc, catalog=catalog, upgrades_alone=False)
    except InputError as exc:
        return None, AsFound(None, f"{exc.field}: {exc.message}")
    except ValueError as exc:
        return None, AsFound(None, str(exc))
    return result, as_found_of(result.as_found)


def as_found(house: House, catalog: Catalog) -> AsFound:
    """compute_house of the house's document with no upgrades or packages."""
    return as_found_run(house, catalog)[1]


def is_ground(surface: Surface) -> bool:
    """A slab, basement floor or wall with ground inputs: its U is ISO 13370's."""
    return surface.kind in GROUND_KINDS and bool((surface.details or {}).get("ground"))


def behind_label(house: House, surface: Surface) -> str:
    """What lies behind the surface, in words: Outdoors, Ground or the space's label."""
    if is_ground(surface):
        return "Ground"
    behind = (surface.details or {}).get("adjacent") or "outdoors"
    if behind == "outdoors":
        return "Outdoors"
    if behind == "ground":
        return "Ground"
    for space in house.spaces or []:
        if isinstance(space, dict) and space.get("id") == behind:
            return str(space.get("label") or behind)
    return str(behind)


@dataclass
class EnvelopeRow:
    """One row of the envelope table; ``figures`` is calc/house's SurfaceFigures (or None)."""

    surface: Surface
    result: Any
    ua: float | None
    share: float | None
    error: str | None
    code: Any
    behind: str
    figures: SurfaceFigures | None
    facing_space: bool
    ground: bool

    @property
    def u(self) -> float | None:
        """U as calc/house uses it (still-air films toward a space); None for ground rows."""
        if self.ground:
            return None
        if self.figures is not None:
            return self.figures.u
        return None if self.result is None else float(self.result.u_factor)

    @property
    def b(self) -> float | None:
        return self.figures.b if self.figures is not None and self.facing_space else None

    @property
    def ground_u(self) -> float | None:
        return self.figures.u if self.figures is not None and self.ground else None


def envelope_rows(
    house: House, catalog: Catalog, targets: Any = None, *, found: AsFound | None = None
) -> tuple[list[EnvelopeRow], float, AsFound]:
    """The envelope table's rows, the envelope UA and the as-found run behind them (``found``
    when the caller already computed the house, else computed here).

    UA and share come from calc/house (b·U·A; ground U × area) when the house computes; else
    from each assembly alone, as before, with :attr:`AsFound.error` saying why.
    """
    base, _ = svc.surface_rows(house, catalog, targets)
    if found is None:
        found = as_found(house, catalog)
    rows: list[EnvelopeRow] = []
    for row in base:
        surface = row.surface
        figures = found.by_id.get(surface.slug) if found.figures is not None else None
        behind = (surface.details or {}).get("adjacent")
        facing = bool(behind) and behind in found.spaces
        ua = row.ua if figures is None else figures.ua
        rows.append(
            EnvelopeRow(surface, row.result, ua, None, row.error, row.code,
                        behind_label(house, surface), figures, facing, is_ground(surface))
        )  # fmt: skip
    total = sum(r.ua or 0.0 for r in rows)
    for r in rows:
        if r.ua is not None and total > 0:
            r.share = r.ua / total
    return rows, total, found
