"""Dew-point (Glaser) check of a saved assembly: documents -> physics.condensation."""

from __future__ import annotations

from dataclasses import dataclass

from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.common import Units
from server.physics.condensation import CondensationResult, VapourLayer, glaser_check
from server.physics.units import temp_to_c, to_si
from server.services.catalog import Catalog
from server.services.condensation_words import summary_words

#: winter design condition used when the house gives none (common practice, from memory)
INDOOR_C, INDOOR_RH = 21.0, 0.40
OUTDOOR_C, OUTDOOR_RH = -10.0, 0.80
#: glass-fibre or mineral-wool batt: mu ≈ 1 (ISO 10456:2007 Table 3, from memory)
BATT_MU = 1.0
#: Said with every check of an assembly with a framed layer.
CAVITY_SECTION_NOTE = (
    "Checked through the cavity section: ISO 13788 is one-dimensional, so a framed layer "
    "counts its cavity's R (not the framing's, nor the isothermal-planes average), which keeps "
    "the sheathing on the cold side colder: the conservative path."
)


@dataclass(frozen=True)
class MoistureCheck:
    result: CondensationResult
    words: list[str]
    indoor_c: float
    indoor_rh: float
    outdoor_c: float
    outdoor_rh: float
    unknown_layers: list[str]


def check_assembly_moisture(
    assembly: AssemblyInput,
    computed: AssemblyResult,
    *,
    units: Units,
    catalog: Catalog,
    outdoor_design_temperature: float | None = None,
    indoor_c: float = INDOOR_C,
    indoor_rh: float = INDOOR_RH,
) -> MoistureCheck:
    """Glaser profile for a winter design condition (outdoor design temperature in ``units``)."""
    layers: list[VapourLayer] = []
    unknown: list[str] = []
    for doc, out in zip(assembly.layers, computed.layers, strict=True):
        thickness_m = (
            None if out.thickness is None else to_si(out.thickness, "thickness", units) * 1e-3
        )
        # a framed layer: the cavity section's R, the colder path (ISO 13788 is 1-D)
        r_si = to_si(out.r if out.r_cavity_path is None else out.r_cavity_path, "r", units)
        sd = doc.vapour_sd_m
        if sd is None:
            slug = doc.material or (doc.cavity.material if doc.cavity else None)
            spec = catalog.get(slug) if slug else None
            if spec is not None and spec.vapour_sd_m is not None:
                sd = spec.vapour_sd_m + (spec.vapour_mu or 0) * (thickness_m or 0)
            elif spec is not None and spec.vapour_mu is not None and thickness_m:
                sd = spec.vapour_mu * thickness_m
            elif doc.cavity is not None and doc.cavity.batt is not None and thickness_m:
                sd = BATT_MU * thickness_m
            else:
                sd = 0.0
                if not (doc.cavity is not None and doc.cavity.r is not None):
                    unknown.append(out.name)
        layers.append(VapourLayer(out.name, r_si, sd, thickness_m))
    outdoor_c = (
        OUTDOOR_C
        if outdoor_design_temperature is None
        else temp_to_c(outdoor_design_temperature, units)
    )
    films = computed.films
    result = glaser_check(
        layers,
        indoor_temp_c=indoor_c,
        indoor_rh=indoor_rh,
        outdoor_temp_c=outdoor_c,
        outdoor_rh=OUTDOOR_RH,
        inside_surface_resistance_m2k_w=max(to_si(films.inside, "r", units), 0.0),
        outside_surface_resistance_m2k_w=max(to_si(films.outside, "r", units), 0.0),
    )
    words = summary_words(result, units=units)
    if any(out.r_cavity_path is not None for out in computed.layers):
        words.append(CAVITY_SECTION_NOTE)
    if unknown:
        words.insert(
            0,
            "No vapour data for: " + ", ".join(unknown) + ". They are counted as still air, "
            "which can hide or exaggerate a risk: give their sd to make the check count.",
        )
    return MoistureCheck(result, words, indoor_c, indoor_rh, outdoor_c, OUTDOOR_RH, unknown)
