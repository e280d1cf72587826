"""Pure model -> result: the figures of one evaluated house variant, of one option (a package or
an upgrade alone) and of the heating fuel, in the document's units."""

from __future__ import annotations

from server.documents.house import (
    CashFlowFigures,
    FuelFigures,
    HouseDocument,
    OptionFigures,
    PipeFigures,
    StepFigures,
    SurfaceFigures,
)
from server.physics import house_model as model
from server.physics.energy import (
    CFM_M3_PER_S,
    air_changes_at_50_pa,
)
from server.physics.fuels import (
    GRID_ELECTRICITY_CO2_SOURCE,
    KWH_J,
)
from server.physics.units import BTU_J, UnitSystem, from_si, to_si
from server.services import gains as gains_svc
from server.services import systems as systems_svc
from server.services.house_design import OVERSIZED_RATIO, _design
from server.services.house_spaces import _space_figures


def _energy(value_j: float, units: UnitSystem) -> float:
    """Energy [J] -> Btu (ip) or kWh (si)."""
    return value_j / BTU_J if units == "ip" else value_j / KWH_J


def _figures(doc: HouseDocument, house: model.House, energy: model.HouseEnergy) -> dict:
    """The HouseFigures fields of one evaluated house, in the document's units."""
    units = doc.units
    names = {s.id: s.name for s in doc.surfaces}
    total_ua = energy.ua_w_per_k

    def ua(value: float) -> float:
        return from_si(value, "ua", units)

    surfaces = [
        SurfaceFigures(
            id=s.id,
            kind=s.kind,
            name=names[s.id],
            area=from_si(s.area_m2, "area", units),
            r=from_si(1.0 / s.u_si, "r", units),
            u=from_si(s.u_si, "u", units),
            ua=ua(energy.ua_by_surface_w_per_k[s.id]),
            share_of_ua=energy.ua_by_surface_w_per_k[s.id] / total_ua if total_ua > 0 else 0.0,
            adjacent=s.adjacent,
            b=energy.spaces[s.adjacent].b if s.adjacent in energy.spaces else 1.0,
            **gains_svc.surface_gain_figures(doc, s, energy),
        )
        for s in house.surfaces
    ]
    pipes = [
        PipeFigures(
            id=p.id,
            name=names[p.id],
            length=from_si(p.length_m, "length", units),
            r_per_length=from_si(p.r_per_length_si, "r_per_length", units),
            heat_loss_per_length=from_si(p.delta_t_k / p.r_per_length_si, "q_per_length", units),
            annual_loss=_energy(energy.pipe_loss_by_run_j[p.id], units),
            service=p.service,
            location=p.location,
            counted_loss=_energy(energy.pipe_counted_by_run_j.get(p.id, 0.0), units),
            water_heating_fuel=energy.water_heating_fuel_by_run.get(p.id),
        )
        for p in house.pipe_runs
    ]
    leak = house.air_leakage
    ach50 = None if leak is None else air_changes_at_50_pa(leak.flow50_m3_per_s, leak.volume_m3)
    eta_design = systems_svc.design_distribution_efficiency(energy)
    design_loss, ratio = _design(doc, total_ua, eta_design)
    envelope_design = (
        None if design_loss is None else to_si(design_loss, "power", units) * eta_design
    )
    return {
        "ua": ua(total_ua),
        "ua_envelope": ua(energy.envelope_ua_w_per_k),
        "ua_infiltration": ua(energy.infiltration_ua_w_per_k),
        "ua_by_surface": {key: ua(value) for key, value in energy.ua_by_surface_w_per_k.items()},
        "surfaces": surfaces,
        "spaces": _space_figures(doc, house, energy),
        "cfm50": None if leak is None else leak.flow50_m3_per_s / CFM_M3_PER_S,
        "ach50": ach50,
        "ach_natural": None if leak is None or ach50 is None else ach50 / leak.n_factor,
        "heating_load": _energy(energy.heating_load_j, units),
        "pipe_loss": _energy(energy.pipe_loss_j, units),
        "pipes": pipes,
        "heating_fuel": energy.heating_fuel_units,
        "heating_fuel_unit": house.heating.fuel.unit,
        "heating_cost": energy.heating_cost,
        "cooling_load": _energy(energy.cooling_load_j, units),
        "cooling_electricity": energy.cooling_electricity_kwh,
        "cooling_cost": energy.cooling_cost,
        "total_cost": energy.total_cost,
        "heating_co2": energy.heating_co2_kg,
        "cooling_co2": energy.cooling_co2_kg,
        "co2": energy.co2_kg,
        "co2_biogenic": energy.co2_biogenic_kg,
        "design_heat_loss": design_loss,
        "capacity_ratio": ratio,
        **systems_svc.figures(doc, energy, envelope_design),
        **gains_svc.gain_figures(doc, house, energy),
    }


def _option(
    doc: HouseDocument,
    house: model.House,
    upgrades: dict[str, model.Upgrade],
    as_found: model.HouseEnergy,
    option: model.OptionResult,
    name: str,
    modified: model.House | None = None,
) -> OptionFigures:
    """The figures of one option; ``modified``: its house with the upgrades applied, when the
    caller has it already (else applied here)."""
    money = option.appraisal
    if modified is None:
        modified = model.apply_upgrades(house, [upgrades[u] for u in option.upgrade_ids])
    warnings = list(option.warnings)
    if money.annual_savings <= 0:
        warnings.append("saves nothing at today's prices, so it never pays back")
    figures = _figures(doc, modified, option.energy)
    ratio = figures["capacity_ratio"]
    if ratio is not None and ratio > OVERSIZED_RATIO:
        warnings.append(
            f"after this package the heating equipment's output is {ratio:.1f} times the design "
            f"heat loss (more than {OVERSIZED_RATIO:.1f}): it is oversized for the house, and a "
            "smaller system (such as a heat pump) may qualify; have a licensed professional "
            "size it by a room-by-room load calculation"
        )
    flow = money.cash_flow
    return OptionFigures(
        **figures,
        id=option.id,
        name=name,
        upgrades=list(option.upgrade_ids),
        annual_savings=money.annual_savings,
        installed_cost=money.installed_cost,
        rebates=money.rebates,
        net_cost=money.net_cost,
        simple_payback_years=money.simple_payback_years,
        cash_flow_payback_years=money.payback_year,
        discounted_payback_years=money.discounted_payback_year,
        present_value=money.present_value,
        npv=money.npv,
        sir=money.sir,
        monthly_loan_payment=money.monthly_loan_payment,
        monthly_savings=money.monthly_savings,
        co2_avoided=option.co2_avoided_kg,
        heating_fuel_saved=as_found.heating_fuel_units - option.energy.heating_fuel_units,
        steps=[
            StepFigures(
                upgrade=step.upgrade_id,
                annual_savings=step.annual_savings,
                ua_reduction=from_si(step.ua_reduction_w_per_k, "ua", doc.units),
                co2_avoided=step.co2_avoided_kg,
            )
            for step in option.steps
        ],
        cash_flow=CashFlowFigures(
            years=list(flow.years),
            cumulative=list(flow.cumulative),
            cumulative_discounted=list(flow.cumulative_discounted),
        ),
        warnings=warnings,
    )


def _fuel(doc: HouseDocument, house: model.House) -> FuelFigures:
    fuel = house.heating.fuel
    own = doc.heating.co2_per_unit is not None
    return FuelFigures(
        fuel=fuel.slug,
        label=fuel.label,
        unit=fuel.unit,
        energy_per_unit=_energy(fuel.energy_per_unit_j, doc.units),
        energy_source=fuel.energy_source,
        co2_per_unit=model.heating_co2_per_unit(house),
        co2_source="given in the document" if own else fuel.co2_source,
        efficiency_meaning=fuel.efficiency_meaning,
        electricity_co2_per_kwh=house.electricity_co2_kg_per_kwh,
        electricity_co2_source="given in the document"
        if doc.electricity_co2_per_kwh is not None
        else GRID_ELECTRICITY_CO2_SOURCE,
    )
