"""Buffer spaces, ISO 13789 (server.physics.buffer_spaces), and still-air films on their side.

ISO 13789:2017 (unconditioned spaces): b = H_ue / (H_iu + H_ue); H_iu = Σ U·A of the house's
surfaces facing the space, H_ue = Σ U·A of its exposed parts + ρc · n · V. The hand check of
REFERENCES.md: H_iu = 120 W/K, H_ue = 80 W/K gives b = 80 / 200 = 0.4.

The worked attic of the model test house (tests/unit/test_house_model.py), IP, by hand:
  attic floor 1000 ft² at R-11 -> R-49; the vented attic above it has a roof of 1100 ft² at
  U 0.5 (roof deck and shingles, about R-2 films included, common practice) and 4000 ft³ of
  air at 3 air changes per hour (a vented attic, from memory);
  H_ue = 1100 × 0.5 + 0.018 × 3 × 4000 = 550 + 216 = 766 Btu/(h·°F).
  As found: H_iu = 1000 / 11 = 90.9091;  b = 766 / 856.9091 = 0.893910;
            UA_attic = b · H_iu = 81.2646 Btu/(h·°F).
  R-49:     H_iu = 1000 / 49 = 20.4082;  b = 766 / 786.4082 = 0.974049;
            UA_attic = 19.8785 Btu/(h·°F).
  ΔUA = 61.3860 Btu/(h·°F) (70.5009 as if the attic floor faced outdoor air; 63.0215 had
  the as-found b been kept), so the saving is 61.3860 × 5400 × 24 / 80,000 × 1.45 = $144.1958
  a year instead of $165.6066.
"""

from __future__ import annotations

import math
from dataclasses import replace

import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from server.physics import buffer_spaces as bs
from server.physics import house_model as hm
from server.physics.energy import AIR_HEAT_CAPACITY_SI
from server.physics.films import surface_films
from server.physics.fuels import FUELS
from server.physics.units import to_si

Q = pint.UnitRegistry().Quantity
PROPERTY = settings(max_examples=200, deadline=None)
#: 0.018 Btu/(ft³·°F) in J/(m³·K), by pint (ASHRAE Handbook—Fundamentals ch. 16's air)
RHO_C_PINT = Q(0.018, "Btu_it/(ft**3*delta_degF)").to("J/(m**3*K)").magnitude  # 1207.19
UA_IP_W_K = Q(1, "Btu_it/hr/delta_degF").to("W/K").magnitude  # 0.527528
FT2_M2 = Q(1, "ft**2").to("m**2").magnitude
FT3_M3 = Q(1, "ft**3").to("m**3").magnitude
R_IP_SI = Q(1, "hr*ft**2*delta_degF/Btu_it").to("m**2*K/W").magnitude  # 0.176110


def ua_ip(ua_w_per_k: float) -> float:
    return ua_w_per_k / UA_IP_W_K


# --- the adjustment factor b ----------------------------------------------------------------


def test_hand_check_from_references() -> None:
    # REFERENCES.md: H_iu 120 W/K, H_ue 80 W/K -> b = 80 / (120 + 80) = 0.4
    assert bs.adjustment_factor(120.0, 80.0) == pytest.approx(0.4, rel=1e-15)
    factors = bs.space_factors(bs.BufferSpace("crawl", (bs.ExposedPart(40.0, 2.0),)), 120.0)
    assert (factors.b, factors.h_iu_w_per_k, factors.h_ue_w_per_k) == pytest.approx((0.4, 120, 80))
    assert factors.b_given is False


def test_the_one_air_heat_capacity_is_the_infiltration_one() -> None:
    # ρc of the project: 0.018 Btu/(ft³·°F) = 1207.19 J/(m³·K) (pint); no second constant.
    assert AIR_HEAT_CAPACITY_SI == pytest.approx(RHO_C_PINT, rel=1e-9)
    # 4000 ft³ at 3 /h: 0.018 × 3 × 4000 = 216 Btu/(h·°F) by hand, in IP as the trade writes it
    h_v = bs.ventilation_conductance(4000 * FT3_M3, 3.0)
    assert ua_ip(h_v) == pytest.approx(216.0, rel=1e-9)
    # SI: 50 m³ at 1 /h: 1207.19 × 1 × 50 / 3600 = 16.7665 W/K
    assert bs.ventilation_conductance(50.0, 1.0) == pytest.approx(RHO_C_PINT * 50 / 3600, rel=1e-9)


def test_h_ue_counts_the_exposed_parts_and_the_air() -> None:
    # SI crawlspace by hand: walls 20 m² at U 1.5 = 30 W/K; ground floor 60 m² at U 0.5
    # = 30 W/K; 50 m³ at 1 /h = 16.7665 W/K; H_ue = 76.7665 W/K.
    parts = (bs.ExposedPart(20.0, 1.5), bs.ExposedPart(60.0, 0.5))
    h_ue = bs.space_to_outside_conductance(parts, 50.0, 1.0)
    assert h_ue == pytest.approx(60.0 + RHO_C_PINT * 50 / 3600, rel=1e-9)
    # with a floor of 90 m² at U 2.0 facing it (H_iu 180 W/K): b = 76.7665 / 256.7665
    factors = bs.space_factors(bs.BufferSpace("crawl", parts, 50.0, 1.0), 180.0)
    assert factors.b == pytest.approx(76.7665 / 256.7665, rel=1e-5)


def test_b_given_directly() -> None:
    factors = bs.space_factors(bs.BufferSpace("garage", b=0.5), 40.0)
    assert (factors.b, factors.h_iu_w_per_k, factors.h_ue_w_per_k, factors.b_given) == (
        0.5,
        40.0,
        None,
        True,
    )
    with pytest.raises(ValueError, match="between 0 and 1"):
        bs.space_factors(bs.BufferSpace("garage", b=1.2), 40.0)


def test_limiting_cases() -> None:
    # H_ue -> ∞: b -> 1, the surface as if it faced outdoor air
    assert bs.adjustment_factor(120.0, 1e15) == pytest.approx(1.0, abs=1e-12)
    assert bs.adjustment_factor(120.0, 1e6) == pytest.approx(1e6 / (1e6 + 120), rel=1e-15)
    # no exposed part and no air change: H_ue = 0, b = 0 (the space reaches indoor temperature)
    closed = bs.space_factors(bs.BufferSpace("closet", (), 30.0, 0.0), 120.0)
    assert (closed.b, closed.h_ue_w_per_k) == (0.0, 0.0)
    # nothing faces it and nothing leaves it: no heat passes, b taken as 0
    assert bs.adjustment_factor(0.0, 0.0) == 0.0
    # nothing faces it: b = 1 whatever H_ue (and it multiplies nothing)
    assert bs.adjustment_factor(0.0, 50.0) == 1.0


def test_b_is_the_series_conductance_of_the_two_sides() -> None:
    # Steady heat balance of the space (ISO 13789 Annex C): H_iu (θi - θu) = H_ue (θu - θe),
    # so the loss through it is H_iu·H_ue / (H_iu + H_ue) · (θi - θe) = b · H_iu · Δθ. With
    # H_iu 120, H_ue 80 W/K and 20 °C / 0 °C: θu = (120·20 + 80·0) / 200 = 12 °C, loss =
    # 120 × 8 = 960 W = 0.4 × 120 × 20.
    b = bs.adjustment_factor(120.0, 80.0)
    theta_u = (120 * 20 + 80 * 0) / 200
    assert theta_u == 12.0
    assert b * 120 * 20 == pytest.approx(120 * (20 - theta_u), rel=1e-15)
    assert b == pytest.approx((20 - theta_u) / (20 - 0), rel=1e-15)  # b = (θi - θu)/(θi - θe)


def test_bad_inputs_are_refused() -> None:
    with pytest.raises(ValueError, match="volume"):
        bs.ventilation_conductance(-1.0, 1.0)
    with pytest.raises(ValueError, match="air changes"):
        bs.ventilation_conductance(10.0, math.nan)
    with pytest.raises(ValueError, match="U-factor"):
        bs.space_to_outside_conductance((bs.ExposedPart(1.0, -2.0),), 1.0, 1.0)
    with pytest.raises(ValueError, match="no space 'attik'"):
        bs.buffered_conductances({"ceiling": 10.0}, {"ceiling": "attik"}, ())
    with pytest.raises(ValueError, match="used twice"):
        bs.buffered_conductances({}, {}, (bs.BufferSpace("a", b=0.5), bs.BufferSpace("a", b=1)))


# --- in the house: b recomputed for every package -------------------------------------------

ATTIC = bs.BufferSpace(
    "attic",
    exposed=(bs.ExposedPart(1100 * FT2_M2, 0.5 / R_IP_SI),),
    volume_m3=4000 * FT3_M3,
    air_changes_per_h=3.0,
)
HOUSE = hm.House(
    surfaces=(
        hm.Surface("attic-floor", "ceiling", 1000 * FT2_M2, 1 / (11 * R_IP_SI), "attic"),
        hm.Surface("walls", "wall", 1400 * FT2_M2, 1 / (14 * R_IP_SI)),
    ),
    climate=hm.Climate(hdd_k_day=to_si(5400, "degree_days", "ip")),
    heating=hm.Heating(FUELS["natural_gas"], efficiency=0.80, price_per_unit=1.45),
    spaces=(ATTIC,),
)
ATTIC_R49 = hm.AssemblyUpgrade("attic-r49", "attic-floor", 1 / (49 * R_IP_SI))


def test_attic_floor_upgrade_changes_b() -> None:
    # worked by hand in the module docstring
    found = hm.evaluate(HOUSE)
    attic = found.spaces["attic"]
    assert ua_ip(attic.h_ue_w_per_k or 0) == pytest.approx(766.0, rel=1e-9)
    assert ua_ip(attic.h_iu_w_per_k) == pytest.approx(90.9091, rel=1e-6)
    assert attic.b == pytest.approx(0.893910, rel=1e-6)
    assert ua_ip(found.ua_by_surface_w_per_k["attic-floor"]) == pytest.approx(81.2646, rel=1e-6)
    assert ua_ip(found.ua_by_surface_w_per_k["walls"]) == pytest.approx(100.0, rel=1e-9)

    after = hm.evaluate(hm.apply_upgrades(HOUSE, [ATTIC_R49]))
    assert after.spaces["attic"].b == pytest.approx(0.974049, rel=1e-6)
    assert ua_ip(after.ua_by_surface_w_per_k["attic-floor"]) == pytest.approx(19.8785, rel=1e-5)
    assert ua_ip(found.ua_w_per_k - after.ua_w_per_k) == pytest.approx(61.3860, rel=1e-6)
    comparison = hm.compare(HOUSE, [ATTIC_R49], [hm.Package("p", ("attic-r49",))])
    assert comparison.packages[0].appraisal.annual_savings == pytest.approx(144.1958, rel=1e-6)
    # as if outdoors the same upgrade saves $165.6066 (tests/unit/test_house_model.py)
    outdoors = replace_adjacent(HOUSE, "outdoors")
    alone = hm.compare(outdoors, [ATTIC_R49], [hm.Package("p", ("attic-r49",))])
    assert alone.packages[0].appraisal.annual_savings == pytest.approx(165.6066, rel=1e-6)


def replace_adjacent(house: hm.House, adjacent: str) -> hm.House:
    return replace(house, surfaces=tuple(replace(s, adjacent=adjacent) for s in house.surfaces))


def test_house_without_spaces_is_unchanged() -> None:
    plain = hm.House(
        surfaces=(hm.Surface("walls", "wall", 130.0, 0.4),),
        climate=hm.Climate(hdd_k_day=3000.0),
        heating=hm.Heating(FUELS["natural_gas"], 0.8, 1.45),
    )
    energy = hm.evaluate(plain)
    assert energy.ua_by_surface_w_per_k == {"walls": 130.0 * 0.4}
    assert energy.spaces == {}


# --- still-air films on the buffer-space side -----------------------------------------------


@pytest.mark.parametrize(
    ("heat_flow", "still_ip"), [("horizontal", 0.68), ("up", 0.61), ("down", 0.92)]
)
def test_still_air_films_are_the_handbook_values(heat_flow: str, still_ip: float) -> None:
    # ASHRAE Handbook—Fundamentals surface-film table, still air, non-reflective surfaces:
    # horizontal, up, down R-0.92 (h·ft²·°F/Btu); outdoors 15 mph wind.
    still = surface_films("ashrae", heat_flow, "still_air")  # type: ignore[arg-type]
    assert still.outside_r_m2k_w == pytest.approx(still_ip * R_IP_SI, rel=1e-9)
    assert still.inside_r_m2k_w == pytest.approx(still_ip * R_IP_SI, rel=1e-9)
    wind = surface_films("ashrae", heat_flow)  # type: ignore[arg-type]
    assert wind.outside_r_m2k_w == pytest.approx(0.17 * R_IP_SI, rel=1e-9)
    assert wind.inside_r_m2k_w == still.inside_r_m2k_w


@pytest.mark.parametrize(("heat_flow", "rsi"), [("horizontal", 0.13), ("up", 0.10), ("down", 0.17)])
def test_iso6946_unconditioned_side_takes_rsi(heat_flow: str, rsi: float) -> None:
    # ISO 6946 Table 7: Rsi 0.13 / 0.10 / 0.17, Rse 0.04 m²·K/W; next to an unconditioned space
    # the outer face takes Rsi of the same direction (from memory).
    still = surface_films("iso6946", heat_flow, "still_air")  # type: ignore[arg-type]
    assert (still.inside_r_m2k_w, still.outside_r_m2k_w) == (rsi, rsi)
    assert surface_films("iso6946", heat_flow).outside_r_m2k_w == 0.04  # type: ignore[arg-type]
    assert surface_films("none", heat_flow, "still_air").total_r_m2k_w == 0.0  # type: ignore[arg-type]


def test_unknown_outside_film_is_refused() -> None:
    with pytest.raises(ValueError, match="wind or still_air"):
        surface_films("ashrae", "up", "breeze")  # type: ignore[arg-type]


# --- invariants (hypothesis) ----------------------------------------------------------------

conductance = st.floats(min_value=0.0, max_value=1e7, allow_nan=False, allow_infinity=False)


@PROPERTY
@given(h_iu=conductance, h_ue=conductance, more=st.floats(min_value=0.0, max_value=1e7))
def test_b_between_zero_and_one_and_rising_with_h_ue(h_iu: float, h_ue: float, more: float) -> None:
    b = bs.adjustment_factor(h_iu, h_ue)
    assert 0.0 <= b <= 1.0
    assert bs.adjustment_factor(h_iu, h_ue + more) >= b - 1e-15


@PROPERTY
@given(
    surfaces=st.lists(
        st.tuples(
            st.floats(min_value=0.01, max_value=1e4),  # area m²
            st.floats(min_value=0.01, max_value=20.0),  # U W/(m²·K)
            st.sampled_from(["outdoors", "ground", "attic", "crawl"]),
        ),
        min_size=1,
        max_size=8,
    ),
    exposed_u=st.floats(min_value=0.0, max_value=20.0),
    air_changes=st.floats(min_value=0.0, max_value=30.0),
    b_crawl=st.floats(min_value=0.0, max_value=1.0),
)
def test_ua_with_a_buffer_is_at_most_ua_as_if_outdoors(
    surfaces: list[tuple[float, float, str]], exposed_u: float, air_changes: float, b_crawl: float
) -> None:
    spaces = (
        bs.BufferSpace("attic", (bs.ExposedPart(100.0, exposed_u),), 300.0, air_changes),
        bs.BufferSpace("crawl", b=b_crawl),
    )
    ua = {f"s{i}": area * u for i, (area, u, _) in enumerate(surfaces)}
    adjacent = {f"s{i}": behind for i, (_, _, behind) in enumerate(surfaces)}
    buffered, factors = bs.buffered_conductances(ua, adjacent, spaces)
    assert sum(buffered.values()) <= sum(ua.values()) * (1 + 1e-12)
    for key, value in buffered.items():
        assert 0.0 <= value <= ua[key] * (1 + 1e-12)
        if adjacent[key] in ("outdoors", "ground"):
            assert value == ua[key]
    for space in factors.values():
        assert 0.0 <= space.b <= 1.0
    h_iu_attic = sum(ua[k] for k in ua if adjacent[k] == "attic")
    assert factors["attic"].h_iu_w_per_k == pytest.approx(h_iu_attic, rel=1e-12)
