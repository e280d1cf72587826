"""server.physics.ground against ISO 13370:2017's formulas worked by hand, every branch.

The worked floor used throughout: A = 120 m², P = 46 m, w = 0.3 m, λ = 2.0 W/(m·K).
B' = 120 / (0.5 × 46) = 5.217391 m; with R_f = 0, d_t = 0.3 + 2.0 × (0.17 + 0 + 0.04) = 0.72 m.
"""

from __future__ import annotations

import csv
import math
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import ground

A, P, W, LAM = 120.0, 46.0, 0.3, 2.0
B = 120.0 / 23.0  # 5.217391 m


def test_characteristic_dimension_and_equivalent_thicknesses() -> None:
    assert ground.characteristic_dimension(A, P) == pytest.approx(5.217391, rel=1e-6)
    # d_t = 0.3 + 2.0 × (0.17 + 0.5 + 0.04) = 1.72 m;  d_w = 2.0 × (0.13 + 0.2 + 0.04) = 0.74 m
    assert ground.floor_equivalent_thickness(W, LAM, 0.5) == pytest.approx(1.72, rel=1e-12)
    assert ground.wall_equivalent_thickness(LAM, 0.2) == pytest.approx(0.74, rel=1e-12)


def test_slab_worked_case_uninsulated_branch() -> None:
    # d_t = 0.72 < B' = 5.217391: U = 2λ/(π B' + d_t) · ln(π B'/d_t + 1)
    # π B' = 16.390918; π B' + d_t = 17.110918; π B'/d_t = 22.765164; ln(23.765164) = 3.168221
    # U = 4 / 17.110918 × 3.168221 = 0.740631 W/(m²·K); H_g = 120 × 0.740631 = 88.8758 W/K
    slab = ground.slab_on_ground(A, P, W, LAM, 0.0)
    assert slab.characteristic_m == pytest.approx(5.217391, rel=1e-6)
    assert slab.floor_thickness_m == pytest.approx(0.72, rel=1e-12)
    assert slab.branch == "d < B'"
    assert slab.u == pytest.approx(0.740631, rel=1e-6)
    assert slab.heat_transfer_w_k == pytest.approx(88.8758, rel=1e-6)
    assert slab.edge_psi_w_mk is None and slab.u_without_edge == slab.u


def test_slab_well_insulated_branch() -> None:
    # R_f = 3.0: d_t = 0.3 + 2 × (0.17 + 3.0 + 0.04) = 6.72 m ≥ B' = 5.217391:
    # U = λ/(0.457 B' + d_t) = 2 / (2.384348 + 6.72) = 2 / 9.104348 = 0.219675 W/(m²·K)
    slab = ground.slab_on_ground(A, P, W, LAM, 3.0)
    assert slab.branch == "d >= B'"
    assert slab.u == pytest.approx(0.219675, rel=1e-5)


def test_the_two_floor_branches_meet_at_d_equal_b() -> None:
    # At d = B': 2λ/((π+1) B') ln(π+1) = 0.686248 λ/B' and λ/(1.457 B') = 0.686342 λ/B':
    # the standard's two formulas differ by only 0.014 % where they hand over.
    b = 4.0
    below = ground.floor_u(b, b * (1 - 1e-12), LAM)
    at = ground.floor_u(b, b, LAM)
    assert below == pytest.approx(0.686248 * LAM / b, rel=1e-5)
    assert at == pytest.approx(0.686342 * LAM / b, rel=1e-5)
    assert abs(at - below) / at < 2e-4


def test_large_floor_limits() -> None:
    # Well-insulated branch, B' growing with d_t ≥ B' kept: U → λ/(0.457 B' + d_t) exactly.
    for b in (10.0, 100.0, 1000.0):
        d = 1.5 * b
        assert ground.floor_u(b, d, LAM) == pytest.approx(LAM / (0.457 * b + d), rel=1e-12)
    # Uninsulated branch, very large floor: U → (2λ/(π B')) ln(π B'/d_t), i.e. U B' → 0 slowly
    for b in (1e3, 1e5, 1e7):
        approx = 2 * LAM / (math.pi * b) * math.log(math.pi * b / 0.72)
        assert ground.floor_u(b, 0.72, LAM) == pytest.approx(approx, rel=1e-3)
    # Heavy insulation: d_t → ∞ gives one-dimensional conduction, U → 1/(R_si + R_f + R_se + w/λ):
    # R_f 900: U = 2/(2.384348 + 1800.72) = 0.00110920; × (900.21 + 0.15) = 0.998678
    u = ground.slab_on_ground(A, P, W, LAM, 900.0).u
    assert u * (0.17 + 900.0 + 0.04 + W / LAM) == pytest.approx(1.0, rel=2e-3)


def test_edge_insulation_horizontal() -> None:
    # D = 1.0 m wide, R_n = 2.0 m²·K/W, d_n = 0.06 m; R' = 2.0 − 0.06/2.0 = 1.97, d' = 3.94 m
    # Ψ = −(2/π)[ln(1/0.72 + 1) − ln(1/(0.72 + 3.94) + 1)] = −0.636620 × (0.870828 − 0.194408)
    #   = −0.430622 W/(m·K);  U = 0.740631 + 2 × (−0.430622)/5.217391 = 0.575560 W/(m²·K)
    edge = ground.EdgeInsulation("horizontal", 1.0, 2.0, 0.06)
    slab = ground.slab_on_ground(A, P, W, LAM, 0.0, edge)
    assert slab.edge_psi_w_mk == pytest.approx(-0.430622, rel=1e-5)
    assert slab.u_without_edge == pytest.approx(0.740631, rel=1e-6)
    assert slab.u == pytest.approx(0.575560, rel=1e-5)


def test_edge_insulation_vertical() -> None:
    # Vertical depth D = 1.0 m: 2D = 2.0; Ψ = −(2/π)[ln(2/0.72 + 1) − ln(2/4.66 + 1)]
    #   = −0.636620 × (1.329136 − 0.357104) = −0.618815 W/(m·K)
    # U = 0.740631 − 2 × 0.618815 / 5.217391 = 0.503419 W/(m²·K)
    slab = ground.slab_on_ground(
        A, P, W, LAM, 0.0, ground.EdgeInsulation("vertical", 1.0, 2.0, 0.06)
    )
    assert slab.edge_psi_w_mk == pytest.approx(-0.618815, rel=1e-5)
    assert slab.u == pytest.approx(0.503419, rel=1e-5)
    # by the formulas, vertical insulation of depth D acts as horizontal of width 2D
    half = ground.edge_insulation_psi(LAM, 0.72, "vertical", 0.5, 2.0, 0.06)
    assert half == pytest.approx(
        ground.edge_insulation_psi(LAM, 0.72, "horizontal", 1.0, 2.0, 0.06)
    )


def test_edge_insulation_no_better_than_soil_is_refused() -> None:
    # R_n = 0.02 ≤ d_n/λ = 0.06/2.0 = 0.03: R' ≤ 0
    with pytest.raises(ground.GroundInputError) as caught:
        ground.edge_insulation_psi(LAM, 0.72, "horizontal", 1.0, 0.02, 0.06)
    assert caught.value.parameter == "insulation_r_m2k_w"


def test_heated_basement_worked_case() -> None:
    # API.md's example: R_f 0.5, z 2.0 m, R_w 0.2.
    # d_t = 1.72 m; d_t + 0.5 z = 2.72 < B': U_bf = 4/(16.390918 + 2.72) · ln(16.390918/2.72 + 1)
    #   = 0.209304 × ln(7.026073) = 0.209304 × 1.949628 = 0.408066 W/(m²·K)
    # d_w = 0.74 < d_t = 1.72, so d_t → d_w in the bracket:
    # U_bw = (4/(2π)) (1 + 0.5 × 0.74/2.74) ln(2/0.74 + 1) = 0.636620 × 1.135036 × 1.309063
    #   = 0.945911 W/(m²·K)  (≈ 0.95)
    # H_g = 120 × 0.408066 + 2 × 46 × 0.945911 = 48.9679 + 87.0238 = 135.9917 W/K
    # U' = 135.9917 / (120 + 92) = 0.641471 W/(m²·K)
    base = ground.heated_basement(A, P, W, LAM, 0.5, 2.0, 0.2)
    assert base.floor_thickness_m == pytest.approx(1.72, rel=1e-12)
    assert base.wall_thickness_eq_m == pytest.approx(0.74, rel=1e-12)
    assert base.floor_branch == "d_t + 0.5 z < B'"
    assert base.wall_branch == "d_w < d_t"
    assert base.u_floor == pytest.approx(0.408066, rel=1e-5)
    assert base.u_wall == pytest.approx(0.945911, rel=1e-5)
    assert base.heat_transfer_w_k == pytest.approx(135.9917, rel=1e-5)
    assert base.u_overall == pytest.approx(0.641471, rel=1e-5)
    assert base.wall_area_m2 == pytest.approx(92.0)


def test_two_metre_basement_wall_in_ordinary_soil() -> None:
    # 300 mm of dense concrete (k 1.95 W/(m·K), the library's row): R_w = 0.3/1.95 = 0.153846;
    # sand or gravel λ 2.0, z = 2 m, uninsulated floor d_t = 0.72 m.
    # d_w = 2 × (0.13 + 0.153846 + 0.04) = 0.647692 < d_t:
    # U_bw = 0.636620 × (1 + 0.5 × 0.647692/2.647692) × ln(2/0.647692 + 1)
    #      = 0.636620 × 1.122313 × 1.408028 = 1.006017 W/(m²·K), inside the 0.95–1.12 quoted
    u = ground.basement_wall_u(LAM, 2.0, 0.72, ground.wall_equivalent_thickness(LAM, 0.3 / 1.95))
    assert u == pytest.approx(1.006017, rel=1e-5)
    assert 0.95 <= u <= 1.12


def test_basement_wall_insulated_branch() -> None:
    # R_w = 2.0: d_w = 2 × (0.13 + 2.0 + 0.04) = 4.34 ≥ d_t = 0.72, d_t stays in the bracket:
    # U_bw = 0.636620 × (1 + 0.5 × 0.72/2.72) × ln(2/4.34 + 1) = 0.636620 × 1.132353 × 0.379004
    #      = 0.273216 W/(m²·K)
    base = ground.heated_basement(A, P, W, LAM, 0.0, 2.0, 2.0)
    assert base.wall_branch == "d_w >= d_t"
    assert base.u_wall == pytest.approx(0.273216, rel=1e-5)


def test_basement_floor_well_insulated_branch() -> None:
    # R_f = 2.0: d_t = 0.3 + 2 × 2.21 = 4.72; d_t + 0.5 z = 5.72 ≥ B' = 5.217391:
    # U_bf = λ/(0.457 B' + d_t + 0.5 z) = 2 / (2.384348 + 5.72) = 0.246781 W/(m²·K)
    base = ground.heated_basement(A, P, W, LAM, 2.0, 2.0, 0.2)
    assert base.floor_branch == "d_t + 0.5 z >= B'"
    assert base.u_floor == pytest.approx(0.246781, rel=1e-5)


def test_basement_of_no_depth_is_the_slab() -> None:
    # z = 0: U_bf is the slab's U; U_bw is the limit 3λ/(π d_w) = 6/(π × 0.74) = 2.580891
    base = ground.heated_basement(A, P, W, LAM, 0.0, 0.0, 0.2)
    assert base.u_floor == pytest.approx(ground.slab_on_ground(A, P, W, LAM, 0.0).u, rel=1e-12)
    assert base.u_wall == pytest.approx(2.580891, rel=1e-6)
    assert base.wall_area_m2 == 0.0
    assert base.heat_transfer_w_k == pytest.approx(120 * base.u_floor, rel=1e-12)
    # and the z → 0 limit is continuous with a very shallow wall
    assert ground.basement_wall_u(LAM, 1e-7, 0.72, 0.74) == pytest.approx(base.u_wall, rel=1e-5)


def test_suspended_floor_worked_case() -> None:
    # Deck R_f = 2.0; h = 0.5 m, U_w = 1.5, ε = 0.003 m²/m, v = 4 m/s, average f_w = 0.05.
    # d_g = 0.72 m (R_g = 0) so U_g = 0.740631 (the slab's formula);
    # U_x = 2 × 0.5 × 1.5/5.217391 + 1450 × 0.003 × 4 × 0.05/5.217391 = 0.28750 + 0.16675
    #     = 0.45425 W/(m²·K); U_f = 1/(0.17 + 2.0 + 0.17) = 0.427350;
    # U = 1 / (1/0.427350 + 1/(0.740631 + 0.45425)) = 1 / (2.34 + 0.836903) = 0.314772
    floor = ground.suspended_floor(
        A, P, W, LAM, 2.0, 0.5, 1.5, 0.003, 4.0, ground.SHIELDING_FACTOR["average"]
    )
    assert floor.ground_thickness_m == pytest.approx(0.72)
    assert floor.u_ground == pytest.approx(0.740631, rel=1e-6)
    assert floor.u_ventilation == pytest.approx(0.45425, rel=1e-6)
    assert floor.u_deck == pytest.approx(1 / 2.34, rel=1e-12)
    assert floor.u == pytest.approx(0.314772, rel=1e-5)
    assert floor.heat_transfer_w_k == pytest.approx(120 * 0.314772, rel=1e-5)


def test_no_exposed_perimeter_is_refused_plainly() -> None:
    with pytest.raises(ground.GroundInputError) as caught:
        ground.slab_on_ground(A, 0.0, W, LAM, 0.0)
    assert caught.value.parameter == "exposed_perimeter_m"
    assert "no exposed perimeter" in str(caught.value)


@pytest.mark.parametrize(
    ("call", "parameter"),
    [
        (lambda: ground.slab_on_ground(0.0, P, W, LAM, 0.0), "area_m2"),
        (lambda: ground.slab_on_ground(A, P, W, 0.0, 0.0), "conductivity_w_mk"),
        (lambda: ground.slab_on_ground(A, P, W, -1.0, 0.0), "conductivity_w_mk"),
        (lambda: ground.slab_on_ground(A, P, -0.1, LAM, 0.0), "wall_thickness_m"),
        (lambda: ground.slab_on_ground(A, P, W, LAM, -0.1), "floor_r_m2k_w"),
        (lambda: ground.heated_basement(A, P, W, LAM, 0.0, -1.0, 0.2), "depth_m"),
        (lambda: ground.heated_basement(A, P, W, LAM, 0.0, 2.0, math.nan), "wall_r_m2k_w"),
    ],
)
def test_refused_inputs_name_the_parameter(call, parameter) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(ground.GroundInputError) as caught:
        call()
    assert caught.value.parameter == parameter


def test_edge_insulation_wider_than_the_floor_is_refused() -> None:
    # A 4 m² floor exposed on 8 m (B' = 1 m) with a 100 m deep R-1000 band: U_0 + 2Ψ/B' < 0
    with pytest.raises(ground.GroundInputError) as caught:
        ground.slab_on_ground(4.0, 8.0, W, LAM, 0.0, ground.EdgeInsulation("vertical", 100, 1e3, 0))
    assert caught.value.parameter == "extent_m"


def test_ranges_keep_every_figure_finite() -> None:
    # a perimeter that underflows 0.5 P, and a buried depth of 5e-324 m (limit taken)
    with pytest.raises(ground.GroundInputError) as caught:
        ground.characteristic_dimension(A, 5e-324)
    assert caught.value.parameter == "exposed_perimeter_m"
    assert ground.basement_wall_u(LAM, 5e-324, 0.72, 0.74) == pytest.approx(6 / (math.pi * 0.74))
    with pytest.raises(ground.GroundInputError, match="at most 100 W"):
        ground.floor_equivalent_thickness(W, 1e7, 0.0)


def test_soil_table_agrees_with_the_material_library() -> None:
    # the library's soil rows (server/data/materials.csv) carry the same category values
    rows = {
        row["slug"]: float(row["conductivity_w_mk"])
        for row in csv.DictReader(
            (Path(ground.__file__).parents[1] / "data" / "materials.csv").open(encoding="utf-8")
        )
        if row["slug"].startswith("soil-")
    }
    assert rows["soil-clay-silt"] == ground.SOIL_CONDUCTIVITY_W_MK["clay_silt"] == 1.5
    assert rows["soil-sand-gravel"] == ground.SOIL_CONDUCTIVITY_W_MK["sand_gravel"] == 2.0
    assert ground.SOIL_CONDUCTIVITY_W_MK["rock"] == 3.5


# --- invariants (hypothesis) -------------------------------------------------------------------

areas = st.floats(1.0, 1e5)
perimeters = st.floats(1.0, 1e4)
walls = st.floats(0.0, 1.0)
soils = st.floats(0.2, 5.0)
resistances = st.floats(0.0, 20.0)
depths = st.floats(0.01, 10.0)


@settings(max_examples=150, deadline=None)
@given(areas, perimeters, walls, soils, resistances, st.floats(0.01, 5.0))
def test_slab_u_positive_and_falls_as_r_f_grows(a, p, w, lam, r_f, extra) -> None:  # type: ignore[no-untyped-def]
    u = ground.slab_on_ground(a, p, w, lam, r_f).u
    u_more = ground.slab_on_ground(a, p, w, lam, r_f + extra).u
    assert u > 0
    # across the branch hand-over the standard's formulas may rise by up to 0.014 %
    assert u_more < u * (1 + 2e-4)


@settings(max_examples=150, deadline=None)
@given(areas, perimeters, walls, soils, resistances, depths, resistances, st.floats(0.01, 5.0))
def test_basement_invariants(a, p, w, lam, r_f, z, r_w, extra) -> None:  # type: ignore[no-untyped-def]
    base = ground.heated_basement(a, p, w, lam, r_f, z, r_w)
    assert base.u_floor > 0 and base.u_wall > 0
    assert base.heat_transfer_w_k == pytest.approx(a * base.u_floor + z * p * base.u_wall)
    assert base.u_overall == pytest.approx(base.heat_transfer_w_k / (a + z * p))
    more = ground.heated_basement(a, p, w, lam, r_f, z, r_w + extra)
    assert more.u_wall < base.u_wall
    assert more.u_floor == base.u_floor


@settings(max_examples=100, deadline=None)
@given(
    st.floats(6.0, 300.0),
    st.floats(6.0, 300.0),
    st.floats(0.25, 1.0),
    walls,
    soils,
    resistances,
    st.floats(0.01, 5.0),
    st.floats(0.2, 1.2),
)
def test_edge_insulation_always_helps(l1, l2, share, w, lam, r_f, r_n, band) -> None:  # type: ignore[no-untyped-def]
    # building-sized floors (sides of 6 to 300 m, part of the perimeter exposed), bands of
    # 0.2 to 1.2 m (common practice); the insulation adds R' = R_n − d_n/λ > 0
    a, p = l1 * l2, share * 2 * (l1 + l2)
    d_n = min(0.5 * r_n * lam, 0.2)  # a board up to 200 mm thick
    for orientation in ("horizontal", "vertical"):
        slab = ground.slab_on_ground(
            a, p, w, lam, r_f, ground.EdgeInsulation(orientation, band, r_n, d_n)
        )
        assert slab.edge_psi_w_mk is not None and slab.edge_psi_w_mk < 0
        assert slab.u < slab.u_without_edge
