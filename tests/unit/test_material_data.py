"""The built-in material library (server/data/materials.csv) and its loader."""

from __future__ import annotations

import csv
import dataclasses
import io
import math
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics.units import K_IP_IN_SI, R_IP_IN_SI
from server.services.material_data import (
    CATEGORIES,
    CSV_HEADER,
    KINDS,
    SOURCE_KINDS,
    MaterialRow,
    load_builtin_materials,
    material_r_si,
    material_vapour_sd_m,
    parse_materials_csv,
)

CSV_PATH = Path(__file__).resolve().parents[2] / "server" / "data" / "materials.csv"
HEADER_LINE = (
    "slug,name,category,kind,conductivity_w_mk,r_si,r_per_inch_ip,thickness_mm,"
    "density_kg_m3,vapour_mu,vapour_sd_m,source_kind,source"
)
ROWS = load_builtin_materials()
BY_SLUG = {row.slug: row for row in ROWS}
CONDUCTIVITY_ROWS = [row for row in ROWS if row.kind == "conductivity"]
FIXED_ROWS = [row for row in ROWS if row.kind == "fixed_r"]
INCH_M = 0.0254  # exact (NIST SP 811, appendix B)

# A valid row to mutate: OSB, k 0.106 W/(m·K) -> k_ip = 0.106 / 0.14422789 = 0.7350,
# R per inch = 1 / 0.7350 = 1.361 (hand-worked).
GOOD = {
    "slug": "osb",
    "name": "oriented strand board",
    "category": "board",
    "kind": "conductivity",
    "conductivity_w_mk": "0.106",
    "r_si": "",
    "r_per_inch_ip": "1.361",
    "thickness_mm": "11.1",
    "density_kg_m3": "650",
    "vapour_mu": "50",
    "vapour_sd_m": "",
    "source_kind": "handbook",
    "source": "ASHRAE Handbook—Fundamentals (2013), ch. 26 Table 1",
}
GOOD_FIXED = {
    **GOOD,
    "slug": "vinyl-siding",
    "name": "vinyl siding",
    "category": "cladding",
    "kind": "fixed_r",
    "conductivity_w_mk": "",
    "r_si": "0.11",
    "r_per_inch_ip": "",
    "thickness_mm": "12",
    "vapour_mu": "",
}


def csv_text(*rows: dict[str, str], header: tuple[str, ...] = CSV_HEADER) -> str:
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow([row.get(name, "") for name in header])
    return out.getvalue()


# --- the shipped file -------------------------------------------------------------------------
def test_header_is_exactly_the_documented_one() -> None:
    first_line = CSV_PATH.read_text(encoding="utf-8").splitlines()[0]
    assert first_line == HEADER_LINE
    assert ",".join(CSV_HEADER) == HEADER_LINE


def test_builtin_file_loads_with_a_house_sized_library() -> None:
    assert 35 <= len(ROWS) <= 50
    assert all(isinstance(row, MaterialRow) for row in ROWS)


def test_slugs_are_unique() -> None:
    slugs = [row.slug for row in ROWS]
    assert len(slugs) == len(set(slugs))


def test_library_covers_what_an_auditor_finds() -> None:
    # What is in a North American or European house (common practice).
    expected = {
        "gypsum-board", "osb", "plywood-softwood", "fiberglass-batt", "mineral-wool-batt",
        "cellulose-loose-fill", "cellulose-dense-pack", "fiberglass-loose-fill", "eps", "xps",
        "polyiso-foil-faced", "spray-foam-open-cell", "spray-foam-closed-cell",
        "softwood-lumber", "hardwood", "concrete", "concrete-block-hollow-8in", "brick-common",
        "brick-face", "stucco", "vinyl-siding", "wood-bevel-siding", "fiber-cement-siding",
        "asphalt-shingles", "building-paper", "house-wrap", "polyethylene-6mil", "kraft-facing",
        "air-space-3-4-in", "vermiculite-loose-fill", "rock-wool-loose-fill", "steel",
        "aluminium", "glass", "carpet-and-pad", "hardwood-floor", "plaster-lime",
        "lath-and-plaster",
    }  # fmt: skip
    assert expected <= set(BY_SLUG)
    assert {row.category for row in ROWS} == CATEGORIES
    assert {row.kind for row in ROWS} == KINDS


def test_every_row_names_its_source_honestly() -> None:
    for row in ROWS:
        assert row.source.strip(), row.slug
        assert row.source_kind in SOURCE_KINDS, row.slug
        if row.source_kind == "from memory":
            # A recalled value says so in its source text as well.
            assert "from memory" in row.source, row.slug
        if row.source_kind == "handbook":
            assert "ASHRAE" in row.source, row.slug


def test_r_per_inch_agrees_with_conductivity_to_half_a_percent() -> None:
    # R per inch [h·ft²·°F/(Btu·in)] = 1 / k_ip, k_ip = k / 0.14422789 (units.K_IP_IN_SI,
    # NIST SP 811 appendix B).
    for row in CONDUCTIVITY_ROWS:
        assert row.conductivity_w_mk is not None and row.r_per_inch_ip is not None
        k_ip = row.conductivity_w_mk / K_IP_IN_SI
        assert row.r_per_inch_ip * k_ip == pytest.approx(1.0, rel=0.005), row.slug
        assert row.r_si is None, row.slug


def test_fixed_rows_state_their_thickness_and_no_conductivity() -> None:
    for row in FIXED_ROWS:
        assert row.r_si is not None and row.r_si > 0.0, row.slug
        assert row.thickness_mm is not None and row.thickness_mm > 0.0, row.slug
        assert row.conductivity_w_mk is None and row.r_per_inch_ip is None, row.slug


def test_values_sit_in_physically_plausible_bands() -> None:
    for row in CONDUCTIVITY_ROWS:
        k = row.conductivity_w_mk
        assert k is not None
        if row.category == "insulation":
            # Building insulation: 0.019 (aged faced PIR) to 0.068 (vermiculite) W/(m·K),
            # ASHRAE Handbook—Fundamentals (2013) ch. 26 Table 1 (via ht).
            assert 0.018 <= k <= 0.07, row.slug
        if row.category == "metal":
            assert k > 10.0, row.slug  # metals: tens to hundreds of W/(m·K), ISO 10456 Table 3
        if row.category == "framing":
            assert 0.08 <= k <= 0.2, row.slug  # wood across the grain, ISO 10456 Table 3
        if row.category == "masonry":
            assert 0.1 <= k <= 3.5, row.slug  # aerated concrete to dense stone, ISO 10456
    for row in FIXED_ROWS:
        assert row.r_si is not None
        if row.category == "air-space":
            # ISO 6946:2007 Table 2: unventilated air layers 0.11 to 0.23 m²·K/W.
            assert 0.11 <= row.r_si <= 0.23, row.slug
        if row.category == "membrane":
            assert row.r_si < 0.02, row.slug  # sheets add next to nothing (common practice)
    for row in ROWS:
        if row.vapour_mu is not None:
            assert row.vapour_mu >= 1.0, row.slug  # nothing is more open than still air


def test_vapour_barrier_is_far_tighter_than_house_wrap() -> None:
    # 6 mil polyethylene ~0.06 perm vs house wrap ~50 perm: sd differs by ~3 orders of
    # magnitude (from memory; 1 perm ≈ sd 3.5 m with δ_air = 2e-10 kg/(m·s·Pa), ISO 10456).
    poly = BY_SLUG["polyethylene-6mil"].vapour_sd_m
    wrap = BY_SLUG["house-wrap"].vapour_sd_m
    assert poly is not None and wrap is not None
    assert poly >= 50.0
    assert poly / wrap > 100.0


# --- material_r_si -----------------------------------------------------------------------------
def test_half_inch_gypsum_board_is_r_0_45() -> None:
    # 0.0127 m / 0.16 W/(m·K) = 0.079375 m²·K/W; / 0.17611 = R-0.4507, the handbook's
    # for 1/2 in gypsum board (ASHRAE Handbook—Fundamentals, from memory).
    r_si = material_r_si(BY_SLUG["gypsum-board"], 0.5 * INCH_M)
    assert r_si == pytest.approx(0.079375, rel=1e-9)
    assert r_si / R_IP_IN_SI == pytest.approx(0.45, abs=0.005)


def test_batt_in_a_2x4_cavity_is_about_r_11_to_13() -> None:
    # 3.5 in = 0.0889 m; 0.0889 / 0.043 = 2.0674 m²·K/W = R-11.74 (hand-worked); 2x4 batts are
    # sold as R-11 to R-13 (common practice).
    r_si = material_r_si(BY_SLUG["fiberglass-batt"], 3.5 * INCH_M)
    assert r_si == pytest.approx(0.0889 / 0.043, rel=1e-9)
    assert 11.0 <= r_si / R_IP_IN_SI <= 13.0


def test_one_inch_xps_is_r_5() -> None:
    # 0.0254 / 0.0288 = 0.88194 m²·K/W = R-5.008; XPS is labelled R-5 per inch (ASTM C578
    # Type IV, from memory).
    r_si = material_r_si(BY_SLUG["xps"], INCH_M)
    assert r_si / R_IP_IN_SI == pytest.approx(5.0, rel=0.005)


@pytest.mark.parametrize("thickness_m", [None, 1e-4, 0.0127, 1.0])
def test_fixed_r_ignores_the_thickness(thickness_m: float | None) -> None:
    # Hollow-backed vinyl siding: RSI 0.11 (R-0.61, ASHRAE Handbook—Fundamentals) at any
    # entered thickness.
    assert material_r_si(BY_SLUG["vinyl-siding"], thickness_m) == 0.11
    for row in FIXED_ROWS:
        assert material_r_si(row, thickness_m) == row.r_si


@pytest.mark.parametrize("thickness_m", [None, 0.0, -0.01, math.nan, math.inf])
def test_conductivity_material_needs_a_real_thickness(thickness_m: float | None) -> None:
    with pytest.raises(ValueError, match="thickness greater than zero"):
        material_r_si(BY_SLUG["eps"], thickness_m)


@settings(max_examples=200, deadline=None)
@given(
    row=st.sampled_from(CONDUCTIVITY_ROWS),
    thickness_m=st.floats(min_value=1e-4, max_value=1.0, allow_nan=False),
)
def test_conductivity_resistance_is_linear_in_thickness(
    row: MaterialRow, thickness_m: float
) -> None:
    # Fourier's law for a homogeneous slab: R = L / k, so R doubles with L and R·k = L.
    r_single = material_r_si(row, thickness_m)
    assert material_r_si(row, 2.0 * thickness_m) == pytest.approx(2.0 * r_single, rel=1e-12)
    assert r_single * (row.conductivity_w_mk or 0.0) == pytest.approx(thickness_m, rel=1e-12)
    assert r_single > 0.0


def test_limiting_case_thin_layer_has_almost_no_resistance() -> None:
    # L -> 0 gives R -> 0 (limit of R = L / k): 0.1 mm of concrete is 5e-5 m²·K/W.
    assert material_r_si(BY_SLUG["concrete"], 1e-4) == pytest.approx(1e-4 / 1.95, rel=1e-12)


# --- material_vapour_sd_m ---------------------------------------------------------------------
def test_vapour_sd_hand_worked() -> None:
    # Gypsum board 12.7 mm, μ 10: sd = 10 × 0.0127 = 0.127 m (ISO 13788 sd = μ d).
    gypsum = material_vapour_sd_m(BY_SLUG["gypsum-board"], 0.0127)
    assert gypsum == pytest.approx(0.127, rel=1e-12)
    # Foil-faced polyiso 25.4 mm: core 60 × 0.0254 = 1.524 m plus facers 100 m = 101.524 m.
    polyiso = material_vapour_sd_m(BY_SLUG["polyiso-foil-faced"], 0.0254)
    assert polyiso == pytest.approx(101.524, rel=1e-12)
    # A sheet keeps its sd whatever the thickness; no vapour data gives None.
    assert material_vapour_sd_m(BY_SLUG["polyethylene-6mil"], None) == 50.0
    assert material_vapour_sd_m(BY_SLUG["vinyl-siding"], 0.012) is None
    with pytest.raises(ValueError):
        material_vapour_sd_m(BY_SLUG["gypsum-board"], None)


# --- the loader and its validation -------------------------------------------------------------
def test_loader_returns_a_fresh_list_of_frozen_rows() -> None:
    first = load_builtin_materials()
    first.clear()
    assert len(load_builtin_materials()) == len(ROWS)
    with pytest.raises(dataclasses.FrozenInstanceError):
        ROWS[0].conductivity_w_mk = 1.0  # type: ignore[misc]


def test_parser_reads_typed_values() -> None:
    rows = parse_materials_csv(csv_text(GOOD, GOOD_FIXED))
    assert [row.slug for row in rows] == ["osb", "vinyl-siding"]
    assert rows[0].conductivity_w_mk == 0.106 and rows[0].r_si is None
    assert rows[0].vapour_sd_m is None and rows[0].density_kg_m3 == 650.0
    assert rows[1].r_si == 0.11 and rows[1].conductivity_w_mk is None


def test_r_per_inch_tolerance_edge() -> None:
    # Exact R per inch is 0.14422789 / 0.106 = 1.36064; 0.4 % off passes, 0.6 % off fails.
    exact = K_IP_IN_SI / 0.106
    parse_materials_csv(csv_text({**GOOD, "r_per_inch_ip": f"{exact * 1.004:.6f}"}))
    with pytest.raises(ValueError, match="does not match"):
        parse_materials_csv(csv_text({**GOOD, "r_per_inch_ip": f"{exact * 1.006:.6f}"}))


BAD_ROWS = [
    ({"source": ""}, "source is missing"),
    ({"source": "   "}, "source is missing"),
    ({"kind": "conductive"}, "unknown kind"),
    ({"category": "roof"}, "unknown category"),
    ({"source_kind": "guess"}, "unknown source_kind"),
    ({"conductivity_w_mk": ""}, "needs conductivity_w_mk"),
    ({"conductivity_w_mk": "0"}, "greater than zero"),
    ({"conductivity_w_mk": "-0.1"}, "greater than zero"),
    ({"conductivity_w_mk": "nan"}, "greater than zero"),
    ({"conductivity_w_mk": "inf"}, "greater than zero"),
    ({"conductivity_w_mk": "0.1O6"}, "not a number"),
    ({"r_per_inch_ip": "1.50"}, "does not match"),
    ({"r_per_inch_ip": ""}, "needs r_per_inch_ip"),
    ({"r_si": "0.07"}, "leave r_si empty"),
    ({"vapour_mu": "0.5"}, "at least 1"),
    ({"name": ""}, "name is missing"),
    ({"slug": "OSB Board"}, "lowercase words"),
]


@pytest.mark.parametrize(("change", "message"), BAD_ROWS)
def test_validator_rejects_a_bad_conductivity_row(change: dict[str, str], message: str) -> None:
    bad = {**GOOD, **change}
    with pytest.raises(ValueError, match=message) as caught:
        parse_materials_csv(csv_text(GOOD_FIXED, bad))
    # The message names the data row (second under the header) and the slug.
    assert "row 2" in str(caught.value)
    assert f"'{bad['slug']}'" in str(caught.value)


BAD_FIXED = [
    ({"r_si": ""}, "needs r_si"),
    ({"r_si": "0"}, "greater than zero"),
    ({"r_si": "-0.11"}, "greater than zero"),
    ({"conductivity_w_mk": "0.2"}, "leave conductivity_w_mk"),
    ({"thickness_mm": ""}, "needs the thickness_mm"),
]


@pytest.mark.parametrize(("change", "message"), BAD_FIXED)
def test_validator_rejects_a_bad_fixed_row(change: dict[str, str], message: str) -> None:
    with pytest.raises(ValueError, match=message) as caught:
        parse_materials_csv(csv_text({**GOOD_FIXED, **change}))
    assert "row 1 (slug 'vinyl-siding')" in str(caught.value)


def test_validator_rejects_a_duplicate_slug() -> None:
    with pytest.raises(ValueError, match="duplicate slug") as caught:
        parse_materials_csv(csv_text(GOOD, GOOD_FIXED, GOOD))
    assert "row 3 (slug 'osb')" in str(caught.value)


def test_validator_rejects_a_wrong_header_or_cell_count() -> None:
    with pytest.raises(ValueError, match="header"):
        parse_materials_csv(csv_text(GOOD, header=CSV_HEADER[:-1]))
    with pytest.raises(ValueError, match="header"):
        parse_materials_csv("")
    short = HEADER_LINE + "\n" + ",".join(list(GOOD.values())[:12]) + "\n"  # no source cell
    with pytest.raises(ValueError, match="cells, expected 13"):
        parse_materials_csv(short)


def test_blank_lines_are_skipped() -> None:
    text = csv_text(GOOD) + "\n\n"
    assert len(parse_materials_csv(text)) == 1
