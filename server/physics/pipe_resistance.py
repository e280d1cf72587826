"""Resistances of an insulated pipe per unit length: cylindrical shells, the outer surface,
the equivalent flat R and the critical insulation radius (SI).

References
----------
[1] T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, Fundamentals of Heat and Mass
    Transfer, 7th ed., Wiley (2011): §3.3.1 eq. 3.33 (cylindrical wall resistance), eq. 3.35
    (composite wall), Example 3.6 (critical insulation radius r_cr = k/h).
[3] ASTM C680, Standard Practice for Estimate of the Heat Gain or Loss and the Surface
    Temperatures of Insulated Flat, Cylindrical, and Spherical Systems (method style; from
    memory). The numbering is that of :mod:`.pipe`.
"""

from __future__ import annotations

import math

from server.physics.pipe_types import PipeLayer


def layer_radii(pipe_outer_diameter_m: float, layers: tuple[PipeLayer, ...]) -> tuple[float, ...]:
    """Radii [m] of the pipe surface and each layer's outer face: r_0 = D/2, r_j+1 = r_j + t_j."""
    radii = [0.5 * pipe_outer_diameter_m]
    for layer in layers:
        radii.append(radii[-1] + layer.thickness_m)
    return tuple(radii)


def cylinder_resistance_per_length(
    inner_radius_m: float, outer_radius_m: float, conductivity_w_mk: float
) -> float:
    r"""Conduction resistance of a cylindrical shell per unit length.

    .. math:: R' = \frac{\ln(r_2 / r_1)}{2 \pi k}

    Parameters
    ----------
    inner_radius_m, outer_radius_m : float
        Inner and outer radius [m], 0 < inner <= outer.
    conductivity_w_mk : float
        Thermal conductivity [W/(m·K)], > 0.

    Returns
    -------
    float
        R' [m·K/W].

    References
    ----------
    [1] eq. 3.33 (per unit length L = 1).
    """
    if not (0 < inner_radius_m <= outer_radius_m and conductivity_w_mk > 0):
        raise ValueError("radii must satisfy 0 < inner <= outer and k must be positive")
    return math.log(outer_radius_m / inner_radius_m) / (2.0 * math.pi * conductivity_w_mk)


def surface_resistance_per_length(outer_radius_m: float, surface_coefficient_w_m2k: float) -> float:
    r"""Outer-surface resistance per unit length, :math:`R'_s = 1 / (2 \pi r_o h)` [m·K/W].

    Parameters
    ----------
    outer_radius_m : float
        Outermost radius [m], > 0.
    surface_coefficient_w_m2k : float
        Combined outer coefficient h [W/(m²·K)], > 0.

    References
    ----------
    [1] eq. 3.35 (convection term of the composite cylinder).
    """
    if not (outer_radius_m > 0 and surface_coefficient_w_m2k > 0):
        raise ValueError("the radius and the surface coefficient must be positive")
    return 1.0 / (2.0 * math.pi * outer_radius_m * surface_coefficient_w_m2k)


def equivalent_flat_resistance(
    pipe_outer_diameter_m: float, layers: tuple[PipeLayer, ...]
) -> float:
    r"""Insulation R referred to the outer surface area (equivalent flat R).

    .. math:: R_{flat} = r_o \sum_j \frac{\ln(r_{j+1} / r_j)}{k_j}
              = 2 \pi r_o R'_{insulation}

    Parameters
    ----------
    pipe_outer_diameter_m : float
        Bare pipe outer diameter [m].
    layers : tuple of PipeLayer
        Inside to outside.

    Returns
    -------
    float
        R [m²·K/W] per m² of outer insulation surface (0 for a bare pipe).

    References
    ----------
    [3] (equivalent thickness / outer-surface basis, method style).
    """
    radii = layer_radii(pipe_outer_diameter_m, layers)
    return radii[-1] * sum(
        math.log(outer / inner) / layer.conductivity_w_mk
        for inner, outer, layer in zip(radii[:-1], radii[1:], layers, strict=True)
    )


def critical_radius(conductivity_w_mk: float, surface_coefficient_w_m2k: float) -> float:
    """Critical insulation radius r_cr = k / h [m]; below it more insulation loses more heat [1]."""
    if not (conductivity_w_mk > 0 and surface_coefficient_w_m2k > 0):
        raise ValueError("the conductivity and the surface coefficient must be positive")
    return conductivity_w_mk / surface_coefficient_w_m2k
