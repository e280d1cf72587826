"""The demo house: an invented 1950s one-and-a-half-storey house (no real address or owner)."""

from __future__ import annotations

import copy
from collections.abc import Mapping
from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.models import House, Package, Surface, Upgrade
from server.services.demo_parts import (
    add_demo_envelope,
    add_demo_systems,
    add_demo_weather,
    demo_bills,
)
from server.services.house_bills import save_bills
from server.services.houses import add_surface, create_house, default_organization
from server.services.typical import typical_assemblies

DEMO_LABEL = "Demo: 14 Quillfeather Row"

#: (typical assembly, surface name, area ft²)
DEMO_SURFACES = [
    ("attic-2x6-16-empty", "Attic floor (main)", 860.0),
    ("wall-2x4-16-empty", "Walls, first floor", 1180.0),
    ("cathedral-2x10-16-r30", "Upstairs sloped ceiling", 310.0),
    ("floor-2x10-16-empty", "Floor over crawlspace", 860.0),
    ("rim-2x10-empty", "Rim joist", 120.0),
]

#: the demo upgrades that are not a new assembly for a surface (``upgrades.kind``)
DEMO_UPGRADE_KINDS = {
    "air-seal": "air_sealing",
    "duct-seal": "duct_sealing",
    "north-storms": "window",
}


def load_demo_house(*, session: Session) -> int:
    """Create the demo house unless it exists; return its id."""
    org = default_organization(session=session)
    existing = session.scalars(
        select(House).where(House.organization_id == org.id, House.label == DEMO_LABEL)
    ).first()
    if existing is not None:
        return existing.id
    house = create_house(
        session=session,
        organization_id=org.id,
        label=DEMO_LABEL,
        address="14 Quillfeather Row (invented for the demo)",
        units="ip",
    )
    house.notes = "Invented demo house: 1950s, gas furnace, unvented crawlspace, vermiculite suspected in attic."
    house.floor_area = 1720.0
    house.volume = 13760.0
    house.climate = {"hdd": 5600, "cdd": 850, "heating_base": 65, "cooling_base": 65}
    house.heating = {"fuel": "natural_gas", "efficiency": 0.78, "price": 1.52}
    house.cooling = {"seer": 13, "electricity_price": 0.17}
    house.air_leakage = {"cfm50": 3400, "n_factor": 18, "volume": 13760}
    house.economics = {
        "discount_rate": 0.03,
        "fuel_escalation": 0.02,
        "years": 25,
        "loan": {"apr": 0.065, "years": 10},
    }
    session.flush()
    surfaces = {}
    for typical, name, area in DEMO_SURFACES:
        surface = add_surface(
            session=session, house=house, name=name, kind="", area=area, typical=typical
        )
        surfaces[typical] = surface
    add_demo_envelope(session=session, house=house, surfaces=surfaces)
    add_demo_systems(house)
    add_demo_weather(house)
    by_slug = {s.slug: s.id for s in surfaces.values()}
    for i, (slug, name, document) in enumerate(_demo_upgrades(surfaces)):
        kind = DEMO_UPGRADE_KINDS.get(slug, "assembly")
        upgrade = Upgrade(
            house=house, position=i, slug=slug, name=name, kind=kind, document=document
        )
        upgrade.surface_id = by_slug.get(document.get("surface", ""))
        session.add(upgrade)
    session.add(Package(house=house, position=0, slug="attic-and-air", name="Attic + air sealing",
                        upgrade_slugs=["attic-r49", "air-seal"]))  # fmt: skip
    session.add(Package(house=house, position=1, slug="whole-house", name="Whole envelope",
                        upgrade_slugs=["attic-r49", "air-seal", "walls-dense-pack", "floor-r30", "rim-foam"]))  # fmt: skip
    session.flush()
    save_bills(session=session, house=house, bills=demo_bills(), expected_version=None)
    session.flush()
    return house.id


def _demo_upgrades(surfaces: Mapping[str, Surface]) -> list[tuple[str, str, dict[str, Any]]]:
    """Candidate upgrades with invented but plausible prices (demo data, not a price list)."""
    typ = typical_assemblies()
    attic = copy.deepcopy(typ["attic-2x6-16-empty"].document_ip)
    attic["layers"].insert(0, {"name": "blown cellulose, ~13 in", "r": 47.0})
    rim = copy.deepcopy(typ["rim-2x10-empty"].document_ip)
    rim["layers"].append({"name": "2 in closed-cell spray foam", "thickness": 2.0, "r": 13.0})
    return [
        (
            "attic-r49",
            "Attic: blow R-47 cellulose over the joists",
            {
                "surface": surfaces["attic-2x6-16-empty"].slug,
                "assembly": attic,
                "cost": {"fixed": 350, "per_area": 1.35},
                "rebate": 300,
                "life_years": 30,
            },
        ),
        (
            "air-seal",
            "Air sealing to 2,300 CFM50",
            {"cfm50_after": 2300, "cost": {"fixed": 1350}, "rebate": 250, "life_years": 20},
        ),
        (
            "walls-dense-pack",
            "Walls: dense-pack cellulose",
            {
                "surface": surfaces["wall-2x4-16-empty"].slug,
                "assembly": typ["wall-2x4-16-dense-pack"].document_ip,
                "cost": {"fixed": 400, "per_area": 2.10},
                "rebate": 0,
                "life_years": 30,
            },
        ),
        (
            "floor-r30",
            "Crawlspace floor: R-30 batts",
            {
                "surface": surfaces["floor-2x10-16-empty"].slug,
                "assembly": typ["floor-2x10-16-r30"].document_ip,
                "cost": {"fixed": 250, "per_area": 1.75},
                "rebate": 0,
                "life_years": 30,
            },
        ),
        (
            "rim-foam",
            "Rim joist: 2 in closed-cell foam",
            {
                "surface": surfaces["rim-2x10-empty"].slug,
                "assembly": rim,
                "cost": {"fixed": 150, "per_area": 3.40},
                "rebate": 0,
                "life_years": 30,
            },
        ),
        (
            "north-storms",
            "North windows: low-e interior storm panels",
            {
                "surface": surfaces["window-N"].slug,
                "u": 0.33,
                "shgc": 0.45,
                "cost": {"fixed": 120, "per_area": 14.0},
                "rebate": 0,
                "life_years": 20,
            },
        ),
        (
            "slab-edge",
            "Slab edge: 2 in rigid foam, 2 ft down",
            {
                "surface": surfaces["slab"].slug,
                "ground": {
                    "edge_insulation": {
                        "orientation": "vertical",
                        "width_or_depth": 2.0,
                        "r": 10.0,
                        "thickness": 2.0,
                    }
                },  # fmt: skip
                "cost": {"fixed": 650, "per_area": 0.0},
                "rebate": 0,
                "life_years": 30,
            },
        ),
        (
            "duct-seal",
            "Seal the crawlspace ducts",
            {
                "supply_leakage_after": 0.04,
                "return_leakage_after": 0.03,
                "cost": {"fixed": 600},
                "rebate": 100,
                "life_years": 20,
            },  # fmt: skip
        ),
    ]


#: (e-mail, password, firm, role): development sign-ins made by ``warmstead demo``. Known
#: passwords: deactivate these accounts (Users page) on any server that real firms use.
DEMO_PASSWORD = "warmstead-demo"
OTHER_ORGANIZATION = "Other firm"
DEMO_ACCOUNTS = (
    ("auditor@demo.invalid", DEMO_PASSWORD, "demo firm", "admin"),
    ("other@demo.invalid", DEMO_PASSWORD, OTHER_ORGANIZATION, "admin"),
)


def load_demo_accounts(*, session: Session) -> list[tuple[str, str, str, str]]:
    """Create (once) the demo firm's admin and a second firm with its own user.

    The demo firm is the one that holds the demo house; "Other firm" exists so a person can
    sign in as someone else and check by hand that the demo firm's data stays invisible.
    Existing accounts are left as they are. Returns :data:`DEMO_ACCOUNTS`.
    """
    from server.models import Organization, User
    from server.services.accounts import create_user

    demo_org = default_organization(session=session)
    other = session.scalars(
        select(Organization).where(Organization.name == OTHER_ORGANIZATION)
    ).first()
    if other is None:
        other = Organization(name=OTHER_ORGANIZATION)
        session.add(other)
        session.flush()
    for (email, password, _org_name, role), org in zip(
        DEMO_ACCOUNTS, (demo_org, other), strict=True
    ):
        if session.scalars(select(User.id).where(User.email == email)).first() is None:
            create_user(session=session, organization_id=org.id, email=email, password=password,
                        role=role, name="Demo auditor" if org is demo_org else "Other firm's auditor")  # fmt: skip
    return list(DEMO_ACCOUNTS)
