"""Code targets: the lookup by climate zone and surface kind, the verdict, the table's loader.

The table itself (server/data/code_targets.csv, from memory) is checked against an outside
dataset in tests/reference/test_code_targets_besd.py; here the code that reads and applies it.
"""

from __future__ import annotations

import pytest

from server.errors import InputError
from server.physics.code_targets import SURFACE_KINDS, CodeTarget, check, target_for
from server.services.code_target_data import load_code_targets, parse_code_targets

ROWS = load_code_targets()


def _ours(kind: str, field: str) -> list[float | None]:
    return [getattr(target_for(ROWS, z, kind), field) for z in range(9)]


def test_every_u_max_is_non_increasing_and_every_r_min_non_decreasing_by_zone():
    # The table's own rule: going colder (zone 1 -> 8) never asks for less insulation.
    for kind in SURFACE_KINDS:
        rs = [r for r in _ours(kind, "r_min_ip")[1:] if r is not None]
        us = [u for u in _ours(kind, "u_max_ip")[1:] if u is not None]
        assert rs == sorted(rs), kind
        assert us == sorted(us, reverse=True), kind


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
