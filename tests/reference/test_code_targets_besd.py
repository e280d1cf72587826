"""Code-target table: plausibility against building-energy-standards-data, plus its own rules.

Outside source: building-energy-standards-data (0.3.x),
``building_energy_standards_data/database_files/envelope_requirements_IECC.json``: a list of
rows with ``template`` ("IECC-2021"), ``climate_zone_set`` ("ClimateZone 5", "ClimateZone 4C"),
``intended_surface_type`` ("ExteriorWall", "ExteriorRoof"), ``standards_construction_type``
("WoodFramed", "Attic and Other"), ``building_category`` and ``assembly_maximum_u_value``
(Btu/(h·ft²·°F), films included). These are the COMMERCIAL provisions (C402), not the
one- and two-family dwelling table our CSV holds, so the checks are only of shape: same zones,
the same direction from warm to cold, and U-factors of the same order.
"""

from __future__ import annotations

import json
from importlib import resources

import pytest

from server.errors import InputError
from server.physics.code_targets import SURFACE_KINDS, CodeTarget, check, target_for
from server.services.code_target_data import load_code_targets, parse_code_targets

ROWS = load_code_targets()


def _besd_u(surface_type: str, construction_type: str) -> dict[str, float]:
    """IECC-2021 commercial 'Residential' (Group R) maximum U by zone label ('4A', '5', ...)."""
    path = resources.files("building_energy_standards_data").joinpath(
        "database_files", "envelope_requirements_IECC.json"
    )
    data = json.loads(path.read_text(encoding="utf-8"))
    return {
        row["climate_zone_set"].removeprefix("ClimateZone ").strip(): row[
            "assembly_maximum_u_value"
        ]
        for row in data
        if row["template"] == "IECC-2021"
        and row["building_category"] == "Residential"
        and row["intended_surface_type"] == surface_type
        and row["standards_construction_type"] == construction_type
    }


def _by_zone(values: dict[str, float]) -> list[float]:
    """Zones 0..8 in order; zone 4 is '4' or, where split by moisture, '4A'."""
    return [values.get(str(z), values.get(f"{z}A")) for z in range(9)]  # type: ignore[misc]


def _ours(kind: str, field: str) -> list[float | None]:
    return [getattr(target_for(ROWS, z, kind), field) for z in range(9)]


def test_dataset_zones_match_ours():
    # building-energy-standards-data: IECC-2021 wood-framed walls have zones 0-8 (4 split into
    # 4A/4B/4C); our table has one row per zone 0-8 for every surface kind.
    dataset_zones = {int(label[0]) for label in _besd_u("ExteriorWall", "WoodFramed")}
    assert dataset_zones == set(range(9))
    for kind in SURFACE_KINDS:
        assert sorted(r.climate_zone for r in ROWS if r.surface_kind == kind) == list(range(9))


@pytest.mark.parametrize(
    ("surface_type", "construction_type", "our_kind"),
    [
        ("ExteriorWall", "WoodFramed", "wood_frame_wall"),
        ("ExteriorRoof", "Attic and Other", "ceiling"),
    ],
)
def test_u_max_never_rises_from_warm_to_cold_in_the_dataset_and_in_ours(
    surface_type, construction_type, our_kind
):
    # building-energy-standards-data IECC-2021: wood-framed wall 0.064 (0-4A), 0.051 (5-7),
    # 0.032 (8); attic 0.027 (0-3), 0.021 (4-6), 0.017 (7-8): non-increasing warm -> cold.
    theirs = _by_zone(_besd_u(surface_type, construction_type))
    assert all(a >= b for a, b in zip(theirs, theirs[1:], strict=False))
    ours = _ours(our_kind, "u_max_ip")
    assert all(a >= b for a, b in zip(ours, ours[1:], strict=False))  # type: ignore[operator]
    # Plausibility only (commercial Group R vs one- and two-family dwellings): same order of
    # magnitude, within a factor of 2 zone by zone.
    for zone, (mine, dataset) in enumerate(zip(ours, theirs, strict=True)):
        assert 0.5 <= mine / dataset <= 2.0, f"zone {zone}: {mine} vs {dataset}"  # type: ignore[operator]


def test_every_u_max_is_non_increasing_and_every_r_min_non_decreasing_by_zone():
    # The table's own rule: going colder (zone 1 -> 8) never asks for less insulation.
    for kind in SURFACE_KINDS:
        rs = [r for r in _ours(kind, "r_min_ip")[1:] if r is not None]
        us = [u for u in _ours(kind, "u_max_ip")[1:] if u is not None]
        assert rs == sorted(rs), kind
        assert us == sorted(us, reverse=True), kind


def test_every_row_carries_edition_source_and_a_number():
    for row in ROWS:
        assert row.source_kind == "from memory"  # nothing read from a packaged dataset
        assert "verify with your locally adopted code" in row.edition
        assert row.r_min_ip is not None or row.u_max_ip is not None


def test_spot_values_from_memory():
    # IECC 2021 Table R402.1.3 / R402.1.2 as recalled (from memory): zone 5 ceiling R-60 /
    # U-0.024; zone 3 wood-frame wall "20 or 13+5ci or 0+15ci" / U-0.060; fenestration U-0.30.
    ceiling = target_for(ROWS, 5, "ceiling")
    assert (ceiling.r_min_ip, ceiling.u_max_ip) == (60.0, 0.024)
    wall = target_for(ROWS, 3, "wall")  # alias of wood_frame_wall
    assert (wall.r_min_ip, wall.u_max_ip, wall.note) == (20.0, 0.060, "20 or 13+5ci or 0+15ci")
    assert target_for(ROWS, "6A", "window").u_max_ip == 0.30


def test_check_compares_u_factor_first():
    ceiling = target_for(ROWS, 5, "ceiling")
    # R-38 total: U = 1 / 38 = 0.0263 > 0.024 -> below target.
    verdict = check(ceiling, r_total_ip=38.0)
    assert verdict.status == "below target" and verdict.compared == "u_factor"
    assert verdict.actual_value == pytest.approx(1 / 38, rel=1e-12)
    assert "0.026" in verdict.words and "0.024" in verdict.words
    # R-50 total: U = 0.020 <= 0.024 -> meets. A given U-factor wins over 1 / R.
    assert check(ceiling, r_total_ip=50.0).status == "meets"
    assert check(ceiling, r_total_ip=50.0, u_factor_ip=0.030).status == "below target"


def test_check_falls_back_to_r_for_slabs_and_says_it_is_approximate():
    slab = target_for(ROWS, 5, "slab")  # R-10, no U-factor row
    assert check(slab, r_total_ip=10.0).status == "meets"
    verdict = check(slab, r_total_ip=5.0)
    assert verdict.status == "below target" and verdict.compared == "r_value"
    assert "approximate" in verdict.words


def test_no_target_cases():
    # Unknown kind, missing row, or nothing to compare.
    assert target_for(ROWS, 5, "pipe_run") is None
    assert check(None, r_total_ip=20.0).status == "no target"
    assert check(target_for(ROWS, 5, "ceiling")).status == "no target"


def test_marine_zone_4_uses_zone_5():
    # IECC groups marine zone 4 (4C) with zone 5 (from memory).
    marine = target_for(ROWS, "4C", "wood_frame_wall")
    assert marine.climate_zone == 5 and marine.note.startswith("Marine zone 4")
    assert target_for(ROWS, "4A", "wood_frame_wall").u_max_ip == 0.045
    for bad in ("9", "10", "4D", "", "zone"):
        with pytest.raises(ValueError):
            target_for(ROWS, bad, "ceiling")


def test_check_refuses_bad_numbers():
    for bad in (0.0, -1.0, float("nan"), float("inf")):
        with pytest.raises(ValueError):
            check(target_for(ROWS, 5, "ceiling"), r_total_ip=bad)


def test_row_validation():
    with pytest.raises(ValueError, match="minimum R, a maximum U-factor"):
        CodeTarget("x", 3, "ceiling", None, None, "", "from memory")
    with pytest.raises(ValueError, match="climate zone"):
        CodeTarget("x", 9, "ceiling", 30.0, None, "", "from memory")


HEADER = "edition,climate_zone,surface_kind,r_min_ip,u_max_ip,note,source_kind\n"


@pytest.mark.parametrize(
    ("line", "field"),
    [
        ("x,9,ceiling,30,,n,from memory", "code_targets.csv[1].climate_zone"),
        ("x,3,ceiling,abc,,n,from memory", "code_targets.csv[1].r_min_ip"),
        ("x,3,ceiling,,,n,from memory", "code_targets.csv[1]"),
        ("x,3,ceiling,30,,n,", "code_targets.csv[1]"),
        (",3,ceiling,30,,n,from memory", "code_targets.csv[1]"),
    ],
)
def test_loader_names_the_bad_row(line, field):
    with pytest.raises(InputError) as caught:
        parse_code_targets(HEADER + line + "\n")
    assert caught.value.field == field


def test_loader_refuses_duplicates_and_missing_columns():
    row = "x,3,ceiling,30,,n,from memory\n"
    with pytest.raises(InputError, match="twice"):
        parse_code_targets(HEADER + row + row)
    with pytest.raises(InputError):
        parse_code_targets("edition,climate_zone\nx,3\n")
