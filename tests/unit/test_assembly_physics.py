"""Assembly R: parallel path (ISO 6946 upper bound), isothermal planes (lower bound), combined.

Hand-worked cases carry their arithmetic in the comments; films are checked against the
ASHRAE Handbook—Fundamentals and ISO 6946 values (from memory, ../shared/REFERENCES.md).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics.assembly import (
    MAX_FRAMED_LAYERS,
    FramedLayer,
    Layer,
    assembly_resistance,
    isothermal_layer_r,
    layer_r,
    thickness_for_r,
)
from server.physics.films import Films, surface_films
from server.physics.units import INCH_M, R_IP_IN_SI, k_ip_to_si, r_ip_to_si, r_si_to_ip

NO_FILMS = Films(0.0, 0.0)


def _ip(value: float) -> float:
    return r_ip_to_si(value)


# --- (a) the API.md example wall, worked in ip -------------------------------------------------


def _api_example_layers() -> list[Layer | FramedLayer]:
    depth_m = 3.5 * INCH_M
    return [
        Layer("siding", _ip(0.62)),
        Layer("sheathing", _ip(0.62), 0.4375 * INCH_M),
        FramedLayer(
            "stud bay",
            depth_m,
            cavity_r_si=_ip(13.0),
            framing_r_si=layer_r(depth_m, k_ip_to_si(0.80)),
            framing_fraction=0.25,
        ),
        Layer("drywall", layer_r(0.5 * INCH_M, k_ip_to_si(1.11)), 0.5 * INCH_M),
    ]


def test_api_example_wall_hand_worked() -> None:
    # API.md example (ip, ASHRAE films horizontal: inside 0.68, outside 0.17 — from memory):
    # framing R = 3.5 in / 0.80 = 4.375; drywall R = 0.5 / 1.11 = 0.4504505
    # series part = 0.62 + 0.62 + 0.4504505 + 0.68 + 0.17 = 2.5404505
    # cavity path = 2.5404505 + 13 = 15.5404505; framing path = 2.5404505 + 4.375 = 6.9154505
    # parallel path: 1 / (0.75/15.5404505 + 0.25/6.9154505) = 1 / (0.0482611 + 0.0361509)
    #              = 1 / 0.0844121 = 11.84665
    # isothermal: framed layer 1 / (0.75/13 + 0.25/4.375) = 1 / 0.1148352 = 8.708134;
    #             2.5404505 + 8.708134 = 11.24858
    # combined (11.84665 + 11.24858) / 2 = 11.54761; error 0.59806 / (2 x 11.54761) = 0.025895
    films = surface_films("ashrae", "horizontal")
    result = assembly_resistance(_api_example_layers(), films)
    assert r_si_to_ip(result.r_parallel_path_si) == pytest.approx(11.84665, rel=1e-6)
    assert r_si_to_ip(result.r_isothermal_planes_si) == pytest.approx(11.24858, rel=1e-6)
    assert r_si_to_ip(result.r_iso6946_si) == pytest.approx(11.54761, rel=1e-6)
    assert result.iso6946_max_error == pytest.approx(0.025895, rel=1e-4)
    # API.md published (rounded) values: 11.85 / 11.25 / 11.55 / 0.026
    assert round(r_si_to_ip(result.r_parallel_path_si), 2) == 11.85
    assert round(r_si_to_ip(result.r_isothermal_planes_si), 2) == 11.25
    assert round(r_si_to_ip(result.r_iso6946_si), 2) == 11.55
    assert round(result.iso6946_max_error, 3) == 0.026
    # the framed layer's own share is its isothermal value 8.708134, paths 13 and 4.375
    framed = result.layers[2]
    assert r_si_to_ip(framed.r_si) == pytest.approx(8.708134, rel=1e-6)
    assert r_si_to_ip(framed.r_cavity_path_si) == pytest.approx(13.0, rel=1e-9)
    assert r_si_to_ip(framed.r_framing_path_si) == pytest.approx(4.375, rel=1e-9)


# --- (b) an ISO 6946 worked case in SI ---------------------------------------------------------


def test_iso6946_timber_frame_wall_si() -> None:
    # Timber-frame wall, ISO 6946 films (horizontal): Rse 0.04, Rsi 0.13.
    # render 20 mm, k 1.0      -> 0.020/1.0   = 0.0200000
    # OSB 9 mm, k 0.13         -> 0.009/0.13  = 0.0692308
    # plasterboard 12.5 mm, k 0.25 -> 0.0125/0.25 = 0.0500000
    # series part = 0.0200000 + 0.0692308 + 0.0500000 + 0.13 + 0.04 = 0.3092308
    # stud layer 100 mm: mineral wool k 0.04 -> Rc = 2.5; timber k 0.13 -> Rf = 0.7692308;
    # timber share f = 0.12
    # upper R'_T: cavity path 2.8092308, timber path 1.0784615
    #   1/R' = 0.88/2.8092308 + 0.12/1.0784615 = 0.3132530 + 0.1112696 = 0.4245226
    #   R' = 2.355587
    # lower R''_T: 1/R_layer = 0.88/2.5 + 0.12/0.7692308 = 0.352 + 0.156 = 0.508
    #   R_layer = 1.968504; R'' = 0.3092308 + 1.968504 = 2.277735
    # R_T = (2.355587 + 2.277735)/2 = 2.316661; e = 0.077852/(2 x 2.316661) = 0.016803
    layers = [
        Layer("render", layer_r(0.020, 1.0), 0.020),
        Layer("OSB", layer_r(0.009, 0.13), 0.009),
        FramedLayer("studs", 0.100, layer_r(0.100, 0.04), layer_r(0.100, 0.13), 0.12),
        Layer("plasterboard", layer_r(0.0125, 0.25), 0.0125),
    ]
    result = assembly_resistance(layers, surface_films("iso6946", "horizontal"))
    assert result.r_parallel_path_si == pytest.approx(2.355587, rel=1e-6)
    assert result.r_isothermal_planes_si == pytest.approx(2.277735, rel=1e-6)
    assert result.r_iso6946_si == pytest.approx(2.316661, rel=1e-6)
    assert result.iso6946_max_error == pytest.approx(0.016803, rel=1e-4)
    assert result.layers[2].r_si == pytest.approx(1.968504, rel=1e-6)


# --- (c) two crossed framed layers -------------------------------------------------------------


def test_two_crossed_framed_layers_four_paths() -> None:
    # Attic joists crossed by strapping (layers independent), films none, one 0.1 RSI board.
    # joists A: Rc 3.0, Rf 1.0, fA 0.1;  strapping B: Rc 1.0, Rf 0.3, fB 0.2
    # four paths (area, R):
    #   cavity/cavity  0.9 x 0.8 = 0.72, 0.1 + 3.0 + 1.0 = 4.1 -> 0.72/4.1 = 0.1756098
    #   cavity/framing 0.9 x 0.2 = 0.18, 0.1 + 3.0 + 0.3 = 3.4 -> 0.18/3.4 = 0.0529412
    #   framing/cavity 0.1 x 0.8 = 0.08, 0.1 + 1.0 + 1.0 = 2.1 -> 0.08/2.1 = 0.0380952
    #   framing/framing 0.1 x 0.2 = 0.02, 0.1 + 1.0 + 0.3 = 1.4 -> 0.02/1.4 = 0.0142857
    #   sum 0.2809319 -> upper R' = 3.559582
    # lower: A 1/(0.9/3 + 0.1/1) = 2.5; B 1/(0.8/1 + 0.2/0.3) = 1/1.4666667 = 0.6818182
    #   R'' = 0.1 + 2.5 + 0.6818182 = 3.281818
    layers = [
        Layer("board", 0.1),
        FramedLayer("joists", 0.14, 3.0, 1.0, 0.1),
        FramedLayer("strapping", 0.02, 1.0, 0.3, 0.2),
    ]
    result = assembly_resistance(layers, NO_FILMS)
    assert result.r_parallel_path_si == pytest.approx(3.559582, rel=1e-6)
    assert result.r_isothermal_planes_si == pytest.approx(3.281818, rel=1e-6)
    # combined (3.559582 + 3.281818)/2 = 3.420700
    assert result.r_iso6946_si == pytest.approx(3.420700, rel=1e-6)


# --- limiting cases ----------------------------------------------------------------------------


def _three(result) -> tuple[float, float, float]:  # type: ignore[no-untyped-def]
    return (result.r_parallel_path_si, result.r_isothermal_planes_si, result.r_iso6946_si)


def test_limit_framing_fraction_zero_is_series_sum() -> None:
    # f = 0: no framing path exists; every bound is the series sum 0.5 + 2.0 + films 0.17
    layers = [Layer("board", 0.5), FramedLayer("bay", 0.09, 2.0, 0.7, 0.0)]
    films = surface_films("iso6946", "horizontal")  # 0.13 + 0.04
    for value in _three(assembly_resistance(layers, films)):
        assert value == pytest.approx(0.5 + 2.0 + 0.17, rel=1e-12)


def test_limit_framing_r_equal_cavity_r_is_series_sum() -> None:
    # R_framing == R_cavity: the layer is effectively homogeneous, 0.3 + 1.5 + 0 films
    layers = [Layer("board", 0.3), FramedLayer("bay", 0.09, 1.5, 1.5, 0.25)]
    result = assembly_resistance(layers, NO_FILMS)
    for value in _three(result):
        assert value == pytest.approx(1.8, rel=1e-12)
    assert result.iso6946_max_error == pytest.approx(0.0, abs=1e-12)


def test_limit_no_framed_layer_all_equal() -> None:
    # homogeneous layers only: R = 0.2 + 1.0 + 0.05 + ASHRAE films (0.68 + 0.17) x 0.17611018
    films = surface_films("ashrae", "horizontal")
    expected = 1.25 + 0.85 * R_IP_IN_SI
    result = assembly_resistance([Layer("a", 0.2), Layer("b", 1.0), Layer("c", 0.05)], films)
    for value in _three(result):
        assert value == pytest.approx(expected, rel=1e-12)
    assert result.iso6946_max_error == pytest.approx(0.0, abs=1e-12)


def test_limit_films_none_is_zero() -> None:
    # films 'none': both film resistances zero, total = layers alone
    films = surface_films("none", "up")
    assert films.inside_r_m2k_w == 0.0 and films.outside_r_m2k_w == 0.0
    result = assembly_resistance([Layer("a", 1.25)], films)
    assert result.r_parallel_path_si == pytest.approx(1.25, rel=1e-12)


# --- films -------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("heat_flow", "inside_ip"),
    # ASHRAE Handbook—Fundamentals, still air, non-reflective (from memory):
    # horizontal 0.68, up 0.61, down 0.92; outside 15 mph wind 0.17
    [("horizontal", 0.68), ("up", 0.61), ("down", 0.92)],
)
def test_ashrae_films(heat_flow: str, inside_ip: float) -> None:
    films = surface_films("ashrae", heat_flow)  # type: ignore[arg-type]
    assert r_si_to_ip(films.inside_r_m2k_w) == pytest.approx(inside_ip, rel=1e-9)
    assert r_si_to_ip(films.outside_r_m2k_w) == pytest.approx(0.17, rel=1e-9)


@pytest.mark.parametrize(
    # ISO 6946 conventional surface resistances (from memory): Rsi 0.13 / 0.10 / 0.17, Rse 0.04
    ("heat_flow", "rsi"),
    [("horizontal", 0.13), ("up", 0.10), ("down", 0.17)],
)
def test_iso6946_films(heat_flow: str, rsi: float) -> None:
    films = surface_films("iso6946", heat_flow)  # type: ignore[arg-type]
    assert films.inside_r_m2k_w == pytest.approx(rsi, rel=1e-12)
    assert films.outside_r_m2k_w == pytest.approx(0.04, rel=1e-12)
    assert films.total_r_m2k_w == pytest.approx(rsi + 0.04, rel=1e-12)


def test_films_bad_choices() -> None:
    with pytest.raises(ValueError):
        surface_films("ashrae", "sideways")  # type: ignore[arg-type]
    with pytest.raises(ValueError):
        surface_films("other", "up")  # type: ignore[arg-type]


# --- Fourier's law helpers ---------------------------------------------------------------------


def test_layer_r_and_thickness_for_r_hand() -> None:
    # Fourier: R = L/k: 0.0127 m / 0.16 W/(m·K) = 0.079375 m²·K/W; L = R k: 5.0 x 0.04 = 0.2 m
    assert layer_r(0.0127, 0.16) == pytest.approx(0.079375, rel=1e-12)
    assert thickness_for_r(5.0, 0.04) == pytest.approx(0.2, rel=1e-12)


# --- invariants (hypothesis) -------------------------------------------------------------------

_R = st.floats(min_value=1e-3, max_value=50.0)
_FRACTION = st.floats(min_value=0.0, max_value=0.95)
_HOMOGENEOUS = st.builds(Layer, name=st.just("h"), r_si=st.floats(min_value=0.0, max_value=20.0))
_FRAMED = st.builds(
    FramedLayer,
    name=st.just("f"),
    thickness_m=st.floats(min_value=0.01, max_value=0.3),
    cavity_r_si=_R,
    framing_r_si=_R,
    framing_fraction=_FRACTION,
)
_ANY = st.one_of(_HOMOGENEOUS, _FRAMED)


def _assembly() -> st.SearchStrategy[list[Layer | FramedLayer]]:
    return st.lists(_ANY, min_size=1, max_size=6).filter(
        lambda layers: sum(isinstance(x, FramedLayer) for x in layers) <= 4
    )


_FILMS = st.sampled_from(
    [surface_films(s, h) for s in ("ashrae", "iso6946") for h in ("horizontal", "up", "down")]
)
#: round-off allowance for comparisons that are exact in real arithmetic
TOL = 1e-12


@settings(max_examples=200, deadline=None)
@given(layers=_assembly(), extra=_ANY, films=_FILMS)
def test_adding_a_layer_never_lowers_r(layers, extra, films) -> None:  # type: ignore[no-untyped-def]
    # each path only gains series resistance, so each total can only rise (or stay);
    # at most 4 + 1 framed layers here, under MAX_FRAMED_LAYERS
    before = _three(assembly_resistance(layers, films))
    after = _three(assembly_resistance([*layers, extra], films))
    for b, a in zip(before, after, strict=True):
        assert a >= b * (1 - TOL)


@settings(max_examples=200, deadline=None)
@given(layers=_assembly(), films=_FILMS)
def test_bounds_order_and_error_range(layers, films) -> None:  # type: ignore[no-untyped-def]
    # ISO 6946: R' (upper, parallel path) >= R'' (lower, isothermal); combined between;
    # e = (R' - R'')/(2 R_T) = (R' - R'')/(R' + R'') lies in [0, 1)
    result = assembly_resistance(layers, films)
    upper, lower, combined = _three(result)
    assert upper >= lower * (1 - TOL)
    assert lower * (1 - TOL) <= combined <= upper * (1 + TOL)
    assert -TOL <= result.iso6946_max_error < 1.0
    assert all(math.isfinite(v) and v > 0 for v in (upper, lower, combined))


@settings(max_examples=200, deadline=None)
@given(layers=_assembly(), films=_FILMS, data=st.data())
def test_layer_order_does_not_change_r(layers, films, data) -> None:  # type: ignore[no-untyped-def]
    # series sums and products of independent area shares commute
    shuffled = data.draw(st.permutations(layers))
    a = _three(assembly_resistance(layers, films))
    b = _three(assembly_resistance(list(shuffled), films))
    for x, y in zip(a, b, strict=True):
        assert x == pytest.approx(y, rel=1e-9)


@settings(max_examples=100, deadline=None)
@given(layer=_FRAMED)
def test_isothermal_layer_between_its_paths(layer: FramedLayer) -> None:
    # the area-weighted layer R lies between its framing R and its cavity R
    low, high = sorted((layer.cavity_r_si, layer.framing_r_si))
    assert low * (1 - TOL) <= isothermal_layer_r(layer) <= high * (1 + TOL)


# --- validity ----------------------------------------------------------------------------------

_BAD = [-1.0, math.nan, math.inf, -math.inf]


@pytest.mark.parametrize("value", [*_BAD, 0.0])
def test_layer_r_refuses_bad(value: float) -> None:
    with pytest.raises(ValueError, match="greater than zero"):
        layer_r(value, 0.04)
    with pytest.raises(ValueError, match="greater than zero"):
        layer_r(0.1, value)
    with pytest.raises(ValueError):
        thickness_for_r(value, 0.04)


@pytest.mark.parametrize("value", _BAD)
def test_homogeneous_r_refuses_bad(value: float) -> None:
    # a homogeneous layer may have R = 0 (a vent channel) but never negative or non-finite
    with pytest.raises(ValueError):
        assembly_resistance([Layer("x", value)], NO_FILMS)


@pytest.mark.parametrize("field", ["thickness_m", "cavity_r_si", "framing_r_si"])
@pytest.mark.parametrize("value", [*_BAD, 0.0])
def test_framed_layer_refuses_bad(field: str, value: float) -> None:
    good = {"thickness_m": 0.09, "cavity_r_si": 2.0, "framing_r_si": 0.7}
    good[field] = value
    layer = FramedLayer("bay", framing_fraction=0.25, **good)  # type: ignore[arg-type]
    with pytest.raises(ValueError):
        assembly_resistance([layer], NO_FILMS)


@pytest.mark.parametrize("fraction", [-0.1, 1.0, 1.5, math.nan, math.inf])
def test_framing_fraction_outside_0_1_refused(fraction: float) -> None:
    with pytest.raises(ValueError, match="framing fraction"):
        assembly_resistance([FramedLayer("bay", 0.09, 2.0, 0.7, fraction)], NO_FILMS)


def test_empty_assembly_refused() -> None:
    with pytest.raises(ValueError):
        assembly_resistance([], NO_FILMS)


def test_too_many_framed_layers_refused() -> None:
    framed = [FramedLayer(f"f{i}", 0.02, 1.0, 0.3, 0.1) for i in range(MAX_FRAMED_LAYERS + 1)]
    with pytest.raises(ValueError, match=str(MAX_FRAMED_LAYERS)):
        assembly_resistance(framed, NO_FILMS)
    # exactly the maximum still computes
    assert assembly_resistance(framed[:MAX_FRAMED_LAYERS], NO_FILMS).r_parallel_path_si > 0


def test_zero_total_r_is_a_value_error() -> None:
    # limiting case: total R = 0 means U = infinity: refused (once a ZeroDivisionError)
    with pytest.raises(ValueError):
        assembly_resistance([Layer("vent channel", 0.0)], NO_FILMS)


def test_overflowing_total_r_is_a_value_error() -> None:
    # 1e308 + 1e308 overflows to infinity: refused (once a ZeroDivisionError)
    with pytest.raises(ValueError):
        assembly_resistance([Layer("a", 1e308), Layer("b", 1e308)], NO_FILMS)
