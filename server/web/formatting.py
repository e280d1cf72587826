"""Number formatting for pages: R-values, U-factors, areas, money, in the house's units."""

from __future__ import annotations

from server.physics.units import r_ip_to_si, r_si_to_ip

UNIT_LABELS = {
    "ip": {"r": "h·ft²·°F/Btu", "u": "Btu/(h·ft²·°F)", "area": "ft²", "length": "ft", "thickness": "in",
           "conductivity": "Btu·in/(h·ft²·°F)", "ua": "Btu/(h·°F)", "temp": "°F"},
    "si": {"r": "m²·K/W", "u": "W/(m²·K)", "area": "m²", "length": "m", "thickness": "mm",
           "conductivity": "W/(m·K)", "ua": "W/K", "temp": "°C"},
}  # fmt: skip


def r_value(value: float | None, units: str = "ip") -> str:
    """``R-11.8`` for ip, ``RSI 2.08`` for si."""
    if value is None:
        return "—"
    return f"R-{value:.1f}" if units == "ip" else f"RSI {value:.2f}"


def r_other(value: float | None, units: str = "ip") -> str:
    """The same R in the other system, for the toggle-free reading."""
    if value is None:
        return ""
    return f"RSI {r_ip_to_si(value):.2f}" if units == "ip" else f"R-{r_si_to_ip(value):.1f}"


def u_value(value: float | None, units: str = "ip") -> str:
    if value is None:
        return "—"
    return f"{value:.3f}" if units == "ip" else f"{value:.2f}"


def number(value: float | None, digits: int = 0) -> str:
    if value is None:
        return "—"
    return f"{value:,.{digits}f}"


def percent(value: float | None) -> str:
    return "—" if value is None else f"{value:.0%}"


def money(value: float | None) -> str:
    if value is None:
        return "—"
    sign = "−" if value < 0 else ""
    return f"{sign}${abs(value):,.0f}"


def temp_c(value_c: float | None, units: str = "ip") -> str:
    """A temperature held in °C, shown in the house's units."""
    if value_c is None:
        return "—"
    return f"{value_c * 9 / 5 + 32:.0f} °F" if units == "ip" else f"{value_c:.1f} °C"


FILTERS = {"temp_c": temp_c, "r_value": r_value, "r_other": r_other, "u_value": u_value, "number": number,
           "percent": percent, "money": money}  # fmt: skip
GLOBALS = {"UNIT_LABELS": UNIT_LABELS}
