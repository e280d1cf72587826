"""Typical assemblies (server/data/typical_assemblies.json) and ip <-> si document conversion."""

from __future__ import annotations

import copy
import json
from typing import Any

import pint
import pytest

from server.documents.assembly import AssemblyInput
from server.services.assembly import evaluate_assembly
from server.services.convert import convert_assembly, convert_value
from server.services.typical import DATA, typical_assemblies

Q = pint.UnitRegistry().Quantity
TYPICAL = typical_assemblies()
SLUGS = sorted(TYPICAL)


def _numbers(value: Any, path: str = "") -> dict[str, float]:
    """Every number in a nested document, keyed by its path."""
    out: dict[str, float] = {}
    if isinstance(value, dict):
        for key, item in value.items():
            out.update(_numbers(item, f"{path}.{key}"))
    elif isinstance(value, list):
        for index, item in enumerate(value):
            out.update(_numbers(item, f"{path}[{index}]"))
    elif isinstance(value, int | float) and not isinstance(value, bool):
        out[path] = float(value)
    return out


def test_every_row_of_the_data_file_is_loaded() -> None:
    raw = json.loads(DATA.read_text())
    assert raw["units"] == "ip"
    assert sorted(row["slug"] for row in raw["assemblies"]) == SLUGS
    assert len(SLUGS) >= 10


@pytest.mark.parametrize("slug", SLUGS)
def test_typical_validates_and_computes_the_same_in_ip_and_si(slug: str) -> None:
    typical = TYPICAL[slug]
    ip = evaluate_assembly(typical.assembly("ip"), units="ip")
    si = evaluate_assembly(typical.assembly("si"), units="si")
    # the same wall in two unit systems: the same RSI to round-off
    assert si.rsi_total == pytest.approx(ip.rsi_total, rel=1e-9)
    assert si.r_ip_total == pytest.approx(ip.r_total, rel=1e-9)
    assert si.r_isothermal_planes * 5.678263 == pytest.approx(ip.r_isothermal_planes, rel=1e-6)
    assert ip.r_total > 0 and ip.iso6946_max_error < 0.2
    assert ip.warnings == si.warnings


@pytest.mark.parametrize("slug", SLUGS)
def test_convert_ip_si_ip_is_identity(slug: str) -> None:
    doc = TYPICAL[slug].document_ip
    original = copy.deepcopy(doc)
    back = convert_assembly(convert_assembly(doc, "ip", "si"), "si", "ip")
    assert doc == original  # the source is not changed in place
    before, after = _numbers(doc), _numbers(back)
    assert before.keys() == after.keys()
    for key, value in before.items():
        assert after[key] == pytest.approx(value, rel=1e-12, abs=1e-15), key
    # strings (names, lumber labels) and fractions are left alone
    assert [layer.get("name") for layer in back["layers"]] == [
        layer.get("name") for layer in doc["layers"]
    ]


def test_convert_hand_values() -> None:
    # published factors: R-13 x 0.1761102 = 2.289433 m²·K/W; 16 in x 25.4 = 406.4 mm;
    # k 0.8 Btu·in/(h·ft²·°F) x 0.1442279 = 0.1153823 W/(m·K); the framing share stays 0.25
    doc = {
        "layers": [
            {
                "thickness": 3.5,
                "cavity": {"batt": {"r_nominal": 13, "thickness_nominal": 3.5}},
                "framing": {"conductivity": 0.8, "fraction": 0.25, "lumber": "2x4", "spacing": 16},
            }
        ]
    }
    layer = convert_assembly(doc, "ip", "si")["layers"][0]
    assert layer["thickness"] == pytest.approx(88.9, rel=1e-12)
    assert layer["cavity"]["batt"]["r_nominal"] == pytest.approx(2.289433, rel=1e-6)
    assert layer["cavity"]["batt"]["thickness_nominal"] == pytest.approx(88.9, rel=1e-12)
    assert layer["framing"]["conductivity"] == pytest.approx(0.1153823, rel=1e-6)
    assert layer["framing"]["spacing"] == pytest.approx(406.4, rel=1e-12)
    assert layer["framing"]["fraction"] == 0.25
    assert layer["framing"]["lumber"] == "2x4"
    # same system: unchanged
    assert convert_value(13.0, "r", "ip", "ip") == 13.0


#: the API.md unit of each converted layer field, ip and si, as pint spells them
PINT_UNITS = {
    "r": ("hr*ft**2*delta_degF/Btu_it", "m**2*K/W"),
    "thickness": ("inch", "mm"),
    "conductivity": ("Btu_it*inch/(hr*ft**2*delta_degF)", "W/(m*K)"),
}
PINT_FIELDS = {
    ("r",): "r",
    ("thickness",): "thickness",
    ("conductivity",): "conductivity",
    ("cavity", "r"): "r",
    ("cavity", "conductivity"): "conductivity",
    ("cavity", "batt", "r_nominal"): "r",
    ("cavity", "batt", "thickness_nominal"): "thickness",
    ("framing", "conductivity"): "conductivity",
    ("framing", "spacing"): "thickness",  # on-centre spacing: inch <-> mm, as API.md's table
}


def _at(layer: dict[str, Any], path: tuple[str, ...]) -> Any:
    for key in path:
        layer = layer.get(key) if isinstance(layer, dict) else None  # type: ignore[assignment]
    return layer


@pytest.mark.parametrize("slug", SLUGS)
def test_every_converted_field_matches_pint(slug: str) -> None:
    # pint (outside source) converts each dimensional field of every typical assembly: a field
    # mapped to the wrong quantity, or a wrong factor, fails here even though ip -> si -> ip
    # would still round-trip. Fractions, names and lumber labels must come through unchanged.
    ip = TYPICAL[slug].document_ip
    si = convert_assembly(ip, "ip", "si")
    AssemblyInput.model_validate(si)
    seen = 0
    for ip_layer, si_layer in zip(ip["layers"], si["layers"], strict=True):
        for path, quantity in PINT_FIELDS.items():
            value = _at(ip_layer, path)
            if not isinstance(value, int | float):
                continue
            src, dst = PINT_UNITS[quantity]
            expected = Q(value, src).to(dst).magnitude
            assert _at(si_layer, path) == pytest.approx(expected, rel=1e-6), path
            seen += 1
        assert _at(si_layer, ("framing", "fraction")) == _at(ip_layer, ("framing", "fraction"))
        assert _at(si_layer, ("framing", "lumber")) == _at(ip_layer, ("framing", "lumber"))
    assert seen > 0
    # every other number is a fraction or names its own unit (vapour_sd_m, in metres in both
    # systems) and comes through unchanged
    ip_numbers, si_numbers = _numbers(ip), _numbers(si)
    unchanged = {k for k in si_numbers if k.endswith((".fraction", "_m", "_mu", ".mu"))}
    assert len(si_numbers) - len(unchanged) == seen
    assert all(si_numbers[k] == ip_numbers[k] for k in unchanged)


# --- a few typical walls and ceilings by hand --------------------------------------------------


def _r(slug: str) -> Any:
    return evaluate_assembly(TYPICAL[slug].assembly("ip"), units="ip")


def test_2x4_r13_wall_hand() -> None:
    # vinyl 0.61 + OSB 0.62 + gypsum 0.45 + ASHRAE films 0.68 + 0.17 (from memory) = 2.53
    # R-13 batt, 3.5 in in a 3.5 in cavity: not compressed, R-13; framing 3.5/0.8 = 4.375
    # parallel: 1/(0.75/15.53 + 0.25/6.905) = 1/(0.0482936 + 0.0362056) = 11.8344
    result = _r("wall-2x4-16-r13")
    assert result.r_total == pytest.approx(11.8344, rel=1e-5)
    assert round(result.r_total, 1) == 11.8
    assert result.warnings == []


def test_2x6_r19_wall_compressed_hand() -> None:
    # R-19 6.25 in batt in a 5.5 in 2x6 cavity: 19 x (5.5/6.25)^0.6 = 19 x 0.9261676 = 17.59719
    # framing 5.5/0.8 = 6.875; series part 2.53 (as above)
    # parallel: 1/(0.75/20.12719 + 0.25/9.405) = 1/(0.0372630 + 0.0265816) = 15.6630
    result = _r("wall-2x6-16-r19")
    assert result.r_total == pytest.approx(15.6630, rel=1e-5)
    assert any("compressed" in w for w in result.warnings)


def test_attic_r19_hand() -> None:
    # heat flow up: ASHRAE films 0.61 + 0.17 (from memory) + gypsum 0.45 = 1.23
    # 2x6 joists 5.5/0.8 = 6.875, 10 % framing, R-19 cavity
    # parallel: 1/(0.9/20.23 + 0.1/8.105) = 1/(0.0444884 + 0.0123381) = 17.5974
    result = _r("attic-2x6-16-r19")
    assert result.r_total == pytest.approx(17.5974, rel=1e-5)
    assert result.films.inside == pytest.approx(0.61)


def test_basement_concrete_hand() -> None:
    # 8 in concrete, k 9.7 Btu·in/(h·ft²·°F): 8/9.7 = 0.824742 + films 0.85 = 1.674742
    result = _r("basement-8in-concrete")
    assert result.r_total == pytest.approx(1.674742, rel=1e-6)
    # no framing: the three totals agree
    assert result.r_isothermal_planes == pytest.approx(result.r_parallel_path, rel=1e-12)


def test_adding_xps_raises_the_2x4_wall_by_about_its_r() -> None:
    # 1 in XPS outside the same R-13 wall: every path gains 5 in series:
    # 1/(0.75/20.53 + 0.25/11.905) = 1/(0.0365319 + 0.0209996) = 17.3817
    plus = _r("wall-2x4-16-r13-plus-1in-xps")
    assert plus.r_total == pytest.approx(17.3817, rel=1e-5)
