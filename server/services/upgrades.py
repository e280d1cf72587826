"""Candidate upgrades and packages of a saved house (organization-scoped through the house)."""

from __future__ import annotations

import copy
from typing import Any

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.assembly import AssemblyResult
from server.documents.house import CostIn
from server.errors import InputError
from server.models import House, Package, Surface, Upgrade
from server.services import upgrade_forms as forms
from server.services.catalog import Catalog
from server.services.houses import NotFound, check_version, checked_assembly, touch
from server.services.slugs import unique_slug
from server.services.typical import typical_assemblies

#: what an upgrade of each kind (``upgrades.kind``) is priced per besides its fixed part, as
#: server.documents.house.UpgradeIn takes it; air and duct sealing are priced fixed only
PRICED_PER: dict[str, str] = {
    "assembly": "area",
    "window": "area",
    "duct_insulation": "area",
    "pipe_insulation": "length",
}
#: the kinds whose document may hold an assembly (edited in the layer editor)
ASSEMBLY_KINDS = ("assembly", "window")


def edits_assembly(upgrade: Upgrade) -> bool:
    """Whether the upgrade has an assembly for the layer editor (not an r or u alone)."""
    return upgrade.kind in ASSEMBLY_KINDS and upgrade.document.get("assembly") is not None


def get_upgrade(house: House, upgrade_id: int) -> Upgrade:
    for upgrade in house.upgrades:
        if upgrade.id == upgrade_id:
            return upgrade
    raise NotFound


def _costs(
    fixed: float, per_area: float, rebate: float, life_years: float | None
) -> dict[str, Any]:
    try:
        cost = CostIn.model_validate({"fixed": fixed, "per_area": per_area}).model_dump()
    except ValidationError as exc:
        err = exc.errors()[0]
        raise InputError(
            f"cost_{err['loc'][0]}", "must be zero or more and below a billion"
        ) from None
    if not (0 <= rebate < 1e9):
        raise InputError("rebate", "must be zero or more")
    if life_years is not None and not (0 < life_years <= 100):
        raise InputError("life_years", "must be between 0 and 100 years")
    out: dict[str, Any] = {"cost": cost, "rebate": rebate}
    if life_years is not None:
        out["life_years"] = life_years
    return out


def add_assembly_upgrade(
    *, session: Session, house: House, surface: Surface, name: str, start: str,
    expected_version: int | None,
) -> Upgrade:  # fmt: skip
    """A new assembly for ``surface``, starting from the as-found layers or a typical assembly."""
    check_version(house, expected_version)
    if start.startswith("typical:"):
        typical = typical_assemblies().get(start[8:])
        if typical is None:
            raise InputError("start", "there is no such typical assembly")
        assembly = typical.assembly(house.units).model_dump(exclude_none=True)  # type: ignore[arg-type]
        name = name.strip() or typical.label
    else:
        assembly = copy.deepcopy(surface.assembly)
    name = name.strip() or f"{surface.name}: upgrade"
    upgrade = Upgrade(
        house=house, surface_id=surface.id, position=len(house.upgrades),
        slug=unique_slug(name, {u.slug for u in house.upgrades}, fallback="upgrade"), name=name[:200], kind="assembly",
        document={"surface": surface.slug, "assembly": assembly, "cost": {"fixed": 0.0, "per_area": 0.0},
                  "rebate": 0.0, "life_years": 30.0},
    )  # fmt: skip
    session.add(upgrade)
    touch(house)
    session.flush()
    return upgrade


def add_air_sealing(
    *, session: Session, house: House, name: str, cfm50_after: float, fixed: float, rebate: float,
    life_years: float | None, expected_version: int | None,
) -> Upgrade:  # fmt: skip
    check_version(house, expected_version)
    found = (house.air_leakage or {}).get("cfm50")
    if not found:
        raise InputError("cfm50_after", "enter the blower-door CFM50 in Air leakage first")
    if not (0 < cfm50_after < found):
        raise InputError("cfm50_after", f"the target must be below the as-found {found:,.0f} CFM50")
    name = name.strip() or f"Air sealing to {cfm50_after:,.0f} CFM50"
    doc = {"cfm50_after": cfm50_after, **_costs(fixed, 0.0, rebate, life_years)}
    upgrade = Upgrade(house=house, position=len(house.upgrades), slug=unique_slug(name, {u.slug for u in house.upgrades}, fallback="upgrade"),
                      name=name[:200], kind="air_sealing", document=doc)  # fmt: skip
    session.add(upgrade)
    touch(house)
    session.flush()
    return upgrade


def add_pipe_insulation(
    *, session: Session, house: House, surface: Surface, name: str, thickness: float, conductivity: float,
    expected_version: int | None,
) -> Upgrade:  # fmt: skip
    """Insulation for a pipe run (one layer over the existing ones), priced fixed + per length."""
    check_version(house, expected_version)
    if surface.kind != "pipe_run":
        raise InputError("surface_id", "pipe insulation goes on a pipe run")
    if not (0 < thickness < 1e4):
        raise InputError("thickness", "must be greater than zero")
    if not (0 < conductivity < 1e3):
        raise InputError("conductivity", "must be greater than zero")
    existing = list((surface.details.get("pipe") or {}).get("layers") or [])
    name = name.strip() or f"{surface.name}: insulate"
    doc = {"surface": surface.slug, "pipe_layers": [*existing, {"thickness": thickness, "conductivity": conductivity}],
           "cost": {"fixed": 0.0, "per_length": 0.0}, "rebate": 0.0, "life_years": 20.0}  # fmt: skip
    upgrade = Upgrade(house=house, surface_id=surface.id, position=len(house.upgrades), kind="pipe_insulation",
                      slug=unique_slug(name, {u.slug for u in house.upgrades}, fallback="upgrade"), name=name[:200], document=doc)  # fmt: skip
    session.add(upgrade)
    touch(house)
    session.flush()
    return upgrade


def add_kind_upgrade(
    *, session: Session, house: House, surface: Surface | None, part: str, name: str,
    change: dict[str, Any], fixed: float, per_area: float, catalog: Catalog,
    expected_version: int | None,
) -> Upgrade:  # fmt: skip
    """An upgrade of form ``part`` (see upgrade_forms.FORM_KINDS): a ground, window or duct
    change, stored as calc/house reads it once the whole house computes with it."""
    check_version(house, expected_version)
    kind = forms.FORM_KINDS[part]
    wanted = forms.PART_SURFACES.get(part)
    if wanted is not None and (surface is None or surface.kind not in wanted):
        kinds = " or ".join(k.replace("_", " ") for k in wanted)
        raise InputError("surface_id", f"this upgrade goes on a {kinds}: choose one from the list")
    if wanted is None and not (house.heating or {}).get("ducts"):
        raise InputError("change", "describe the house's ducts (Heating, ducts) first")
    if part == "slab_edge" and surface is not None and not (surface.details or {}).get("ground"):
        raise InputError(
            "surface_id",
            f"enter {surface.name}'s ground contact (perimeter, soil) on its page first",
        )
    costs = _costs(fixed, per_area if PRICED_PER.get(kind) else 0.0, 0.0, forms.LIFE_YEARS[part])
    doc = forms.new_document(part, change, surface=surface, costs=costs)
    name = name.strip() or forms.DEFAULT_NAMES[part].format(surface=surface.name if surface else "")
    slug = unique_slug(name, {u.slug for u in house.upgrades}, fallback="upgrade")
    forms.check_in_house(house, slug=slug, kind=kind, document=doc, catalog=catalog)
    upgrade = Upgrade(house=house, surface_id=surface.id if surface else None, position=len(house.upgrades),
                      slug=slug, name=name[:200], kind=kind, document=doc)  # fmt: skip
    session.add(upgrade)
    touch(house)
    session.flush()
    return upgrade


def update_upgrade(
    *, session: Session, house: House, upgrade: Upgrade, name: str, fixed: float, per_area: float,
    rebate: float, life_years: float | None, expected_version: int | None,
    change: dict[str, Any] | None = None, catalog: Catalog | None = None,
) -> None:  # fmt: skip
    """New prices (and, with ``change``, the kind's own fields, checked with ``catalog`` by
    computing the house before anything is stored)."""
    check_version(house, expected_version)
    doc = dict(upgrade.document)
    doc.pop("price_item", None)  # typed prices replace a price-book link
    per = PRICED_PER.get(upgrade.kind)
    doc.update(_costs(fixed, per_area if per else 0.0, rebate, life_years))
    if per == "length":  # pipe insulation is priced per length, not per area
        doc["cost"] = {"fixed": doc["cost"]["fixed"], "per_length": doc["cost"]["per_area"]}
    if change is not None:
        for key, value in change.items():
            if value is None:
                doc.pop(key, None)  # e.g. a jacket emissivity cleared: the default again
            else:
                doc[key] = value
        if catalog is not None:
            forms.check_in_house(house, slug=upgrade.slug, kind=upgrade.kind, document=doc,
                                 catalog=catalog)  # fmt: skip
    upgrade.document = doc
    upgrade.name = (name.strip() or upgrade.name)[:200]
    touch(house)
    session.flush()


def save_upgrade_assembly(
    *, session: Session, house: House, upgrade: Upgrade, assembly: dict[str, Any], catalog: Catalog,
    expected_version: int | None,
) -> AssemblyResult:  # fmt: skip
    stored, result = checked_assembly(
        house, assembly, catalog=catalog, expected_version=expected_version
    )
    upgrade.document = {**upgrade.document, "assembly": stored}
    touch(house)
    session.flush()
    return result


def delete_upgrade(
    *, session: Session, house: House, upgrade: Upgrade, expected_version: int | None
) -> None:
    check_version(house, expected_version)
    for package in house.packages:
        if upgrade.slug in package.upgrade_slugs:
            package.upgrade_slugs = [s for s in package.upgrade_slugs if s != upgrade.slug]
    house.upgrades.remove(upgrade)
    touch(house)
    session.flush()


def add_package(
    *,
    session: Session,
    house: House,
    name: str,
    upgrade_slugs: list[str],
    expected_version: int | None,
) -> Package:
    check_version(house, expected_version)
    known = {u.slug: u for u in house.upgrades}
    chosen = [s for s in dict.fromkeys(upgrade_slugs) if s in known]
    if not chosen:
        raise InputError("upgrades", "tick at least one upgrade for the package")
    house_wide = {"air_sealing": "air", "duct_sealing": "duct leakage", "duct_insulation": "duct R"}
    targets = [
        house_wide.get(known[s].kind) or known[s].document.get("surface") or s for s in chosen
    ]
    if len(set(targets)) != len(targets):
        raise InputError(
            "upgrades",
            "a package can hold only one upgrade per surface (and one air sealing, one duct "
            "sealing and one duct insulation)",
        )
    name = name.strip() or " + ".join(known[s].name for s in chosen)[:200]
    package = Package(house=house, position=len(house.packages), slug=unique_slug(name, {p.slug for p in house.packages}, fallback="upgrade"),
                      name=name[:200], upgrade_slugs=chosen)  # fmt: skip
    session.add(package)
    touch(house)
    session.flush()
    return package


def delete_package(
    *, session: Session, house: House, package_id: int, expected_version: int | None
) -> None:
    check_version(house, expected_version)
    for package in house.packages:
        if package.id == package_id:
            house.packages.remove(package)
            touch(house)
            session.flush()
            return
    raise NotFound
