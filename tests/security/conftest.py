"""Fixtures for the security tests: Firm A's objects, a staff user, cheap password hashing."""

from __future__ import annotations

import hashlib
import io
import secrets
from collections.abc import Iterator
from dataclasses import dataclass
from datetime import timedelta

import pytest
from fastapi.testclient import TestClient
from PIL import Image
from sqlalchemy import select

from server import security
from server.db import session_scope
from server.models import House, Material, PriceBookItem, ShareLink, Surface, Upgrade, utcnow
from server.services.demo import load_demo_house
from server.services.photo_store import PhotoStore
from server.services.photos import PhotoLimits, add_photo
from tests.conftest import CHEAP_HASHER, Account, make_account, sign_in

#: for checks that do not depend on the database: run on SQLite only (the others on both)
SQLITE_ONLY = pytest.mark.parametrize("db_url", ["sqlite"], indirect=True)

#: text that only Firm A's pages may ever show
FIRM_A_MARKERS = (
    "Quillfeather",
    "admin@firm-a.invalid",
    "staff@firm-a.invalid",
    "Firm A attic special",
    "Firm A secret board",
)


@dataclass(frozen=True)
class FirmAObjects:
    """Ids of one of each kind of Firm A object, for filling route paths."""

    house_id: int
    surface_id: int
    upgrade_id: int
    package_slug: str
    link_id: int
    item_id: int
    user_id: int
    material_id: int
    space_id: str
    photo_id: int = 0


@pytest.fixture
def fast_hashing(monkeypatch: pytest.MonkeyPatch) -> Iterator[None]:
    """argon2id with small parameters, so tests can sign in many times (format unchanged)."""
    monkeypatch.setattr(security, "_HASHER", CHEAP_HASHER)
    security._dummy_hash.cache_clear()
    yield
    security._dummy_hash.cache_clear()


@pytest.fixture
def staff_a(app, firm_a: Account) -> Account:  # type: ignore[no-untyped-def]
    """A staff user of Firm A."""
    return make_account(app, firm=None, email="staff@firm-a.invalid", role="staff",
                        organization_id=firm_a.organization_id)  # fmt: skip


@pytest.fixture
def staff_client(app, staff_a: Account) -> Iterator[TestClient]:  # type: ignore[no-untyped-def]
    with TestClient(app) as test_client:
        sign_in(test_client, app, staff_a)
        yield test_client


@pytest.fixture
def firm_a_objects(app, firm_a: Account, staff_a: Account) -> FirmAObjects:  # type: ignore[no-untyped-def]
    """The demo house (in Firm A, the first firm) plus a share link, a price-book row and a
    custom material of Firm A."""
    org_id = firm_a.organization_id
    with session_scope(app.state.session_factory) as s:
        house_id = load_demo_house(session=s)
        house = s.get(House, house_id)
        assert house is not None and house.organization_id == org_id
        surface_id = s.scalars(select(Surface.id).where(Surface.house_id == house_id)).first()
        upgrade_id = s.scalars(select(Upgrade.id).where(Upgrade.house_id == house_id)).first()
        package_slug = house.packages[0].slug
        token = secrets.token_urlsafe(32)
        link = ShareLink(organization_id=org_id, house_id=house_id, label="for the owner",
                         token_hash=hashlib.sha256(token.encode()).hexdigest(),
                         expires_at=utcnow() + timedelta(days=30))  # fmt: skip
        item = PriceBookItem(organization_id=org_id, slug="firm-a-attic-special",
                             name="Firm A attic special", upgrade_type="attic_fill",
                             basis="per_area", units="ip", unit_cost=1.5, fixed_cost=100.0)  # fmt: skip
        material = Material(organization_id=org_id, slug="firm-a-secret-board",
                            name="Firm A secret board", category="board", kind="conductivity",
                            conductivity_w_mk=0.03, source_kind="data sheet", source="test")  # fmt: skip
        s.add_all([link, item, material])
        s.flush()
        assert surface_id is not None and upgrade_id is not None and house.spaces
        space_id = house.spaces[0]["id"]
        photo = add_photo(session=s, store=PhotoStore(app.state.settings.photo_path()),
                          limits=PhotoLimits.of(app.state.settings), house=house,
                          data=_tiny_jpeg(), caption="Firm A secret board in the attic")  # fmt: skip
        return FirmAObjects(house_id, surface_id, upgrade_id, package_slug, link.id, item.id,
                            staff_a.user_id, material.id, space_id, photo.id)  # fmt: skip


def _tiny_jpeg() -> bytes:
    out = io.BytesIO()
    Image.new("RGB", (40, 30), (90, 90, 90)).save(out, format="JPEG")
    return out.getvalue()


def assert_no_firm_a_data(text: str, where: str) -> None:
    """Fail when a response body shows any of Firm A's marker texts."""
    for marker in FIRM_A_MARKERS:
        assert marker not in text, f"{where}: shows Firm A's {marker!r}"
