"""The dew-point check takes a framed layer's cavity section; typical assemblies take μ from the
materials table (one source of μ).

Dew point, by hand (API.md wall, ip): ASHRAE films 0.17 outside, 0.68 inside; siding 0.62,
sheathing 0.62, the stud bay's cavity R-13, drywall 0.5 in / 1.11 = 0.45045. Through the
cavity section R_T = 0.17 + 0.62 + 0.62 + 13 + 0.45045 + 0.68 = 15.54045 h·ft²·°F/Btu
= 2.73684 m²·K/W (× 0.1761102, pint); the isothermal-planes R of the stud bay (8.70813) would
give 11.24858 = 1.98098 m²·K/W and a warmer sheathing. At −10 °C out, 21 °C in, the
sheathing's inner face (outside air + 0.17 + 0.62 + 0.62 = 1.41) is at
−10 + 31 × 1.41 / 15.54045 = −7.18735 °C (isothermal planes: −6.11417 °C).
"""

from __future__ import annotations

import copy
import json

import pint
import pytest

from server.documents.assembly import AssemblyInput
from server.services.assembly import evaluate_assembly
from server.services.catalog import builtin_catalog
from server.services.material_data import load_builtin_materials, material_vapour_sd_m
from server.services.moisture import CAVITY_SECTION_NOTE, check_assembly_moisture
from server.services.typical import DATA, typical_assemblies
from tests.utils.examples import API_WALL_IP

RSI = pint.UnitRegistry().Quantity(1, "hr*ft**2*delta_degF/Btu_it").to("m**2*K/W").magnitude


def test_dew_point_check_goes_through_the_cavity_section() -> None:
    wall = AssemblyInput.model_validate(
        {k: v for k, v in copy.deepcopy(API_WALL_IP).items() if k != "units"}
    )
    computed = evaluate_assembly(wall, units="ip")
    check = check_assembly_moisture(
        wall, computed, units="ip", catalog=builtin_catalog(), outdoor_design_temperature=14.0
    )  # 14 °F = −10 °C
    result = check.result
    assert result.total_resistance_m2k_w == pytest.approx(15.54045 * RSI, rel=1e-5)
    inner_face = next(
        p
        for p in result.planes
        if p.kind == "interface" and p.cumulative_r_m2k_w == pytest.approx(1.41 * RSI)
    )
    assert inner_face.temperature_c == pytest.approx(-10 + 31 * 1.41 / 15.54045, abs=1e-4)
    assert CAVITY_SECTION_NOTE in check.words


def test_no_framed_layer_no_cavity_note() -> None:
    plain = AssemblyInput.model_validate(
        {
            "heat_flow": "horizontal",
            "films": "ashrae",
            "layers": [{"name": "board", "thickness": 1.0, "r": 5.0, "vapour_sd_m": 1.0}],
        }
    )
    check = check_assembly_moisture(
        plain, evaluate_assembly(plain, units="ip"), units="ip", catalog=builtin_catalog()
    )
    assert CAVITY_SECTION_NOTE not in check.words


def test_typical_assemblies_take_mu_from_the_materials_table() -> None:
    """Fails if a typical assembly's vapour resistance and the library's μ diverge: every layer
    naming a library row gets μ × thickness from materials.csv (OSB μ 50, plywood μ 200,
    ISO 10456 from memory, as the table says), and no OSB or plywood layer types its own sd."""
    rows = {row.slug: row for row in load_builtin_materials()}
    raw = json.loads(DATA.read_text())
    loaded = typical_assemblies()
    named = 0
    for assembly in raw["assemblies"]:
        for index, layer in enumerate(assembly["layers"]):
            name = layer["name"].lower()
            if "osb" in name or "plywood" in name:
                assert "vapour_sd_m" not in layer, (assembly["slug"], layer["name"])
                assert layer["vapour_material"] in ("osb", "plywood-softwood")
            if "vapour_material" in layer:
                named += 1
                row = rows[layer["vapour_material"]]
                expected = material_vapour_sd_m(row, layer["thickness"] * 0.0254)
                got = loaded[assembly["slug"]].document_ip["layers"][index]["vapour_sd_m"]
                assert got == pytest.approx(expected, abs=1e-4)
    assert named >= 10
    # 7/16 in OSB: 50 × 0.0111125 m = 0.5556 m; 1/2 in plywood: 200 × 0.0127 m = 2.54 m
    assert rows["osb"].vapour_mu == 50 and rows["plywood-softwood"].vapour_mu == 200
    r13 = loaded["wall-2x4-16-r13"].document_ip["layers"][1]
    assert r13["vapour_sd_m"] == pytest.approx(0.5556, abs=1e-4)
