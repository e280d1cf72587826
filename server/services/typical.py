"""Typical assemblies an auditor can insert in two taps (server/data/typical_assemblies.json)."""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from server.documents.assembly import AssemblyInput
from server.documents.common import Units
from server.services.convert import convert_assembly

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


@lru_cache
def typical_assemblies() -> dict[str, Typical]:
    raw = json.loads(DATA.read_text())
    out: dict[str, Typical] = {}
    for row in raw["assemblies"]:
        doc = {"heat_flow": row["heat_flow"], "films": row["films"], "layers": row["layers"]}
        AssemblyInput.model_validate(doc)  # refuse a bad data file at first use
        out[row["slug"]] = Typical(row["slug"], row["label"], row["kind"], row["heat_flow"], doc)
    return out
