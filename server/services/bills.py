"""Bills service: the bills document -> SI arrays -> variable-base fit -> result in its units.

The one code path of ``POST /api/v1/calc/bills`` and of a house's ``bills`` (through
:mod:`server.services.calibration`). Every bad input is an :class:`InputError` naming its
field (``periods[3].end``, ``daily_temperatures``); with a ``prefix`` (``bills.``) the names
are those of the house document.

Warnings (computed anyway): a single period; two periods (the base is not searched); fewer
than 9 periods; less than a year of periods; gaps between periods; a period of more than 40
days; an estimated read; no heating signal (β ≤ 0 at every base); a heating slope less than
twice its standard error; a small heating share; the best base at an end of the search range;
a cooling term kept; no efficiency given; no normal temperatures; degree-days typed at a
stated base (then the fit takes that base, :func:`server.physics.bills.fit_degree_days`).

The document's periods, temperatures and data warnings are read by
:mod:`server.services.bill_periods`.
"""

from __future__ import annotations

from pydantic import ValidationError

from server.documents.bills import (
    BillPeriodIn,
    BillPeriodOut,
    BillsIn,
    BillsRequest,
    BillsResult,
    CriterionOut,
)
from server.errors import InputError
from server.physics import bill_figures, bill_model
from server.physics import bills as physics
from server.physics.fuels import KWH_J, fuel_by_slug
from server.physics.units import DELTA_F_K, UnitSystem, from_si, temp_from_c, temp_to_c
from server.services.bill_periods import (
    PLAUSIBLE_C,
    covered_periods,
    daily_temperatures_c,
    data_warnings,
    normal_temperatures_c,
    ordered_periods,
    temperature_words,
)

#: fuels whose meter is an electricity meter (a cooling term may be tried)
ELECTRIC_FUELS = frozenset({"electricity", "electric_resistance", "heat_pump"})


METHOD = (
    "PRISM-style variable-base degree-day regression (Fels 1986): use per day = α + β · HDD(τ) "
    "per day, least squares weighted by each period's days, τ searched from 40 to 75 °F "
    "(4.4–23.9 °C) on a 0.1 K grid then by golden section to 0.005 K; CV(RMSE) and NMBE as "
    "ASHRAE Guideline 14 defines them on the periods' use, with p counting τ"
)


def fuel_unit_and_energy(fuel: str) -> tuple[str, str, float]:
    """Label, unit of sale and energy per unit [J] of a bills fuel (``electricity``: kWh)."""
    if fuel == "electricity":
        return "Electricity", "kWh", KWH_J
    row = fuel_by_slug(fuel)
    return row.label, row.unit, row.energy_per_unit_j


def _fit_daily(
    bills: BillsIn,
    ordered: list[tuple[int, BillPeriodIn]],
    units: UnitSystem,
    fuel: str,
    prefix: str,
) -> bill_model.BillsFit:
    """The variable-base fit on daily temperatures covering every period."""
    for index, period in ordered:
        if period.hdd is not None:
            raise InputError(
                f"{prefix}periods[{index}].hdd",
                "typed degree-days need degree_day_base, the base they were counted at",
            )
    if bills.daily_temperatures is None:
        raise InputError(
            f"{prefix}daily_temperatures",
            "is required: the daily mean temperatures of the billing dates, or else each "
            "period's hdd with degree_day_base",
        )
    daily = daily_temperatures_c(bills, units, prefix)
    periods = covered_periods(ordered, bills.daily_temperatures.start, daily, prefix)
    series = [0.0 if value is None else value for value in daily]
    cooling = bills.cooling_term == "auto" and fuel in ELECTRIC_FUELS
    return physics.fit_bills(series, periods, cooling=cooling)


def _fit_typed_degree_days(
    bills: BillsIn, ordered: list[tuple[int, BillPeriodIn]], units: UnitSystem, prefix: str
) -> bill_model.BillsFit:
    """The fit at the stated base on each period's typed degree-days (no base search)."""
    assert bills.degree_day_base is not None
    if bills.daily_temperatures is not None:
        raise InputError(
            f"{prefix}degree_day_base",
            "give either daily_temperatures or typed degree-days (hdd with degree_day_base), "
            "not both",
        )
    base_c = temp_to_c(bills.degree_day_base, units)
    low, high = bill_model.HEATING_BASE_RANGE_C
    if not low - 1e-9 <= base_c <= high + 1e-9:
        raise InputError(
            f"{prefix}degree_day_base",
            f"must be between {temperature_words(units, low)} and {temperature_words(units, high)}",
        )
    hdd_k_day = []
    for index, period in ordered:
        if period.hdd is None:
            raise InputError(
                f"{prefix}periods[{index}].hdd",
                "is required with degree_day_base: every period needs its heating degree-days",
            )
        days = (period.end - period.start).days
        # a day's degree-days are at most base − (coldest plausible daily mean)
        most = days * (base_c - PLAUSIBLE_C[0])
        value_k_day = period.hdd * DELTA_F_K if units == "ip" else period.hdd
        if value_k_day > most:
            raise InputError(
                f"{prefix}periods[{index}].hdd",
                f"{period.hdd:g} is more degree-days than {days} days can hold at that base",
            )
        hdd_k_day.append(value_k_day)
    return physics.fit_degree_days(
        [(p.end - p.start).days for _i, p in ordered],
        [p.use for _i, p in ordered],
        hdd_k_day,
        base_c,
    )


def fit_bills_document(
    bills: BillsIn,
    *,
    units: UnitSystem,
    fuel: str,
    efficiency: float | None,
    prefix: str = "",
    efficiency_note: str | None = None,
) -> BillsResult:
    """Fit the bills and report the result in ``units``; see the module docstring.

    ``efficiency`` None = 1.0 with a warning (``efficiency_note`` words a default the caller
    chose instead, e.g. the house's heating efficiency).
    """
    normal = normal_temperatures_c(bills, units, prefix)
    ordered = ordered_periods(bills, prefix)
    typed_base = bills.degree_day_base is not None
    try:
        if typed_base:
            fit = _fit_typed_degree_days(bills, ordered, units, prefix)
        else:
            fit = _fit_daily(bills, ordered, units, fuel, prefix)
        normalized = None if normal is None else bill_figures.normalize(fit, normal)
    except ValueError as exc:
        raise InputError(f"{prefix}periods", str(exc)) from None
    label, unit, energy_j = fuel_unit_and_energy(fuel)
    warnings = data_warnings(ordered)
    if typed_base:
        assert bills.degree_day_base is not None
        warnings.append(
            f"the degree-days were typed at a base of {bills.degree_day_base:g} "
            f"{'°F' if units == 'ip' else '°C'}: the fit takes that base as given and cannot "
            "search the house's own balance point"
        )
    if efficiency is None:
        efficiency = 1.0
        warnings.append(
            "no efficiency given: the apparent UA is computed at 1.0 (all the fuel's energy "
            "as heat), an upper bound for a furnace or boiler; give efficiency for the real one"
        )
    elif efficiency_note:
        warnings.append(efficiency_note)
    warnings.extend(_fit_warnings(fit, normalized, units, typed_base=typed_base))
    if normalized is None:
        warnings.append(
            "no normal_temperatures: the weather-normalised annual figures are not computed"
        )
    ip = units == "ip"

    def per_dd(value: float | None) -> float | None:  # per K·day -> per °F·day
        return None if value is None else value * DELTA_F_K if ip else value

    def dd(value: float) -> float:
        return from_si(value, "degree_days", units)

    def temp(value: float | None) -> float | None:
        return None if value is None else temp_from_c(value, units)

    ua = bill_figures.apparent_ua_w_per_k(fit.heating_slope, energy_j, efficiency)
    checks = bill_figures.criteria(fit)
    met = [c.met for c in checks]
    try:
        return BillsResult(
            units=units,
            fuel=fuel,
            fuel_unit=unit,
            model=fit.model,
            base_temperature=temp(fit.base_c),
            base_temperature_searched=fit.base_searched,
            baseload_per_day=fit.baseload_per_day,
            heating_slope=per_dd(fit.heating_slope) or 0.0,
            heating_slope_std_error=per_dd(fit.heating_slope_std_error),
            cooling_slope=per_dd(fit.cooling_slope),
            cooling_slope_std_error=per_dd(fit.cooling_slope_std_error),
            cooling_base_temperature=temp(fit.cooling_base_c),
            r_squared=fit.r_squared,
            cv_rmse=fit.cv_rmse,
            nmbe=fit.nmbe,
            parameters=fit.parameters,
            periods_used=fit.periods,
            days=int(sum(fit.days)),
            normal_days=None if normalized is None else normalized.days,
            heating_degree_days_normal=None if normalized is None else dd(normalized.hdd_k_day),
            cooling_degree_days_normal=None
            if normalized is None or fit.cooling_base_c is None
            else dd(normalized.cdd_k_day),
            normalized_annual_use=None if normalized is None else normalized.annual_use,
            normalized_annual_heating_use=None if normalized is None else normalized.heating_use,
            normalized_annual_baseload=None
            if normalized is None
            else normalized.days * fit.baseload_per_day,
            efficiency=efficiency,
            heating_ua_equivalent=from_si(ua, "ua", units),
            criteria=[
                CriterionOut(
                    name=c.name,
                    source=c.source,
                    statistic=c.statistic,
                    limit=c.limit_percent,
                    value=c.value,
                    met=c.met,
                )
                for c in checks
            ],
            criteria_met=None if None in met else all(met),
            periods=[
                BillPeriodOut(
                    start=period.start,
                    end=period.end,
                    days=int(fit.days[k]),
                    use=period.use,
                    estimated=period.estimated,
                    hdd=dd(fit.hdd[k]),
                    cdd=dd(fit.cdd[k]),
                    predicted=fit.predicted[k],
                    residual=period.use - fit.predicted[k],
                )
                for k, (_index, period) in enumerate(ordered)
            ],
            method=METHOD + f" (here p = {fit.parameters}); fuel: {label}",
            warnings=warnings,
        )
    except ValidationError as exc:  # the result parts refuse inf and NaN
        raise InputError(
            f"{prefix}periods", "these bills give numbers too large to compute; check the use"
        ) from exc


def _fit_warnings(
    fit: bill_model.BillsFit,
    normalized: bill_model.Normalized | None,
    units: UnitSystem,
    *,
    typed_base: bool = False,
) -> list[str]:
    notes = []
    low, high = (temperature_words(units, v) for v in bill_model.HEATING_BASE_RANGE_C)
    if fit.periods == 2 and not typed_base:
        notes.append(
            "two periods: the base temperature cannot be searched, so "
            f"{temperature_words(units, bill_model.REFERENCE_BASE_C)} is used (common practice)"
        )
    if fit.periods >= 2 and fit.model == "baseload":
        notes.append(
            f"no heating signal: the use does not rise with heating degree-days at any base from "
            f"{low} to {high} (heating slope β ≤ 0), so the baseload carries it all; a fuel used "
            "only for water heating or cooking looks like this"
        )
    elif fit.model == "cooling":
        notes.append(
            f"no heating signal: the use does not rise with heating degree-days at any base from "
            f"{low} to {high} (heating slope β ≤ 0); it is baseload plus cooling"
        )
    error = fit.heating_slope_std_error
    if fit.heating_slope > 0 and error is not None and fit.heating_slope < 2.0 * error:
        notes.append(
            "the heating slope is less than twice its standard error: the bills barely show "
            "heating, so the heating figures are uncertain"
        )
    if (
        normalized is not None
        and fit.heating_slope > 0
        and normalized.annual_use > 0
        and normalized.heating_use < 0.10 * normalized.annual_use
    ):
        notes.append(
            f"heating is only {100 * normalized.heating_use / normalized.annual_use:.0f} % of "
            "the normalised use: the baseload (water heating, cooking, appliances) carries most"
        )
    if fit.base_at_limit:
        notes.append(
            f"the best base temperature lies at an end of the search range ({low} to {high}): "
            "the house's balance point may lie outside it"
        )
    if fit.model in ("heating_and_cooling", "cooling"):
        notes.append(
            "a cooling term was added: the use also rises with cooling degree-days, and the "
            "term lowers CV(RMSE) even counting its two extra parameters"
            if fit.model == "heating_and_cooling"
            else "the use rises with cooling degree-days: a cooling-only model fits best"
        )
    return notes


def compute_bills(request: BillsRequest) -> BillsResult:
    """``POST /api/v1/calc/bills``: what the bills say, in the request's units."""
    return fit_bills_document(
        request, units=request.units, fuel=request.fuel, efficiency=request.efficiency
    )
