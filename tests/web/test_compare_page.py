"""Compare page and house export/import: the same compute_house as POST /api/v1/calc/house."""

from __future__ import annotations

import re

from fastapi.testclient import TestClient

from server.services.demo import load_demo_house


def _demo(app) -> int:  # type: ignore[no-untyped-def]
    with app.state.session_factory() as s:
        house_id = load_demo_house(session=s)
        s.commit()
    return house_id


def _row(html: str, label: str) -> list[str]:
    match = re.search(rf"{re.escape(label)}</th>(.*?)</tr>", html, re.S)
    assert match, label
    return re.findall(r'<td class="num">([^<]*)</td>', match.group(1))


def test_compare_page_numbers_equal_the_api(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = _demo(app)
    doc = client.get(f"/api/v1/houses/{house_id}/document")
    assert doc.status_code == 200
    api = client.post("/api/v1/calc/house", json=doc.json()).json()
    page = client.get(f"/houses/{house_id}/compare").text
    costs = _row(page, "Energy cost per year")
    assert costs[0] == f"${api['as_found']['total_cost']:,.0f}"
    assert costs[1:] == [f"${p['total_cost']:,.0f}" for p in api["packages"]]
    paybacks = _row(page, "Simple payback")
    assert paybacks[1:] == [f"{p['simple_payback_years']:,.1f} yr" for p in api["packages"]]
    assert page.count("<svg") >= 3 and "Cautions" in page and "combustion safety" in page


def test_compare_toggle_builds_a_package_on_the_fly(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = _demo(app)
    page = client.get(f"/houses/{house_id}/compare", params={"pick": ["attic-r49", "air-seal"]},
                      headers={"HX-Request": "true"}).text  # fmt: skip
    costs = _row(page, "Energy cost per year")
    # "Your selection" = the same two upgrades as the saved "Attic + air sealing" package
    assert costs[-1] == costs[1]


def test_export_import_round_trip(app, client: TestClient) -> None:  # type: ignore[no-untyped-def]
    house_id = _demo(app)
    doc = client.get(f"/api/v1/houses/{house_id}/document").json()
    created = client.post("/api/v1/houses", json=doc)
    assert created.status_code == 201
    again = client.get(f"/api/v1/houses/{created.json()['id']}/document").json()
    assert again == doc
    assert client.get("/api/v1/houses/999999/document").status_code == 404
    bad = dict(doc, surfaces=[])
    r = client.post("/api/v1/houses", json=bad)
    assert r.status_code == 422 and r.json()["errors"][0]["field"] == "surfaces"
