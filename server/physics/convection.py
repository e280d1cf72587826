"""Outer surface coefficient of a horizontal pipe in still air: natural convection + radiation.

Natural convection uses the Churchill–Chu correlation for an isothermal horizontal cylinder
[1], with air properties at the film temperature from the 1 atm air table of [2]. Radiation
is linearised about the surface and ambient temperatures [2], with the surroundings taken to
be at the ambient air temperature (a room, a basement, a crawlspace).

References
----------
[1] S. W. Churchill and H. H. S. Chu, "Correlating equations for laminar and turbulent free
    convection from a horizontal cylinder", Int. J. Heat Mass Transfer 18 (1975) 1049–1053.
[2] T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, Fundamentals of Heat and Mass
    Transfer, 7th ed., Wiley (2011): eq. 1.9 (radiation coefficient), eq. 9.34 (Churchill–Chu,
    horizontal cylinder, Ra_D <= 1e12), Table A.4 (air at 1 atm).
[3] NIST Special Publication 811 (2008): standard gravity; CODATA 2018 recommended values:
    Stefan–Boltzmann constant.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from dataclasses import dataclass

KELVIN_OFFSET = 273.15  # K at 0 °C, definition of the Celsius scale [3]
STANDARD_GRAVITY = 9.80665  # m/s², standard acceleration of gravity [3]
STEFAN_BOLTZMANN = 5.670374419e-8  # W/(m²·K⁴), CODATA 2018 [3]
CHURCHILL_CHU_MAX_RAYLEIGH = 1e12  # upper end of the correlation's stated range [2]

# Air at 1 atm, [2] Table A.4 (from memory; rows checked for Pr = mu*cp/k in the tests):
# temperature [K], density [kg/m³], cp [J/(kg·K)], dynamic viscosity [Pa·s], k [W/(m·K)], Pr [-]
AIR_TABLE: tuple[tuple[float, float, float, float, float, float], ...] = (
    (200.0, 1.7458, 1007.0, 132.5e-7, 0.0181, 0.737),  # [2] Table A.4, from memory
    (250.0, 1.3947, 1006.0, 159.6e-7, 0.0223, 0.720),  # [2] Table A.4, from memory
    (300.0, 1.1614, 1007.0, 184.6e-7, 0.0263, 0.707),  # [2] Table A.4, from memory
    (350.0, 0.9950, 1009.0, 208.2e-7, 0.0300, 0.700),  # [2] Table A.4, from memory
    (400.0, 0.8711, 1014.0, 230.1e-7, 0.0338, 0.690),  # [2] Table A.4, from memory
    (450.0, 0.7740, 1021.0, 250.7e-7, 0.0373, 0.686),  # [2] Table A.4, from memory
    (500.0, 0.6964, 1030.0, 270.1e-7, 0.0407, 0.684),  # [2] Table A.4, from memory
    (550.0, 0.6329, 1040.0, 288.4e-7, 0.0439, 0.683),  # [2] Table A.4, from memory
    (600.0, 0.5804, 1051.0, 305.8e-7, 0.0469, 0.685),  # [2] Table A.4, from memory
    (650.0, 0.5356, 1063.0, 322.5e-7, 0.0497, 0.690),  # [2] Table A.4, from memory
    (700.0, 0.4975, 1075.0, 338.8e-7, 0.0524, 0.695),  # [2] Table A.4, from memory
    (750.0, 0.4643, 1087.0, 354.6e-7, 0.0549, 0.702),  # [2] Table A.4, from memory
    (800.0, 0.4354, 1099.0, 369.8e-7, 0.0573, 0.709),  # [2] Table A.4, from memory
)
AIR_TABLE_MIN_C = AIR_TABLE[0][0] - KELVIN_OFFSET  # -73.15 °C
AIR_TABLE_MAX_C = AIR_TABLE[-1][0] - KELVIN_OFFSET  # 526.85 °C
_TABLE_K = [row[0] for row in AIR_TABLE]


@dataclass(frozen=True, slots=True)
class AirProperties:
    """Air at 1 atm and one temperature (SI)."""

    temperature_k: float
    density_kg_m3: float
    specific_heat_j_kgk: float
    dynamic_viscosity_pa_s: float
    conductivity_w_mk: float
    prandtl: float

    @property
    def kinematic_viscosity_m2_s(self) -> float:
        """nu = mu / rho [m²/s]."""
        return self.dynamic_viscosity_pa_s / self.density_kg_m3


@dataclass(frozen=True, slots=True)
class SurfaceCoefficient:
    """Outer surface coefficient of a horizontal cylinder and its parts [W/(m²·K)]."""

    convection_w_m2k: float
    radiation_w_m2k: float
    rayleigh: float
    nusselt: float
    film_temperature_c: float

    @property
    def total_w_m2k(self) -> float:
        """h = h_c + h_r [W/(m²·K)]."""
        return self.convection_w_m2k + self.radiation_w_m2k


def air_properties(temperature_c: float) -> AirProperties:
    """Air properties at 1 atm by linear interpolation in the table of [2].

    Parameters
    ----------
    temperature_c : float
        Air (film) temperature [°C], between -73.15 °C and 526.85 °C (200 K to 800 K).

    Returns
    -------
    AirProperties
        Density [kg/m³], cp [J/(kg·K)], dynamic viscosity [Pa·s], conductivity [W/(m·K)],
        Prandtl number [-].

    Raises
    ------
    ValueError
        When the temperature is not finite or lies outside the table.

    References
    ----------
    [2] Bergman et al., 7th ed., Table A.4.
    """
    if not math.isfinite(temperature_c):
        raise ValueError("the air temperature must be a finite number")
    temperature_k = temperature_c + KELVIN_OFFSET
    if not _TABLE_K[0] <= temperature_k <= _TABLE_K[-1]:
        raise ValueError(
            f"air properties are tabulated from {AIR_TABLE_MIN_C:.0f} °C to "
            f"{AIR_TABLE_MAX_C:.0f} °C; {temperature_c:.1f} °C is outside that range"
        )
    upper = min(bisect_right(_TABLE_K, temperature_k), len(AIR_TABLE) - 1)
    low, high = AIR_TABLE[upper - 1], AIR_TABLE[upper]
    weight = (temperature_k - low[0]) / (high[0] - low[0])
    values = [a + weight * (b - a) for a, b in zip(low[1:], high[1:], strict=True)]
    return AirProperties(temperature_k, *values)


def rayleigh_number_cylinder(
    diameter_m: float, surface_temperature_c: float, ambient_temperature_c: float
) -> tuple[float, AirProperties]:
    r"""Rayleigh number of a horizontal cylinder in air, properties at the film temperature.

    .. math:: Ra_D = \frac{g \beta |T_s - T_\infty| D^3}{\nu \alpha}
              = \frac{g \beta |T_s - T_\infty| D^3 Pr}{\nu^2},
              \quad \beta = 1 / T_f,\ T_f = (T_s + T_\infty) / 2

    (ideal gas: beta = 1/T_f in kelvin, [2] eq. 9.6 and §9.5).

    Parameters
    ----------
    diameter_m : float
        Outer diameter of the cylinder [m], > 0.
    surface_temperature_c : float
        Surface temperature [°C].
    ambient_temperature_c : float
        Air temperature away from the cylinder [°C].

    Returns
    -------
    (float, AirProperties)
        Ra_D [-] and the air properties at the film temperature used.
    """
    if not (math.isfinite(diameter_m) and diameter_m > 0):
        raise ValueError("the diameter must be greater than zero")
    film_c = 0.5 * (surface_temperature_c + ambient_temperature_c)
    air = air_properties(film_c)
    beta = 1.0 / air.temperature_k
    delta_t = abs(surface_temperature_c - ambient_temperature_c)
    nu = air.kinematic_viscosity_m2_s
    rayleigh = STANDARD_GRAVITY * beta * delta_t * diameter_m**3 * air.prandtl / nu**2
    return rayleigh, air


def nusselt_churchill_chu(rayleigh: float, prandtl: float) -> float:
    r"""Mean Nusselt number of an isothermal horizontal cylinder, Churchill–Chu [1].

    .. math:: \overline{Nu}_D = \left\{0.60 + \frac{0.387\, Ra_D^{1/6}}
              {[1 + (0.559/Pr)^{9/16}]^{8/27}}\right\}^2

    Stated for 1e-5 <= Ra_D <= 1e12 ([2] eq. 9.34); Ra_D = 0 gives the still-air limit 0.36.

    Parameters
    ----------
    rayleigh : float
        Rayleigh number on the diameter [-], >= 0.
    prandtl : float
        Prandtl number of the fluid [-], > 0.

    Returns
    -------
    float
        Nu_D [-].
    """
    if not (math.isfinite(rayleigh) and rayleigh >= 0):
        raise ValueError("the Rayleigh number must be zero or more")
    if not (math.isfinite(prandtl) and prandtl > 0):
        raise ValueError("the Prandtl number must be greater than zero")
    prandtl_term = (1.0 + (0.559 / prandtl) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return (0.60 + 0.387 * rayleigh ** (1.0 / 6.0) / prandtl_term) ** 2


def natural_convection_coefficient(
    diameter_m: float, surface_temperature_c: float, ambient_temperature_c: float
) -> tuple[float, float, float]:
    r"""Natural-convection coefficient of a horizontal cylinder in still air.

    .. math:: h_c = \overline{Nu}_D\, k_{air}(T_f) / D

    Parameters
    ----------
    diameter_m : float
        Outer diameter [m].
    surface_temperature_c, ambient_temperature_c : float
        Surface and air temperatures [°C].

    Returns
    -------
    (float, float, float)
        h_c [W/(m²·K)], Ra_D [-], Nu_D [-].

    References
    ----------
    [1] Churchill & Chu (1975); [2] eq. 9.34.
    """
    rayleigh, air = rayleigh_number_cylinder(
        diameter_m, surface_temperature_c, ambient_temperature_c
    )
    nusselt = nusselt_churchill_chu(rayleigh, air.prandtl)
    return nusselt * air.conductivity_w_mk / diameter_m, rayleigh, nusselt


def radiation_coefficient(
    emissivity: float, surface_temperature_c: float, surroundings_temperature_c: float
) -> float:
    r"""Linearised radiation coefficient of a small surface in large surroundings.

    .. math:: h_r = \varepsilon \sigma (T_s^2 + T_{sur}^2)(T_s + T_{sur})
              \quad\text{(temperatures in K)}

    so that q'' = h_r (T_s - T_sur) exactly ([2] eq. 1.9).

    Parameters
    ----------
    emissivity : float
        Total hemispherical emissivity of the surface [-], 0 < emissivity <= 1.
    surface_temperature_c : float
        Surface temperature [°C].
    surroundings_temperature_c : float
        Temperature of the surroundings [°C] (taken equal to the ambient air here).

    Returns
    -------
    float
        h_r [W/(m²·K)].
    """
    if not (math.isfinite(emissivity) and 0 < emissivity <= 1):
        raise ValueError("the emissivity must be greater than 0 and at most 1")
    surface_k = surface_temperature_c + KELVIN_OFFSET
    surroundings_k = surroundings_temperature_c + KELVIN_OFFSET
    if surface_k <= 0 or surroundings_k <= 0:
        raise ValueError("temperatures must be above absolute zero (-273.15 °C)")
    return (
        emissivity
        * STEFAN_BOLTZMANN
        * (surface_k**2 + surroundings_k**2)
        * (surface_k + surroundings_k)
    )


def cylinder_surface_coefficient(
    diameter_m: float,
    surface_temperature_c: float,
    ambient_temperature_c: float,
    emissivity: float,
) -> SurfaceCoefficient:
    """Combined outer coefficient of a horizontal pipe in still air: h = h_c + h_r.

    Parameters
    ----------
    diameter_m : float
        Outer diameter of the (insulated) pipe [m].
    surface_temperature_c : float
        Outer surface temperature [°C].
    ambient_temperature_c : float
        Air and surroundings temperature [°C].
    emissivity : float
        Surface emissivity [-], 0 < emissivity <= 1.

    Returns
    -------
    SurfaceCoefficient
        h_c, h_r [W/(m²·K)], Ra_D, Nu_D [-] and the film temperature [°C].

    References
    ----------
    [1] Churchill & Chu (1975); [2] eq. 9.34 and eq. 1.9.
    """
    convection, rayleigh, nusselt = natural_convection_coefficient(
        diameter_m, surface_temperature_c, ambient_temperature_c
    )
    radiation = radiation_coefficient(emissivity, surface_temperature_c, ambient_temperature_c)
    film_c = 0.5 * (surface_temperature_c + ambient_temperature_c)
    return SurfaceCoefficient(convection, radiation, rayleigh, nusselt, film_c)
