"""POST /api/v1/calc/assembly and /calc/thickness: hand values, warnings, and every bad input.

Hand values are worked in the comments; unit factors are the published ones of DESIGN.md
(1 h·ft²·°F/Btu = 0.1761102 m²·K/W, 1 Btu·in/(h·ft²·°F) = 0.1442279 W/(m·K), 1 in = 25.4 mm).
"""

from __future__ import annotations

import copy
import csv
import json
import math
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient
from hypothesis import example, given, settings
from hypothesis import strategies as st

from server.app import create_app
from server.config import Settings
from tests.utils.examples import API_WALL_IP

app = create_app(Settings(environment="test", database_url="sqlite://"))
client = TestClient(app)
#: same app, but a server error comes back as a 500 response instead of being raised here
quiet = TestClient(app, raise_server_exceptions=False)
URL = "/api/v1/calc/assembly"
THICKNESS_URL = "/api/v1/calc/thickness"
MATERIALS_CSV = Path(__file__).resolve().parents[2] / "server" / "data" / "materials.csv"

R_FACTOR = 0.1761102  # published: 1 h·ft²·°F/Btu in m²·K/W
K_FACTOR = 0.1442279  # published: 1 Btu·in/(h·ft²·°F) in W/(m·K)
RSI_PER_R = 5.678263  # published: RSI = R / 5.678263

EXAMPLE_IP: dict[str, Any] = copy.deepcopy(API_WALL_IP)

# The same wall converted by hand with the published factors:
# R 0.62 x 0.1761102 = 0.1091883; 0.4375 in x 25.4 = 11.1125 mm; 3.5 in = 88.9 mm;
# R-13 x 0.1761102 = 2.289433; k 0.80 x 0.1442279 = 0.1153823; 0.5 in = 12.7 mm;
# k 1.11 x 0.1442279 = 0.1600930
EXAMPLE_SI: dict[str, Any] = {
    "units": "si",
    "heat_flow": "horizontal",
    "films": "ashrae",
    "layers": [
        {"name": "siding", "r": 0.1091883},
        {"name": "sheathing", "thickness": 11.1125, "r": 0.1091883},
        {
            "name": "stud bay",
            "thickness": 88.9,
            "cavity": {"r": 2.289433},
            "framing": {"conductivity": 0.1153823, "fraction": 0.25},
        },
        {"name": "drywall", "thickness": 12.7, "conductivity": 0.1600930},
    ],
}

# Hand values of the example wall (ip): series part 0.62 + 0.62 + 0.5/1.11 + 0.68 + 0.17
# = 2.5404505; parallel path 1/(0.75/15.5404505 + 0.25/6.9154505) = 11.84665; isothermal
# 2.5404505 + 1/(0.75/13 + 0.25/4.375) = 11.24858; combined 11.54761; error 0.025895
HAND_PARALLEL = 11.84665
HAND_ISOTHERMAL = 11.24858
HAND_COMBINED = 11.54761
HAND_ERROR = 0.025895


def _post(body: Any, url: str = URL) -> dict[str, Any]:
    response = client.post(url, json=body)
    assert response.status_code == 200, response.text
    return response.json()


def _with_layer(index: int, layer: dict[str, Any], base: dict[str, Any] = EXAMPLE_IP) -> Any:
    body = copy.deepcopy(base)
    body["layers"][index] = layer
    return body


def _assert_422(response: Any, field: str) -> dict[str, Any]:
    """A 422 with the contract's body, naming ``field`` (API.md "Errors", server/api/errors.py)."""
    assert response.status_code == 422, response.text
    body = response.json()
    assert set(body) == {"detail", "errors"}
    assert isinstance(body["detail"], str) and body["detail"]
    assert isinstance(body["errors"], list) and body["errors"]
    for problem in body["errors"]:
        assert set(problem) == {"field", "message"}
        assert isinstance(problem["field"], str) and isinstance(problem["message"], str)
        assert problem["message"]
        # plain words, not a Python traceback or type name
        assert "Traceback" not in problem["message"] and "Error" not in problem["message"]
    fields = [p["field"] for p in body["errors"]]
    assert field in fields, fields
    return body


# --- the API.md example ------------------------------------------------------------------------


def test_api_example_ip() -> None:
    body = _post(EXAMPLE_IP)
    assert body["units"] == "ip"
    # ASHRAE films, horizontal (from memory): inside 0.68, outside 0.17
    assert body["films"] == {"inside": pytest.approx(0.68), "outside": pytest.approx(0.17)}
    assert body["r_parallel_path"] == pytest.approx(HAND_PARALLEL, rel=1e-6)
    assert body["r_isothermal_planes"] == pytest.approx(HAND_ISOTHERMAL, rel=1e-6)
    assert body["r_iso6946"] == pytest.approx(HAND_COMBINED, rel=1e-6)
    assert body["iso6946_max_error"] == pytest.approx(HAND_ERROR, rel=1e-4)
    # API.md's published rounded response: 11.85 / 11.25 / 11.55 / 0.026, r_total 11.85
    assert round(body["r_parallel_path"], 2) == 11.85
    assert round(body["r_isothermal_planes"], 2) == 11.25
    assert round(body["r_iso6946"], 2) == 11.55
    assert round(body["iso6946_max_error"], 3) == 0.026
    assert body["method"] == "parallel_path"
    assert body["r_total"] == pytest.approx(HAND_PARALLEL, rel=1e-6)
    # U = 1/R: 1/11.84665 = 0.08441 (API.md: 0.0844)
    assert body["u_factor"] == pytest.approx(1 / HAND_PARALLEL, rel=1e-6)
    assert round(body["u_factor"], 4) == 0.0844
    assert body["rsi_total"] == pytest.approx(HAND_PARALLEL / RSI_PER_R, rel=1e-6)
    assert body["r_steel_corrected"] is None
    assert body["warnings"] == []
    layers = body["layers"]
    assert [layer["name"] for layer in layers] == ["siding", "sheathing", "stud bay", "drywall"]
    # stud bay: isothermal share 1/(0.75/13 + 0.25/4.375) = 8.708134; paths 13 and 3.5/0.8
    assert layers[2]["r"] == pytest.approx(8.708134, rel=1e-6)
    assert layers[2]["r_cavity_path"] == pytest.approx(13.0, rel=1e-9)
    assert layers[2]["r_framing_path"] == pytest.approx(4.375, rel=1e-9)
    # drywall 0.5/1.11 = 0.4504505; homogeneous layers have no paths
    assert layers[3]["r"] == pytest.approx(0.4504505, rel=1e-6)
    assert layers[3]["r_cavity_path"] is None and layers[3]["r_framing_path"] is None


def test_api_example_si_is_the_same_wall() -> None:
    body = _post(EXAMPLE_SI)
    assert body["units"] == "si"
    # films 0.68 x 0.1761102 = 0.1197549 and 0.17 x 0.1761102 = 0.02993873 m²·K/W
    assert body["films"]["inside"] == pytest.approx(0.1197549, rel=1e-6)
    assert body["films"]["outside"] == pytest.approx(0.02993873, rel=1e-6)
    # RSI = R / 5.678263: 11.84665 -> 2.086315; 11.24858 -> 1.980990; 11.54761 -> 2.033653
    # (inputs rounded to 7 digits: rel 2e-6)
    assert body["r_parallel_path"] == pytest.approx(HAND_PARALLEL / RSI_PER_R, rel=2e-6)
    assert body["r_isothermal_planes"] == pytest.approx(HAND_ISOTHERMAL / RSI_PER_R, rel=2e-6)
    assert body["r_iso6946"] == pytest.approx(HAND_COMBINED / RSI_PER_R, rel=2e-6)
    assert body["iso6946_max_error"] == pytest.approx(HAND_ERROR, rel=1e-4)
    # U in W/(m²·K) = 5.678263 / 11.84665 = 0.479317
    assert body["u_factor"] == pytest.approx(RSI_PER_R / HAND_PARALLEL, rel=2e-6)
    assert body["r_ip_total"] == pytest.approx(HAND_PARALLEL, rel=2e-6)
    assert body["layers"][0]["thickness"] is None
    assert body["layers"][2]["thickness"] == pytest.approx(88.9, rel=1e-12)


def test_method_iso6946_uses_the_combined_value() -> None:
    body = _post({**EXAMPLE_IP, "method": "iso6946"})
    assert body["method"] == "iso6946"
    assert body["r_total"] == pytest.approx(body["r_iso6946"], rel=1e-12)
    assert body["r_total"] == pytest.approx(HAND_COMBINED, rel=1e-6)
    assert body["u_factor"] == pytest.approx(1 / HAND_COMBINED, rel=1e-6)


def test_iso6946_films_up() -> None:
    # ISO 6946 films, heat flow up (from memory): Rsi 0.10 + Rse 0.04 = 0.14; one RSI 2.0 layer
    body = _post({"units": "si", "films": "iso6946", "heat_flow": "up", "layers": [{"r": 2.0}]})
    assert body["films"] == {"inside": pytest.approx(0.10), "outside": pytest.approx(0.04)}
    assert body["r_total"] == pytest.approx(2.14, rel=1e-12)


def test_no_framed_layer_all_totals_equal() -> None:
    # API.md: with no framed layer all three totals are equal; 0.62 + 0.45 + films 0.85 = 1.92
    body = _post({"units": "ip", "layers": [{"r": 0.62}, {"r": 0.45}]})
    for key in ("r_parallel_path", "r_isothermal_planes", "r_iso6946", "r_total"):
        assert body[key] == pytest.approx(1.92, rel=1e-12)


# --- materials from the built-in library -------------------------------------------------------


def _csv_conductivity(slug: str) -> float:
    with MATERIALS_CSV.open(newline="") as handle:
        for row in csv.DictReader(handle):
            if row["slug"] == slug:
                return float(row["conductivity_w_mk"])
    raise AssertionError(f"{slug} not in materials.csv")


def test_material_by_slug_gypsum() -> None:
    # materials.csv: gypsum-board k = 0.16 W/(m·K) (ASHRAE Handbook via ht, per the CSV)
    k = _csv_conductivity("gypsum-board")
    assert k == pytest.approx(0.16)
    # si: 12.7 mm / 0.16 = 0.079375 m²·K/W; films none
    si = _post(
        {
            "units": "si",
            "films": "none",
            "layers": [{"thickness": 12.7, "material": "gypsum-board"}],
        }
    )
    assert si["r_total"] == pytest.approx(0.0127 / 0.16, rel=1e-12)
    # ip: 0.5 in = 0.0127 m; 0.079375 / 0.1761102 = 0.4507121 h·ft²·°F/Btu
    ip = _post(
        {
            "units": "ip",
            "films": "none",
            "layers": [{"thickness": 0.5, "material": "gypsum-board"}],
        }
    )
    assert ip["r_total"] == pytest.approx(0.079375 / R_FACTOR, rel=1e-6)


def test_cavity_material_by_slug() -> None:
    # materials.csv: fiberglass-batt k = 0.043; cavity 88.9 mm: 0.0889/0.043 = 2.067442 RSI
    k = _csv_conductivity("fiberglass-batt")
    body = _post(
        {
            "units": "si",
            "films": "none",
            "layers": [
                {
                    "thickness": 88.9,
                    "cavity": {"material": "fiberglass-batt"},
                    "framing": {"material": "softwood-lumber", "fraction": 0.25},
                }
            ],
        }
    )
    assert body["layers"][0]["r_cavity_path"] == pytest.approx(0.0889 / k, rel=1e-12)
    # softwood-lumber k from the CSV: 0.0889/0.12 = 0.7408333 RSI
    k_wood = _csv_conductivity("softwood-lumber")
    assert body["layers"][0]["r_framing_path"] == pytest.approx(0.0889 / k_wood, rel=1e-12)


# --- batts, lumber, framing fraction -----------------------------------------------------------


def _framed_ip(**layer: Any) -> dict[str, Any]:
    return {"units": "ip", "films": "ashrae", "layers": [layer]}


def test_batt_compression_warning_and_depth_from_lumber() -> None:
    # R-19 batt of 6.25 in in a 2x6 (actual depth 5.5 in, common practice), thickness omitted:
    # ratio 5.5/6.25 = 0.88; R = 19 x 0.88^0.6 = 19 x 0.9261676 = 17.59719 (the documented fit;
    # a commonly published chart says about R-18, from memory: within 1 R)
    body = _post(
        _framed_ip(
            name="2x6 bay",
            cavity={"batt": {"r_nominal": 19, "thickness_nominal": 6.25}},
            framing={"lumber": "2x6", "conductivity": 0.8, "fraction": 0.25},
        )
    )
    layer = body["layers"][0]
    assert layer["thickness"] == pytest.approx(5.5, rel=1e-12)  # 2x6 actual depth
    assert layer["r_cavity_path"] == pytest.approx(17.59719, rel=1e-6)
    assert abs(layer["r_cavity_path"] - 18.0) <= 1.0
    assert layer["r_framing_path"] == pytest.approx(5.5 / 0.8, rel=1e-12)  # 6.875
    assert any("compressed" in w for w in body["warnings"])


def test_lumber_depth_in_si() -> None:
    # 2x4: 3.5 in actual = 88.9 mm when the thickness is omitted
    body = _post(
        {
            "units": "si",
            "layers": [{"cavity": {"r": 2.0}, "framing": {"lumber": "2x4", "fraction": 0.2}}],
        }
    )
    assert body["layers"][0]["thickness"] == pytest.approx(88.9, rel=1e-12)


def test_framing_fraction_from_lumber_and_spacing() -> None:
    # 2x4 (1.5 in wide) at 16 in: f = 1.5/16 = 0.09375 (studs only -> a warning says so)
    # series part = films 0.85; cavity path 13.85, framing path 0.85 + 3.5/0.8 = 5.225
    # parallel: 1/(0.90625/13.85 + 0.09375/5.225) = 1/(0.0654332 + 0.0179426) = 11.99389
    # isothermal: 0.85 + 1/(0.90625/13 + 0.09375/4.375) = 11.82212
    body = _post(
        _framed_ip(
            cavity={"r": 13.0},
            framing={"lumber": "2x4", "spacing": 16, "conductivity": 0.8},
        )
    )
    assert body["r_parallel_path"] == pytest.approx(11.99389, rel=1e-6)
    assert body["r_isothermal_planes"] == pytest.approx(11.82212, rel=1e-6)
    assert any("framing fraction" in w and "9%" in w for w in body["warnings"])


def test_thinner_batt_gap_warning() -> None:
    # R-13 batt 3.5 in in a 5.5 in cavity: nominal R-13 kept, the gap is warned about
    body = _post(
        _framed_ip(
            thickness=5.5,
            cavity={"batt": {"r_nominal": 13, "thickness_nominal": 3.5}},
            framing={"conductivity": 0.8, "fraction": 0.25},
        )
    )
    assert body["layers"][0]["r_cavity_path"] == pytest.approx(13.0, rel=1e-12)
    assert any("gap" in w for w in body["warnings"])


# --- steel framing -----------------------------------------------------------------------------

STEEL_SI: dict[str, Any] = {
    "units": "si",
    "films": "ashrae",
    "layers": [
        {"name": "cladding", "r": 0.1},
        {
            "name": "steel studs",
            "thickness": 88.9,
            "cavity": {"r": 2.289433},  # R-13 x 0.1761102
            "framing": {"conductivity": 45.0, "fraction": 0.01, "spacing": 406.4},  # 16 in
        },
        {"name": "drywall", "thickness": 12.7, "material": "gypsum-board"},
    ],
}


def test_steel_framing_warning_and_correction() -> None:
    # steel (k 45 W/(m·K)) in 3-1/2 in studs at 16 in, R-13 cavity -> effective
    # (ASHRAE 90.1 Appendix A style table, from memory) = 6.0 x 0.1761102 = 1.056661 RSI
    # r_steel = 0.1 + 0.0127/0.16 + films 0.85 x 0.1761102 + 1.056661
    #         = 0.1 + 0.079375 + 0.1496937 + 1.056661 = 1.385730
    body = _post(STEEL_SI)
    assert any("metal framing" in w for w in body["warnings"])
    assert body["r_steel_corrected"] == pytest.approx(1.385730, rel=2e-6)
    assert body["method"] == "parallel_path"
    corrected = _post({**STEEL_SI, "method": "steel_correction"})
    assert corrected["method"] == "steel_correction"
    assert corrected["r_total"] == pytest.approx(1.385730, rel=2e-6)
    assert corrected["u_factor"] == pytest.approx(1 / 1.385730, rel=2e-6)
    # the steel route sits well below parallel path here
    assert corrected["r_total"] < body["r_parallel_path"]


def test_steel_correction_without_metal_framing_is_422() -> None:
    _assert_422(client.post(URL, json={**EXAMPLE_IP, "method": "steel_correction"}), "method")


# --- thickness for a target R ------------------------------------------------------------------


def test_thickness_for_r30_cellulose_like() -> None:
    # Fourier: L = R x k = 30 h·ft²·°F/Btu x 0.27 Btu·in/(h·ft²·°F) = 8.1 in
    body = _post({"units": "ip", "target_r": 30, "conductivity": 0.27}, THICKNESS_URL)
    assert body["thickness"] == pytest.approx(8.1, rel=1e-6)
    assert body["r_needed"] == pytest.approx(30.0)
    assert body["thickness_label"] == '8-1/8"'  # nearest 1/8 in
    # with R-11 already there: (30 - 11) x 0.27 = 5.13 in
    partial = _post(
        {"units": "ip", "target_r": 30, "existing_r": 11, "conductivity": 0.27}, THICKNESS_URL
    )
    assert partial["thickness"] == pytest.approx(5.13, rel=1e-6)


def test_thickness_si_from_material() -> None:
    # materials.csv cellulose-loose-fill k 0.042: RSI 5.0 x 0.042 = 0.21 m = 210 mm
    k = _csv_conductivity("cellulose-loose-fill")
    body = _post(
        {"units": "si", "target_r": 5.0, "material": "cellulose-loose-fill"}, THICKNESS_URL
    )
    assert body["thickness"] == pytest.approx(5.0 * k * 1e3, rel=1e-9)
    assert body["conductivity"] == pytest.approx(k)


@pytest.mark.parametrize("existing", [30, 31])
def test_thickness_already_met_is_422(existing: float) -> None:
    response = client.post(
        THICKNESS_URL,
        json={"units": "ip", "target_r": 30, "existing_r": existing, "conductivity": 0.27},
    )
    _assert_422(response, "target_r")


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"units": "ip", "target_r": 30}, "body"),  # neither k nor material
        ({"units": "ip", "target_r": 30, "conductivity": 0.27, "material": "xps"}, "body"),
        ({"units": "ip", "target_r": -1, "conductivity": 0.27}, "target_r"),
        ({"units": "ip", "target_r": 30, "conductivity": 0}, "conductivity"),
        ({"units": "ip", "target_r": 30, "material": "no-such-thing"}, "material"),
        ({"units": "ip", "target_r": 30, "material": "concrete-block-hollow-8in"}, "material"),
        ({"units": "mks", "target_r": 30, "conductivity": 0.27}, "units"),
    ],
)
def test_thickness_bad_input_is_422(body: dict[str, Any], field: str) -> None:
    _assert_422(client.post(THICKNESS_URL, json=body), field)


@pytest.mark.parametrize(
    "body",
    [
        {"units": "ip", "target_r": 1e308, "conductivity": 1e308},
        {"units": "si", "target_r": 1e300, "conductivity": 1e10},
    ],
)
def test_thickness_overflow_is_422(body: dict[str, Any]) -> None:
    response = quiet.post(THICKNESS_URL, json=body)
    assert response.status_code == 422, response.text


# --- every bad input -> 422 naming the field ---------------------------------------------------

_FRAMED = EXAMPLE_IP["layers"][2]

BAD_BODIES: list[tuple[str, Any, str]] = [
    ("negative thickness", _with_layer(3, {"thickness": -0.5, "conductivity": 1.11}), "layers[3].thickness"),
    ("zero conductivity", _with_layer(3, {"thickness": 0.5, "conductivity": 0}), "layers[3].conductivity"),
    ("negative r", _with_layer(0, {"r": -1}), "layers[0].r"),
    ("fraction 1.0", _with_layer(2, {**_FRAMED, "framing": {"conductivity": 0.8, "fraction": 1.0}}), "layers[2].framing.fraction"),
    ("fraction -0.1", _with_layer(2, {**_FRAMED, "framing": {"conductivity": 0.8, "fraction": -0.1}}), "layers[2].framing.fraction"),
    ("unknown material", _with_layer(3, {"thickness": 0.5, "material": "unobtainium"}), "layers[3].material"),
    ("unknown cavity material", _with_layer(2, {**_FRAMED, "cavity": {"material": "unobtainium"}}), "layers[2].cavity.material"),
    ("unknown framing material", _with_layer(2, {**_FRAMED, "framing": {"material": "unobtainium", "fraction": 0.2}}), "layers[2].framing.material"),
    ("fixed-R material in a cavity", _with_layer(2, {**_FRAMED, "cavity": {"material": "concrete-block-hollow-8in"}}), "layers[2].cavity.material"),
    ("r and conductivity", _with_layer(0, {"r": 0.62, "thickness": 0.5, "conductivity": 1.0}), "layers[0]"),
    ("layer with nothing", _with_layer(0, {"name": "mystery"}), "layers[0]"),
    ("conductivity without thickness", _with_layer(0, {"conductivity": 1.0}), "layers[0]"),
    ("cavity two ways", _with_layer(2, {**_FRAMED, "cavity": {"r": 13, "conductivity": 0.3}}), "layers[2].cavity"),
    ("cavity no way", _with_layer(2, {**_FRAMED, "cavity": {}}), "layers[2].cavity"),
    ("framed without framing", _with_layer(2, {"thickness": 3.5, "cavity": {"r": 13}}), "layers[2]"),
    ("framing without cavity", _with_layer(2, {"thickness": 3.5, "framing": _FRAMED["framing"]}), "layers[2]"),
    ("framed with r too", _with_layer(2, {**_FRAMED, "r": 13}), "layers[2]"),
    ("framed without thickness or lumber", _with_layer(2, {"cavity": {"r": 13}, "framing": {"fraction": 0.25}}), "layers[2]"),
    ("framing with no fraction or spacing", _with_layer(2, {**_FRAMED, "framing": {"conductivity": 0.8, "lumber": "2x4"}}), "layers[2].framing"),
    ("bad lumber", _with_layer(2, {**_FRAMED, "framing": {"lumber": "2x5", "fraction": 0.25}}), "layers[2].framing.lumber"),
    ("spacing narrower than lumber", _with_layer(2, {**_FRAMED, "framing": {"lumber": "2x4", "spacing": 1.0}}), "layers[2].framing.spacing"),
    ("zero batt R", _with_layer(2, {**_FRAMED, "cavity": {"batt": {"r_nominal": 0, "thickness_nominal": 3.5}}}), "layers[2].cavity.batt.r_nominal"),
    ("empty layers", {**EXAMPLE_IP, "layers": []}, "layers"),
    ("41 layers", {**EXAMPLE_IP, "layers": [{"r": 1.0}] * 41}, "layers"),
    ("layers not a list", {**EXAMPLE_IP, "layers": {"r": 1.0}}, "layers"),
    ("missing layers", {"units": "ip"}, "layers"),
    ("missing units", {k: v for k, v in EXAMPLE_IP.items() if k != "units"}, "units"),
    ("unknown units", {**EXAMPLE_IP, "units": "metric"}, "units"),
    ("unknown heat_flow", {**EXAMPLE_IP, "heat_flow": "sideways"}, "heat_flow"),
    ("unknown films", {**EXAMPLE_IP, "films": "still"}, "films"),
    ("unknown method", {**EXAMPLE_IP, "method": "guess"}, "method"),
    ("unknown top-level field", {**EXAMPLE_IP, "colour": "red"}, "colour"),
    ("unknown layer field", _with_layer(0, {"r": 0.62, "colour": "red"}), "layers[0].colour"),
    ("unknown cavity field", _with_layer(2, {**_FRAMED, "cavity": {"r": 13, "density": 3}}), "layers[2].cavity.density"),
    ("string for a number", _with_layer(3, {"thickness": "half an inch", "conductivity": 1.11}), "layers[3].thickness"),
    ("string for r", _with_layer(0, {"r": "abc"}), "layers[0].r"),
    ("list for a number", _with_layer(0, {"r": [1]}), "layers[0].r"),
    ("object for a number", _with_layer(0, {"r": {"value": 1}}), "layers[0].r"),
    ("layer not an object", {**EXAMPLE_IP, "layers": [5]}, "layers[0]"),
    ("name too long", _with_layer(0, {"name": "x" * 500, "r": 0.62}), "layers[0].name"),
    ("slug with capitals", _with_layer(3, {"thickness": 0.5, "material": "Gypsum Board"}), "layers[3].material"),
    ("body a list", [EXAMPLE_IP], "body"),
    ("body a string", "ip", "body"),
    ("body a number", 42, "body"),
    ("body null", None, "body"),
]  # fmt: skip


@pytest.mark.parametrize(("case", "body", "field"), BAD_BODIES, ids=[c[0] for c in BAD_BODIES])
def test_bad_input_is_422_naming_the_field(case: str, body: Any, field: str) -> None:
    response = client.post(
        URL, content=json.dumps(body), headers={"content-type": "application/json"}
    )
    _assert_422(response, field)


@pytest.mark.parametrize(
    ("raw", "field"),
    [
        ('{"units":"ip","layers":[{"r":NaN}]}', "layers[0].r"),
        ('{"units":"ip","layers":[{"r":Infinity}]}', "layers[0].r"),
        ('{"units":"ip","layers":[{"r":-Infinity}]}', "layers[0].r"),
        ('{"units":"ip","layers":[{"thickness":NaN,"conductivity":1}]}', "layers[0].thickness"),
        (
            '{"units":"si","layers":[{"thickness":89,"cavity":{"r":2},'
            '"framing":{"conductivity":0.12,"fraction":NaN}}]}',
            "layers[0].framing.fraction",
        ),
        (
            '{"units":"si","layers":[{"thickness":89,"cavity":{"r":Infinity},'
            '"framing":{"conductivity":0.12,"fraction":0.2}}]}',
            "layers[0].cavity.r",
        ),
    ],
)
def test_raw_nan_and_infinity_tokens_are_422(raw: str, field: str) -> None:
    response = client.post(URL, content=raw, headers={"content-type": "application/json"})
    body = _assert_422(response, field)
    assert "finite" in body["errors"][0]["message"]


@pytest.mark.parametrize("raw", ['{"units": "ip", "layers": [', "{units: ip}", "", "\x00\x01"])
def test_malformed_json_is_422(raw: str) -> None:
    response = client.post(URL, content=raw, headers={"content-type": "application/json"})
    _assert_422(response, "body")


def test_error_detail_names_the_field_in_plain_words() -> None:
    bad = _with_layer(2, {**_FRAMED, "framing": {"conductivity": 0.8, "fraction": 1.0}})
    body = _assert_422(client.post(URL, json=bad), "layers[2].framing.fraction")
    assert body["detail"].startswith("layers[2].framing.fraction")
    assert "less than 1" in body["detail"]


def test_huge_thickness_si_computes() -> None:
    # 1e308 mm = 1e305 m of k 0.04: R = 2.5e306 m²·K/W, still finite -> a 200, not a 500
    response = quiet.post(
        URL, json={"units": "si", "layers": [{"thickness": 1e308, "conductivity": 0.04}]}
    )
    assert response.status_code == 200, response.text
    assert response.json()["r_total"] == pytest.approx(2.5e306, rel=1e-9)


@pytest.mark.parametrize(
    "body",
    [
        {"units": "ip", "layers": [{"thickness": 1e308, "conductivity": 1.0}]},
        {
            "units": "ip",
            "layers": [{"thickness": 1e308, "cavity": {"r": 13}, "framing": {"fraction": 0.2}}],
        },
        {"units": "si", "layers": [{"thickness": 5e-324, "conductivity": 0.04}]},
        {
            "units": "ip",
            "layers": [{"cavity": {"r": 13}, "framing": {"lumber": "0x0 rough", "fraction": 0.2}}],
        },
    ],
)
def test_overflowing_inputs_are_422(body: dict[str, Any]) -> None:
    response = quiet.post(URL, json=body)
    assert response.status_code == 422, response.text


@pytest.mark.parametrize(
    "body",
    [
        {"units": "si", "films": "none", "layers": [{"r": 0}]},
        {"units": "si", "layers": [{"r": 1e308}, {"r": 1e308}]},
    ],
)
def test_zero_or_infinite_total_is_422(body: dict[str, Any]) -> None:
    # total R zero (U infinite) or overflowing: once a 500 (ZeroDivisionError), now a 422
    _assert_422(quiet.post(URL, json=body), "layers")


# --- never a 500 (hypothesis) ------------------------------------------------------------------

_LEAF_ORDINARY = st.one_of(
    # finite numbers of everyday size (no over/underflow in unit conversion), plus NaN/inf
    st.floats(min_value=-1e6, max_value=1e6).filter(lambda x: x == 0 or abs(x) >= 1e-6),
    st.sampled_from([math.nan, math.inf, -math.inf, 0.0, 0.25, 3.5, 13.0]),
    st.text(max_size=6),
    st.sampled_from(["2x4", "2x6", "2x4 rough", "gypsum-board", "xps", "softwood-lumber"]),
    st.none(),
    st.booleans(),
)
_LEAF_ANY = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=6),
    st.none(),
)
_INNER_KEYS = ["r", "conductivity", "material", "fraction", "lumber", "spacing"]
_BATT_KEYS = ["r_nominal", "thickness_nominal"]
_LAYER_KEYS = ["name", "r", "thickness", "conductivity", "material", "cavity", "framing"]


def _layer_strategy(leaf: st.SearchStrategy[Any]) -> st.SearchStrategy[dict[str, Any]]:
    batt = st.dictionaries(st.sampled_from(_BATT_KEYS), leaf, max_size=2)
    inner = st.dictionaries(
        st.sampled_from([*_INNER_KEYS, "batt"]), st.one_of(leaf, batt), max_size=4
    )
    return st.dictionaries(st.sampled_from(_LAYER_KEYS), st.one_of(leaf, inner), max_size=5)


def _send(units: str, films: str, layers: list[dict[str, Any]]) -> int:
    raw = json.dumps({"units": units, "films": films, "layers": layers})  # NaN/Infinity tokens
    response = quiet.post(URL, content=raw, headers={"content-type": "application/json"})
    if response.status_code == 422:
        body = response.json()
        assert set(body) == {"detail", "errors"} and body["errors"]
    return response.status_code


@settings(max_examples=150, deadline=None)
@given(
    units=st.sampled_from(["ip", "si"]),
    films=st.sampled_from(["ashrae", "iso6946"]),
    layers=st.lists(_layer_strategy(_LEAF_ORDINARY), min_size=1, max_size=4),
)
def test_never_a_500_on_random_layers(units: str, films: str, layers: list[Any]) -> None:
    assert _send(units, films, layers) in (200, 422)


@settings(max_examples=150, deadline=None)
@given(
    units=st.sampled_from(["ip", "si"]),
    films=st.sampled_from(["ashrae", "iso6946", "none"]),
    layers=st.lists(_layer_strategy(_LEAF_ANY), min_size=1, max_size=4),
)
@example(units="ip", films="ashrae", layers=[{"thickness": 1e308, "conductivity": 1.0}])
def test_never_a_500_on_random_layers_full_float_range(
    units: str, films: str, layers: list[Any]
) -> None:
    assert _send(units, films, layers) in (200, 422)
