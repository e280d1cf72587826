"""The assembly document: request and result of ``POST /api/v1/calc/assembly``.

The same :class:`AssemblyInput` is stored on each saved surface and upgrade, so pages, the API
and export/import share one shape (see ../shared/API.md).
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, model_validator

from server.documents.common import (
    Fraction01,
    Name,
    NonNegative,
    Number,
    Out,
    Positive,
    Slug,
    Strict,
    Units,
)

Lumber = Annotated[str, Field(max_length=20, pattern=r"^\s*\d+\s*[xX×]\s*\d+(\s*-?\s*rough)?\s*$")]
HeatFlow = Literal["horizontal", "up", "down"]
FilmChoice = Literal["ashrae", "iso6946", "none"]
OutsideFilmChoice = Literal["wind", "still_air"]
Method = Literal["parallel_path", "iso6946", "steel_correction"]


class BattInput(Strict):
    """A batt as labelled: nominal R and lofted thickness."""

    r_nominal: Positive
    thickness_nominal: Positive


class CavityInput(Strict):
    """What fills the cavity: exactly one of ``r``, ``conductivity``, ``material``, ``batt``."""

    r: Positive | None = None
    conductivity: Positive | None = None
    material: Slug | None = None
    batt: BattInput | None = None

    @model_validator(mode="after")
    def _one_way(self) -> CavityInput:
        given = [
            n for n in ("r", "conductivity", "material", "batt") if getattr(self, n) is not None
        ]
        if len(given) != 1:
            raise ValueError(
                "give the cavity exactly one of r, conductivity, material or batt"
                + (f" (got {', '.join(given)})" if given else "")
            )
        return self


class FramingInput(Strict):
    """The framing members: material or conductivity, and the share of area they take."""

    conductivity: Positive | None = None
    material: Slug | None = None
    fraction: Fraction01 | None = None
    lumber: Lumber | None = Field(
        default=None, description='nominal size, e.g. 2x4, 2x6 or "2x4 rough"'
    )
    spacing: Positive | None = Field(default=None, description="on-centre spacing (in / mm)")

    @model_validator(mode="after")
    def _one_way(self) -> FramingInput:
        if self.conductivity is not None and self.material is not None:
            raise ValueError("give the framing either conductivity or material, not both")
        if self.fraction is None and (self.lumber is None or self.spacing is None):
            raise ValueError("give the framing fraction, or lumber and spacing to work it out")
        return self


class LayerInput(Strict):
    """One layer, outside to inside.

    Homogeneous: exactly one of ``r``; ``thickness`` + ``conductivity``; ``thickness`` +
    ``material`` (or ``material`` alone for a fixed-R library item). Framed: ``cavity`` and
    ``framing`` with ``thickness`` (or ``framing.lumber`` to take the actual lumber depth).
    """

    name: Name = ""
    r: NonNegative | None = None
    thickness: Positive | None = None
    conductivity: Positive | None = None
    material: Slug | None = None
    cavity: CavityInput | None = None
    framing: FramingInput | None = None
    vapour_sd_m: NonNegative | None = Field(
        default=None,
        description="vapour-diffusion-equivalent air layer thickness sd [m] (always metres); "
        "omitted = from the library material, or still air of the layer's thickness",
    )

    @model_validator(mode="after")
    def _one_way(self) -> LayerInput:
        framed = self.cavity is not None or self.framing is not None
        if framed:
            if self.cavity is None or self.framing is None:
                raise ValueError("a framed layer needs both cavity and framing")
            extra = [n for n in ("r", "conductivity", "material") if getattr(self, n) is not None]
            if extra:
                raise ValueError(f"a framed layer takes cavity and framing, not {', '.join(extra)}")
            if self.thickness is None and self.framing.lumber is None:
                raise ValueError("a framed layer needs a thickness (or framing.lumber)")
            return self
        ways = [n for n in ("r", "conductivity", "material") if getattr(self, n) is not None]
        if len(ways) != 1:
            raise ValueError(
                "give the layer exactly one way of finding its R: r, thickness + conductivity,"
                " or thickness + material" + (f" (got {', '.join(ways)})" if len(ways) > 1 else "")
            )
        if self.conductivity is not None and self.thickness is None:
            raise ValueError("a layer given by conductivity also needs its thickness")
        return self


class AssemblyInput(Strict):
    """An assembly: its layers and how to count films and framing."""

    heat_flow: HeatFlow = "horizontal"
    films: FilmChoice = "ashrae"
    outside_film: OutsideFilmChoice | None = Field(
        default=None,
        description="what the outer face (the first layer's side) meets: 'wind' = outdoor air, "
        "the 15 mph film (ASHRAE 0.17 h·ft²·°F/Btu; ISO 6946 Rse 0.04 m²·K/W); 'still_air' = an "
        "unconditioned space such as a vented attic or crawlspace, the still-air film of the "
        "heat-flow direction (ASHRAE horizontal 0.68, up 0.61, down 0.92; ISO 6946 Rse = Rsi). "
        "Omitted = 'wind'; on a surface of a house document, omitted = follows the surface's "
        "`adjacent` (still air when it faces a buffer space).",
    )
    method: Method = "parallel_path"
    layers: list[LayerInput] = Field(min_length=1, max_length=40)


class AssemblyRequest(AssemblyInput):
    units: Units


class FilmsOut(Out):
    inside: float
    outside: float


class LayerOut(Out):
    name: str
    r: float
    thickness: float | None = None
    r_cavity_path: float | None = None
    r_framing_path: float | None = None


class AssemblyResult(Out):
    units: Units
    films: FilmsOut
    outside_film: OutsideFilmChoice = Field(
        default="wind", description="the outside film used: wind (outdoor air) or still_air"
    )
    r_parallel_path: float
    r_isothermal_planes: float
    r_iso6946: float
    iso6946_max_error: float
    r_steel_corrected: float | None = None
    method: Method
    r_total: float
    u_factor: float
    rsi_total: float = Field(description="r_total in m²·K/W whatever the units")
    r_ip_total: float = Field(description="r_total in h·ft²·°F/Btu whatever the units")
    layers: list[LayerOut]
    warnings: list[str] = []


class ThicknessRequest(Strict):
    """Thickness of one material needed to bring an assembly to a target R."""

    units: Units
    target_r: Positive
    existing_r: NonNegative = 0.0
    conductivity: Positive | None = None
    material: Slug | None = None

    @model_validator(mode="after")
    def _one_way(self) -> ThicknessRequest:
        if (self.conductivity is None) == (self.material is None):
            raise ValueError("give exactly one of conductivity or material")
        return self


class ThicknessResult(Out):
    units: Units
    r_needed: float
    thickness: float
    thickness_label: str
    conductivity: float
    note: str


__all__ = [
    "AssemblyInput",
    "AssemblyRequest",
    "AssemblyResult",
    "LayerInput",
    "Number",
    "ThicknessRequest",
    "ThicknessResult",
]
