"""The House page's Bills section (templates/partials/house_bills.html).

The table of meter-read periods (stored, or as typed with each wrong row's message), the
paste box and the uploads, the weather of the bills' dates, and the fit of the stored bills
from the same :func:`server.services.bills.fit_bills_document` as ``POST /api/v1/calc/bills``,
with the modelled vs bills ratio from the house's calculation (the compare page's, kept per
state of the house).
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from datetime import date, timedelta
from typing import Any

from server.documents.bills import BillsIn, BillsResult, CalibrationFigures
from server.errors import InputError
from server.models import House
from server.physics.units import UnitSystem
from server.services.bill_forms import FormRow, rows_from_stored
from server.services.bill_rows import BillRow
from server.services.bills import ELECTRIC_FUELS, fit_bills_document, fuel_unit_and_energy
from server.services.catalog import Catalog
from server.services.house_bills import DEFAULT_FUEL
from server.web.pages.house_run import HouseRun, house_run

#: a fresh table shows this many empty rows, a filled one one more to add a period
EMPTY_ROWS_NEW, EMPTY_ROWS_MORE = 3, 1
_PERIOD_REF = re.compile(r"periods\[(\d+)\]")


def heating_fuel(house: House) -> tuple[str, float | None]:
    """The house's heating fuel (the bills' fuel) and its stated efficiency."""
    heating = house.heating or {}
    return str(heating.get("fuel") or DEFAULT_FUEL), heating.get("efficiency")


def plain_words(text: str) -> str:
    """A fit warning for the page: ``periods[3]`` is row 4 of the table as stored."""
    return _PERIOD_REF.sub(lambda m: f"row {int(m[1]) + 1}", text)


def stored_fit(house: House) -> tuple[BillsResult | None, str]:
    """The stored bills' fit (as calc/bills computes it), or None with the reason."""
    if not house.bills:
        return None, ""
    units: UnitSystem = "si" if house.units == "si" else "ip"
    fuel, efficiency = heating_fuel(house)
    try:
        doc = BillsIn.model_validate(house.bills)
        return (
            fit_bills_document(
                doc,
                units=units,
                fuel=doc.fuel or fuel,
                efficiency=doc.efficiency if doc.efficiency is not None else efficiency,
                prefix="bills.",
            ),
            "",
        )
    except (InputError, ValueError) as exc:
        return None, f"the stored bills no longer compute: {getattr(exc, 'message', exc)}"


def house_calibration(
    house: House, catalog: Catalog, run: HouseRun | None = None
) -> tuple[CalibrationFigures | None, str]:
    """The house's modelled vs bills figures from its calculation (``run``, the House page's
    one, else the compare page's kept run), or None with the reason."""
    if not house.bills:
        return None, ""
    if run is None:
        run = house_run(house=house, catalog=catalog)
    if run.result is None:
        return None, f"the model cannot be computed yet ({run.error})"
    return run.result.calibration, ""


def _n(value: float | None, digits: int) -> str:
    return "—" if value is None else f"{value:,.{digits}f}"


def _weather(house: House) -> dict[str, Any]:
    """What the stored bills use for the weather of their dates, in words."""
    bills = house.bills or {}
    daily = bills.get("daily_temperatures")
    if isinstance(daily, dict) and daily.get("values"):
        first = date.fromisoformat(str(daily["start"]))
        last = first + timedelta(days=len(daily["values"]) - 1)
        return {"kind": "daily", "source": daily.get("source") or "daily temperatures",
                "span": f"{first.isoformat()} to {last.isoformat()}",
                "days": len(daily["values"])}  # fmt: skip
    if bills.get("degree_day_base") is not None:
        return {"kind": "degree_days", "base": f"{float(bills['degree_day_base']):g}"}
    return {}


def fit_view(fit: BillsResult, calibration: CalibrationFigures | None) -> dict[str, Any]:
    """The fit's figures as the page shows them (text, in the result's units)."""
    ip = fit.units == "ip"
    unit, temp = fit.fuel_unit, "°F" if ip else "°C"
    dd = "°F·day" if ip else "K·day"
    figures = [
        ("Base temperature (balance point)",
         "—" if fit.base_temperature is None else f"{fit.base_temperature:.1f} {temp}",
         "searched for the best fit" if fit.base_temperature_searched else "fixed, not searched"),
        ("Heating slope", f"{fit.heating_slope:,.4f} {unit} per {dd}",
         "" if fit.heating_slope_std_error is None
         else f"± {fit.heating_slope_std_error:,.4f} (standard error)"),
        ("Baseload", f"{fit.baseload_per_day:,.2f} {unit} per day", "water heating, cooking, pilot"),
        ("Apparent UA", f"{fit.heating_ua_equivalent:,.0f} {'Btu/(h·°F)' if ip else 'W/K'}",
         f"from the heating slope at an efficiency of {fit.efficiency:g}"),
        ("R²", _n(fit.r_squared, 3), "share of the day-to-day variation the fit explains"),
        ("CV(RMSE)", "—" if fit.cv_rmse is None else f"{fit.cv_rmse:.1f} %", "ASHRAE Guideline 14"),
        ("NMBE", "—" if fit.nmbe is None else f"{fit.nmbe:.2f} %", "ASHRAE Guideline 14"),
        ("Weather-normalised annual use",
         "—" if fit.normalized_annual_use is None else f"{fit.normalized_annual_use:,.0f} {unit}",
         "in the typical year of the house's weather file"),
        ("…of which heating",
         "—" if fit.normalized_annual_heating_use is None
         else f"{fit.normalized_annual_heating_use:,.0f} {unit}", ""),
    ]  # fmt: skip
    if fit.cooling_slope is not None:
        figures.append(("Cooling slope", f"{fit.cooling_slope:,.4f} {unit} per {dd}",
                        f"above {_n(fit.cooling_base_temperature, 1)} {temp}"))  # fmt: skip
    criteria = [
        {"name": c.name, "source": c.source,
         "value": "—" if c.value is None else f"{c.value:.{3 if c.limit < 0.1 else 1}f} %",
         "met": c.met}
        for c in fit.criteria
    ]  # fmt: skip
    periods = [
        {"start": p.start.isoformat(), "end": p.end.isoformat(), "days": p.days,
         "use": _n(p.use, 1), "predicted": _n(p.predicted, 1), "residual": _n(p.residual, 1),
         "hdd": _n(p.hdd, 0), "estimated": p.estimated}
        for p in fit.periods
    ]  # fmt: skip
    calib = None
    if calibration is not None:
        ratio = calibration.ratio
        calib = {
            "bills": f"{calibration.bills_heating_use:,.0f} {calibration.fuel_unit}",
            "model": f"{calibration.model_heating_use:,.0f} {calibration.fuel_unit}",
            "ratio": "—" if ratio is None else f"{ratio:.2f}",
            "words": "" if ratio is None or ratio == 0 else (
                f"The model predicts {abs(1 / ratio - 1):.0%} "
                f"{'more' if ratio < 1 else 'less'} heating fuel than the bills show."),
            "warnings": [plain_words(w) for w in calibration.warnings],
        }  # fmt: skip
    return {
        "figures": figures,
        "criteria": criteria,
        "criteria_met": fit.criteria_met,
        "periods": periods,
        "periods_used": fit.periods_used,
        "model": fit.model,
        "warnings": [plain_words(w) for w in fit.warnings],
        "calibration": calib,
        "method": fit.method,
    }


def bills_context(
    *,
    house: House,
    catalog: Catalog | None = None,
    rows: Sequence[FormRow] | None = None,
    errors: Mapping[str, str] | None = None,
    paste: str = "",
    paste_rows: Sequence[BillRow] = (),
    weather_mode: str | None = None,
    degree_day_base: str = "",
    weather_kept: str = "",
    message: str = "",
    run: HouseRun | None = None,
) -> dict[str, Any]:
    """The Bills section: the stored bills (or what was typed, ``rows`` with their messages,
    the unread ``paste`` lines ``paste_rows``), the weather, and the stored bills' fit.
    ``run``: the House page's one calculation (else the kept compare run is used)."""
    fuel, efficiency = heating_fuel(house)
    label, unit, _energy = fuel_unit_and_energy(fuel)
    weather = _weather(house)
    table = list(rows) if rows is not None else rows_from_stored(house.bills)
    table += [FormRow() for _ in range(EMPTY_ROWS_NEW if not table else EMPTY_ROWS_MORE)]
    mode = weather_mode or ("degree_days" if weather.get("kind") == "degree_days" else "file")
    fit, fit_error = stored_fit(house)
    calibration, calibration_error = (None, "")
    if fit is not None and catalog is not None:
        calibration, calibration_error = house_calibration(house, catalog, run)
    stored_base = weather.get("base", "")
    return {
        "bills_house": house,
        "bills_rows": table,
        "bills_errors": dict(errors or {}),
        "bills_message": message,
        "bills_paste": paste,
        "bills_paste_rows": [{"text": r.text, "message": r.message} for r in paste_rows],
        "bills_fuel": {
            "slug": fuel,
            "label": label,
            "unit": unit,
            "electric": fuel in ELECTRIC_FUELS,
            "efficiency": efficiency,
        },  # fmt: skip
        "bills_weather": weather,
        "bills_weather_mode": mode,
        "bills_dd_base": degree_day_base or stored_base,
        "bills_weather_kept": weather_kept,
        "bills_has_normal": bool(
            ((house.climate or {}).get("weather") or {}).get("normal_daily_means_c")
        ),  # fmt: skip
        "bills_fit": None if fit is None else fit_view(fit, calibration),
        "bills_fit_error": fit_error,
        "bills_calibration_error": calibration_error,
        "bills_temp_unit": "°F" if house.units == "ip" else "°C",
        "bills_dd_unit": "°F·day" if house.units == "ip" else "K·day",
    }
