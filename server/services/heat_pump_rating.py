"""The heat pump of a house document in SI (HSPF, HSPF2 or COP at 47 °F, capacities), and the
performance curves it is computed with (``server/data/heat_pump_curves.json``)."""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

from server.documents.house import HouseDocument
from server.errors import InputError
from server.physics import heat_pump as hp
from server.physics.units import temp_to_c, to_si

CURVES_FILE = Path(__file__).resolve().parent.parent / "data" / "heat_pump_curves.json"


@lru_cache(maxsize=1)
def heat_pump_curves() -> hp.Curves:
    """The copied performance curves (``server/data/heat_pump_curves.json``)."""
    data = json.loads(CURVES_FILE.read_text(encoding="utf-8"))["curves"]

    def cubic(name: str) -> hp.Cubic:
        row = data[name]
        return hp.Cubic(
            name,
            (row["coeff_1"], row["coeff_2"], row["coeff_3"], row["coeff_4"]),
            float(row["minimum_independent_variable_1"]),
            float(row["maximum_independent_variable_1"]),
        )

    return hp.Curves(cubic("HPACHeatCapFT"), cubic("HPACHeatEIRFT"))


@lru_cache(maxsize=1)
def curves_source() -> str:
    """The curves' names, package and version, as the result states them."""
    source = json.loads(CURVES_FILE.read_text(encoding="utf-8"))["source"]
    return (
        f"HPACHeatCapFT and HPACHeatEIRFT of {source['package']} {source['version']} "
        f"({source['file'].rsplit('/', 1)[-1]})"
    )


def heat_pump_rating(doc: HouseDocument) -> hp.HeatPumpRating:
    """The rating in SI, from HSPF, HSPF2 or COP_47 and the capacities."""
    units, heating = doc.units, doc.heating
    rated = heating.heat_pump
    assert rated is not None
    field = "heating.heat_pump"
    if rated.cop_47 is not None:
        cop47 = rated.cop_47
    else:
        try:
            hspf = rated.hspf if rated.hspf is not None else hp.hspf2_to_hspf(rated.hspf2 or 0.0)
            cop47 = hp.hspf_to_cop47(hspf)
        except ValueError as exc:
            name = "hspf" if rated.hspf is not None else "hspf2"
            raise InputError(f"{field}.{name}", str(exc)) from None
    capacity = rated.capacity_47 if rated.capacity_47 is not None else heating.output_capacity
    if capacity is None:
        raise InputError(
            f"{field}.capacity_47", "give the capacity at 47 °F (or heating.output_capacity)"
        )
    rating = hp.HeatPumpRating(
        capacity_47_w=to_si(capacity, "power", units),
        cop_47=cop47,
        capacity_17_w=None
        if rated.capacity_17 is None
        else to_si(rated.capacity_17, "power", units),
        cop_17=rated.cop_17,
        backup_efficiency=rated.backup_efficiency,
        cutoff_c=None
        if rated.cutoff_temperature is None
        else temp_to_c(rated.cutoff_temperature, units),
    )
    try:
        hp.check_rating(rating, heat_pump_curves())
    except ValueError as exc:
        raise InputError(f"{field}.cop_17", str(exc)) from None
    return rating
