"""Steel studs: effective R of cavity insulation between them (correction-factor route).

Steel conducts about 1,000 times better than wood, so heat runs sideways along the flanges and
neither the parallel-path nor the isothermal-planes result holds. Codes instead give effective
R-values of the framing/cavity layer for common stud depths and spacings. The table below is in
the style of ASHRAE 90.1 Appendix A (Table A9.2B) and IECC Table R402.2.6 (values from memory —
verify with the adopted code); between table entries the correction factor F = R_eff / R_cavity
is interpolated linearly in R_cavity.
"""

from __future__ import annotations

import math

from server.physics.units import r_ip_to_si, r_si_to_ip

#: (nominal depth [in], spacing [in]) -> [(cavity R (IP), effective R of the layer (IP))]
_EFFECTIVE_R_IP = {
    (3.5, 16): [(11.0, 5.5), (13.0, 6.0), (15.0, 6.4)],
    (3.5, 24): [(11.0, 6.6), (13.0, 7.2), (15.0, 7.8)],
    (6.0, 16): [(19.0, 7.1), (21.0, 7.4)],
    (6.0, 24): [(19.0, 8.6), (21.0, 9.0)],
}


def steel_stud_effective_r(cavity_r_si: float, depth_m: float, spacing_in: float = 16) -> float:
    """Effective R [m²·K/W] of a steel-stud layer with cavity insulation of R ``cavity_r_si``.

    Parameters
    ----------
    cavity_r_si : float
        R of the cavity insulation alone [m²·K/W].
    depth_m : float
        Stud depth [m]; the nearer of 3-1/2 in and 6 in rows is used.
    spacing_in : float
        Stud spacing on centre [in]; 16 or 24 (nearer one used).
    """
    if not (math.isfinite(cavity_r_si) and cavity_r_si > 0):
        raise ValueError("cavity R must be a finite number greater than zero")
    if not (math.isfinite(depth_m) and depth_m > 0):
        raise ValueError("stud depth must be a finite number greater than zero")
    depth_in = depth_m / 0.0254
    depth_key = 3.5 if abs(depth_in - 3.5) <= abs(depth_in - 6.0) else 6.0
    spacing_key = 16 if abs(spacing_in - 16) <= abs(spacing_in - 24) else 24
    rows = _EFFECTIVE_R_IP[(depth_key, spacing_key)]
    cavity_ip = r_si_to_ip(cavity_r_si)
    factors = [(r, eff / r) for r, eff in rows]
    factor = factors[-1][1]
    if cavity_ip <= factors[0][0]:
        factor = factors[0][1]
    elif cavity_ip >= factors[-1][0]:
        factor = factors[-1][1]
    else:
        for (r0, f0), (r1, f1) in zip(factors, factors[1:], strict=False):
            if r0 <= cavity_ip <= r1:
                factor = f0 + (f1 - f0) * (cavity_ip - r0) / (r1 - r0)
                break
    return r_ip_to_si(cavity_ip * factor)
