"""The house document's envelope: surfaces, buffer spaces (ISO 13789) and air leakage.

A surface gives exactly one of ``assembly``, ``r`` or ``u``; a ``pipe_run`` surface gives
``length``, ``pipe`` and ``hours_per_year`` instead (see :mod:`.house_request`).
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import Field, ValidationInfo, field_validator, model_validator

from server.documents.assembly import AssemblyInput
from server.documents.common import Name, Strict, document_units
from server.documents.ground import GroundIn
from server.documents.house_fields import (
    GROUND_SURFACE_KINDS,
    VOLUME,
    Area,
    Ident,
    RValue,
    SurfaceKind,
    UValue,
)
from server.documents.house_systems import PipeIn
from server.documents.solar import CompassPoint
from server.documents.systems import NFactorTableIn


class AirLeakageIn(Strict):
    """Blower-door result: exactly one of ``cfm50`` [ft³/min] or ``n50`` [1/h]."""

    cfm50: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)] | None = None
    n50: Annotated[float, Field(ge=0, le=100, allow_inf_nan=False)] | None = None
    n_factor: Annotated[float, Field(ge=1, le=100, allow_inf_nan=False)] = Field(
        default=18.0, description="LBL N-factor; 18 when omitted (common practice)"
    )
    n_factor_table: NFactorTableIn | None = Field(
        default=None,
        description="the N-factor from the LBL table by climate zone, stories and shielding "
        "instead of n_factor",
    )
    volume: Annotated[float, Field(gt=0, allow_inf_nan=False)]

    @field_validator("volume")
    @classmethod
    def _volume_span(cls, value: float, info: ValidationInfo) -> float:
        return VOLUME.check(value, document_units(info))

    @model_validator(mode="after")
    def _one_figure(self) -> AirLeakageIn:
        if (self.cfm50 is None) == (self.n50 is None):
            raise ValueError("give the air leakage exactly one of cfm50 or n50")
        # the table replaces n_factor; an exported document carries the default 18 beside it
        if self.n_factor_table is not None and self.n_factor != 18.0:
            raise ValueError("give either n_factor or n_factor_table, not both")
        return self


class ExposedPartIn(Strict):
    """A part of a buffer space's enclosure facing outdoors or the ground: area and U."""

    name: Name = ""
    area: Area
    u: UValue = Field(description="U-factor of the part, films included")


SpaceKind = Literal["vented_attic", "crawlspace", "unheated_basement", "garage", "other"]
SpaceFraction = Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)]


class SpaceIn(Strict):
    """An unconditioned (buffer) space, ISO 13789: a vented attic, crawlspace, garage...

    Either ``b`` as given, or ``exposed`` (its parts facing outdoors or the ground),
    ``volume`` and ``air_changes`` (with the outdoors, 1/h) from which b = H_ue / (H_iu + H_ue)
    is computed for every house variant (the service checks which was given, naming the field).
    """

    id: Ident
    label: Name = ""
    kind: SpaceKind | None = Field(
        default=None, description="what the space is (for people; the calculation ignores it)"
    )
    exposed: list[ExposedPartIn] | None = Field(default=None, max_length=50)
    volume: Annotated[float, Field(gt=0, le=1e9, allow_inf_nan=False)] | None = Field(
        default=None, description="air volume of the space, ft³ or m³"
    )
    air_changes: Annotated[float, Field(ge=0, le=1000, allow_inf_nan=False)] | None = Field(
        default=None, description="air changes per hour with the outdoors"
    )
    b: SpaceFraction | None = Field(
        default=None, description="adjustment factor given directly, 0..1 (instead of the rest)"
    )


class SurfaceIn(Strict):
    """One piece of the envelope, or a pipe run (``kind: pipe_run``)."""

    id: Ident
    kind: SurfaceKind
    name: Name = ""
    adjacent: Ident = Field(
        default="outdoors",
        description="what lies behind the surface: outdoors, ground, or the id of a space",
    )
    area: Area | None = None
    assembly: AssemblyInput | None = None
    r: RValue | None = Field(default=None, description="whole-assembly R, films included")
    u: UValue | None = Field(default=None, description="whole-assembly U-factor")
    length: Area | None = Field(default=None, description="pipe runs: ft or m")
    pipe: PipeIn | None = None
    hours_per_year: Annotated[float, Field(gt=0, le=8784, allow_inf_nan=False)] | None = None
    ground: GroundIn | None = Field(
        default=None,
        description="slab, basement_floor, basement_wall: ground contact by ISO 13370 (the "
        "assembly gives R_f or R_w, films excluded); its UA then uses the ground U",
    )
    shgc: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None, description="a window's solar heat gain coefficient, 0..1"
    )
    orientation: CompassPoint | None = Field(
        default=None, description="the way the surface faces: N, NE, E, SE, S, SW, W or NW"
    )
    azimuth: Annotated[float, Field(ge=0, le=360, allow_inf_nan=False)] | None = Field(
        default=None,
        description="the way it faces in degrees from north, clockwise (instead of orientation)",
    )
    tilt: Annotated[float, Field(ge=0, le=90, allow_inf_nan=False)] | None = Field(
        default=None,
        description="degrees from horizontal: 90 a wall's window (the default), 0 a flat skylight",
    )

    @field_validator("shgc")
    @classmethod
    def _shgc_on_windows(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("kind") not in (None, "window"):
            raise ValueError(f"shgc belongs to a window, not a {info.data.get('kind')}")
        return value

    @field_validator("azimuth")
    @classmethod
    def _one_facing(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("orientation") is not None:
            raise ValueError("give either orientation or azimuth, not both")
        return value

    @model_validator(mode="after")
    def _shape(self) -> SurfaceIn:
        given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        if self.ground is not None and self.kind not in GROUND_SURFACE_KINDS:
            raise ValueError(
                f"a ground object belongs to a slab, basement_floor or basement_wall, not a {self.kind}"
            )
        if self.kind == "pipe_run":
            missing = [n for n in ("length", "pipe", "hours_per_year") if getattr(self, n) is None]
            if missing:
                raise ValueError(f"a pipe run needs {', '.join(missing)}")
            if given or self.area is not None:
                raise ValueError("a pipe run takes length, pipe and hours_per_year, not an area")
            return self
        if self.area is None:
            raise ValueError(f"a {self.kind} needs its area")
        if len(given) != 1:
            raise ValueError(
                "give the surface exactly one of assembly, r or u"
                + (f" (got {', '.join(given)})" if given else "")
            )
        if self.length is not None or self.pipe is not None or self.hours_per_year is not None:
            raise ValueError("length, pipe and hours_per_year belong to pipe runs only")
        return self
