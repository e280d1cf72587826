"""The firm's editable code-target table, used beside every surface."""

from __future__ import annotations

from fastapi.testclient import TestClient


def test_firm_row_replaces_packaged_row_and_drives_the_verdict(client: TestClient) -> None:
    page = client.get("/code-targets").text
    assert "Verify with your locally adopted code" in page and "from memory" in page
    house = client.post("/houses", data={"label": "Target house"}, follow_redirects=False).headers[
        "location"
    ]
    client.post(f"{house}/surfaces", data={"typical": "attic-2x6-16-r19-plus-r30", "area": "500"})
    client.post(f"{house}/settings/climate", data={"hdd": "6000", "climate_zone": "5"})
    # R-19 + R-30 attic: R-47.5 (U 0.021) meets the packaged zone 5 ceiling maximum U-0.024
    # (IECC 2021 R402.1.2, from memory) ...
    assert "✓ meets" in client.get(house).text
    # ... but not a stricter local row of U ≤ 0.017 (an invented jurisdiction for the test)
    r = client.post("/code-targets", data={"climate_zone": "5", "surface_kind": "ceiling", "r_min_ip": "60",
                                            "u_max_ip": "0.017", "note": "R-60", "edition": "Local code 2026, table 3"},
                    follow_redirects=True)  # fmt: skip
    assert r.status_code == 200 and "firm" in r.text
    assert "✗ below" in client.get(house).text
    client.post(
        "/code-targets", data={"climate_zone": "5", "surface_kind": "ceiling", "action": "reset"}
    )
    assert "✓ meets" in client.get(house).text


def test_bad_row_is_refused_with_typed_values_kept(client: TestClient) -> None:
    r = client.post("/code-targets", data={"climate_zone": "5", "surface_kind": "ceiling", "r_min_ip": "",
                                            "u_max_ip": "", "edition": "Local"})  # fmt: skip
    assert r.status_code == 422 and "needs a minimum R, a maximum U-factor, or both" in r.text
    r = client.post(
        "/code-targets",
        data={"climate_zone": "5", "surface_kind": "ceiling", "r_min_ip": "lots", "edition": "x"},
    )
    assert r.status_code == 422 and 'value="lots"' in r.text


def test_other_firm_does_not_see_our_rows(client: TestClient, other_client: TestClient) -> None:
    client.post("/code-targets", data={"climate_zone": "3", "surface_kind": "floor", "r_min_ip": "99",
                                        "edition": "Our local table"})  # fmt: skip
    assert "Our local table" not in other_client.get("/code-targets").text
    assert (
        "R-99.0" in client.get("/code-targets").text
        and "R-99.0" not in other_client.get("/code-targets").text
    )
