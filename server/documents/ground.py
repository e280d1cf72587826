"""Ground-contact documents: ``POST /api/v1/calc/ground`` and a house surface's ``ground``.

Every number is in the request's ``units`` (table in ../shared/API.md): ``ip`` = ft², ft,
inch, Btu·in/(h·ft²·°F), h·ft²·°F/Btu, Btu/(h·ft²·°F), Btu/(h·°F); ``si`` = m², m, mm,
W/(m·K), m²·K/W, W/(m²·K), W/K. Decisions (the contract was silent):

* The equivalent thicknesses in the result (``floor_equivalent_thickness`` d_t,
  ``wall_equivalent_thickness`` d_w) are LENGTHS (ft / m), like the characteristic dimension
  B' they are compared with; ``wall_thickness`` w in the request is a thickness (inch / mm).
* ``wind_speed`` is in mph (ip) or m/s (si); ``vent_area_per_perimeter`` ε in ft²/ft (ip) or
  m²/m (si), i.e. the length unit.
* The linear thermal transmittance of edge insulation ``edge_psi`` is in Btu/(h·ft·°F) (ip)
  or W/(m·K) (si).
* ``soil_conductivity`` defaults to 2.0 W/(m·K) (sand or gravel); ``soil`` names the
  standard's category instead; both given and disagreeing (by more than 1 %) is a 422.
* ``floor_r`` defaults to 0 (an uninsulated floor) with a warning. Inputs that belong to
  another ``type`` (``depth`` on a slab, say) are ignored with a warning.
* ``exposed_perimeter`` 0 is a 422: ISO 13370 then gives no heat flow (B' infinite).
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import ConfigDict, Field

from server.documents.common import Out, Strict, Units

GroundType = Literal["slab", "heated_basement", "suspended_floor"]
SoilCategory = Literal["clay_silt", "sand_gravel", "rock"]
Shielding = Literal["sheltered", "average", "exposed"]
#: generous upper bounds keep every product finite (common practice, not physics)
Big = Annotated[float, Field(gt=0, le=1e7, allow_inf_nan=False)]
BigOrZero = Annotated[float, Field(ge=0, le=1e7, allow_inf_nan=False)]
RInput = Annotated[float, Field(ge=0, le=1000, allow_inf_nan=False)]
ShieldingFactor = Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)]


class EdgeInsulationIn(Strict):
    """Slab edge insulation (ISO 13370 annex on edge insulation).

    ``r`` is R_n of the insulation (or of a low-density foundation wall) and ``thickness`` its
    d_n; the insulation adds R' = R_n − d_n / λ over the soil it displaces.
    """

    orientation: Literal["horizontal", "vertical"] = Field(
        description="horizontal: laid flat round the edge; vertical: down the foundation"
    )
    width_or_depth: Big = Field(
        description="D: width of horizontal, or depth below grade of vertical insulation (ft / m)"
    )
    r: Big = Field(description="R_n of the edge insulation (h·ft²·°F/Btu / m²·K/W)")
    thickness: BigOrZero = Field(description="d_n, its thickness (inch / mm)")


class GroundIn(Strict):
    """A house surface's ground contact; its own assembly gives R_f (slab, basement_floor) or
    R_w (basement_wall), films excluded.

    * ``slab``: U by the slab-on-ground clause, UA = U × area.
    * ``basement_floor``: U_bf at ``depth``, UA = U_bf × area.
    * ``basement_wall``: U_bw at ``depth``, UA = U_bw × depth × exposed_perimeter (the
      below-grade area); the rest of ``area`` above that counts at the assembly's air-to-air U;
      an ``area`` smaller than the below-grade area is warned about and the below-grade area
      used. ``floor_r`` is the basement floor's R_f (d_t enters U_bw).

    In an upgrade every field is optional: the fields given replace the surface's.
    """

    floor_area: Big | None = Field(
        default=None,
        description="A of the whole floor for B' (ft² / m²); omitted = the surface's area",
    )
    exposed_perimeter: BigOrZero | None = Field(
        default=None,
        description="P (ft / m): the floor's perimeter next to outside air; for a basement_wall "
        "the wall's length at grade",
    )
    wall_thickness: BigOrZero | None = Field(
        default=None, description="w, full thickness of the walls round the floor (inch / mm)"
    )
    soil_conductivity: Big | None = Field(
        default=None, description="λ (Btu·in/(h·ft²·°F) / W/(m·K)); omitted = 2.0 W/(m·K)"
    )
    soil: SoilCategory | None = Field(
        default=None, description="the standard's soil category instead of soil_conductivity"
    )
    depth: BigOrZero | None = Field(
        default=None, description="z, basement floor below grade (ft / m)"
    )
    floor_r: RInput | None = Field(
        default=None, description="basement_wall only: R_f of the basement floor, films excluded"
    )
    edge_insulation: EdgeInsulationIn | None = Field(default=None, description="slab only")


class GroundRequest(Strict):
    """``POST /api/v1/calc/ground``: one floor (and, for a basement, its walls)."""

    model_config = ConfigDict(
        extra="forbid",
        allow_inf_nan=False,
        json_schema_extra={
            "examples": [
                {
                    "units": "si",
                    "type": "heated_basement",
                    "floor_area": 120.0,
                    "exposed_perimeter": 46.0,
                    "wall_thickness": 300,
                    "soil_conductivity": 2.0,
                    "floor_r": 0.5,
                    "depth": 2.0,
                    "wall_r": 0.2,
                }
            ]
        },
    )

    units: Units
    type: GroundType = Field(description="slab | heated_basement | suspended_floor")
    floor_area: Big = Field(description="A (ft² / m²)")
    exposed_perimeter: BigOrZero = Field(
        description="P (ft / m): only the perimeter next to outside air"
    )
    wall_thickness: BigOrZero = Field(description="w, full thickness of the walls (inch / mm)")
    soil_conductivity: Big | None = Field(
        default=None, description="λ (Btu·in/(h·ft²·°F) / W/(m·K)); omitted = 2.0 W/(m·K)"
    )
    soil: SoilCategory | None = Field(
        default=None,
        description="clay_silt 1.5, sand_gravel 2.0, rock 3.5 W/(m·K) (ISO 13370 table of "
        "soil properties, from memory)",
    )
    floor_r: RInput | None = Field(
        default=None,
        description="R_f of the floor construction, films excluded; a suspended floor's deck; "
        "omitted = 0",
    )
    depth: BigOrZero | None = Field(
        default=None, description="z, basement floor below grade (ft / m): heated_basement"
    )
    wall_r: RInput | None = Field(
        default=None, description="R_w of the basement wall, films excluded: heated_basement"
    )
    edge_insulation: EdgeInsulationIn | None = Field(default=None, description="slab only")
    height_above_grade: BigOrZero | None = Field(
        default=None,
        description="suspended_floor: h, top of the floor above the outside ground (ft / m)",
    )
    underfloor_wall_u: BigOrZero | None = Field(
        default=None, description="suspended_floor: U_w of the underfloor walls above grade"
    )
    vent_area_per_perimeter: BigOrZero | None = Field(
        default=None,
        description="suspended_floor: ε, vent openings per perimeter (ft²/ft / m²/m)",
    )
    wind_speed: BigOrZero | None = Field(
        default=None, description="suspended_floor: v, mean wind speed at 10 m (mph / m/s)"
    )
    shielding: Shielding | ShieldingFactor | None = Field(
        default=None,
        description="suspended_floor: sheltered 0.02, average 0.05, exposed 0.10, or the "
        "factor f_w itself; omitted = average",
    )
    ground_r: RInput | None = Field(
        default=None,
        description="suspended_floor: R_g of insulation on the underfloor ground; omitted = 0",
    )


class GroundResult(Out):
    """Ground heat transfer in the request's units (method ISO 13370)."""

    model_config = ConfigDict(extra="ignore", allow_inf_nan=False)

    units: Units
    type: GroundType
    characteristic_dimension: float = Field(description="B' = A / (0.5 P) (ft / m)")
    floor_equivalent_thickness: float = Field(
        description="d_t = w + λ (R_si + R_f + R_se), R_si 0.17, R_se 0.04 m²·K/W, as a LENGTH "
        "(ft / m); suspended_floor: d_g of the underfloor ground (R_g in place of R_f)"
    )
    u_floor: float = Field(
        description="slab: U (with edge insulation); heated_basement: U_bf; suspended_floor: U"
    )
    wall_equivalent_thickness: float | None = Field(
        default=None, description="heated_basement: d_w = λ (0.13 + R_w + 0.04) (ft / m)"
    )
    u_wall: float | None = Field(default=None, description="heated_basement: U_bw")
    u_overall: float = Field(description="(A U_floor + z P U_wall) / (A + z P)")
    heat_transfer_coefficient: float = Field(
        description="H_g = A U_floor + z P U_wall, per degree (Btu/(h·°F) / W/K)"
    )
    method: Literal["ISO 13370"] = "ISO 13370"
    soil_conductivity: float = Field(description="λ used")
    floor_branch: str | None = Field(
        default=None, description="which branch of the floor formula applied"
    )
    wall_branch: str | None = None
    wall_area: float | None = Field(
        default=None, description="heated_basement: z P, walls below grade (ft² / m²)"
    )
    u_floor_without_edge_insulation: float | None = None
    edge_psi: float | None = Field(
        default=None, description="Ψ_ge of the edge insulation (Btu/(h·ft·°F) / W/(m·K))"
    )
    u_deck: float | None = Field(default=None, description="suspended_floor: U_f of the deck")
    u_underfloor_ground: float | None = Field(default=None, description="suspended_floor: U_g")
    u_ventilation: float | None = Field(default=None, description="suspended_floor: U_x")
    shielding_factor: float | None = Field(default=None, description="suspended_floor: f_w")
    warnings: list[str] = []


__all__ = ["EdgeInsulationIn", "GroundIn", "GroundRequest", "GroundResult"]
