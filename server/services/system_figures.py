"""The systems' part of the house result: each variant's duct and heat-pump figures in the
document's units, the N-factor used, and the assumptions the result states."""

from __future__ import annotations

from typing import Any

from server.documents.house import HouseDocument
from server.documents.systems import DistributionFigures, HeatPumpFigures
from server.errors import InputError
from server.physics import ventilation as vent
from server.physics.fuels import KWH_J
from server.physics.units import from_si, temp_from_c
from server.services.heat_pump_rating import curves_source, heat_pump_rating

DUCT_ASSUMPTION = (
    "Ducts (ANSI/ASHRAE Standard 152, seasonal distribution efficiency): η_dist = DE + "
    "F_regain·(1 − DE); a duct in a buffer space runs at T_in − b·(T_in − T_out) and its losses "
    "come back in the share 1 − b; heating energy = load / (η_dist · η_equipment); design heat "
    "loss includes the duct losses at the design temperature. Infiltration induced by duct "
    "leakage is not counted."
)
HEAT_PUMP_ASSUMPTION = (
    "Heat pump by temperature bins: capacity and COP from building-energy-standards-data "
    "curves HPACHeatCapFT and HPACHeatEIRFT, scaled to the rating at 47 °F (and 17 °F when "
    "given); the load UA·max(0, T_balance − T_out) beyond the capacity is met by electric "
    "resistance backup; the bins give the seasonal COP applied to the degree-day load. No "
    "cycling losses."
)
VENTILATION_ASSUMPTION = (
    "Mechanical ventilation runs continuously: UA_air = ρc·[Q_balanced·(1 − ε) + "
    "sqrt(Q_unbalanced² + Q_infiltration²)] (ASHRAE Handbook—Fundamentals ch. 16)."
)
ALTITUDE_ASSUMPTION = (
    "Altitude: the air's heat capacity is 0.018 Btu/(ft³·°F) × p(z)/p₀ with the standard "
    "atmosphere (ASHRAE Handbook—Fundamentals ch. 1 eq. 3); buffer spaces' air changes keep the "
    "sea-level figure."
)
PIPE_ASSUMPTION = (
    "Pipe runs that say where they run: heating water counts b of its loss (none in the "
    "conditioned space, where it heats the house); domestic hot water counts 1 − s·(1 − b) (s: "
    "share of its hot hours in the heating season, when its loss heats the house and is no "
    "saving) and is bought at its water heater."
)


def n_factor(doc: HouseDocument) -> tuple[float, str] | None:
    """The N-factor used and its source, or None without air leakage."""
    air = doc.air_leakage
    if air is None:
        return None
    table = air.n_factor_table
    if table is None:
        typed = "n_factor" in air.model_fields_set
        return air.n_factor, "given in the document" if typed else "default 18 (common practice)"
    try:
        value = vent.n_factor(table.zone, table.stories, table.shielding)
    except ValueError as exc:
        raise InputError("air_leakage.n_factor_table", str(exc)) from None
    where = f"zone {table.zone}, {table.stories:g} stories, {table.shielding.replace('_', ' ')}"
    return value, f"{vent.N_FACTOR_SOURCE} ({where})"


def figures(doc: HouseDocument, energy: Any, design_loss_w: float | None) -> dict[str, Any]:
    """The HouseFigures fields of the systems for one variant, in the document's units."""
    units = doc.units
    out: dict[str, Any] = {"ua_ventilation": from_si(energy.ventilation_ua_w_per_k, "ua", units)}
    found = n_factor(doc)
    if found is not None:
        out["n_factor"], out["n_factor_source"] = found
    out["water_heating_cost"] = energy.water_heating_cost
    system = energy.systems
    if system is None:
        return out
    dist, design = system.distribution, system.design_distribution
    if dist is not None and system.season_outdoor_c is not None:
        loss = None
        if design is not None and design_loss_w is not None and design.efficiency > 0:
            loss = from_si(design_loss_w * (1 / design.efficiency - 1), "power", units)
        out["distribution"] = DistributionFigures(
            delivery_effectiveness=dist.delivery_effectiveness,
            regain=dist.regain,
            efficiency=dist.efficiency,
            season_outdoor_temperature=temp_from_c(system.season_outdoor_c, units),
            supply_temperature=temp_from_c(dist.supply_temperature_c, units),
            return_temperature=temp_from_c(dist.return_temperature_c, units),
            design_efficiency=None if design is None else design.efficiency,
            design_loss=loss,
        )
    rated = doc.heating.heat_pump
    if rated is not None:
        rating = heat_pump_rating(doc)
        season = system.heat_pump
        out["heat_pump"] = HeatPumpFigures(
            seasonal_cop=doc.heating.efficiency if season is None else season.seasonal_cop,
            rated_cop_47=rating.cop_47,
            capacity_47=from_si(rating.capacity_47_w, "power", units),
            heat_pump_electricity=0.0 if season is None else season.heat_pump_electricity_j / KWH_J,
            backup_electricity=0.0 if season is None else season.backup_electricity_j / KWH_J,
            backup_share=0.0 if season is None else season.backup_share,
            balance_point=None
            if season is None or season.balance_point_c is None
            else temp_from_c(season.balance_point_c, units),
            bins_used=season is not None,
            curves=curves_source(),
        )
    return out


def design_distribution_efficiency(energy: Any) -> float:
    """η_dist at design of one variant (1 without ducts or a design temperature)."""
    system = energy.systems
    if system is None or system.design_distribution is None:
        return 1.0
    return max(system.design_distribution.efficiency, 1e-9)


def assumptions(doc: HouseDocument) -> list[str]:
    notes = []
    if doc.heating.ducts is not None:
        notes.append(DUCT_ASSUMPTION)
    if doc.heating.heat_pump is not None:
        notes.append(HEAT_PUMP_ASSUMPTION)
    if doc.mechanical_ventilation is not None:
        notes.append(VENTILATION_ASSUMPTION)
    if doc.climate.elevation is not None:
        notes.append(ALTITUDE_ASSUMPTION)
    if any(s.pipe is not None and s.pipe.location is not None for s in doc.surfaces):
        notes.append(PIPE_ASSUMPTION)
    return notes
