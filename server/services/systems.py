"""House document -> the systems part of the pure house model (ducts, heat pump by bins,
mechanical ventilation, altitude, N-factor table, what pipe runs carry), and back to figures.

Rules decided here (each stated on the result's assumptions when it applies):

* A document with none of the new inputs gets no :class:`server.physics.systems.Systems`:
  it computes exactly as before.
* Ducts: the indoor temperature is the indoor design temperature (70 °F / 21 °C when not
  given); the heating season's mean outdoor temperature is ``climate.heating_season_temperature``,
  else the hours-weighted mean of the temperature bins below the balance point, else
  ``T_base − HDD / 212 days``. The air flow is ``ducts.air_flow``, else the output capacity over
  ρc · rise. A space named by the ducts takes its b in each variant.
* A heat pump with ``heating.heat_pump`` and ``climate.temperature_bins`` gets its seasonal COP
  from the bins for each variant (its load and balance point); the annual heat is still the
  degree-day load, so a heat-pump house and a furnace house compare on the same load. Without
  bins the typed ``heating.efficiency`` (seasonal COP) is used, with a warning.
* Pipe runs: see :mod:`server.physics.pipe_runs`.

The heat pump's rating and curves are in :mod:`server.services.heat_pump_rating`, the figures
and assumptions of the result in :mod:`server.services.system_figures`; this module re-exports
them (importers use ``systems.<name>``).
"""

from __future__ import annotations

from typing import Any

from server.documents.house import HouseDocument, PipeIn, UpgradeIn
from server.errors import InputError
from server.physics import ducts as duct_physics
from server.physics import pipe_runs
from server.physics import systems as sysm
from server.physics import ventilation as vent
from server.physics.energy import AIR_HEAT_CAPACITY_SI
from server.physics.fuels import fuel_by_slug
from server.physics.units import DELTA_F_K, temp_to_c, to_si
from server.services.heat_pump_rating import heat_pump_curves, heat_pump_rating
from server.services.system_figures import (
    assumptions,
    design_distribution_efficiency,
    figures,
    n_factor,
)

#: this module's names and those it re-exports (importers use ``systems.<name>``)
__all__ = [
    "DEFAULT_BASE_C",
    "DEFAULT_RISE_K",
    "HOUSE_ONLY_PIPE_FIELDS",
    "LITRE_PER_S_M3",
    "assumptions",
    "build_systems",
    "design_distribution_efficiency",
    "duct_upgrade",
    "duct_upgrade_notes",
    "figures",
    "flow_si",
    "heat_pump_curves",
    "heat_pump_rating",
    "indoor_c",
    "n_factor",
    "pipe_location",
    "pipe_request_fields",
    "water_heater",
]


#: pipe fields of a house document that /calc/pipe does not take
HOUSE_ONLY_PIPE_FIELDS = ("material", "service", "location", "water_heater", "heating_season_share")


#: one L/s [m³/s]; ft³/min comes from :data:`server.physics.energy.CFM_M3_PER_S`
LITRE_PER_S_M3 = 1e-3
#: equipment temperature rise when neither flow nor capacity tells it [K]: 50 °F for a
#: furnace, 25 °F for a heat pump (common practice)
DEFAULT_RISE_K = {"heat_pump": 25.0 * DELTA_F_K, "other": 50.0 * DELTA_F_K}
#: default heating base when the climate gives none [°C]: 65 °F / 18.3 °C (API contract)
DEFAULT_BASE_C = {"ip": (65.0 - 32.0) * 5.0 / 9.0, "si": 18.3}


def flow_si(value: float, units: str) -> float:
    """An air flow of the document [ft³/min or L/s] -> m³/s."""
    from server.physics.energy import CFM_M3_PER_S

    return value * (CFM_M3_PER_S if units == "ip" else LITRE_PER_S_M3)


def indoor_c(doc: HouseDocument) -> float:
    from server.services.house_design import INDOOR_DESIGN_C

    indoor = doc.climate.indoor_design_temperature
    return INDOOR_DESIGN_C[doc.units] if indoor is None else temp_to_c(indoor, doc.units)


def _location(doc: HouseDocument, where: str, field: str, allowed: tuple[str, ...]) -> str:
    spaces = [space.id for space in doc.spaces]
    if where not in allowed and where not in spaces:
        choices = ", ".join([*allowed, *spaces])
        raise InputError(field, f"there is no space '{where}' (choose one of: {choices})")
    return where


def build_systems(doc: HouseDocument, warnings: list[str]) -> sysm.Systems | None:
    """The pure systems of the document, or None when it gives none of them."""
    heating, climate, units = doc.heating, doc.climate, doc.units
    if (
        heating.ducts is None
        and heating.heat_pump is None
        and doc.mechanical_ventilation is None
        and climate.elevation is None
        and not climate.temperature_bins
        and not any(s.pipe is not None and s.pipe.location is not None for s in doc.surfaces)
    ):
        return None
    elevation_m = None if climate.elevation is None else to_si(climate.elevation, "length", units)
    rho_c = vent.air_heat_capacity_si(elevation_m)
    base = climate.heating_base
    base_c = DEFAULT_BASE_C[units] if base is None else temp_to_c(base, units)
    bins = tuple(
        (temp_to_c(row.temperature, units), row.hours) for row in climate.temperature_bins or []
    )
    ducts = None
    if heating.ducts is not None:
        d = heating.ducts
        where = ("conditioned", "outdoors")
        supply = duct_physics.DuctSide(
            _location(doc, d.supply_location, "heating.ducts.supply_location", where),
            d.supply_leakage,
            to_si(d.supply_r, "r", units),
            to_si(d.supply_area, "area", units),
        )
        returns = duct_physics.DuctSide(
            _location(doc, d.return_location, "heating.ducts.return_location", where),
            d.return_leakage,
            to_si(d.return_r, "r", units),
            to_si(d.return_area, "area", units),
        )
        capacity = (
            None
            if heating.output_capacity is None
            else to_si(heating.output_capacity, "power", units)
        )
        flow = None if d.air_flow is None else flow_si(d.air_flow, units)
        rise = None if d.temperature_rise is None else to_si(d.temperature_rise, "delta_t", units)
        if rise is None:
            if flow is not None and capacity is not None:
                rise = capacity / (rho_c * flow)
            else:
                rise = DEFAULT_RISE_K["heat_pump" if heating.fuel == "heat_pump" else "other"]
        if flow is None:
            if capacity is None:
                raise InputError(
                    "heating.ducts.air_flow",
                    "give the air handler's flow, or the heating output_capacity to work it out",
                )
            flow = duct_physics.air_flow_from_capacity(capacity, rise, rho_c)
        ducts = duct_physics.DuctSystem(supply, returns, flow, rise)
        if climate.heating_season_temperature is None and not bins:
            warnings.append(
                "ducts: no heating_season_temperature or temperature bins; the heating "
                "season's mean outdoor temperature is estimated as base − HDD / 212 days"
            )
    rating = None
    if heating.heat_pump is not None:
        rating = heat_pump_rating(doc)
        if not bins:
            warnings.append(
                "heat pump: the climate has no temperature bins (load a weather file, or give "
                "temperature_bins); the seasonal COP typed as heating.efficiency is used"
            )
    design = climate.heating_design_temperature
    season = climate.heating_season_temperature
    vent_in = doc.mechanical_ventilation
    return sysm.Systems(
        indoor_c=indoor_c(doc),
        heating_base_c=base_c,
        season_outdoor_c=None if season is None else temp_to_c(season, units),
        design_outdoor_c=None if design is None else temp_to_c(design, units),
        ducts=ducts,
        heat_pump=rating,
        curves=heat_pump_curves() if rating is not None else None,
        bins=bins,
        ventilation=None
        if vent_in is None
        else vent.MechanicalVentilation(
            vent_in.kind, flow_si(vent_in.air_flow, units), vent_in.sensible_recovery
        ),
        air_heat_capacity=rho_c if elevation_m is not None else AIR_HEAT_CAPACITY_SI,
        elevation_m=elevation_m,
    )


def duct_upgrade(doc: HouseDocument, index: int, upgrade: UpgradeIn) -> sysm.DuctUpgrade:
    """The pure duct sealing or insulation upgrade (the house must describe ducts)."""
    ducts = doc.heating.ducts
    if ducts is None:
        raise InputError(f"upgrades[{index}]", f"{upgrade.kind} needs the house's heating.ducts")
    cost = upgrade.cost
    if upgrade.kind == "duct_sealing":
        return sysm.DuctSealingUpgrade(
            upgrade.id,
            upgrade.supply_leakage_after,
            upgrade.return_leakage_after,
            cost.fixed,
            upgrade.rebate,
            upgrade.life_years,
        )
    area = (ducts.supply_area if upgrade.supply_r_after is not None else 0.0) + (
        ducts.return_area if upgrade.return_r_after is not None else 0.0
    )
    return sysm.DuctInsulationUpgrade(
        upgrade.id,
        None if upgrade.supply_r_after is None else to_si(upgrade.supply_r_after, "r", doc.units),
        None if upgrade.return_r_after is None else to_si(upgrade.return_r_after, "r", doc.units),
        cost.fixed + cost.per_area * area,
        upgrade.rebate,
        upgrade.life_years,
    )


def duct_upgrade_notes(doc: HouseDocument, upgrade: UpgradeIn) -> list[str]:
    """Warnings for a duct upgrade that does not improve what it changes."""
    ducts = doc.heating.ducts
    if ducts is None:
        return []
    notes = []
    for side in ("supply", "return"):
        if upgrade.kind == "duct_sealing":
            after = getattr(upgrade, f"{side}_leakage_after")
            if after is not None and after >= getattr(ducts, f"{side}_leakage"):
                notes.append(f"{upgrade.id}: does not lower the {side} leakage")
        else:
            after = getattr(upgrade, f"{side}_r_after")
            if after is not None and after <= getattr(ducts, f"{side}_r"):
                notes.append(f"{upgrade.id}: does not raise the {side} duct R")
    return notes


def pipe_request_fields(
    pipe: dict[str, Any], *, jacket: float | None = None, resolve: bool = False
) -> dict[str, Any]:
    """A stored or document pipe spec as /calc/pipe fields: the house-only fields dropped and
    the outer surface's emissivity chosen (see :func:`server.physics.pipe_runs.outer_emissivity`).

    ``jacket`` is an insulation upgrade's jacket emissivity (it replaces the pipe's own); with
    ``resolve`` the emissivity is always written (0.9 when nothing says otherwise), else it is
    left to /calc/pipe's default unless the spec or a bare copper pipe sets it.
    """
    spec = {k: v for k, v in pipe.items() if k not in HOUSE_ONLY_PIPE_FIELDS}
    if jacket is not None:
        spec["emissivity"] = jacket
        return spec
    insulated = bool(spec.get("layers"))
    given = spec.get("emissivity")
    if given is None and (resolve or (not insulated and pipe.get("material") == "copper")):
        spec["emissivity"] = pipe_runs.outer_emissivity(None, insulated, pipe.get("material"))
    elif given is None:
        spec.pop("emissivity", None)
    return spec


def pipe_location(doc: HouseDocument, pipe: PipeIn, path: str) -> str | None:
    if pipe.location is None:
        return None
    return _location(doc, pipe.location, f"{path}.pipe.location", ("conditioned", "unconditioned"))


def water_heater(pipe: PipeIn) -> pipe_runs.WaterHeater | None:
    heater = pipe.water_heater
    if heater is None:
        return None
    if heater.fuel != "heat_pump" and heater.efficiency > 1:
        raise InputError(
            "pipe.water_heater.efficiency",
            "give a combustion or resistance water heater's efficiency as a fraction of at most 1",
        )
    return pipe_runs.WaterHeater(
        fuel_by_slug(heater.fuel), heater.efficiency, heater.price, heater.co2_per_unit
    )
