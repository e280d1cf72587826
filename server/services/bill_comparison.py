"""Modelled vs bills, period by period: the bills' use beside the as-found model at the same
weather, from the house's calibration (:mod:`server.services.calibration`).

No second physics formula: the model's annual heating fuel at the typical year
(``model_heating_use``) is spread over each meter-read period by that period's share of the
typical year's heating degree-days at the bills' base τ (the fit's ``hdd`` of the period over
``heating_degree_days_normal``), the degree-day method being linear in the degree-days; the
bills' own baseload α · n (water heating, cooking: what the envelope model does not cover) is
added to both lines alike. Summed over a typical year the model line gives the model's annual
heating fuel, and period by period the bills' heating part over the model's is the ratio.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from server.documents.bills import CalibrationFigures


@dataclass(frozen=True, slots=True)
class PeriodUse:
    """One meter-read period: fuel units used by the bills and by the model, same weather."""

    start: date
    end: date
    days: int
    bills: float
    fit: float
    model: float
    estimated: bool


def modelled_periods(calibration: CalibrationFigures) -> list[PeriodUse]:
    """Each period of the fit with the model's use at its weather (empty when the bills show
    no heating signal or the model uses no fuel: then there is nothing to spread)."""
    fit = calibration.fit
    normal = fit.heating_degree_days_normal
    if calibration.ratio is None or fit.base_temperature is None or not normal:
        return []
    per_degree_day = calibration.model_heating_use / normal
    return [
        PeriodUse(
            start=p.start,
            end=p.end,
            days=p.days,
            bills=p.use,
            fit=p.predicted,
            model=fit.baseload_per_day * p.days + per_degree_day * p.hdd,
            estimated=p.estimated,
        )
        for p in fit.periods
    ]
