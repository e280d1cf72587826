"""Heating fuels: unit of sale, energy per unit and CO2 per unit, each with its source.

One table, :data:`FUELS`, keyed by slug. Energy contents are higher heating values per unit of
sale, stored in joules (SI inside); the unit of sale stays the trade's own (therm, gallon, kWh,
cord) in every unit system, because that is how the fuel is priced.

CO2 factors are combustion CO2 only (no CH4/N2O, no upstream), computed as the published
factor per million Btu times the energy per unit, so the two numbers in a row stay consistent.
Electricity has no fixed factor here: its CO2 depends on the grid, so electric rows carry
``co2_kg_per_unit=None`` and the caller applies :data:`GRID_ELECTRICITY_CO2_KG_PER_KWH` (or the
request's own figure).

References
----------
[1] US EPA, "Emission Factors for Greenhouse Gas Inventories" (GHG Emission Factors Hub),
    table 1 "Stationary combustion", kg CO2 per mmBtu (from memory of the 2023/2024 editions).
[2] US EIA, "Units and calculators explained: British thermal units (Btu)" — heat contents of
    propane and No. 2 heating oil (from memory).
[3] NIST Special Publication 811 (2008), appendix B: 1 therm (US) = 100 000 Btu; 1 kWh =
    3.6 MJ = 3412.14 Btu.
[4] US EIA, "How much carbon dioxide is produced per kilowatthour of U.S. electricity
    generation?" (FAQ), about 0.86 lb CO2/kWh for 2022 (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

from server.physics.units import BTU_J, KWH_BTU

#: One kWh [J] (= 3412.14 Btu, NIST SP 811 [3]).
KWH_J = KWH_BTU * BTU_J

#: Grid-average CO2 per kWh of electricity delivered [kg/kWh]. From memory: US average for
#: 2022, about 0.86 lb/kWh (EIA FAQ [4]) = 0.39 kg/kWh. A local utility's figure is better;
#: the house document may override it.
GRID_ELECTRICITY_CO2_KG_PER_KWH = 0.388
GRID_ELECTRICITY_CO2_SOURCE = (
    "US grid average about 0.86 lb CO2/kWh for 2022 (US EIA FAQ, from memory); "
    "replace with your utility's figure"
)


@dataclass(frozen=True, slots=True)
class Fuel:
    """One heating fuel.

    Attributes
    ----------
    slug : str
        Identifier used in documents (``natural_gas``).
    label : str
        Plain name.
    unit : str
        Unit of sale the price refers to (``therm``, ``gallon``, ``kWh``, ``cord``).
    energy_per_unit_j : float
        Higher heating value per unit of sale [J/unit].
    energy_source : str
        Where the energy content comes from.
    co2_kg_per_unit : float or None
        Combustion CO2 per unit of sale [kg/unit]; ``None`` for electricity (use the grid
        factor).
    co2_source : str
        Where the CO2 factor comes from.
    efficiency_meaning : str
        What the heating system's efficiency means for this fuel (AFUE, COP...).
    electric : bool
        True when the unit is a kWh of electricity.
    biogenic : bool
        True when the combustion CO2 is biogenic (wood): reported apart from fossil CO2, as
        greenhouse-gas inventories do [1].
    """

    slug: str
    label: str
    unit: str
    energy_per_unit_j: float
    energy_source: str
    co2_kg_per_unit: float | None
    co2_source: str
    efficiency_meaning: str
    electric: bool = False
    biogenic: bool = False


_COMBUSTION = "seasonal efficiency as a fraction (AFUE for a furnace or boiler), e.g. 0.80"

FUELS: dict[str, Fuel] = {
    fuel.slug: fuel
    for fuel in (
        Fuel(
            slug="natural_gas",
            label="Natural gas",
            unit="therm",
            energy_per_unit_j=1.0e5 * BTU_J,  # 100 000 Btu/therm by definition (NIST SP 811)
            energy_source="1 therm = 100,000 Btu by definition (NIST SP 811)",
            co2_kg_per_unit=53.06 * 0.1,  # 53.06 kg/mmBtu x 0.1 mmBtu/therm (EPA, from memory)
            co2_source="53.06 kg CO2/mmBtu (US EPA GHG emission factors, table 1, from memory)",
            efficiency_meaning=_COMBUSTION,
        ),
        Fuel(
            slug="propane",
            label="Propane",
            unit="gallon",
            energy_per_unit_j=91_500.0 * BTU_J,  # about 91,500 Btu/gal (EIA, from memory)
            energy_source="about 91,500 Btu per gallon (US EIA, from memory)",
            co2_kg_per_unit=62.87 * 0.0915,  # 62.87 kg/mmBtu x 0.0915 mmBtu/gal (EPA, memory)
            co2_source="62.87 kg CO2/mmBtu (US EPA GHG emission factors, table 1, from memory)",
            efficiency_meaning=_COMBUSTION,
        ),
        Fuel(
            slug="heating_oil",
            label="Heating oil (No. 2)",
            unit="gallon",
            energy_per_unit_j=138_500.0 * BTU_J,  # about 138,500 Btu/gal (EIA, from memory)
            energy_source="about 138,500 Btu per gallon of No. 2 oil (US EIA, from memory)",
            co2_kg_per_unit=73.96 * 0.1385,  # 73.96 kg/mmBtu x 0.1385 mmBtu/gal (EPA, memory)
            co2_source=(
                "73.96 kg CO2/mmBtu for distillate fuel oil No. 2 "
                "(US EPA GHG emission factors, table 1, from memory)"
            ),
            efficiency_meaning=_COMBUSTION,
        ),
        Fuel(
            slug="electric_resistance",
            label="Electric resistance",
            unit="kWh",
            energy_per_unit_j=KWH_J,  # 3412.14 Btu/kWh (NIST SP 811)
            energy_source="1 kWh = 3412.14 Btu (NIST SP 811)",
            co2_kg_per_unit=None,
            co2_source="grid electricity factor (see electricity CO2)",
            efficiency_meaning="1.0 for resistance heat (every kWh becomes heat)",
            electric=True,
        ),
        Fuel(
            slug="heat_pump",
            label="Heat pump (electric)",
            unit="kWh",
            energy_per_unit_j=KWH_J,  # 3412.14 Btu/kWh (NIST SP 811)
            energy_source="1 kWh = 3412.14 Btu (NIST SP 811)",
            co2_kg_per_unit=None,
            co2_source="grid electricity factor (see electricity CO2)",
            efficiency_meaning=(
                "seasonal COP (heat delivered / electricity used), e.g. 2.6; "
                "from HSPF: COP = HSPF / 3.412"
            ),
            electric=True,
        ),
        Fuel(
            slug="wood",
            label="Firewood",
            unit="cord",
            energy_per_unit_j=20.0e6 * BTU_J,  # about 20 million Btu/cord, air-dried hardwood
            energy_source=(
                "about 20 million Btu per cord of air-dried hardwood (from memory; "
                "softwoods and wet wood give much less)"
            ),
            co2_kg_per_unit=93.80 * 20.0,  # 93.80 kg/mmBtu x 20 mmBtu/cord (EPA, from memory)
            co2_source=(
                "93.80 kg CO2/mmBtu for wood (US EPA GHG emission factors, table 1, from "
                "memory); biogenic CO2, which inventories report separately"
            ),
            efficiency_meaning="seasonal stove or boiler efficiency as a fraction, e.g. 0.65",
            biogenic=True,
        ),
    )
}


def fuel_by_slug(slug: str) -> Fuel:
    """Return the :class:`Fuel` row for ``slug``.

    Raises
    ------
    ValueError
        When the slug is not in :data:`FUELS`.
    """
    try:
        return FUELS[slug]
    except KeyError:
        known = ", ".join(sorted(FUELS))
        raise ValueError(f"unknown fuel '{slug}'; use one of {known}") from None
