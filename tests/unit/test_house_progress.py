"""What the House page's section bar says is left to enter (server/services/house_progress.py).

The rules are the product's own (no outside figures): each case is worked by hand below."""

from __future__ import annotations

from dataclasses import replace
from types import SimpleNamespace

from server.services.house_progress import HouseFacts, house_facts, section_todo

#: a house with everything the calculation needs: no badge anywhere
COMPLETE = HouseFacts(surfaces=11, surfaces_to_finish=0, has_climate=True, has_heating=True,
                      has_air_leakage=True, bill_periods=24, upgrades=8, packages=2)  # fmt: skip


def test_a_complete_house_has_no_badges() -> None:
    assert section_todo(COMPLETE) == {}


def test_a_new_house_lists_every_section() -> None:
    empty = HouseFacts(0, 0, False, False, False, 0, 0, 0)
    assert section_todo(empty) == {"house": "climate", "envelope": "add", "air": "none",
                                   "bills": "none", "upgrades": "0"}  # fmt: skip


def test_each_missing_part_alone() -> None:
    assert section_todo(replace(COMPLETE, has_heating=False)) == {"house": "heating"}
    # climate first: without degree-days nothing computes, the fuel matters next
    assert section_todo(replace(COMPLETE, has_climate=False, has_heating=False)) == {
        "house": "climate"
    }
    assert section_todo(replace(COMPLETE, surfaces_to_finish=2)) == {"envelope": "2"}
    assert section_todo(replace(COMPLETE, has_air_leakage=False)) == {"air": "none"}
    assert section_todo(replace(COMPLETE, packages=0)) == {"upgrades": "no package"}
    assert section_todo(replace(COMPLETE, bill_periods=0)) == {"bills": "none"}


def _row(area: float, result: object = "r", error: str | None = None) -> SimpleNamespace:
    return SimpleNamespace(surface=SimpleNamespace(area=area), result=result, error=error)


def test_facts_of_a_house_count_unfinished_surfaces() -> None:
    house = SimpleNamespace(
        climate={"weather": {"station": "x"}},  # a weather file, no typed HDD
        heating={"fuel": "natural_gas"},
        air_leakage={"n50": 7.0, "volume": 400.0},
        bills={"periods": [{}, {}, {}]},
        upgrades=[1],
        packages=[],
    )
    # 3 surfaces: one fine, one with no area, one whose assembly cannot compute -> "2"
    rows = [_row(100.0), _row(0.0), _row(50.0, result=None, error="layers[0]: no material")]
    facts = house_facts(house, rows)  # type: ignore[arg-type]
    assert facts == HouseFacts(3, 2, True, True, True, 3, 1, 0)
    assert section_todo(facts) == {"envelope": "2", "upgrades": "no package"}
