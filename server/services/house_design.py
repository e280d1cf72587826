"""Design heat loss and the equipment's capacity ratio of one house variant (ASHRAE
Handbook—Fundamentals design conditions; ASHRAE 152 distribution at design)."""

from __future__ import annotations

from server.documents.house import (
    HouseDocument,
)
from server.physics.energy import (
    capacity_ratio,
    design_heat_loss,
)
from server.physics.units import from_si, temp_to_c, to_si

#: Indoor design temperature when the document gives none, by unit system [°C]: 70 °F
#: (21.11 °C) or 21 °C (the usual winter indoor design condition, common practice).
INDOOR_DESIGN_C = {"ip": (70.0 - 32.0) * 5.0 / 9.0, "si": 21.0}

#: Above this output capacity ÷ design heat loss the equipment is called oversized. From
#: memory: common sizing practice (ACCA Manual S) lets a furnace's output reach about 140 %
#: of the design load; a heat pump is sized much closer to the load.
OVERSIZED_RATIO = 1.4


def _design(
    doc: HouseDocument, ua_w_per_k: float, distribution_efficiency: float = 1.0
) -> tuple[float | None, float | None]:
    """Design heat loss [document units: Btu/h or W] and capacity ratio [-] of one variant.

    With ducts the loss at design is UA·ΔT / η_dist,design: the envelope's and the ducts'
    (ASHRAE Standard 152 design distribution efficiency, see :mod:`server.physics.ducts`).
    """
    design = doc.climate.heating_design_temperature
    if design is None:
        return None, None
    indoor = doc.climate.indoor_design_temperature
    indoor_c = INDOOR_DESIGN_C[doc.units] if indoor is None else temp_to_c(indoor, doc.units)
    loss_w = design_heat_loss(ua_w_per_k, indoor_c, temp_to_c(design, doc.units))
    if distribution_efficiency != 1.0:
        loss_w /= distribution_efficiency
    capacity = doc.heating.output_capacity
    ratio = (
        None if capacity is None else capacity_ratio(to_si(capacity, "power", doc.units), loss_w)
    )
    return from_si(loss_w, "power", doc.units), ratio
