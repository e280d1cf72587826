"""Pipe sizing page: same code path as POST /api/v1/calc/pipe."""

from __future__ import annotations

import re

from fastapi.testclient import TestClient

FORM = {"units": "si", "pipe_outer_diameter": "22", "thickness": "19", "conductivity": "0.035",
        "fluid_temperature": "55", "ambient_temperature": "15", "surface_coefficient": "9",
        "emissivity": "0.9", "length": "10", "hours_per_year": "", "target_heat_loss_per_length": ""}  # fmt: skip


def test_pipe_page_matches_hand_value(client: TestClient) -> None:
    # Hand: r1 = 0.011 m, r2 = 0.030 m; R' = ln(30/11)/(2π·0.035) + 1/(2π·0.030·9)
    # = 1.00330/0.21991 + 1/1.69646 = 4.56228 + 0.58946 = 5.15174 m·K/W; q' = 40/5.15174 = 7.764 W/m
    r = client.post("/tools/pipe", data=FORM, headers={"HX-Request": "true"})
    assert r.status_code == 200
    assert re.search(r'class="big">7\.8 ', r.text)
    api = client.post("/api/v1/calc/pipe", json={
        "units": "si", "pipe_outer_diameter": 22, "layers": [{"thickness": 19, "conductivity": 0.035}],
        "fluid_temperature": 55, "ambient_temperature": 15, "surface_coefficient": 9, "length": 10})  # fmt: skip
    assert abs(api.json()["heat_loss_per_length"] - 7.764) < 0.001


def test_pipe_page_keeps_bad_input(client: TestClient) -> None:
    bad = {**FORM, "thickness": "three quarters", "conductivity": "0"}
    r = client.post("/tools/pipe", data=bad)
    assert r.status_code == 422
    assert 'value="three quarters"' in r.text and "must be greater than zero" in r.text


def test_pipe_page_fraction_inch_entry(client: TestClient) -> None:
    r = client.get("/tools/pipe")
    assert r.status_code == 200 and 'value="7/8"' in r.text
