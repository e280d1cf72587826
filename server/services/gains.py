"""Internal and solar gains of a house document -> the pure model's variable base and windows.

Rules decided here (see ../shared/API.md, calc/house):

* The heating degree-days come from a balance point only when the document carries a
  degree-day table by base (``climate.variable_base.table``, from a weather file). Without
  it the fixed-base ``climate.hdd`` is used and no gains are estimated; the result's
  ``degree_day_basis`` says so.
* ``variable_base.internal_gains`` typed: the one figure of internal and solar gains, as
  before (the windows' solar gains are not added). Omitted: the house's ``internal_gains``,
  else the ANSI/RESNET/ICC 301 default from ``floor_area`` and ``bedrooms``
  (:func:`server.physics.gains.resnet_internal_gains_w`), plus each window's solar gain from
  ``climate.solar`` (SHGC × area × mean irradiance on its plane over the heating days). A
  window upgrade changes SHGC and U, so each variant has its own balance point.
* ``variable_base.setpoint`` omitted: 68 °F / 20 °C (ANSI/RESNET/ICC 301 reference heating
  set-point, from memory).
"""

from __future__ import annotations

from dataclasses import replace

from server.documents.house import HouseDocument, SurfaceIn
from server.documents.solar import SolarIn
from server.errors import InputError
from server.physics import gains as physics_gains
from server.physics import house_model as model
from server.physics import solar
from server.physics.fuels import KWH_J
from server.physics.units import (
    BTU_J,
    SQFT_M2,
    UnitSystem,
    from_si,
    temp_from_c,
    temp_to_c,
    to_si,
)

#: Heating set-point when the document gives none [°C]: 68 °F (20 °C) in IP, 20 °C in SI
#: (ANSI/RESNET/ICC 301 reference home, from memory).
DEFAULT_SETPOINT_C = {"ip": 20.0, "si": 20.0}
DAY_S = 86400.0

FIXED_BASE = (
    "Fixed base: the heating degree-days are the document's hdd at its heating base. No "
    "degree-day table from a weather file (climate.variable_base), so internal and solar "
    "gains are not estimated and the balance point does not move with the upgrades."
)
TYPED_GAINS = (
    "Variable base (ASHRAE Handbook—Fundamentals ch. 19): each variant's balance point = "
    "set-point − gains / UA, with the gains typed as one figure (climate.variable_base."
    "internal_gains); the heating degree-days are read from the table at that point."
)
RESNET_WORDS = (
    "the ANSI/RESNET/ICC 301 default 17,900 + 23.8 × floor area (ft²) + 4,104 × bedrooms "
    "Btu/day (from memory)"
)


def irradiation_to_si(value: float, units: UnitSystem) -> float:
    """Irradiation in the document's unit (Btu/ft² or kWh/m²) -> J/m²."""
    return value * (BTU_J / SQFT_M2 if units == "ip" else KWH_J)


def irradiation_from_si(value_j_m2: float, units: UnitSystem) -> float:
    """J/m² -> Btu/ft² (ip) or kWh/m² (si)."""
    return value_j_m2 / (BTU_J / SQFT_M2 if units == "ip" else KWH_J)


def plane_azimuth(surface: SurfaceIn) -> float | None:
    """The plane azimuth [degrees from north] of a surface's orientation or azimuth."""
    if surface.azimuth is not None:
        return surface.azimuth % 360.0
    if surface.orientation is not None:
        return solar.COMPASS_AZIMUTHS[surface.orientation]
    return None


def _plane_sums(table: SolarIn, surface: SurfaceIn, units: UnitSystem) -> list[float]:
    """Irradiation on the surface's plane over the heating days at each table row [J/m²]."""
    azimuth = plane_azimuth(surface)
    assert azimuth is not None
    tilt = 90.0 if surface.tilt is None else surface.tilt
    return [
        irradiation_to_si(
            solar.plane_sum(
                tilt=tilt,
                azimuth=azimuth,
                beam_horizontal=row.beam_horizontal,
                diffuse_horizontal=row.diffuse_horizontal,
                global_horizontal=row.global_horizontal,
                beam_vertical=row.beam_vertical,
                ground_reflectance=table.ground_reflectance,
            ),
            units,
        )
        for row in table.table
    ]


def _interp(xs: list[float], ys: list[float], x: float) -> float:
    return physics_gains._at(xs, ys, x)


def _internal_w(doc: HouseDocument) -> tuple[float, str]:
    """Internal gains [W] and the words naming where they came from."""
    units = doc.units
    if doc.internal_gains is not None:
        return to_si(doc.internal_gains, "power", units), "the typed internal_gains"
    if doc.floor_area is None:
        raise InputError(
            "internal_gains",
            "the degree-day table (climate.variable_base) needs the gains: give internal_gains, "
            "or floor_area and bedrooms for the ANSI/RESNET/ICC 301 default, or "
            "climate.variable_base.internal_gains",
        )
    if doc.bedrooms is None:
        raise InputError(
            "bedrooms", "give the number of bedrooms with floor_area for the default internal gains"
        )
    area_m2 = to_si(doc.floor_area, "area", units)
    return physics_gains.resnet_internal_gains_w(area_m2, doc.bedrooms), RESNET_WORDS


def variable_base_si(doc: HouseDocument) -> model.VariableBase | None:
    """The document's variable base in SI (°C, W, K·day), its gains resolved; or None."""
    vb = doc.climate.variable_base
    if vb is None:
        return None
    units = doc.units
    setpoint_c = DEFAULT_SETPOINT_C[units] if vb.setpoint is None else temp_to_c(vb.setpoint, units)
    if vb.internal_gains is not None:
        internal_w = to_si(vb.internal_gains, "power", units)
    else:
        internal_w, _words = _internal_w(doc)
    return model.VariableBase(
        setpoint_c=setpoint_c,
        internal_gains_w=internal_w,
        bases_c=tuple(temp_to_c(row.base, units) for row in vb.table),
        hdd_k_day=tuple(to_si(row.hdd, "degree_days", units) for row in vb.table),
    )


def _filled(mean: list[float | None]) -> tuple[float, ...]:
    """A base with no heating day below it takes the mean of the next base that has some (the
    limit as the base falls to the coldest day); all empty -> zeros."""
    out: list[float] = []
    later = next((m for m in reversed(mean) if m is not None), 0.0)
    for k, value in enumerate(mean):
        if value is None:
            value = next((m for m in mean[k + 1 :] if m is not None), later)
        out.append(value)
    return tuple(out)


def _solar_counted(doc: HouseDocument) -> bool:
    vb = doc.climate.variable_base
    return vb is not None and vb.internal_gains is None and doc.climate.solar is not None


def with_windows(doc: HouseDocument, house: model.House, warnings: list[str]) -> model.House:
    """The pure house with each window's SHGC and, when solar gains count, its mean plane
    irradiance over the heating days at each base of the variable-base table [W/m²]."""
    windows = [(i, s) for i, s in enumerate(doc.surfaces) if s.kind == "window"]
    if not windows:
        return house
    units = doc.units
    table = doc.climate.solar
    vb = house.climate.variable_base
    counted = _solar_counted(doc) and vb is not None
    extra: dict[str, tuple[float, tuple[float, ...]]] = {}
    for index, surface in windows:
        shgc = surface.shgc or 0.0
        if not counted:
            extra[surface.id] = (shgc, ())
            continue
        if surface.shgc is None:
            warnings.append(f"{surface.id}: no shgc given, so its solar gain is not counted")
            continue
        if plane_azimuth(surface) is None:
            raise InputError(
                f"surfaces[{index}].orientation",
                "a window with shgc needs its orientation (N, NE, E, SE, S, SW, W, NW) or "
                "azimuth for its solar gain",
            )
        assert table is not None and vb is not None
        bases = [temp_to_c(row.base, units) for row in table.table]
        days = [float(row.days) for row in table.table]
        sums = _plane_sums(table, surface, units)
        mean: list[float | None] = []
        for base in vb.bases_c:
            n = _interp(bases, days, base)
            mean.append(_interp(bases, sums, base) / (n * DAY_S) if n > 0 else None)
        extra[surface.id] = (shgc, _filled(mean))
    if not counted and doc.climate.solar is not None and any(s.shgc for _, s in windows):
        warnings.append(
            "climate.solar: "
            + (
                "the gains are typed as one figure (climate.variable_base.internal_gains), so "
                "the windows' solar gains are not added; omit it to compute them"
                if doc.climate.variable_base is not None
                else "no degree-day table (climate.variable_base), so the fixed base is used "
                "and the windows' solar gains are not counted"
            )
        )
    return replace(
        house,
        surfaces=tuple(
            replace(s, shgc=extra[s.id][0], solar_w_per_m2=extra[s.id][1]) if s.id in extra else s
            for s in house.surfaces
        ),
    )


def degree_day_basis(doc: HouseDocument) -> str:
    """One result line: how the heating degree-days were chosen."""
    vb = doc.climate.variable_base
    if vb is None:
        return FIXED_BASE
    if vb.internal_gains is not None:
        return TYPED_GAINS
    _w, source = _internal_w(doc)
    setpoint = "" if vb.setpoint is not None else " (set-point 68 °F / 20 °C, the default)"
    if doc.climate.solar is None:
        sun = "no climate.solar, so the windows' solar gains are not counted"
    else:
        sun = (
            "plus each window's solar gain, SHGC × area × the mean irradiance on its plane over "
            "the heating days (the days whose daily mean is below the balance point; hourly "
            "weather-file irradiance, isotropic sky, ground reflectance "
            f"{doc.climate.solar.ground_reflectance:g})"
        )
    return (
        "Variable base (ASHRAE Handbook—Fundamentals ch. 19): each variant's balance point "
        f"solves t = set-point − (internal + solar gains(t)) / UA{setpoint}; internal gains "
        f"from {source}, {sun}; the heating degree-days are read from the table at that point."
    )


def gain_figures(doc: HouseDocument, house: model.House, energy: model.HouseEnergy) -> dict:
    """HouseFigures' degree-day and gains fields in the document's units."""
    units = doc.units
    vb = house.climate.variable_base
    balance = energy.balance_point_c
    return {
        "heating_degree_days": from_si(energy.hdd_k_day, "degree_days", units),
        "balance_point": None if balance is None else temp_from_c(balance, units),
        "internal_gains": None if vb is None else from_si(vb.internal_gains_w, "power", units),
        "solar_gains": None
        if vb is None
        else from_si(sum(energy.solar_gain_by_surface_w.values()), "power", units),
    }


def surface_gain_figures(
    doc: HouseDocument, surface: model.Surface, energy: model.HouseEnergy
) -> dict:
    """SurfaceFigures' ``shgc`` and ``solar_gain`` (Btu or kWh over the heating days)."""
    if surface.kind != "window":
        return {}
    figures: dict = {"shgc": surface.shgc}
    table = doc.climate.solar
    balance = energy.balance_point_c
    if surface.id in energy.solar_gain_by_surface_w and table is not None and balance is not None:
        units = doc.units
        bases = [temp_to_c(row.base, units) for row in table.table]
        days = _interp(bases, [float(row.days) for row in table.table], balance)
        gain_j = energy.solar_gain_by_surface_w[surface.id] * days * DAY_S
        figures["solar_gain"] = gain_j / (BTU_J if units == "ip" else KWH_J)
    return figures
