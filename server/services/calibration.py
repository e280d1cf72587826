"""The house against its bills: ``calibration`` and each option's ``calibrated`` figures.

Rules decided here (the contract gave the names):

* The house's ``bills`` are for its heating fuel: ``bills.fuel`` omitted = ``heating.fuel``;
  another fuel is refused (``electricity`` is taken for an electric heating fuel). They need
  ``normal_temperatures``: the typical year the model's degree-days come from.
* ``model_heating_use`` is the as-found model's heating fuel per year (envelope, air and pipe
  runs); ``bills_heating_use`` the bills' normalised heating use β · HDD_normal(τ); ``ratio``
  = bills / model (null, with no calibrated figures, when the model uses no fuel).
* Calibrated savings of an option = (as-found − option heating cost) × ratio + the rest of its
  savings (cooling) unchanged; payback, present value, NPV and SIR from the same
  :func:`server.physics.economics.appraise` as the uncalibrated figures. As the heating fuel
  an option saves is at most the model's, its calibrated heating-fuel savings never exceed the
  bills' normalised heating use.
"""

from __future__ import annotations

from pydantic import ValidationError

from server.documents.bills import CalibratedFigures, CalibrationFigures
from server.documents.house import HouseDocument, HouseResult, OptionFigures
from server.errors import InputError
from server.physics import economics
from server.services.bills import ELECTRIC_FUELS, fit_bills_document

#: how far from 1 the ratio may be before the result says so (common practice: models of
#: older houses often run 20–50 % above the bills)
RATIO_WARNING = (0.8, 1.25)


def _bills_fuel(doc: HouseDocument) -> str:
    assert doc.bills is not None
    heating = doc.heating.fuel
    fuel = doc.bills.fuel or heating
    same = fuel == heating or (fuel == "electricity" and heating in ELECTRIC_FUELS)
    if not same:
        raise InputError(
            "bills.fuel",
            f"the house's bills must be for its heating fuel ({heating}), not {fuel}",
        )
    return fuel


def _calibrated(
    doc: HouseDocument, option: OptionFigures, as_found_heating_cost: float, ratio: float
) -> CalibratedFigures:
    econ = doc.economics
    model_heating = as_found_heating_cost - option.heating_cost
    other = option.annual_savings - model_heating
    heating = model_heating * ratio
    annual = heating + other
    money = economics.appraise(
        installed_cost=option.installed_cost,
        rebates=option.rebates,
        annual_savings=annual,
        discount_rate=econ.discount_rate,
        escalation_rate=econ.fuel_escalation,
        years=econ.years,
    )
    return CalibratedFigures(
        ratio=ratio,
        heating_fuel_saved=option.heating_fuel_saved * ratio,
        heating_savings=heating,
        other_savings=other,
        annual_savings=money.annual_savings,
        simple_payback_years=money.simple_payback_years,
        present_value=money.present_value,
        npv=money.npv,
        sir=money.sir,
        monthly_savings=money.monthly_savings,
    )


def calibrate(doc: HouseDocument, result: HouseResult) -> None:
    """Add ``calibration`` to ``result`` and ``calibrated`` to each option (in place).

    Does nothing when the document has no ``bills``. Raises :class:`InputError` naming the
    ``bills.`` field of any problem.
    """
    bills = doc.bills
    if bills is None:
        return
    fuel = _bills_fuel(doc)
    if bills.normal_temperatures is None:
        raise InputError(
            "bills.normal_temperatures",
            "is required on a house: the 365 daily means of the typical year the model's "
            "degree-days come from, to normalise the bills to the same weather",
        )
    given = bills.efficiency is not None
    fit = fit_bills_document(
        bills,
        units=doc.units,
        fuel=fuel,
        efficiency=bills.efficiency if given else doc.heating.efficiency,
        prefix="bills.",
        efficiency_note=None
        if given
        else f"the apparent UA uses the house's heating efficiency ({doc.heating.efficiency:g})",
    )
    bills_heating = fit.normalized_annual_heating_use or 0.0
    model_heating = result.as_found.heating_fuel
    ratio = bills_heating / model_heating if model_heating > 0 else None
    unit = result.as_found.heating_fuel_unit
    notes = []
    if ratio is None:
        notes.append("the as-found model uses no heating fuel, so there is no ratio to apply")
    elif ratio == 0:
        notes.append(
            "the bills show no heating signal: calibrated heating savings are zero, only the "
            "other savings remain"
        )
    elif not RATIO_WARNING[0] <= ratio <= RATIO_WARNING[1]:
        side = "above" if ratio < 1 else "below"
        notes.append(
            f"the model is {abs(1 / ratio - 1) * 100:.0f} % {side} the bills' normalised "
            "heating use; inputs that most often explain it: air leakage, the heating "
            "system's efficiency, the areas, and the thermostat setpoint"
        )
    try:
        result.calibration = CalibrationFigures(
            bills_heating_use=bills_heating,
            model_heating_use=model_heating,
            ratio=ratio,
            fuel_unit=unit,
            fit=fit,
            warnings=notes,
        )
        if ratio is not None:
            as_found_cost = result.as_found.heating_cost
            best = [] if result.best is None else [result.best]
            for option in [*result.packages, *result.upgrades, *best]:
                option.calibrated = _calibrated(doc, option, as_found_cost, ratio)
    except (ValidationError, ValueError) as exc:
        raise InputError(
            "bills", "these bills give numbers too large to compute; check the use"
        ) from exc
