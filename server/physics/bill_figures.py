"""What a bills fit says: a typical year's use, the apparent UA, and the ASHRAE Guideline 14
criteria (the model and references: :mod:`server.physics.bills`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Literal

import numpy as np

from server.physics.bill_model import BillsFit, Criterion, FloatArray, Normalized


def normalize(fit: BillsFit, normal_daily_c: Sequence[float] | FloatArray) -> Normalized:
    """Use of a typical year from the fit [1].

    ``annual = N α + β Σ max(0, τ − T_d) + γ Σ max(0, T_d − τ_c)`` over the N days of the
    normal year; ``heating = β Σ max(0, τ − T_d)``.

    Parameters
    ----------
    fit : BillsFit
        The fitted model.
    normal_daily_c : sequence of float
        Daily mean temperatures of the typical year [°C] (365 values).
    """
    temps = np.asarray(normal_daily_c, dtype=float)
    if temps.size == 0 or not np.isfinite(temps).all():
        raise ValueError("the normal temperatures must be finite numbers")
    hdd = 0.0 if fit.base_c is None else float(np.maximum(fit.base_c - temps, 0.0).sum())
    cdd = (
        0.0
        if fit.cooling_base_c is None
        else float(np.maximum(temps - fit.cooling_base_c, 0.0).sum())
    )
    heating = fit.heating_slope * hdd
    cooling = (fit.cooling_slope or 0.0) * cdd
    return Normalized(
        days=int(temps.size),
        hdd_k_day=hdd,
        cdd_k_day=cdd,
        annual_use=temps.size * fit.baseload_per_day + heating + cooling,
        heating_use=heating,
        cooling_use=cooling,
    )


def apparent_ua_w_per_k(
    heating_slope_per_k_day: float, energy_per_unit_j: float, efficiency: float
) -> float:
    """The house's apparent UA from the heating slope [W/K].

    ``UA = β · E · η / 86 400 s``: β fuel units per K·day, E joules per unit, η the seasonal
    efficiency (or COP); per hour instead of per second this is β E η / 24 [1].
    """
    for value, name in (
        (heating_slope_per_k_day, "the heating slope"),
        (energy_per_unit_j, "the energy per unit"),
        (efficiency, "the efficiency"),
    ):
        if not math.isfinite(value):
            raise ValueError(f"{name} must be a finite number")
    return heating_slope_per_k_day * energy_per_unit_j * efficiency / 86_400.0


#: Guideline 14 criteria applied to a bill fit [2] (name, source, statistic, limit [%]).
GUIDELINE_14_CRITERIA: tuple[tuple[str, str, Literal["cv_rmse", "nmbe"], float], ...] = (
    (
        "calibrated model, monthly data: CV(RMSE) at most 15 %",
        "ASHRAE Guideline 14-2014, calibrated simulation, monthly calibration data (clause "
        "5.3.2.4 of the 2002 edition, from memory)",
        "cv_rmse",
        15.0,
    ),
    (
        "calibrated model, monthly data: NMBE within ±5 %",
        "ASHRAE Guideline 14-2014, calibrated simulation, monthly calibration data (clause "
        "5.3.2.4 of the 2002 edition, from memory)",
        "nmbe",
        5.0,
    ),
    (
        "regression baseline: CV(RMSE) at most 20 % for energy use",
        "ASHRAE Guideline 14-2014, whole-building approach, baseline model (clause 5.2.2.4 "
        "of the 2002 edition, from memory)",
        "cv_rmse",
        20.0,
    ),
    (
        "regression baseline: net bias within ±0.005 %",
        "ASHRAE Guideline 14-2014, whole-building approach, baseline model (clause 5.2.2.4 "
        "of the 2002 edition, from memory)",
        "nmbe",
        0.005,
    ),
)


def criteria(fit: BillsFit) -> tuple[Criterion, ...]:
    """Each of :data:`GUIDELINE_14_CRITERIA` applied to the fit's CV(RMSE) and NMBE [2]."""
    out = []
    for name, source, statistic, limit in GUIDELINE_14_CRITERIA:
        value = fit.cv_rmse if statistic == "cv_rmse" else fit.nmbe
        met = None if value is None else abs(value) <= limit
        out.append(Criterion(name, source, statistic, limit, value, met))
    return tuple(out)
