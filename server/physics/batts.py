"""Fibrous batts in cavities: compression when the batt is thicker than the cavity.

A batt squeezed into a shallower cavity gains density: its R per inch rises a little but its
total R falls. Published compression charts for glass-fibre batts (e.g. a nominal R-19 batt of
6-1/4 in gives about R-18 in a 5-1/2 in cavity and about R-13 in a 3-1/2 in cavity) are fitted
well by

    R_compressed = R_nominal × (t / t_nominal) ** 0.6        (t ≤ t_nominal)

(common practice; the exponent is our fit to those commonly published chart values, recalled
from memory, within about ±1 R over 55–100 % of nominal thickness). It is an estimate: the
result always carries a warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: exponent of the compression fit (common practice, from memory; see module docstring)
COMPRESSION_EXPONENT = 0.6
#: below this share of nominal thickness the fit is not trusted
MIN_TRUSTED_RATIO = 0.5


@dataclass(frozen=True, slots=True)
class BattFit:
    """How a batt fits its cavity."""

    r_si: float  #: effective R of the batt in the cavity [m²·K/W]
    compression_ratio: float  #: cavity depth / nominal thickness [-] (>1: batt thinner)
    compressed: bool
    warnings: tuple[str, ...]


def batt_in_cavity(
    r_nominal_si: float, thickness_nominal_m: float, cavity_depth_m: float
) -> BattFit:
    """Effective R [m²·K/W] of a batt of nominal R and thickness in a cavity of given depth.

    Parameters
    ----------
    r_nominal_si : float
        Labelled R of the batt [m²·K/W].
    thickness_nominal_m : float
        Labelled (lofted) thickness [m].
    cavity_depth_m : float
        Depth available in the cavity [m] (actual lumber depth, see :mod:`lumber`).

    Returns
    -------
    BattFit
        ``r_si`` = R_nominal × (t/t_nominal)^0.6 when compressed, R_nominal otherwise.
    """
    values = (r_nominal_si, thickness_nominal_m, cavity_depth_m)
    if not all(math.isfinite(v) and v > 0 for v in values):
        raise ValueError("batt R, batt thickness and cavity depth must be greater than zero")
    ratio = cavity_depth_m / thickness_nominal_m
    if ratio >= 1.0:
        warnings: tuple[str, ...] = ()
        if ratio > 1.1:
            warnings = (
                "The batt is thinner than the cavity: the gap is given no R; make sure the "
                "batt touches the air barrier side so air cannot loop around it.",
            )
        return BattFit(r_nominal_si, ratio, False, warnings)
    r_si = r_nominal_si * ratio**COMPRESSION_EXPONENT
    note = (
        f"The batt is compressed to {ratio:.0%} of its labelled thickness: its R drops to about "
        f"{ratio**COMPRESSION_EXPONENT:.0%} of the label (estimate)."
    )
    extra: tuple[str, ...] = ()
    if ratio < MIN_TRUSTED_RATIO:
        extra = ("Compression below half the labelled thickness is outside the estimate's range.",)
    return BattFit(r_si, ratio, True, (note, *extra))
