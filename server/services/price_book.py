"""The firm's price book: unit costs per upgrade type, and filling upgrade costs from it.

An item is priced one of three ways (``basis``):

* ``per_area``   — installed cost = fixed_cost + unit_cost × area   (per ft² or per m²)
* ``per_length`` — installed cost = fixed_cost + unit_cost × length (per ft or per m of pipe)
* ``fixed``      — installed cost = fixed_cost (a whole job, e.g. air sealing)

``units`` says whether ``unit_cost`` is per ft/ft² (``ip``) or per m/m² (``si``). A price per
area converts inversely to the area: $/m² = ($/ft²) / (m² per ft²), with the exact factor
1 ft² = 0.09290304 m² from :mod:`server.physics.units` (NIST SP 811, appendix B).

An upgrade document links to an item with ``"price_item": "<slug>"``; :func:`apply_price_item`
(pure) returns the document with its ``cost`` taken from the item, in the house's units.
"""

from __future__ import annotations

import math
from typing import Any, Literal, Protocol

from sqlalchemy import select
from sqlalchemy.orm import Session, object_session

from server.errors import FieldError, InputError
from server.models import House, PriceBookItem, Upgrade, utcnow
from server.physics.units import FOOT_M, SQFT_M2
from server.services.houses import NotFound, check_version, touch
from server.services.slugs import unique_slug

Basis = Literal["per_area", "per_length", "fixed"]
BASES: dict[str, str] = {
    "per_area": "per area (ft² or m²)",
    "per_length": "per length of pipe (ft or m)",
    "fixed": "fixed price per job",
}
UPGRADE_TYPES: dict[str, str] = {
    "attic_fill": "Attic insulation",
    "wall_fill": "Wall insulation",
    "floor_insulation": "Floor insulation",
    "rim_joist": "Rim joist insulation",
    "basement_wall": "Basement wall insulation",
    "cathedral_roof": "Sloped ceiling insulation",
    "air_sealing": "Air sealing",
    "pipe_insulation": "Pipe insulation",
    "other": "Other work",
}
#: which pricing suits which kind of upgrade (``upgrades.kind``; air sealing has no area or
#: length), and how a refusal names it: the priced shapes of server.documents.house.UpgradeIn
BASES_FOR_KIND: dict[str, tuple[str, ...]] = {
    "assembly": ("per_area", "fixed"),
    "window": ("per_area", "fixed"),
    "pipe_insulation": ("per_length", "fixed"),
    "air_sealing": ("fixed",),
    "duct_sealing": ("fixed",),
    "duct_insulation": ("per_area", "fixed"),
}
KIND_WORDS: dict[str, str] = {
    "assembly": "an insulation upgrade",
    "window": "a window upgrade",
    "pipe_insulation": "pipe insulation",
    "air_sealing": "air sealing",
    "duct_sealing": "duct sealing",
    "duct_insulation": "duct insulation",
}
EXAMPLE_NOTE = "example — replace with your own"
#: starting rows for a new firm. NOT real prices: round placeholders, marked as examples.
EXAMPLE_ITEMS: tuple[dict[str, Any], ...] = (
    {"slug": "example-attic-loose-fill", "name": "Attic: blown loose-fill", "upgrade_type": "attic_fill",
     "basis": "per_area", "units": "ip", "unit_cost": 1.00, "fixed_cost": 100.0},
    {"slug": "example-wall-dense-pack", "name": "Walls: dense-pack cavity fill", "upgrade_type": "wall_fill",
     "basis": "per_area", "units": "ip", "unit_cost": 2.00, "fixed_cost": 100.0},
    {"slug": "example-floor-batts", "name": "Floor: batts between joists", "upgrade_type": "floor_insulation",
     "basis": "per_area", "units": "ip", "unit_cost": 1.50, "fixed_cost": 100.0},
    {"slug": "example-rim-foam", "name": "Rim joist: foam board or spray foam", "upgrade_type": "rim_joist",
     "basis": "per_area", "units": "ip", "unit_cost": 3.00, "fixed_cost": 100.0},
    {"slug": "example-air-sealing", "name": "Air sealing, whole house", "upgrade_type": "air_sealing",
     "basis": "fixed", "units": "ip", "unit_cost": 0.0, "fixed_cost": 1000.0},
    {"slug": "example-pipe-wrap", "name": "Pipe insulation sleeves", "upgrade_type": "pipe_insulation",
     "basis": "per_length", "units": "ip", "unit_cost": 3.00, "fixed_cost": 50.0},
)  # fmt: skip
MAX_UNIT_COST = 1e6
MAX_FIXED_COST = 1e9


class PriceSource(Protocol):
    """What the pure pricing functions read from an item (a PriceBookItem fits)."""

    slug: str
    name: str
    basis: str
    units: str
    unit_cost: float
    fixed_cost: float


# --- pure pricing -----------------------------------------------------------------------------


def _per_unit_factor(basis: str) -> float:
    """m² per ft² (per_area) or m per ft (per_length): exact, NIST SP 811 appendix B."""
    return SQFT_M2 if basis == "per_area" else FOOT_M


def unit_cost_in(item: PriceSource, units: str) -> float:
    """The item's cost per unit area or length expressed per ``units`` (ip: ft/ft², si: m/m²).

    ($/m²) = ($/ft²) / 0.09290304 and ($/m) = ($/ft) / 0.3048; the reverse multiplies.
    """
    if item.basis == "fixed" or item.units == units:
        return float(item.unit_cost)
    factor = _per_unit_factor(item.basis)
    if item.units == "ip":  # per ft(²) -> per m(²)
        return item.unit_cost / factor
    return item.unit_cost * factor  # per m(²) -> per ft(²)


def price_upgrade(
    item: PriceSource, quantity: float, *, quantity_units: str | None = None
) -> float:
    """Installed cost = fixed_cost + unit_cost × quantity (area or length; 0 for fixed items).

    ``quantity`` is in ``quantity_units`` (default: the item's own units). Raises ValueError
    for a negative or non-finite quantity.
    """
    if not (math.isfinite(quantity) and quantity >= 0):
        raise ValueError("the quantity must be a finite number of zero or more")
    if item.basis == "fixed":
        return float(item.fixed_cost)
    per_unit = unit_cost_in(item, quantity_units or item.units)
    return float(item.fixed_cost) + per_unit * quantity


def check_fits(item: PriceSource, *, kind: str, field: str = "price_item") -> None:
    """Refuse an item whose pricing does not suit an upgrade of ``kind`` (``upgrades.kind``),
    e.g. per area on air sealing; an unknown kind takes only a fixed price."""
    allowed_bases = BASES_FOR_KIND.get(kind, ("fixed",))
    if item.basis not in allowed_bases:
        words = KIND_WORDS.get(kind, "this upgrade")
        allowed = " or ".join(BASES[b] for b in allowed_bases)
        raise InputError(
            field,
            f"'{item.name}' is priced {BASES[item.basis]}; {words} takes a price {allowed}",
        )


def apply_price_item(
    document: dict[str, Any], item: PriceSource, *, kind: str, units: str,
    field: str = "price_item",
) -> dict[str, Any]:  # fmt: skip
    """A copy of the upgrade document with ``cost`` from ``item`` in the house's ``units``.

    per_area -> {fixed, per_area}; per_length -> {fixed, per_length}; fixed -> {fixed}.
    The house calculator then computes fixed + per_area × area (+ per_length × length), which
    is :func:`price_upgrade` of the surface's area or the pipe run's length.
    """
    check_fits(item, kind=kind, field=field)
    cost: dict[str, float] = {"fixed": float(item.fixed_cost)}
    if item.basis != "fixed":
        cost[item.basis] = unit_cost_in(item, units)
    return {**document, "cost": cost, "price_item": item.slug}


def link_price_item(
    *, session: Session, organization_id: int, house: House, upgrade: Upgrade, price_item: str,
    expected_version: int | None,
) -> None:  # fmt: skip
    """Link ``upgrade`` to the firm's item ``price_item`` (its cost then follows the item), or
    unlink it when ``price_item`` is empty (the cost last filled in stays).

    Raises
    ------
    Conflict
        The form was loaded from an older version, or another save came first.
    InputError
        ``price_item``: no such item in the firm's price book, or one that does not fit the
        upgrade (:func:`check_fits`).
    """
    check_version(house, expected_version)
    if price_item:
        items = {i.slug: i for i in list_items(session=session, organization_id=organization_id)}
        if price_item not in items:
            raise InputError("price_item", "there is no such item in the price book")
        document = apply_price_item(
            upgrade.document, items[price_item], kind=upgrade.kind, units=house.units
        )
    else:
        document = {k: v for k, v in upgrade.document.items() if k != "price_item"}
    upgrade.document = document
    touch(house)  # written now: Conflict when another save of the house came first


def priced_document(
    document: dict[str, Any], items: dict[str, PriceSource], *, kind: str, units: str, field: str
) -> dict[str, Any]:
    """The upgrade document as the calculator takes it: priced from its item when linked.

    ``price_item`` is not part of the calculator's document, so it is removed here; a link to
    an item that no longer exists keeps the cost last filled in.
    """
    slug = document.get("price_item")
    if not slug:
        return {k: v for k, v in document.items() if k != "price_item"}
    out = document
    if slug in items:
        out = apply_price_item(document, items[slug], kind=kind, units=units, field=field)
    return {k: v for k, v in out.items() if k != "price_item"}


def items_for_house(house: Any) -> dict[str, PriceSource]:
    """The price book of the house's firm, read only when one of its upgrades links an item."""
    if not any((u.document or {}).get("price_item") for u in house.upgrades):
        return {}
    session = object_session(house)
    if session is None:
        return {}
    return {i.slug: i for i in list_items(session=session, organization_id=house.organization_id)}


# --- the firm's rows --------------------------------------------------------------------------


def list_items(*, session: Session, organization_id: int) -> list[PriceBookItem]:
    """The firm's items, by type then name."""
    return list(
        session.scalars(
            select(PriceBookItem)
            .where(PriceBookItem.organization_id == organization_id)
            .order_by(PriceBookItem.upgrade_type, PriceBookItem.name, PriceBookItem.id)
        )
    )


def get_item(*, session: Session, organization_id: int, item_id: int) -> PriceBookItem:
    item = session.scalars(
        select(PriceBookItem).where(
            PriceBookItem.id == item_id, PriceBookItem.organization_id == organization_id
        )
    ).first()
    if item is None:
        raise NotFound
    return item


def is_example(item: PriceBookItem) -> bool:
    """Still the placeholder row a new firm starts with."""
    return EXAMPLE_NOTE in (item.notes or "")


def _validated(
    *, name: str, upgrade_type: str, basis: str, units: str, unit_cost: float,
    fixed_cost: float, notes: str,
) -> dict[str, Any]:  # fmt: skip
    """Check every field at once; raise InputError naming each problem."""
    problems: list[FieldError] = []
    name = (name or "").strip()
    if not name:
        problems.append(FieldError("name", "give the item a name, e.g. 'Attic: blown cellulose'"))
    elif len(name) > 200:
        problems.append(FieldError("name", "keep the name under 200 characters"))
    if upgrade_type not in UPGRADE_TYPES:
        problems.append(FieldError("upgrade_type", "choose what kind of work this prices"))
    if basis not in BASES:
        problems.append(
            FieldError("basis", "choose how it is priced: per area, per length or fixed")
        )
    if units not in ("ip", "si"):
        problems.append(FieldError("units", "choose US (ft, ft²) or metric (m, m²) units"))
    if not (math.isfinite(unit_cost) and 0 <= unit_cost <= MAX_UNIT_COST):
        problems.append(FieldError("unit_cost", "must be a number from 0 to 1,000,000"))
    elif basis == "fixed" and unit_cost != 0:
        problems.append(
            FieldError("unit_cost", "a fixed price has no unit cost: put the whole price in "
                       "the fixed cost and leave this at 0")
        )  # fmt: skip
    elif basis in ("per_area", "per_length") and unit_cost <= 0:
        per = "area" if basis == "per_area" else "length"
        problems.append(FieldError("unit_cost", f"a price per {per} needs its cost per unit"))
    if not (math.isfinite(fixed_cost) and 0 <= fixed_cost <= MAX_FIXED_COST):
        problems.append(FieldError("fixed_cost", "must be a number from 0 to 1,000,000,000"))
    elif basis == "fixed" and fixed_cost <= 0:
        problems.append(FieldError("fixed_cost", "a fixed-price item needs its price"))
    if len(notes or "") > 2000:
        problems.append(FieldError("notes", "keep the notes under 2,000 characters"))
    if problems:
        first, *rest = problems
        raise InputError(first.field, first.message, rest)
    return {"name": name, "upgrade_type": upgrade_type, "basis": basis, "units": units,
            "unit_cost": float(unit_cost), "fixed_cost": float(fixed_cost),
            "notes": (notes or "").strip()}  # fmt: skip


def add_item(
    *, session: Session, organization_id: int, name: str, upgrade_type: str, basis: str,
    units: str = "ip", unit_cost: float = 0.0, fixed_cost: float = 0.0, notes: str = "",
) -> PriceBookItem:  # fmt: skip
    """Add a row; its slug (what upgrades link to) comes from the name, unique in the firm."""
    values = _validated(name=name, upgrade_type=upgrade_type, basis=basis, units=units,
                        unit_cost=unit_cost, fixed_cost=fixed_cost, notes=notes)  # fmt: skip
    taken = {i.slug for i in list_items(session=session, organization_id=organization_id)}
    item = PriceBookItem(
        organization_id=organization_id,
        slug=unique_slug(values["name"], taken, fallback="item"),
        **values,
    )
    session.add(item)
    session.flush()
    return item


def update_item(
    *, session: Session, organization_id: int, item_id: int, name: str, upgrade_type: str,
    basis: str, units: str, unit_cost: float, fixed_cost: float, notes: str = "",
) -> PriceBookItem:  # fmt: skip
    """Change a row (its slug stays, so upgrades linked to it follow the new price)."""
    item = get_item(session=session, organization_id=organization_id, item_id=item_id)
    values = _validated(name=name, upgrade_type=upgrade_type, basis=basis, units=units,
                        unit_cost=unit_cost, fixed_cost=fixed_cost, notes=notes)  # fmt: skip
    for key, value in values.items():
        setattr(item, key, value)
    item.updated_at = utcnow()
    session.flush()
    return item


def delete_item(*, session: Session, organization_id: int, item_id: int) -> None:
    """Remove a row. Upgrades linked to it keep its last price, written into their own cost."""
    item = get_item(session=session, organization_id=organization_id, item_id=item_id)
    linked = session.scalars(
        select(Upgrade).join(House).where(House.organization_id == organization_id)
    )
    for upgrade in linked:
        if (upgrade.document or {}).get("price_item") != item.slug:
            continue
        try:
            document = apply_price_item(
                upgrade.document, item, kind=upgrade.kind, units=upgrade.house.units
            )
        except InputError:  # no longer fits: keep the cost the upgrade already holds
            document = upgrade.document
        upgrade.document = {k: v for k, v in document.items() if k != "price_item"}
    session.delete(item)
    session.flush()


def seed_examples(*, session: Session, organization_id: int) -> int:
    """Give a firm with an empty price book the example rows (marked as examples). Returns
    how many were added (0 when the firm already has items)."""
    if list_items(session=session, organization_id=organization_id):
        return 0
    for row in EXAMPLE_ITEMS:
        session.add(PriceBookItem(organization_id=organization_id, notes=EXAMPLE_NOTE, **row))
    session.flush()
    return len(EXAMPLE_ITEMS)
