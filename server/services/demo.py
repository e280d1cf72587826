"""The demo house: an invented 1950s one-and-a-half-storey house (no real address or owner)."""

from __future__ import annotations

from sqlalchemy import select
from sqlalchemy.orm import Session

from server.models import House
from server.services.houses import add_surface, create_house, default_organization

DEMO_LABEL = "Demo: 14 Quillfeather Row"

#: (typical assembly, surface name, area ft²)
DEMO_SURFACES = [
    ("attic-2x6-16-empty", "Attic floor (main)", 860.0),
    ("wall-2x4-16-empty", "Walls, first floor", 1180.0),
    ("cathedral-2x10-16-r30", "Upstairs sloped ceiling", 310.0),
    ("floor-2x10-16-empty", "Floor over crawlspace", 860.0),
    ("rim-2x10-empty", "Rim joist", 120.0),
]


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
    for typical, name, area in DEMO_SURFACES:
        add_surface(session=session, house=house, name=name, kind="", area=area, typical=typical)
    return house.id
