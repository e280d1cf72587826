"""Unit conversions and trade-style length display.

Everything inside :mod:`server.physics` is SI: metres, kelvin (or degrees Celsius for
temperatures), watts, m²·K/W. Conversion to and from US customary (``ip``) units happens at
the edges through the functions here.

References
----------
[1] NIST Special Publication 811 (2008), Guide for the Use of the International System of
    Units, appendix B (exact inch and foot; International Table Btu).
[2] ASHRAE Handbook—Fundamentals (2021), ch. 38 "Units and Conversions".
[3] ASHRAE Handbook—Fundamentals (2017), ch. 26 "Heat, Air, and Moisture Control in Building
    Assemblies—Material Properties" (permeance units: 1 perm = 57.2 ng/(s·m²·Pa)).

Exact and derived factors (all from [1], [2]):

* 1 in = 0.0254 m (exact); 1 ft = 0.3048 m (exact).
* 1 Btu_IT = 1055.05585262 J (exact); 1 Btu/h = 0.29307107 W.
* 1 °F (difference) = 5/9 K (exact).
* 1 h·ft²·°F/Btu = 0.17611018 m²·K/W, so RSI = R / 5.678263.
* 1 Btu·in/(h·ft²·°F) = 0.14422789 W/(m·K).
* 1 grain = 64.79891 mg (exact); 1 inHg (conventional, 0 °C) = 3386.389 Pa; so
  1 US perm = 1 grain/(h·ft²·inHg) = 57.2135 ng/(Pa·s·m²) ([1], [3]).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Literal

UnitSystem = Literal["ip", "si"]

INCH_M = 0.0254
FOOT_M = 0.3048
BTU_J = 1055.05585262
HOUR_S = 3600.0
BTU_PER_HOUR_W = BTU_J / HOUR_S  # 0.29307107 W
DELTA_F_K = 5.0 / 9.0
SQFT_M2 = FOOT_M**2
CUFT_M3 = FOOT_M**3

#: 1 h·ft²·°F/Btu in m²·K/W  (= 0.17611018)
R_IP_IN_SI = SQFT_M2 * DELTA_F_K / BTU_PER_HOUR_W
#: 1 Btu·in/(h·ft²·°F) in W/(m·K)  (= 0.14422789)
K_IP_IN_SI = BTU_PER_HOUR_W * INCH_M / (SQFT_M2 * DELTA_F_K)
#: 1 Btu/(h·ft²·°F) in W/(m²·K)  (= 5.678263)
U_IP_IN_SI = 1.0 / R_IP_IN_SI
#: 1 Btu/(h·°F) in W/K (UA)
UA_IP_IN_SI = BTU_PER_HOUR_W / DELTA_F_K
#: 1 h·ft·°F/Btu (per-length resistance) in m·K/W
R_LENGTH_IP_IN_SI = FOOT_M * DELTA_F_K / BTU_PER_HOUR_W
#: 1 Btu/(h·ft) in W/m
Q_LENGTH_IP_IN_SI = BTU_PER_HOUR_W / FOOT_M
#: 1 kWh in Btu (= 3412.14)
KWH_BTU = 3.6e6 / BTU_J
#: 1 grain = 64.79891 mg exactly, NIST SP 811 [1] [kg].
GRAIN_KG = 64.79891e-6
#: Conventional inch of mercury (0 °C) = 3386.389 Pa, NIST SP 811 [1] [Pa].
INCH_HG_PA = 3386.389
#: 1 US perm = 1 grain/(h·ft²·inHg) = 57.2135 ng/(Pa·s·m²) ([1], [3]).
US_PERM_NG_PER_PA_S_M2 = GRAIN_KG * 1e12 / (HOUR_S * SQFT_M2 * INCH_HG_PA)


def r_ip_to_si(r_ip: float) -> float:
    """R [h·ft²·°F/Btu] -> RSI [m²·K/W]."""
    return r_ip * R_IP_IN_SI


def r_si_to_ip(r_si: float) -> float:
    """RSI [m²·K/W] -> R [h·ft²·°F/Btu]."""
    return r_si / R_IP_IN_SI


def k_ip_to_si(k_ip: float) -> float:
    """k [Btu·in/(h·ft²·°F)] -> k [W/(m·K)]."""
    return k_ip * K_IP_IN_SI


def k_si_to_ip(k_si: float) -> float:
    """k [W/(m·K)] -> k [Btu·in/(h·ft²·°F)]."""
    return k_si / K_IP_IN_SI


def u_ip_to_si(u_ip: float) -> float:
    """U [Btu/(h·ft²·°F)] -> U [W/(m²·K)]."""
    return u_ip * U_IP_IN_SI


def u_si_to_ip(u_si: float) -> float:
    """U [W/(m²·K)] -> U [Btu/(h·ft²·°F)]."""
    return u_si / U_IP_IN_SI


def f_to_c(temp_f: float) -> float:
    """Temperature [°F] -> [°C]."""
    return (temp_f - 32.0) * DELTA_F_K


def c_to_f(temp_c: float) -> float:
    """Temperature [°C] -> [°F]."""
    return temp_c / DELTA_F_K + 32.0


def delta_f_to_k(delta_f: float) -> float:
    """Temperature difference or degree-days [°F(·day)] -> [K(·day)]."""
    return delta_f * DELTA_F_K


def delta_k_to_f(delta_k: float) -> float:
    """Temperature difference or degree-days [K(·day)] -> [°F(·day)]."""
    return delta_k / DELTA_F_K


def us_perms_to_permeance(perms: float) -> float:
    """Vapour permeance: US perms [grain/(h·ft²·inHg)] -> [ng/(Pa·s·m²)] ([1], [3])."""
    return perms * US_PERM_NG_PER_PA_S_M2


def permeance_to_us_perms(permeance_ng_per_pa_s_m2: float) -> float:
    """Vapour permeance: [ng/(Pa·s·m²)] -> US perms [grain/(h·ft²·inHg)] ([1], [3])."""
    return permeance_ng_per_pa_s_m2 / US_PERM_NG_PER_PA_S_M2


# --- quantity tables used at the edges -------------------------------------------------------
#: factor that turns one ip unit into its SI counterpart, per quantity name.
IP_TO_SI: dict[str, float] = {
    "thickness": INCH_M / 1e-3,  # inch -> mm
    "diameter": INCH_M / 1e-3,  # inch -> mm
    "length": FOOT_M,  # ft -> m
    "area": SQFT_M2,  # ft² -> m²
    "volume": CUFT_M3,  # ft³ -> m³
    "conductivity": K_IP_IN_SI,
    "r": R_IP_IN_SI,
    "u": U_IP_IN_SI,
    "h": U_IP_IN_SI,
    "r_per_length": R_LENGTH_IP_IN_SI,
    "q_per_length": Q_LENGTH_IP_IN_SI,
    "ua": UA_IP_IN_SI,
    "degree_days": DELTA_F_K,
    "delta_t": DELTA_F_K,
    "power": BTU_PER_HOUR_W,  # Btu/h -> W
}


def to_si(value: float, quantity: str, units: UnitSystem) -> float:
    """Convert ``value`` of ``quantity`` given in ``units`` to the API's SI unit of it.

    The API's SI units are those of ../shared/API.md: thickness in mm, areas in m², k in
    W/(m·K), R in m²·K/W and so on. Temperatures are handled by :func:`temp_to_c`.
    """
    if units == "si":
        return value
    return value * IP_TO_SI[quantity]


def from_si(value: float, quantity: str, units: UnitSystem) -> float:
    """Inverse of :func:`to_si`."""
    if units == "si":
        return value
    return value / IP_TO_SI[quantity]


def temp_to_c(value: float, units: UnitSystem) -> float:
    """Temperature in the request's units -> °C."""
    return value if units == "si" else f_to_c(value)


def temp_from_c(value_c: float, units: UnitSystem) -> float:
    """°C -> temperature in the request's units."""
    return value_c if units == "si" else c_to_f(value_c)


# --- trade-style length display (reading typed lengths: server/services/number_text.py) ----


def format_inches(metres: float, denominator: int = 8) -> str:
    """Format a length [m] as inches with a trade fraction, e.g. ``3-1/2"``."""
    inches = metres / INCH_M
    frac = Fraction(round(inches * denominator), denominator)
    whole, rest = divmod(frac, 1)
    if rest == 0:
        return f'{int(whole)}"'
    if whole == 0:
        return f'{rest.numerator}/{rest.denominator}"'
    return f'{int(whole)}-{rest.numerator}/{rest.denominator}"'
