"""Variable-base degree-days in the house calculation (ASHRAE Handbook—Fundamentals, ch. 19).

balance point = set-point − internal gains / UA; HDD read from a table of degree-days by base.
"""

from __future__ import annotations

import pytest

from server.documents.house import HouseDocument
from server.services.comparison import compute_house

TABLE = [{"base": 50, "hdd": 2000}, {"base": 55, "hdd": 3000}, {"base": 60, "hdd": 4000},
         {"base": 65, "hdd": 5000}]  # fmt: skip


def _doc(variable: bool) -> HouseDocument:
    climate: dict = {"hdd": 5000, "cdd": 0}
    if variable:
        climate["variable_base"] = {"setpoint": 70, "internal_gains": 4000, "table": TABLE}
    return HouseDocument.model_validate({
        "units": "ip",
        "climate": climate,
        "heating": {"fuel": "natural_gas", "efficiency": 1.0, "price": 1.0},
        "surfaces": [{"id": "w", "kind": "wall", "area": 1000, "r": 2.5}],
        "upgrades": [{"id": "thicker", "surface": "w", "r": 4.0}],
        "packages": [{"id": "p", "upgrades": ["thicker"]}],
    })  # fmt: skip


def test_balance_point_picks_hdd_per_option() -> None:
    result = compute_house(_doc(variable=True))
    # As found: UA = 1000 / 2.5 = 400 Btu/(h·°F); balance = 70 − 4000/400 = 60 °F → HDD 4000;
    # load = 400 × 4000 × 24 = 38,400,000 Btu.
    assert result.as_found.heating_load == pytest.approx(38_400_000, rel=1e-9)
    # Package: UA = 1000 / 4 = 250; balance = 70 − 16 = 54 °F → HDD 2000 + 4/5 × 1000 = 2800;
    # load = 250 × 2800 × 24 = 16,800,000 Btu (fixed-base would give 250 × 5000 × 24 = 30,000,000).
    assert result.packages[0].heating_load == pytest.approx(16_800_000, rel=1e-9)


def test_fixed_base_when_no_table() -> None:
    result = compute_house(_doc(variable=False))
    assert result.as_found.heating_load == pytest.approx(400 * 5000 * 24, rel=1e-9)


def test_balance_point_below_the_table_takes_its_end() -> None:
    doc = _doc(variable=True).model_copy(deep=True)
    doc.climate.variable_base.internal_gains = 40000  # type: ignore[union-attr]
    # balance = 70 − 40000/400 = −30 °F, below the table's 50 °F → HDD 2000 (table end)
    assert compute_house(doc).as_found.heating_load == pytest.approx(400 * 2000 * 24, rel=1e-9)


def test_descending_table_is_refused() -> None:
    with pytest.raises(ValueError, match="ascending"):
        HouseDocument.model_validate({**_doc(True).model_dump(), "climate": {
            "hdd": 1, "variable_base": {"setpoint": 70, "internal_gains": 1, "table": TABLE[::-1]}}})  # fmt: skip
