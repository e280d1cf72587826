"""The compare page costs the same number of SQL statements whatever the house's size (no N+1).

Statements are counted with SQLAlchemy's ``before_cursor_execute`` event on the app's engine
during one GET, on SQLite and on PostgreSQL (the ``db_url`` fixture). A 3-surface house and a
40-surface house with 5 upgrades per surface and 6 packages cost the same: a first view (which
computes) 7 statements when this was written (the signed-in user, the house row's key columns
with the firm's price-book stamp, the firm's materials, the rest of the house row, then
surfaces, upgrades and packages, one statement each), a second view of the unchanged house 3
(the computed page is kept, see server/web/compare_cache.py). The bound asserted is 10.
"""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import event

from server.db import session_scope
from server.documents.house import HouseDocument
from server.services.house_document import import_house
from tests.utils.auth import create_signed_in_user, session_headers
from tests.utils.houses import big_house_document
from tests.utils.loop_probe import statements_on_the_event_loop

MAX_STATEMENTS = 10


@contextmanager
def counted(engine: Any) -> Iterator[list[str]]:
    statements: list[str] = []

    def record(_conn, _cursor, statement, _params, _context, _many):  # type: ignore[no-untyped-def]
        statements.append(statement)

    event.listen(engine, "before_cursor_execute", record)
    try:
        yield statements
    finally:
        event.remove(engine, "before_cursor_execute", record)


def _import(app: Any, organization_id: int, document: dict[str, Any]) -> int:
    with session_scope(app.state.session_factory) as session:
        house = import_house(
            session=session,
            organization_id=organization_id,
            document=HouseDocument.model_validate(document),
        )
        return house.id


@pytest.fixture
def signed_in(app: Any) -> tuple[int, dict[str, str]]:
    org_id, user_id, version = create_signed_in_user(
        app.state.session_factory, email="counter@example.com"
    )
    secret = app.state.settings.secret_key
    return org_id, session_headers(secret, user_id=user_id, session_version=version)


def test_compare_page_statement_count_does_not_grow_with_the_house(
    app: Any, signed_in: tuple[int, dict[str, str]]
) -> None:
    org_id, headers = signed_in
    small = _import(app, org_id, big_house_document(surfaces=3, upgrades_per_surface=5))
    big = _import(app, org_id, big_house_document(surfaces=40, upgrades_per_surface=5))
    counts = {}
    with TestClient(app) as client:
        for label, house_id in (("small", small), ("big", big)):
            # Twice each: a second view of the same house must not cost more either.
            for attempt in range(2):
                with counted(app.state.engine) as statements:
                    response = client.get(f"/houses/{house_id}/compare", headers=headers)
                assert response.status_code == 200, response.text[:300]
                assert "cannot be compared" not in response.text
                counts[(label, attempt)] = len(statements)
    assert counts[("small", 0)] == counts[("big", 0)], counts
    assert counts[("small", 1)] == counts[("big", 1)], counts
    assert counts[("big", 1)] <= counts[("big", 0)], counts  # a kept page never costs more
    assert max(counts.values()) <= MAX_STATEMENTS, counts


def test_compare_page_with_a_selection_costs_no_more_per_upgrade(
    app: Any, signed_in: tuple[int, dict[str, str]]
) -> None:
    # Ticking upgrades ("pick") adds a package computed on the fly: still no extra statements.
    org_id, headers = signed_in
    house_id = _import(app, org_id, big_house_document(surfaces=40, upgrades_per_surface=5))
    with TestClient(app) as client:
        with counted(app.state.engine) as plain:
            client.get(f"/houses/{house_id}/compare", headers=headers)
        picks = [("pick", f"s{s}-u0") for s in range(40)]
        with counted(app.state.engine) as chosen:
            response = client.get(f"/houses/{house_id}/compare", params=picks, headers=headers)
    assert response.status_code == 200
    assert "Your selection" in response.text
    assert len(chosen) <= len(plain), (len(plain), len(chosen))


def test_no_page_waits_on_the_database_on_the_event_loop(
    app: Any, signed_in: tuple[int, dict[str, str]]
) -> None:
    # The compare page and the session/sign-in dependencies are async (fewer threadpool hops):
    # every statement they cause must still run in the threadpool, or one slow query would
    # stall every request of the process. First view (computes) and second view (kept).
    org_id, headers = signed_in
    house_id = _import(app, org_id, big_house_document(surfaces=3, upgrades_per_surface=2))
    paths = [f"/houses/{house_id}/compare", f"/houses/{house_id}/compare",
             f"/houses/{house_id}", "/houses", f"/houses/{house_id}/compare?pick=s0-u0"]  # fmt: skip
    blocking = statements_on_the_event_loop(app.state.engine)
    with TestClient(app) as client:
        for path in paths:
            with counted(app.state.engine) as everything:
                response = client.get(path, headers=headers)
            assert response.status_code == 200, (path, response.text[:300])
            assert everything, path  # this page's statements were seen
            assert blocking == [], (path, blocking)
