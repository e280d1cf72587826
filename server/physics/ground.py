"""Heat transfer via the ground: slab on ground, heated basement, suspended floor (steady state).

Everything is SI: lengths [m], areas [m²], conductivity [W/(m·K)], R [m²·K/W], U [W/(m²·K)],
Ψ [W/(m·K)], H [W/K], wind speed [m/s]. The methods are the simplified steady-state ones of
[1] for the annual mean; the periodic (monthly) terms of [1] are not included.

Symbols follow [1]: A floor area, P exposed perimeter (only the length next to outside air or
an unheated space outside the insulated envelope), B' = A / (0.5 P) characteristic dimension,
w full thickness of the walls round the floor, λ ground conductivity, d_t total equivalent
thickness of the floor, d_w of the basement walls, z depth of a basement floor below grade.

Decisions taken here (the standard is silent or leaves them to the user):

* P = 0 (a floor with no exposed perimeter) is refused: B' is then infinite and every U of
  [1] tends to zero, i.e. the method gives no heat flow to the ground; the caller should
  leave such a floor out (or give the short perimeter it really has) rather than get a U of 0.
* z = 0 in a heated basement is accepted: the floor is then exactly the slab on ground, and
  U_bw takes its limit 3λ / (π d_w) for a wall of zero buried height (area 0).
* Edge insulation so wide or deep that U_0 + 2 Ψ_ge / B' would not be above zero is refused
  (the formulas are for a band at the edge, not insulation under the whole floor).
* Inputs outside :data:`RANGES` are refused (generous bounds that keep every figure finite).
* Surface resistances are those [1] prescribes: R_si 0.17 m²·K/W for floors (downward heat
  flow), 0.13 for walls, R_se 0.04 m²·K/W.

References
----------
[1] ISO 13370:2017 Thermal performance of buildings — Heat transfer via the ground —
    Calculation methods. Cited by clause title; the clause and equation numbers given in
    brackets are those of the 2007 edition (EN ISO 13370:2007), from memory: characteristic
    dimension (8.1), equivalent thickness (8.2), slab-on-ground floor (9.1, Eq. 3 and 4),
    suspended floor (9.2, Eq. 6 to 9), heated basement (9.3, Eq. 10 to 15), edge insulation
    (Annex B, Eq. B.4 to B.6), thermal properties of the ground (Table 7). The 2017 edition
    keeps these formulas; check its numbering.
[2] ISO 6946:2017 Building components and building elements — Thermal resistance and thermal
    transmittance: surface resistances R_si 0.17 (downward), 0.13 (horizontal), R_se 0.04
    m²·K/W (Table 7).

Modules: :mod:`.ground_terms` (what every case shares: surface resistances, soils, checks, B',
equivalent thicknesses, the floor U), :mod:`.ground_slab`, :mod:`.ground_basement` and
:mod:`.ground_suspended`; this module re-exports their public names (importers use
``ground.<name>``).
"""

from __future__ import annotations

from server.physics.ground_basement import BasementResult, basement_wall_u, heated_basement
from server.physics.ground_slab import (
    EdgeInsulation,
    SlabResult,
    edge_insulation_psi,
    slab_on_ground,
)
from server.physics.ground_suspended import SuspendedResult, suspended_floor
from server.physics.ground_terms import (
    DEFAULT_SOIL_CONDUCTIVITY_W_MK,
    MAX_CHARACTERISTIC_M,
    R_SE,
    R_SI_FLOOR,
    R_SI_WALL,
    RANGES,
    SHALLOW_DEPTH_M,
    SHIELDING_FACTOR,
    SOIL_CONDUCTIVITY_W_MK,
    VENTILATION_CONSTANT,
    GroundInputError,
    Orientation,
    characteristic_dimension,
    floor_branch,
    floor_equivalent_thickness,
    floor_u,
    wall_equivalent_thickness,
)

__all__ = [
    "DEFAULT_SOIL_CONDUCTIVITY_W_MK",
    "MAX_CHARACTERISTIC_M",
    "R_SE",
    "R_SI_FLOOR",
    "R_SI_WALL",
    "RANGES",
    "SHALLOW_DEPTH_M",
    "SHIELDING_FACTOR",
    "SOIL_CONDUCTIVITY_W_MK",
    "VENTILATION_CONSTANT",
    "BasementResult",
    "EdgeInsulation",
    "GroundInputError",
    "Orientation",
    "SlabResult",
    "SuspendedResult",
    "basement_wall_u",
    "characteristic_dimension",
    "edge_insulation_psi",
    "floor_branch",
    "floor_equivalent_thickness",
    "floor_u",
    "heated_basement",
    "slab_on_ground",
    "suspended_floor",
    "wall_equivalent_thickness",
]
