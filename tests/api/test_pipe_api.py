"""POST /api/v1/calc/pipe: happy paths against hand values, and every bad input -> 422."""

from __future__ import annotations

import json
import math
from typing import Any

import pytest
from fastapi.testclient import TestClient
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from server.app import create_app
from server.config import Settings

client = TestClient(create_app(Settings(environment="test", database_url="sqlite://")))
URL = "/api/v1/calc/pipe"

SI = {
    "units": "si",
    "pipe_outer_diameter": 22.0,
    "layers": [{"thickness": 19.0, "conductivity": 0.035}],
    "fluid_temperature": 55.0,
    "ambient_temperature": 15.0,
    "surface_coefficient": 9.0,
    "length": 10.0,
}
IP = {
    "units": "ip",
    "pipe_outer_diameter": 0.875,
    "layers": [{"thickness": 0.75, "conductivity": 0.25}],
    "fluid_temperature": 140.0,
    "ambient_temperature": 60.0,
    "surface_coefficient": 1.5,
    "length": 50.0,
}


def _with(base: dict[str, Any], **changes: Any) -> dict[str, Any]:
    body = json.loads(json.dumps(base))
    for key, value in changes.items():
        if value is ...:
            body.pop(key)
        else:
            body[key] = value
    return body


def _layer(**changes: Any) -> dict[str, Any]:
    return _with(SI, layers=[{**SI["layers"][0], **changes}])


def test_si_happy_path_hand_value() -> None:
    # Hand case (tests/unit/test_pipe.py): r0 = 11 mm, r1 = 30 mm, ln(30/11) = 1.0033021;
    # R' = 1.0033021/(2 pi 0.035) + 1/(2 pi 0.030 * 9) = 4.562300 + 0.5894628 = 5.151762 m·K/W
    # q' = 40/5.151762 = 7.764333 W/m; Q = 77.64333 W over 10 m; Ts = 19.57679 °C;
    # R_flat = 0.030 * 1.0033021/0.035 = 0.8599732 m²·K/W
    response = client.post(URL, json=SI)
    assert response.status_code == 200, response.text
    body = response.json()
    assert body["units"] == "si"
    assert body["r_per_length"] == pytest.approx(5.151762, rel=1e-6)
    assert body["r_insulation_per_length"] == pytest.approx(4.562300, rel=1e-6)
    assert body["heat_loss_per_length"] == pytest.approx(7.764333, rel=1e-6)
    assert body["heat_loss"] == pytest.approx(77.64333, rel=1e-6)
    assert body["surface_temperature"] == pytest.approx(19.57679, abs=1e-4)
    assert body["surface_coefficient"] == pytest.approx(9.0)
    assert body["r_equivalent_flat"] == pytest.approx(0.8599732, rel=1e-6)
    assert body["outer_diameter"] == pytest.approx(60.0)
    assert body["warnings"] == []


def test_ip_happy_path_hand_value() -> None:
    # Worked in ip units: 7/8 in pipe, 3/4 in of k = 0.25 Btu·in/(h·ft²·°F), h = 1.5, 140/60 °F.
    # r0 = 0.4375 in, r1 = 1.1875 in, ln(1.1875/0.4375) = 0.9985288; k = 0.25/12 Btu/(h·ft·°F)
    # R'_ins = 0.9985288 / (2 pi 0.25/12 = 0.1308997) = 7.628198 h·ft·°F/Btu
    # R'_s = 1 / (2 pi (1.1875/12) * 1.5 = 0.9326603) = 1.072202;  R' = 8.700400
    # q' = 80 / 8.700400 = 9.194979 Btu/(h·ft); Q = 459.7490 Btu/h over 50 ft
    # Ts = 60 + 9.194979 * 1.072202 = 69.85887 °F; R_flat = 1.1875 * 0.9985288/0.25 = 4.743012
    response = client.post(URL, json=IP)
    assert response.status_code == 200, response.text
    body = response.json()
    assert body["r_per_length"] == pytest.approx(8.700400, rel=1e-6)
    assert body["r_insulation_per_length"] == pytest.approx(7.628198, rel=1e-6)
    assert body["heat_loss_per_length"] == pytest.approx(9.194979, rel=1e-6)
    assert body["heat_loss"] == pytest.approx(459.7490, rel=1e-6)
    assert body["surface_temperature"] == pytest.approx(69.85887, abs=1e-4)
    assert body["r_equivalent_flat"] == pytest.approx(4.743012, rel=1e-6)
    assert body["outer_diameter"] == pytest.approx(2.375, rel=1e-12)


def test_optional_outputs() -> None:
    # 77.64333 W * 4000 h = 310.5733 kWh; target 5 W/m with the layer's k; computed h when
    # omitted (its parts are reported); bare pipe when layers is [].
    response = client.post(URL, json=_with(SI, hours_per_year=4000, target_heat_loss_per_length=5))
    body = response.json()
    assert body["annual_loss_kwh"] == pytest.approx(310.5733, rel=1e-6)
    assert body["annual_loss"] == pytest.approx(310.5733, rel=1e-6)
    assert body["annual_loss_unit"] == "kWh"
    assert body["target_conductivity"] == pytest.approx(0.035)
    assert body["thickness_for_target"] > 19.0  # 19 mm loses 7.76 W/m > 5 W/m
    assert body["heat_loss_per_length_at_target"] == pytest.approx(5.0, rel=1e-5)
    computed = client.post(URL, json=_with(SI, surface_coefficient=...)).json()
    assert computed["surface_coefficient_source"] == "computed"
    assert computed["surface_coefficient"] == pytest.approx(
        computed["convection_coefficient"] + computed["radiation_coefficient"]
    )
    bare = client.post(URL, json=_with(SI, layers=[])).json()
    # bare: q' = 40 * 2 pi 0.011 * 9 = 24.88141 W/m, surface at the fluid temperature
    assert bare["heat_loss_per_length"] == pytest.approx(24.88141, rel=1e-6)
    assert bare["surface_temperature"] == pytest.approx(55.0)


def test_equal_temperatures_are_allowed() -> None:
    # Documented decision: fluid == ambient is a valid request with zero heat loss.
    body = client.post(URL, json=_with(SI, fluid_temperature=15.0)).json()
    assert body["heat_loss_per_length"] == 0.0


def _assert_422(response, field: str) -> None:
    assert response.status_code == 422, response.text
    body = response.json()
    assert isinstance(body["detail"], str) and body["detail"]
    assert body["errors"], body
    for error in body["errors"]:
        assert set(error) == {"field", "message"}
        assert isinstance(error["message"], str) and error["message"]
    assert field in [error["field"] for error in body["errors"]], body


BAD_BODIES = [
    ("negative thickness", _layer(thickness=-19.0), "layers[0].thickness"),
    ("zero thickness", _layer(thickness=0.0), "layers[0].thickness"),
    ("zero conductivity", _layer(conductivity=0.0), "layers[0].conductivity"),
    ("negative conductivity", _layer(conductivity=-0.035), "layers[0].conductivity"),
    ("text conductivity", _layer(conductivity="abc"), "layers[0].conductivity"),
    ("missing thickness", {**SI, "layers": [{"conductivity": 0.035}]}, "layers[0].thickness"),
    ("unknown layer field", _layer(colour="red"), "layers[0].colour"),
    ("huge thickness", _layer(thickness=3000.0), "layers[0].thickness"),
    ("zero diameter", _with(SI, pipe_outer_diameter=0.0), "pipe_outer_diameter"),
    ("negative diameter", _with(SI, pipe_outer_diameter=-22.0), "pipe_outer_diameter"),
    ("string NaN diameter", _with(SI, pipe_outer_diameter="NaN"), "pipe_outer_diameter"),
    ("emissivity 1.5", _with(SI, emissivity=1.5), "emissivity"),
    ("emissivity 0", _with(SI, emissivity=0.0), "emissivity"),
    ("negative emissivity", _with(SI, emissivity=-0.2), "emissivity"),
    ("zero coefficient", _with(SI, surface_coefficient=0.0), "surface_coefficient"),
    ("negative coefficient", _with(SI, surface_coefficient=-9.0), "surface_coefficient"),
    ("zero length", _with(SI, length=0.0), "length"),
    ("negative length", _with(SI, length=-10.0), "length"),
    ("unknown units", _with(SI, units="metric"), "units"),
    ("unknown field", _with(SI, colour="red"), "colour"),
    ("layers not a list", _with(SI, layers={"thickness": 19.0}), "layers"),
    ("too many layers", _with(SI, layers=SI["layers"] * 21), "layers"),
    ("zero hours", _with(SI, hours_per_year=0), "hours_per_year"),
    ("more hours than a year", _with(SI, hours_per_year=9000), "hours_per_year"),
    ("zero target", _with(SI, target_heat_loss_per_length=0), "target_heat_loss_per_length"),
    (
        "unreachable target",
        _with(SI, target_heat_loss_per_length=0.01),
        "target_heat_loss_per_length",
    ),
    ("target k without target", _with(SI, target_conductivity=0.04), "target_conductivity"),
    (
        "zero target k",
        _with(SI, target_heat_loss_per_length=5, target_conductivity=0),
        "target_conductivity",
    ),
    (
        "target, two layers, no k",
        _with(SI, layers=SI["layers"] * 2, target_heat_loss_per_length=5),
        "target_conductivity",
    ),
    (
        "target on a bare pipe, no k",
        _with(SI, layers=[], target_heat_loss_per_length=5),
        "target_conductivity",
    ),
    ("below absolute zero (ip)", _with(IP, fluid_temperature=-500.0), "fluid_temperature"),
    ("ambient below absolute zero", _with(SI, ambient_temperature=-300.0), "ambient_temperature"),
    (
        "too hot for the computed h",
        _with(IP, fluid_temperature=1200.0, surface_coefficient=...),
        "fluid_temperature",
    ),
    ("coefficient far too small", _with(SI, surface_coefficient=1e-300), "surface_coefficient"),
    ("diameter far too large", _with(SI, pipe_outer_diameter=1e300), "pipe_outer_diameter"),
    ("body is a list", [SI], "body"),
]
BAD_BODIES += [
    (f"missing {name}", _with(SI, **{name: ...}), name)
    for name in (
        "units",
        "pipe_outer_diameter",
        "layers",
        "fluid_temperature",
        "ambient_temperature",
    )
]


@pytest.mark.parametrize(("case", "body", "field"), BAD_BODIES, ids=[c[0] for c in BAD_BODIES])
def test_bad_input_is_422_naming_the_field(case: str, body: Any, field: str) -> None:
    _assert_422(client.post(URL, json=body), field)


@pytest.mark.parametrize(
    ("token", "field"),
    [
        ('"pipe_outer_diameter": NaN', "pipe_outer_diameter"),
        ('"fluid_temperature": Infinity', "fluid_temperature"),
        ('"ambient_temperature": -Infinity', "ambient_temperature"),
        ('"layers": [{"thickness": NaN, "conductivity": 0.035}]', "layers[0].thickness"),
        ('"layers": [{"thickness": 19, "conductivity": Infinity}]', "layers[0].conductivity"),
        ('"emissivity": NaN', "emissivity"),
        ('"surface_coefficient": Infinity', "surface_coefficient"),
        ('"length": NaN', "length"),
    ],
)
def test_raw_nan_and_infinity_tokens_are_422(token: str, field: str) -> None:
    # Python's JSON reader accepts the bare tokens NaN / Infinity; they must never compute.
    key = token.split(":")[0].strip().strip('"')
    rest = {k: v for k, v in SI.items() if k != key}
    text = "{" + token + ", " + json.dumps(rest)[1:]
    response = client.post(URL, content=text, headers={"content-type": "application/json"})
    _assert_422(response, field)


def test_broken_json_is_a_plain_error_not_a_500() -> None:
    # The shared handler (server/api/errors.py) answers unparseable JSON with 400 and the
    # same plain body.
    response = client.post(URL, content="{not json", headers={"content-type": "application/json"})
    assert response.status_code in (400, 422)
    assert isinstance(response.json()["detail"], str)


NUMBERS = st.one_of(
    st.floats(allow_nan=False, allow_infinity=False),
    st.floats(-100.0, 1000.0),  # mostly computable: exercises the solver, not only validation
    st.sampled_from([0.0, -0.0, 1e-320, 5e-324, 1e308, -1e308, 1e-9, 1e9]),
    st.integers(-(10**20), 10**20),
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    units=st.sampled_from(["si", "ip"]),
    values=st.fixed_dictionaries(
        {
            "pipe_outer_diameter": NUMBERS,
            "fluid_temperature": NUMBERS,
            "ambient_temperature": NUMBERS,
            "thickness": NUMBERS,
            "conductivity": NUMBERS,
        },
        optional={
            "surface_coefficient": NUMBERS,
            "emissivity": NUMBERS,
            "length": NUMBERS,
            "hours_per_year": NUMBERS,
            "target_heat_loss_per_length": NUMBERS,
        },
    ),
)
def test_never_a_500(units: str, values: dict[str, Any]) -> None:
    # Invariant: any numbers at all give 200 with finite results, or a plain 422 - never a 500.
    body = {"units": units, **values}
    body["layers"] = [
        {"thickness": body.pop("thickness"), "conductivity": body.pop("conductivity")}
    ]
    response = client.post(URL, json=body)
    assert response.status_code in (200, 422), response.text
    if response.status_code == 200:
        result = response.json()
        for key in ("heat_loss_per_length", "surface_temperature", "r_per_length"):
            assert math.isfinite(result[key])
    else:
        assert response.json()["errors"]


def _numbers_in(value: Any) -> list[float]:
    if isinstance(value, dict):
        return [n for v in value.values() for n in _numbers_in(v)]
    if isinstance(value, list):
        return [n for v in value for n in _numbers_in(v)]
    return [value] if isinstance(value, float) else []


@settings(max_examples=150, deadline=None)
@given(
    units=st.sampled_from(["si", "ip"]),
    values=st.fixed_dictionaries(
        {
            "pipe_outer_diameter": st.floats(0.01, 5000.0),
            "fluid_temperature": st.floats(-300.0, 1500.0),
            "ambient_temperature": st.floats(-300.0, 1500.0),
        },
        optional={
            "surface_coefficient": st.floats(1e-3, 1e4),
            "emissivity": st.floats(1e-3, 1.0),
            "length": st.floats(1e-3, 1e6),
            "hours_per_year": st.floats(0.1, 8784.0),
            "target_heat_loss_per_length": st.floats(1e-4, 1e4),
        },
    ),
    layers=st.lists(
        st.fixed_dictionaries(
            {"thickness": st.floats(1e-3, 2000.0), "conductivity": st.floats(1e-3, 1e3)}
        ),
        max_size=3,
    ),
)
def test_plausible_ranges_compute_or_say_why(
    units: str, values: dict[str, Any], layers: list[dict[str, float]]
) -> None:
    # Invariant over wide but well-formed inputs: 200 with every number finite, or a plain 422.
    response = client.post(URL, json={"units": units, **values, "layers": layers})
    assert response.status_code in (200, 422), response.text
    body = response.json()
    if response.status_code == 200:
        assert all(math.isfinite(n) for n in _numbers_in(body))
    else:
        assert body["errors"][0]["field"] in {*values, "layers", "target_conductivity"} or body[
            "errors"
        ][0]["field"].startswith("layers[")
