"""The bills regression's inputs and results: meter-read periods, fits, search ranges (the model
and its references are in :mod:`server.physics.bills`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from server.physics.units import f_to_c

FloatArray = NDArray[np.float64]
ModelKind = Literal["heating", "heating_and_cooling", "cooling", "baseload"]

#: Heating base search range [°C]: 40–75 °F, as PRISM-style fits search it [1].
HEATING_BASE_RANGE_C = (f_to_c(40.0), f_to_c(75.0))
#: Cooling base search range [°C]: 50–85 °F (common practice).
COOLING_BASE_RANGE_C = (f_to_c(50.0), f_to_c(85.0))
#: The base used when it cannot be searched (two periods) [°C]: 65 °F (common practice).
REFERENCE_BASE_C = f_to_c(65.0)
#: Grid step of the first pass [K] and tolerance of the golden-section pass [K].
GRID_STEP_K = 0.1
BASE_TOLERANCE_K = 0.005
#: Grid steps of the heating-and-cooling search [K]: coarse, then fine around the best pair.
PAIR_COARSE_STEP_K = 0.25
PAIR_FINE_STEP_K = 0.01


@dataclass(frozen=True, slots=True)
class Period:
    """One meter-read period.

    Attributes
    ----------
    first_day : int
        Index of its first day in the daily temperature series [-].
    days : int
        Number of days n_i, the read dates' difference (end exclusive) [day].
    use : float
        Metered use U_i [fuel unit].
    """

    first_day: int
    days: int
    use: float


@dataclass(frozen=True, slots=True)
class Criterion:
    """One published criterion applied to the fit, and whether the fit meets it.

    ``value`` and ``met`` are ``None`` when the statistic cannot be computed (too few
    periods for the parameters).
    """

    name: str
    source: str
    statistic: Literal["cv_rmse", "nmbe"]
    limit_percent: float
    value: float | None
    met: bool | None


@dataclass(frozen=True, slots=True)
class BillsFit:
    """The fitted model and its statistics (SI: °C, K·day; use in the meter's unit).

    Attributes
    ----------
    model : str
        ``heating``, ``heating_and_cooling``, ``cooling`` or ``baseload``.
    base_c : float or None
        Heating base τ [°C]; ``None`` without a heating term.
    base_searched : bool
        False when τ was fixed at :data:`REFERENCE_BASE_C` (two periods) or there is no term.
    base_at_limit : bool
        The best base lies at an end of the search range.
    baseload_per_day : float
        α [unit/day].
    heating_slope : float
        β [unit/(K·day)]; 0 without a heating term.
    heating_slope_std_error : float or None
        Standard error of β at the chosen base [unit/(K·day)].
    cooling_base_c, cooling_slope, cooling_slope_std_error : float or None
        τ_c [°C], γ [unit/(K·day)] and its standard error, with a cooling term.
    parameters : int
        p, the parameters counted in CV(RMSE) and NMBE (τ included when searched).
    r_squared, cv_rmse, nmbe : float or None
        Weighted R² [-]; CV(RMSE) and NMBE [%] as Guideline 14 defines them [2].
    days, use, hdd, cdd, predicted : tuple of float
        Per period: n_i [day], U_i, HDD_i(τ) and CDD_i(τ_c) [K·day] (zeros without the term),
        and the fitted use n_i (α + β HDD_i/n_i + γ CDD_i/n_i).
    """

    model: ModelKind
    base_c: float | None
    base_searched: bool
    base_at_limit: bool
    baseload_per_day: float
    heating_slope: float
    heating_slope_std_error: float | None
    cooling_base_c: float | None
    cooling_slope: float | None
    cooling_slope_std_error: float | None
    cooling_base_at_limit: bool
    parameters: int
    r_squared: float | None
    cv_rmse: float | None
    nmbe: float | None
    days: tuple[float, ...]
    use: tuple[float, ...]
    hdd: tuple[float, ...]
    cdd: tuple[float, ...]
    predicted: tuple[float, ...]

    @property
    def periods(self) -> int:
        """Number of periods used, P."""
        return len(self.days)


@dataclass(frozen=True, slots=True)
class Normalized:
    """Use in a typical year from the fit [1].

    ``annual_use = N α + β HDD_0(τ) + γ CDD_0(τ_c)`` with N the normal year's days (365);
    ``heating_use = β HDD_0(τ)``; degree-days in [K·day].
    """

    days: int
    hdd_k_day: float
    cdd_k_day: float
    annual_use: float
    heating_use: float
    cooling_use: float
