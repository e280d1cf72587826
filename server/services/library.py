"""The material library in the database: built-in rows from the data file, plus a firm's own."""

from __future__ import annotations

from sqlalchemy import bindparam, or_, select
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import Material
from server.services.catalog import Catalog, MaterialSpec, builtin_catalog
from server.services.material_data import load_builtin_materials
from server.services.slugs import unique_slug

_FIELDS = (
    "name",
    "category",
    "kind",
    "conductivity_w_mk",
    "r_si",
    "thickness_mm",
    "density_kg_m3",
    "vapour_mu",
    "vapour_sd_m",
    "source_kind",
    "source",
)


def sync_builtin_materials(*, session: Session) -> int:
    """Insert or update the built-in rows (organization NULL) from the data file."""
    existing = {
        m.slug: m
        for m in session.scalars(select(Material).where(Material.organization_id.is_(None)))
    }
    count = 0
    for row in load_builtin_materials():
        material = existing.get(row.slug) or Material(slug=row.slug, organization_id=None)
        for name in _FIELDS:
            setattr(material, name, getattr(row, name))
        session.add(material)
        count += 1
    return count


def list_materials(*, session: Session, organization_id: int) -> list[Material]:
    """Built-in materials and the firm's own, the firm's first."""
    query = (
        select(Material)
        .where(or_(Material.organization_id.is_(None), Material.organization_id == organization_id))
        .order_by(Material.organization_id.is_(None), Material.category, Material.name)
    )
    return list(session.scalars(query))


def add_material(
    *,
    session: Session,
    organization_id: int,
    name: str,
    category: str,
    conductivity_w_mk: float | None,
    r_si: float | None,
    source: str,
    source_kind: str = "firm's own",
) -> Material:
    """Add one of the firm's own materials (a conductivity or a fixed R, never both)."""
    name = name.strip()
    if not name:
        raise InputError("name", "give the material a name")
    if (conductivity_w_mk is None) == (r_si is None):
        raise InputError("conductivity", "give either a conductivity or a fixed R, not both")
    if conductivity_w_mk is not None and not conductivity_w_mk > 0:
        raise InputError("conductivity", "must be greater than zero")
    if r_si is not None and not r_si > 0:
        raise InputError("r", "must be greater than zero")
    if not source.strip():
        raise InputError("source", "say where the value comes from (a data sheet, a handbook...)")
    taken = set(
        session.scalars(
            select(Material.slug).where(
                or_(Material.organization_id.is_(None), Material.organization_id == organization_id)
            )
        )
    )
    slug = unique_slug(name, taken, fallback="material", max_length=70)
    material = Material(
        organization_id=organization_id,
        slug=slug,
        name=name,
        category=category or "other",
        kind="conductivity" if conductivity_w_mk is not None else "fixed_r",
        conductivity_w_mk=conductivity_w_mk,
        r_si=r_si,
        source_kind=source_kind,
        source=source.strip(),
    )
    session.add(material)
    session.flush()
    return material


_ORGANIZATION_MATERIALS = select(Material).where(
    Material.organization_id == bindparam("organization_id")
)


def catalog_for(*, session: Session, organization_id: int) -> Catalog:
    """Built-in catalog merged with the firm's own materials (firm's win on a slug clash)."""
    own = session.scalars(_ORGANIZATION_MATERIALS, {"organization_id": organization_id}).all()
    if not own:
        return builtin_catalog()
    merged = dict(builtin_catalog())
    for m in own:
        merged[m.slug] = MaterialSpec(
            slug=m.slug,
            name=m.name,
            kind=m.kind,
            conductivity_w_mk=m.conductivity_w_mk,
            r_si=m.r_si,
            vapour_mu=m.vapour_mu,
            vapour_sd_m=m.vapour_sd_m,
            source=m.source,
        )
    return merged
