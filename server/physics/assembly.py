"""Thermal resistance of a building assembly: layers in series, framed layers in parallel.

Three results are given for an assembly with framed layers:

* **parallel path** (ASHRAE [1]): heat flows straight through; each path (cavity or framing in
  every framed layer) is a series sum of its layers, and the paths are combined by their area
  fractions: ``1/R = Σ a_j / R_j``. With several framed layers, each combination of cavity
  and framing is a path of area ``Π a`` (layers taken as independent, e.g. crossed joists).
  This is also the ISO 6946 *upper* bound R'_T [2, §6.7.2.2].
* **isothermal planes** (ISO 6946 *lower* bound R''_T [2, §6.7.2.3]): each framed layer is
  replaced by its area-weighted conductance ``1/R_layer = (1−f)/R_cavity + f/R_framing`` and
  the layers are added in series.
* **ISO 6946 combined** [2, §6.7.2.1]: ``R_T = (R'_T + R''_T) / 2`` with maximum relative error
  ``e = (R'_T − R''_T) / (2 R_T)``.

With no framed layer all three are equal. Steel framing short-circuits the cavity far more than
either bound assumes: see :mod:`server.physics.steel_framing`.

References
----------
[1] ASHRAE Handbook—Fundamentals (2017), ch. 27 "Heat, Air and Moisture Control in Building
    Assemblies—Examples", parallel-path method for wood-frame walls.
[2] ISO 6946:2017, Building components and building elements — Thermal resistance and thermal
    transmittance — Calculation methods, §6.7.2.
[3] Fourier's law of conduction: R = L / k for a homogeneous layer.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

from server.physics.films import Films

#: more framed layers than this make 2**n paths: refuse rather than slow down
MAX_FRAMED_LAYERS = 8


@dataclass(frozen=True, slots=True)
class Layer:
    """A homogeneous layer: thermal resistance [m²·K/W], optional thickness [m]."""

    name: str
    r_si: float
    thickness_m: float | None = None


@dataclass(frozen=True, slots=True)
class FramedLayer:
    """A layer of cavity and framing side by side over the same depth.

    ``framing_fraction`` is the share of the area taken by framing [-], in [0, 1).
    """

    name: str
    thickness_m: float
    cavity_r_si: float
    framing_r_si: float
    framing_fraction: float


AnyLayer = Layer | FramedLayer


@dataclass(frozen=True, slots=True)
class LayerResult:
    """One layer's share: ``r_si`` is its isothermal-planes value for a framed layer."""

    name: str
    r_si: float
    r_cavity_path_si: float | None
    r_framing_path_si: float | None


@dataclass(frozen=True, slots=True)
class AssemblyResistance:
    """Totals [m²·K/W], films included."""

    films: Films
    r_parallel_path_si: float
    r_isothermal_planes_si: float
    r_iso6946_si: float
    iso6946_max_error: float
    layers: tuple[LayerResult, ...]


def layer_r(thickness_m: float, conductivity_w_mk: float) -> float:
    """R of a homogeneous layer by Fourier's law [3]: ``R = L / k`` [m²·K/W].

    Parameters
    ----------
    thickness_m : float
        Layer thickness L [m], > 0.
    conductivity_w_mk : float
        Thermal conductivity k [W/(m·K)], > 0.
    """
    _positive(thickness_m, "thickness")
    _positive(conductivity_w_mk, "conductivity")
    return thickness_m / conductivity_w_mk


def thickness_for_r(target_r_si: float, conductivity_w_mk: float) -> float:
    """Thickness [m] of a material of conductivity k that gives R: ``L = R × k`` [3]."""
    _positive(target_r_si, "target R")
    _positive(conductivity_w_mk, "conductivity")
    return target_r_si * conductivity_w_mk


def isothermal_layer_r(layer: FramedLayer) -> float:
    """Area-weighted R of a framed layer [m²·K/W]: ``1/R = (1−f)/R_c + f/R_f`` [2]."""
    f = layer.framing_fraction
    return 1.0 / ((1.0 - f) / layer.cavity_r_si + f / layer.framing_r_si)


def assembly_resistance(
    layers: list[AnyLayer] | tuple[AnyLayer, ...], films: Films
) -> AssemblyResistance:
    """Parallel-path, isothermal-planes and ISO 6946 combined R of an assembly [m²·K/W].

    Parameters
    ----------
    layers : sequence of Layer | FramedLayer
        Outside to inside (order does not change R, it matters for the dew-point check).
    films : Films
        Surface film resistances [m²·K/W].

    Returns
    -------
    AssemblyResistance
        Totals with films; see the module docstring for the equations.
    """
    if not layers:
        raise ValueError("an assembly needs at least one layer")
    homogeneous = 0.0
    framed: list[FramedLayer] = []
    results: list[LayerResult] = []
    for layer in layers:
        _check(layer)
        if isinstance(layer, FramedLayer):
            framed.append(layer)
            results.append(
                LayerResult(
                    layer.name, isothermal_layer_r(layer), layer.cavity_r_si, layer.framing_r_si
                )
            )
        else:
            homogeneous += layer.r_si
            results.append(LayerResult(layer.name, layer.r_si, None, None))
    if len(framed) > MAX_FRAMED_LAYERS:
        raise ValueError(f"at most {MAX_FRAMED_LAYERS} framed layers are supported")
    base = homogeneous + films.total_r_m2k_w

    # Upper bound / parallel path: every combination of cavity (0) or framing (1) per layer.
    conductance = 0.0
    for choice in itertools.product((0, 1), repeat=len(framed)):
        area, r_path = 1.0, base
        for pick, layer in zip(choice, framed, strict=True):
            f = layer.framing_fraction
            area *= f if pick else 1.0 - f
            r_path += layer.framing_r_si if pick else layer.cavity_r_si
        if area > 0:
            if not r_path > 0:
                raise ValueError("the assembly has no thermal resistance: total R is zero")
            conductance += area / r_path
    if not (conductance > 0 and math.isfinite(conductance)) or not math.isfinite(base):
        raise ValueError(
            "the assembly has no usable thermal resistance (total R is zero or too large to compute)"
        )
    r_upper = 1.0 / conductance

    # Lower bound / isothermal planes.
    r_lower = base + sum(isothermal_layer_r(layer) for layer in framed)
    r_combined = 0.5 * (r_upper + r_lower)
    error = (r_upper - r_lower) / (2.0 * r_combined)
    return AssemblyResistance(films, r_upper, r_lower, r_combined, error, tuple(results))


def _positive(value: float, what: str) -> None:
    if not math.isfinite(value) or value <= 0:
        raise ValueError(f"{what} must be a finite number greater than zero")


def _check(layer: AnyLayer) -> None:
    if isinstance(layer, FramedLayer):
        _positive(layer.thickness_m, "thickness")
        _positive(layer.cavity_r_si, "cavity R")
        _positive(layer.framing_r_si, "framing R")
        if not (math.isfinite(layer.framing_fraction) and 0 <= layer.framing_fraction < 1):
            raise ValueError("framing fraction must be at least 0 and less than 1")
    else:
        if not math.isfinite(layer.r_si) or layer.r_si < 0:
            raise ValueError("R must be a finite number, zero or more")
