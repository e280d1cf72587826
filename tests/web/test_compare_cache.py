"""The compare page's kept contexts (server/web/compare_cache.py) are never stale.

Each test views a page, changes what its figures depend on in some way, and checks that the
next view equals a view computed afresh (cache emptied) and differs from the first one; an
unchanged house is served from the cache, byte for byte what a fresh computation gives.
"""

from __future__ import annotations

from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import select

from server.db import session_scope
from server.documents.house import HouseDocument
from server.models import House, Surface, Upgrade
from server.services import price_book
from server.services.house_document import import_house
from server.services.houses import update_surface
from server.web import compare_cache
from server.web.compare_cache import CACHE, _Cache
from tests.utils.auth import create_signed_in_user, session_headers
from tests.utils.houses import big_house_document


@pytest.fixture
def viewer(app: Any) -> Any:
    org_id, user_id, version = create_signed_in_user(
        app.state.session_factory, email="cache@example.com"
    )
    headers = session_headers(
        app.state.settings.secret_key, user_id=user_id, session_version=version
    )
    with session_scope(app.state.session_factory) as session:
        doc = HouseDocument.model_validate(big_house_document(surfaces=3, upgrades_per_surface=2))
        house_id = import_house(session=session, organization_id=org_id, document=doc).id
    CACHE.clear()
    with TestClient(app) as client:

        def view(fresh: bool = False, **params: Any) -> str:
            if fresh:
                CACHE.clear()
            response = client.get(f"/houses/{house_id}/compare", params=params, headers=headers)
            assert response.status_code == 200, response.text[:300]
            return response.text

        view.house_id = house_id  # type: ignore[attr-defined]
        view.org_id = org_id  # type: ignore[attr-defined]
        yield view
    CACHE.clear()


def test_an_unchanged_house_is_served_from_the_cache_exactly(viewer: Any) -> None:
    first = viewer()
    hits = CACHE.hits
    again = viewer()
    assert CACHE.hits == hits + 1
    assert again == first == viewer(fresh=True)


def test_a_saved_change_shows_at_once(app: Any, viewer: Any) -> None:
    before = viewer()
    with session_scope(app.state.session_factory) as session:
        house = session.get(House, viewer.house_id)
        surface = house.surfaces[0]
        update_surface(session=session, house=house, surface=surface, name=surface.name,
                       kind=surface.kind, area=surface.area * 3, expected_version=None)  # fmt: skip
    after = viewer()
    assert after != before
    assert after == viewer(fresh=True)


def test_a_child_row_changed_without_touching_the_house_still_shows(app: Any, viewer: Any) -> None:
    # A future service that forgets touch(house): the flush hook bumps the house's version.
    before = viewer()
    with session_scope(app.state.session_factory) as session:
        upgrade = session.scalars(
            select(Upgrade).where(Upgrade.house_id == viewer.house_id)
        ).first()
        upgrade.document = {**upgrade.document, "cost": {"fixed": 99_999.0}}
    assert viewer() != before
    assert viewer() == viewer(fresh=True)
    with session_scope(app.state.session_factory) as session:
        surface = session.scalars(
            select(Surface).where(Surface.house_id == viewer.house_id)
        ).first()
        session.delete(surface)  # its upgrades go with it (cascade)
    third = viewer()
    assert third == viewer(fresh=True)


def test_a_price_book_change_shows_at_once(app: Any, viewer: Any) -> None:
    with session_scope(app.state.session_factory) as session:
        item = price_book.add_item(
            session=session, organization_id=viewer.org_id, name="Walls: test fill",
            upgrade_type="wall_fill", basis="per_area", unit_cost=1.0, fixed_cost=10.0,
        )  # fmt: skip
        item_id, slug = item.id, item.slug
        upgrade = session.scalars(
            select(Upgrade).where(Upgrade.house_id == viewer.house_id)
        ).first()
        upgrade.document = {**upgrade.document, "price_item": slug}
    linked = viewer()
    with session_scope(app.state.session_factory) as session:
        price_book.update_item(
            session=session, organization_id=viewer.org_id, item_id=item_id,
            name="Walls: test fill", upgrade_type="wall_fill", basis="per_area", units="ip",
            unit_cost=7.5, fixed_cost=10.0,
        )  # fmt: skip
    repriced = viewer()
    assert repriced != linked
    assert repriced == viewer(fresh=True)


def test_each_selection_is_its_own_entry(viewer: Any) -> None:
    plain = viewer()
    picked = viewer(pick=["s0-u1"])
    column = '<th scope="col">Your selection</th>'
    assert column in picked and column not in plain
    assert viewer(pick=["s0-u1", "s1-u0"]) == viewer(fresh=True, pick=["s0-u1", "s1-u0"])


def test_memory_stays_bounded(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(compare_cache, "MAX_WEIGHT_KB", 3)
    cache = _Cache()
    for key in range(10):
        cache.get_or_build(key, lambda: {"result": None})  # weight 1 each
    assert len(cache._entries) == 3 and list(cache._entries) == [7, 8, 9]  # oldest left first
    built: list[int] = []
    cache.get_or_build(8, lambda: built.append(1) or {})  # type: ignore[func-returns-value]
    assert not built  # 8 was kept


def test_another_firms_materials_are_a_different_key() -> None:
    from server.services.catalog import MaterialSpec, builtin_catalog

    own = dict(builtin_catalog())
    own["firm-foam"] = MaterialSpec("firm-foam", "Firm foam", "conductivity", 0.03, None)
    assert compare_cache._catalog_key(builtin_catalog()) == "built-in"
    assert compare_cache._catalog_key(own) != compare_cache._catalog_key(dict(builtin_catalog()))


def test_skipping_the_single_upgrade_options_leaves_the_packages_unchanged() -> None:
    # The compare page asks compute_house for packages only (upgrades_alone=False): every
    # package figure must be the same as in the full comparison, and the warnings too.
    from server.services.catalog import builtin_catalog
    from server.services.comparison import compute_house

    doc = HouseDocument.model_validate(big_house_document(surfaces=6, upgrades_per_surface=3))
    full = compute_house(doc, catalog=builtin_catalog())
    packages_only = compute_house(doc, catalog=builtin_catalog(), upgrades_alone=False)
    assert len(full.upgrades) == 18 and packages_only.upgrades == []
    assert packages_only.packages == full.packages
    assert packages_only.as_found == full.as_found
    assert packages_only.warnings == full.warnings


def test_the_kept_page_shows_each_viewer_their_own_name_role_and_token(
    app: Any, viewer: Any
) -> None:
    # The body is kept once per state of the house and shown to every viewer; the page
    # around it is each viewer's own. Three people of one firm, two roles, one without a
    # name, one with markup in it: each sees only their own values.
    from server.security import CSRF_HEADER
    from server.services.accounts import create_user

    people = [("admin", "Ana <b>Admin</b>"), ("staff", "Sam Staff"), ("staff", "")]
    headers = []
    with session_scope(app.state.session_factory) as session:
        for i, (role, name) in enumerate(people):
            user = create_user(session=session, organization_id=viewer.org_id,
                               email=f"person{i}@example.com", password="a-long-password-1",
                               role=role, name=name)  # fmt: skip
            session.flush()
            headers.append((user.id, user.session_version))
    secret = app.state.settings.secret_key
    pages = []
    with TestClient(app) as client:
        for user_id, version in headers:
            sent = session_headers(secret, user_id=user_id, session_version=version)
            response = client.get(f"/houses/{viewer.house_id}/compare", headers=sent)
            assert response.status_code == 200
            pages.append((sent[CSRF_HEADER], response.text))
    assert CACHE.hits >= 2  # the later views were kept bodies
    for i, (token, html) in enumerate(pages):
        role, name = people[i]
        shown = name.replace("<", "&lt;").replace(">", "&gt;") or f"person{i}@example.com"
        assert f"<strong>{shown}</strong></a>" in html
        assert html.count(token) == 2  # hx-headers on <body> and the sign-out form
        assert ("/admin/users" in html) == (role == "admin")
        for j, (other_token, _other) in enumerate(pages):
            if j != i:
                assert other_token not in html
    assert "<b>Admin</b>" not in pages[0][1]  # the name is escaped, never markup


def test_the_kept_body_may_read_nothing_of_the_request() -> None:
    # It is shown to every viewer: a CSRF token or name read while rendering it would leak.
    shared = compare_cache.SharedRender()
    with pytest.raises(RuntimeError, match=r"request\.state"):
        _ = shared.state
    with pytest.raises(RuntimeError, match="must not test the request"):
        bool(shared)


def test_the_flush_hook_comes_with_the_houses_service_not_the_web_layer() -> None:
    # A process that stores houses without the web app (a script, the CLI) must still mark a
    # house changed when only a child row changes, or every process's kept pages go stale.
    import subprocess
    import sys

    code = (
        "import sys\n"
        "from sqlalchemy import event\n"
        "from sqlalchemy.orm import Session\n"
        "import server.services.houses\n"
        "from server.services.house_changes import touch_changed_houses\n"
        "assert event.contains(Session, 'before_flush', touch_changed_houses)\n"
        "assert not [m for m in sys.modules if m.startswith('server.web')], 'web imported'\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
