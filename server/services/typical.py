"""Typical assemblies an auditor can insert in two taps (server/data/typical_assemblies.json)."""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from server.documents.assembly import AssemblyInput
from server.documents.common import Units
from server.physics.units import INCH_M
from server.services.convert import convert_assembly
from server.services.material_data import load_builtin_materials, material_vapour_sd_m

DATA = Path(__file__).resolve().parent.parent / "data" / "typical_assemblies.json"


@dataclass(frozen=True)
class Typical:
    slug: str
    label: str
    kind: str
    heat_flow: str
    document_ip: dict[str, Any]

    def assembly(self, units: Units) -> AssemblyInput:
        return AssemblyInput.model_validate(convert_assembly(self.document_ip, "ip", units))


def _vapour_from_library(layer: dict[str, Any], where: str) -> dict[str, Any]:
    """A layer naming ``vapour_material`` takes that library row's sd = μ × thickness (+ sd):
    one source of μ (server/data/materials.csv) for the library and the typical assemblies."""
    if "vapour_material" not in layer:
        return layer
    out = dict(layer)
    slug = out.pop("vapour_material")
    rows = {row.slug: row for row in load_builtin_materials()}
    if slug not in rows or "thickness" not in out:
        raise ValueError(f"{where}: vapour_material '{slug}' needs a library row and a thickness")
    sd = material_vapour_sd_m(rows[slug], out["thickness"] * INCH_M)  # the file is in inches
    if sd is None:
        raise ValueError(f"{where}: the library row '{slug}' has no vapour data")
    out["vapour_sd_m"] = round(sd, 4)
    return out


@lru_cache
def typical_assemblies() -> dict[str, Typical]:
    raw = json.loads(DATA.read_text())
    out: dict[str, Typical] = {}
    for row in raw["assemblies"]:
        layers = [
            _vapour_from_library(layer, f"{row['slug']}.layers[{i}]")
            for i, layer in enumerate(row["layers"])
        ]
        doc = {"heat_flow": row["heat_flow"], "films": row["films"], "layers": layers}
        AssemblyInput.model_validate(doc)  # refuse a bad data file at first use
        out[row["slug"]] = Typical(row["slug"], row["label"], row["kind"], row["heat_flow"], doc)
    return out
