"""The firm's catalog in the JSON API: imports that cannot be computed, and calc/house.

1. ``POST /api/v1/houses`` computes the document against the importing firm's catalog (the
   built-in library plus that firm's materials) before storing anything: an unknown material,
   another firm's material, an unknown surface or upgrade, is a 422 naming the field, and no
   house is stored. Another firm's material is refused in the very words of a made-up slug.
2. ``POST /api/v1/calc/house`` and ``/calc/assembly`` with a session cookie use the signed-in
   user's firm's catalog; without one, the built-in library only (and no SQL statement).

Hand-worked value: the firm's board has k = 0.025 W/(m·K); 2 in of it is
L / k = 0.0508 m / 0.025 W/(m·K) = 2.032 m²·K/W = 2.032 × 5.678263 = 11.538 h·ft²·°F/Btu
(1 h·ft²·°F/Btu = 0.1761102 m²·K/W, ASHRAE Handbook—Fundamentals unit tables).
"""

from __future__ import annotations

import copy
import json
from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import event, func, select

from server.db import session_scope
from server.documents.house import HouseDocument
from server.models import House
from server.services.comparison import compute_house
from server.services.library import add_material, catalog_for
from tests.conftest import Account

FIRM_BOARD = "firm-board-a"  # the slug add_material makes of the name "Firm board A"
OTHER_BOARD = "other-board-b"  # Firm B's, made the same way

WALL = {
    "heat_flow": "horizontal",
    "films": "ashrae",
    "layers": [
        {"name": "firm board", "thickness": 2.0, "material": FIRM_BOARD},
        {"name": "drywall", "thickness": 0.5, "material": "gypsum-board"},
    ],
}
CEILING = {
    "heat_flow": "up",
    "films": "ashrae",
    "layers": [
        {"name": "drywall", "thickness": 0.5, "material": "gypsum-board"},
        {
            "name": "joist bay",
            "thickness": 5.5,
            "cavity": {"material": "fiberglass-batt"},
            "framing": {"material": "osb", "fraction": 0.1},
        },
    ],
}
DOC: dict[str, Any] = {
    "units": "ip",
    "name": "Catalog house",
    "climate": {"hdd": 5400, "cdd": 900},
    "heating": {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.45},
    "surfaces": [
        {"id": "wall", "kind": "wall", "area": 1200, "assembly": copy.deepcopy(WALL)},
        {"id": "attic", "kind": "ceiling", "area": 1000, "assembly": copy.deepcopy(CEILING)},
    ],
    "upgrades": [
        {
            "id": "wall-more",
            "surface": "wall",
            "assembly": {
                **WALL,
                "layers": [{**WALL["layers"][0], "thickness": 3.0}, {**WALL["layers"][1]}],
            },
            "cost": {"fixed": 900, "per_area": 1.5},
            "life_years": 30,
        },
    ],
    "packages": [{"id": "walls", "upgrades": ["wall-more"]}],
}


def _material(app: Any, organization_id: int, name: str) -> str:
    with session_scope(app.state.session_factory) as session:
        row = add_material(
            session=session,
            organization_id=organization_id,
            name=name,
            category="board",
            conductivity_w_mk=0.025,
            r_si=None,
            source="data sheet (test)",
        )
        return row.slug


@pytest.fixture
def firm_board(app: Any, firm_a: Account) -> str:
    slug = _material(app, firm_a.organization_id, "Firm board A")
    assert slug == FIRM_BOARD
    return slug


@pytest.fixture
def other_board(app: Any, firm_b: Account) -> str:
    slug = _material(app, firm_b.organization_id, "Other board B")
    assert slug == OTHER_BOARD
    return slug


def _houses(app: Any, organization_id: int) -> int:
    with session_scope(app.state.session_factory) as session:
        query = select(func.count()).select_from(House)
        return session.scalar(query.where(House.organization_id == organization_id)) or 0


def _changed(path: str, value: Any) -> dict[str, Any]:
    """DOC with the item at ``path`` (dotted, list indexes as numbers) set to ``value``."""
    doc = copy.deepcopy(DOC)
    *parents, last = path.split(".")
    node: Any = doc
    for key in parents:
        node = node[int(key)] if key.isdigit() else node[key]
    node[int(last) if last.isdigit() else last] = value
    return doc


# --- 1. imports --------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        ("surfaces.0.assembly.layers.0.material", "no-such-board",
         "surfaces[0].assembly.layers[0].material"),
        ("surfaces.1.assembly.layers.1.cavity.material", "no-such-batt",
         "surfaces[1].assembly.layers[1].cavity.material"),
        ("surfaces.1.assembly.layers.1.framing.material", "no-such-wood",
         "surfaces[1].assembly.layers[1].framing.material"),
        ("upgrades.0.assembly.layers.1.material", "no-such-gypsum",
         "upgrades[0].assembly.layers[1].material"),
        ("upgrades.0.surface", "no-such-surface", "upgrades[0].surface"),
        ("packages.0.upgrades.0", "no-such-upgrade", "packages[0].upgrades[0]"),
    ],
)  # fmt: skip
def test_an_import_that_cannot_be_computed_is_refused(
    client: TestClient, app: Any, firm_a: Account, firm_board: str, path: str, value: str,
    field: str,
) -> None:  # fmt: skip
    response = client.post("/api/v1/houses", json=_changed(path, value))
    assert response.status_code == 422, response.text
    assert response.json()["errors"][0]["field"] == field
    assert value in response.json()["errors"][0]["message"]
    assert _houses(app, firm_a.organization_id) == 0  # nothing stored


def test_a_pipe_insulation_upgrade_on_a_wall_is_refused(
    client: TestClient, app: Any, firm_a: Account, firm_board: str
) -> None:
    doc = copy.deepcopy(DOC)
    pipe = {"pipe_outer_diameter": 0.875, "fluid_temperature": 140, "ambient_temperature": 60}
    doc["surfaces"].append(
        {"id": "pipe", "kind": "pipe_run", "length": 40, "pipe": pipe, "hours_per_year": 2000}
    )
    doc["upgrades"].append(
        {"id": "wrap", "kind": "pipe_insulation", "surface": "wall",
         "pipe_layers": [{"thickness": 0.75, "conductivity": 0.25}], "cost": {"fixed": 80}}
    )  # fmt: skip
    response = client.post("/api/v1/houses", json=doc)
    assert response.status_code == 422, response.text
    assert response.json()["errors"][0] == {
        "field": "upgrades[1].surface",
        "message": "'wall' is not a pipe run",
    }
    doc["upgrades"][1]["surface"] = "pipe"  # the same run, on the pipe: computable, stored
    assert client.post("/api/v1/houses", json=doc).status_code == 201
    assert _houses(app, firm_a.organization_id) == 1


def test_another_firms_material_is_refused_like_an_unknown_one(
    client: TestClient, app: Any, firm_a: Account, firm_board: str, other_board: str
) -> None:
    answers = {}
    for slug in (OTHER_BOARD, "no-such-board"):
        response = client.post(
            "/api/v1/houses", json=_changed("surfaces.0.assembly.layers.0.material", slug)
        )
        assert response.status_code == 422, response.text
        answers[slug] = response.text.replace(slug, "<slug>")
    assert answers[OTHER_BOARD] == answers["no-such-board"]
    assert "there is no material '<slug>' in the library" in answers[OTHER_BOARD]
    assert _houses(app, firm_a.organization_id) == 0


# --- 2. calc/house and calc/assembly with the firm's catalog --------------------------------


def test_an_export_computes_the_same_through_the_signed_in_api(
    client: TestClient, anon_client: TestClient, other_client: TestClient, app: Any,
    firm_a: Account, firm_board: str, other_board: str,
) -> None:  # fmt: skip
    saved = client.post("/api/v1/houses", json=DOC)
    assert saved.status_code == 201, saved.text
    export = client.get(f"/api/v1/houses/{saved.json()['id']}/document")
    assert export.status_code == 200
    # every field of each upgrade alone, as compute_house gives it by default
    document = {**export.json(), "detail": {"upgrades_alone": "full"}}

    signed_in = client.post("/api/v1/calc/house", json=document)
    assert signed_in.status_code == 200, signed_in.text
    # The compare page's code path: compute_house against catalog_for the firm.
    with session_scope(app.state.session_factory) as session:
        catalog = catalog_for(session=session, organization_id=firm_a.organization_id)
        expected = compute_house(HouseDocument.model_validate(document), catalog=catalog)
    assert signed_in.json() == json.loads(expected.model_dump_json())

    # The wall's UA is its area over the assembly's total R, which holds 2 in of the
    # firm's board at R 11.538 (hand-worked in the module docstring).
    wall = client.post("/api/v1/calc/assembly", json={"units": "ip", **WALL})
    assert wall.status_code == 200, wall.text
    assert wall.json()["layers"][0]["r"] == pytest.approx(11.538, abs=0.001)
    ua_wall = signed_in.json()["as_found"]["ua_by_surface"]["wall"]
    assert ua_wall == pytest.approx(1200 / wall.json()["r_total"], rel=1e-9)

    # Without the cookie, and for another firm, the material is not in the catalog.
    for other in (anon_client, other_client):
        refused = other.post("/api/v1/calc/house", json=document)
        assert refused.status_code == 422, refused.text
        assert refused.json()["errors"][0] == {
            "field": "surfaces[0].assembly.layers[0].material",
            "message": f"there is no material '{FIRM_BOARD}' in the library",
        }
        assembly = other.post("/api/v1/calc/assembly", json={"units": "ip", **WALL})
        assert assembly.status_code == 422
        assert assembly.json()["errors"][0]["field"] == "layers[0].material"


def test_an_anonymous_calc_house_runs_no_sql_statement(
    client: TestClient, anon_client: TestClient, app: Any, firm_board: str
) -> None:
    doc = json.loads(json.dumps(DOC).replace(FIRM_BOARD, "osb"))  # built-in materials only
    statements: list[str] = []

    def record(_conn, _cursor, statement, _params, _context, _many):  # type: ignore[no-untyped-def]
        statements.append(statement)

    event.listen(app.state.engine, "before_cursor_execute", record)
    try:
        assert anon_client.post("/api/v1/calc/house", json=doc).status_code == 200
        anonymous = len(statements)
        assert client.post("/api/v1/calc/house", json=doc).status_code == 200
    finally:
        event.remove(app.state.engine, "before_cursor_execute", record)
    assert anonymous == 0
    # Signed in: the user and firm, then the firm's materials (one threadpool hop).
    assert len(statements) == 2, statements


def test_the_schema_says_which_catalog_is_used(anon_client: TestClient) -> None:
    paths = anon_client.get("/openapi.json").json()["paths"]
    for path in ("/api/v1/calc/house", "/api/v1/calc/assembly"):
        description = paths[path]["post"]["description"]
        assert "built-in library" in description and "firm's own materials" in description
