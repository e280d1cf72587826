"""A saved house <-> the HouseDocument of POST /api/v1/calc/house (export, import, compare)."""

from __future__ import annotations

from typing import Any

from pydantic import ValidationError
from sqlalchemy.orm import Session

from server.documents.house import HouseDocument
from server.documents.house_photos import HouseExport
from server.errors import InputError
from server.models import House, Package, Surface, Upgrade
from server.services.comparison import compute_house
from server.services.houses import create_house
from server.services.library import catalog_for
from server.services.photo_document import import_photos, photo_entries
from server.services.photo_store import PhotoStore
from server.services.photos import PhotoLimits
from server.services.price_book import items_for_house, priced_document

#: defaults for a house whose systems are not entered yet (common practice, shown as assumptions)
DEFAULT_CLIMATE = {"hdd": 5000.0, "cdd": 800.0}
DEFAULT_HEATING = {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.40}


def house_document(
    house: House,
    *,
    extra_package: list[str] | None = None,
    uncertainty: dict[str, Any] | None = None,
    optimize: dict[str, Any] | None = None,
) -> HouseDocument:
    """The house as one document; ``extra_package`` adds a package of chosen upgrade ids;
    ``uncertainty`` and ``optimize`` (the document's fields, e.g. for the compare page) ask
    for ranges and the best package. Neither is stored with the house."""
    surfaces = [_surface(s) for s in house.surfaces]
    known = {u.slug for u in house.upgrades}
    packages = [
        {"id": p.slug, "name": p.name, "upgrades": [x for x in p.upgrade_slugs if x in known]}
        for p in house.packages
        if any(x in known for x in p.upgrade_slugs)
    ]
    chosen = [x for x in (extra_package or []) if x in known]
    if chosen:
        packages.append({"id": "your-selection", "name": "Your selection", "upgrades": chosen})
    prices = items_for_house(house)  # the firm's price book, when an upgrade links an item
    body: dict[str, Any] = {
        "units": house.units,
        "name": house.label,
        "climate": _climate(house.climate) or DEFAULT_CLIMATE,
        "heating": house.heating or DEFAULT_HEATING,
        "surfaces": surfaces,
        "upgrades": [
            {
                "id": u.slug,
                "name": u.name,
                **priced_document(
                    u.document,
                    prices,
                    kind=u.kind,
                    units=house.units,
                    field=f"upgrades[{i}].price_item",
                ),
                **({"kind": u.kind} if u.kind else {}),  # the row's kind, not a guess from keys
            }
            for i, u in enumerate(house.upgrades)
        ],  # fmt: skip
        "packages": packages,
        "economics": house.economics or {},
    }
    if house.cooling:
        body["cooling"] = house.cooling
    if house.air_leakage:
        body["air_leakage"] = house.air_leakage
    _export_ventilation(body)
    _export_spaces(house, body)
    _export_ground(house, body)
    if house.bills:  # the heating fuel's bills, stored as the document's (services/house_bills)
        body["bills"] = house.bills
    _export_gains(house, body)
    if uncertainty is not None:
        body["uncertainty"] = uncertainty
    if optimize is not None:
        body["optimize"] = optimize
    try:
        return HouseDocument.model_validate(body)
    except ValidationError as exc:
        first = exc.errors()[0]
        raise InputError(".".join(str(p) for p in first["loc"]), first["msg"]) from None


def _surface(s: Surface) -> dict[str, Any]:
    if s.kind == "pipe_run":
        return {"id": s.slug, "kind": s.kind, "name": s.name, "length": s.length,
                "pipe": s.details.get("pipe"), "hours_per_year": s.details.get("hours_per_year")}  # fmt: skip
    return {"id": s.slug, "kind": s.kind, "name": s.name, "area": s.area, "assembly": s.assembly}


CLIMATE_KEYS = ("hdd", "cdd", "heating_base", "cooling_base", "variable_base",
                "heating_design_temperature", "indoor_design_temperature", "temperature_bins",
                "elevation", "heating_season_temperature")  # fmt: skip


def _climate(stored: dict[str, Any] | None) -> dict[str, Any]:
    """The calculation's part of the stored climate (the weather file's details stay behind,
    except its temperature bins and 99 % design temperature when the climate has none of its
    own: a heat pump and the design load use them)."""
    out = {k: v for k, v in (stored or {}).items() if k in CLIMATE_KEYS and v is not None}
    weather = (stored or {}).get("weather")
    if (
        "temperature_bins" not in out
        and isinstance(weather, dict)
        and weather.get("temperature_bins")
    ):
        out["temperature_bins"] = weather["temperature_bins"]
    if (  # the design load's 99 % temperature: typed, else the weather file's
        "heating_design_temperature" not in out
        and isinstance(weather, dict)
        and weather.get("heating_design_temperature") is not None
    ):
        out["heating_design_temperature"] = weather["heating_design_temperature"]
    return out


def house_export(
    house: House, *, session: Session, store: PhotoStore, photos: bool = True
) -> dict[str, Any]:
    """The saved house's export as JSON: its document, and a ``photos`` list when it has
    photos and ``photos`` is true (:mod:`server.documents.house_photos`)."""
    body = house_document(house).model_dump(mode="json")
    entries = photo_entries(session=session, store=store, house=house) if photos else []
    if entries:
        body["photos"] = entries
    return body


def import_house(
    *,
    session: Session,
    organization_id: int,
    document: HouseDocument,
    photos_into: tuple[PhotoStore, PhotoLimits] | None = None,
) -> House:
    """Create a saved house from a document (the inverse of :func:`house_document`); the
    photos of an export (:class:`HouseExport`) go into ``photos_into``'s directory, with its
    limits (without it, a document with photos is refused).

    Nothing is stored for a document that cannot be computed: see :func:`check_computable`.
    """
    entries = document.photos if isinstance(document, HouseExport) else []
    if entries and photos_into is None:
        raise InputError("photos", "photos cannot be imported here")
    check_computable(session=session, organization_id=organization_id, document=document)
    house = create_house(
        session=session,
        organization_id=organization_id,
        label=document.name or "Imported house",
        units=document.units,
    )
    house.climate = document.climate.model_dump(exclude_none=True)
    house.heating = document.heating.model_dump(exclude_none=True)
    house.cooling = document.cooling.model_dump(exclude_none=True) if document.cooling else None
    house.air_leakage = (
        document.air_leakage.model_dump(exclude_none=True) if document.air_leakage else None
    )
    if house.air_leakage and "n_factor_table" in house.air_leakage:  # the table gives N
        house.air_leakage.pop("n_factor", None)
    if document.mechanical_ventilation is not None:  # kept with the air (no column of its own)
        vent = document.mechanical_ventilation.model_dump(exclude_none=True)
        house.air_leakage = {**(house.air_leakage or {}), "mechanical_ventilation": vent}
    house.economics = document.economics.model_dump(exclude_none=True)
    house.bills = (
        document.bills.model_dump(mode="json", exclude_none=True) if document.bills else None
    )
    for i, s in enumerate(document.surfaces):
        if s.kind == "pipe_run":
            session.add(Surface(house=house, position=i, slug=s.id, name=s.name or s.id, kind=s.kind,
                                area=None, length=s.length or 0.0, assembly={},
                                details={"pipe": s.pipe.model_dump(exclude_none=True) if s.pipe else {},
                                         "hours_per_year": s.hours_per_year}))  # fmt: skip
            continue
        if s.assembly is None:
            raise InputError(f"surfaces[{i}].assembly", "saved houses need each surface's layers")
        session.add(
            Surface(
                house=house, position=i, slug=s.id, name=s.name or s.id, kind=s.kind,
                area=s.area or 0.0, assembly=s.assembly.model_dump(exclude_none=True),
            )
        )  # fmt: skip
    session.flush()
    _import_spaces(house, document)
    _import_ground(house, document)
    _import_gains(house, document)
    by_slug = {s.slug: s.id for s in house.surfaces}
    for i, u in enumerate(document.upgrades):
        doc = u.model_dump(exclude_none=True, exclude={"id", "name"})
        upgrade = Upgrade(
            house=house, position=i, slug=u.id, name=u.name or u.id, kind=u.kind or "", document=doc
        )
        upgrade.surface_id = by_slug.get(u.surface or "")
        session.add(upgrade)
    for i, p in enumerate(document.packages):
        session.add(
            Package(
                house=house,
                position=i,
                slug=p.id,
                name=p.name or p.id,
                upgrade_slugs=list(p.upgrades),
            )
        )
    session.flush()
    if entries and photos_into is not None:
        session.refresh(house, ["surfaces"])
        import_photos(session=session, store=photos_into[0], limits=photos_into[1], house=house,
                      entries=entries)  # fmt: skip
    return house


def check_computable(*, session: Session, organization_id: int, document: HouseDocument) -> None:
    """Refuse a document the firm's pages could not compute, naming the field.

    The whole document goes through :func:`server.services.comparison.compute_house` (the one
    code path of calc/house and the compare page) against the firm's catalog: the built-in
    library plus the firm's own materials. So every material slug (homogeneous, cavity and
    framing layers, of surfaces and upgrades), every upgrade's ``surface``, every package's
    upgrade ids and every pipe run is checked, e.g. ``surfaces[2].assembly.layers[1].material``.
    Another firm's material is not in this catalog: it is refused in the same words as a
    misspelt slug, so its existence does not show.

    Raises
    ------
    InputError
        The first problem's field and message (HTTP 422).
    """
    catalog = catalog_for(session=session, organization_id=organization_id)
    compute_house(document, catalog=catalog, upgrades_alone=False)


def _export_spaces(house: House, body: dict[str, Any]) -> None:
    """Buffer spaces (ISO 13789) and what each surface faces, into the document ``body``."""
    if house.spaces:
        body["spaces"] = house.spaces
    behind = {row.slug: (row.details or {}).get("adjacent") for row in house.surfaces}
    for surface in body["surfaces"]:
        if behind.get(surface["id"]):
            surface["adjacent"] = behind[surface["id"]]


def _import_spaces(house: House, document: HouseDocument) -> None:
    """The document's spaces onto the saved house; each surface's ``adjacent`` in its details."""
    house.spaces = [space.model_dump(exclude_none=True) for space in document.spaces] or None
    adjacent = {s.id: s.adjacent for s in document.surfaces}
    for row in house.surfaces:
        behind = adjacent.get(row.slug, "outdoors")
        if behind != "outdoors":
            row.details = {**(row.details or {}), "adjacent": behind}


def _export_ground(house: House, body: dict[str, Any]) -> None:
    """Each ground surface's ``ground`` object (ISO 13370), from its details, into ``body``."""
    stored = {row.slug: (row.details or {}).get("ground") for row in house.surfaces}
    for surface in body["surfaces"]:
        if stored.get(surface["id"]):
            surface["ground"] = stored[surface["id"]]


def _import_ground(house: House, document: HouseDocument) -> None:
    """Each surface's ``ground`` object (slab, basement floor or wall) into its details."""
    grounds = {s.id: s.ground for s in document.surfaces if s.ground is not None}
    for row in house.surfaces:
        if row.slug in grounds:
            ground = grounds[row.slug].model_dump(exclude_none=True)
            row.details = {**(row.details or {}), "ground": ground}


def _export_ventilation(body: dict[str, Any]) -> None:
    """Mechanical ventilation, stored beside the air leakage, into its own document field."""
    air = body.get("air_leakage")
    if not isinstance(air, dict) or "mechanical_ventilation" not in air:
        return
    air = dict(air)
    body["mechanical_ventilation"] = air.pop("mechanical_ventilation")
    if air:
        body["air_leakage"] = air
    else:
        body.pop("air_leakage")


def _export_gains(house: House, body: dict[str, Any]) -> None:
    """Floor area, bedrooms, internal gains, the sun's table and each window's SHGC and facing.

    A house whose weather file gave a degree-day table by base (``climate.weather``) and whose
    gains are known (typed, or floor area and bedrooms) gets the variable base by default.
    """
    stored = house.climate or {}
    gains: dict[str, Any] = stored["gains"] if isinstance(stored.get("gains"), dict) else {}
    if house.floor_area:
        body["floor_area"] = house.floor_area
    for key in ("bedrooms", "internal_gains"):
        if gains.get(key) is not None:
            body[key] = gains[key]
    weather: dict[str, Any] = stored["weather"] if isinstance(stored.get("weather"), dict) else {}
    climate = dict(body["climate"])
    sun = stored.get("solar") or weather.get("solar")
    if sun:
        climate["solar"] = sun
    table = weather.get("degree_days_by_base")
    known = body.get("internal_gains") is not None or (
        body.get("floor_area") is not None and body.get("bedrooms") is not None
    )
    if "variable_base" not in climate and table and known:
        climate["variable_base"] = {"table": [{"base": r["base"], "hdd": r["hdd"]} for r in table]}
    body["climate"] = climate
    windows = {row.slug: (row.details or {}).get("window") for row in house.surfaces}
    for surface in body["surfaces"]:
        if windows.get(surface["id"]):
            surface.update(windows[surface["id"]])


WINDOW_KEYS = ("shgc", "orientation", "azimuth", "tilt")


def _import_gains(house: House, document: HouseDocument) -> None:
    """The document's gains fields onto the saved house (floor area in its column, bedrooms
    and internal gains in ``climate["gains"]``, a window's SHGC and facing in its details)."""
    house.floor_area = document.floor_area
    gains = {
        key: getattr(document, key)
        for key in ("bedrooms", "internal_gains")
        if getattr(document, key) is not None
    }
    if gains:
        house.climate = {**(house.climate or {}), "gains": gains}
    facing = {
        s.id: {key: getattr(s, key) for key in WINDOW_KEYS if getattr(s, key) is not None}
        for s in document.surfaces
    }
    for row in house.surfaces:
        if facing.get(row.slug):
            row.details = {**(row.details or {}), "window": facing[row.slug]}
