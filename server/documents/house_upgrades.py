"""The house document's upgrades, their costs and the packages that group them.

Cost is ``fixed + per_area × area + per_length × length``; air sealing takes only ``fixed``;
``per_area`` belongs to assemblies and ``per_length`` to pipe insulation.
"""

from __future__ import annotations

from typing import Annotated

from pydantic import Field, model_validator

from server.documents.assembly import AssemblyInput
from server.documents.common import Name, Strict
from server.documents.ground import GroundIn
from server.documents.house_fields import Ident, Money, Price, RValue, UpgradeKind, UValue
from server.documents.pipe import PipeLayerIn


class CostIn(Strict):
    """Installed cost = fixed + per_area × area + per_length × length (document's currency)."""

    fixed: Money = 0.0
    per_area: Price = 0.0
    per_length: Price = 0.0


class UpgradeIn(Strict):
    """A proposed change: a new assembly, air sealing, or pipe insulation."""

    id: Ident
    kind: UpgradeKind | None = Field(default=None, description="omitted = worked out")
    name: Name = ""
    surface: Ident | None = None
    assembly: AssemblyInput | None = None
    r: RValue | None = None
    u: UValue | None = None
    cfm50_after: Annotated[float, Field(ge=0, le=1e6, allow_inf_nan=False)] | None = None
    n50_after: Annotated[float, Field(ge=0, le=100, allow_inf_nan=False)] | None = None
    pipe_layers: list[PipeLayerIn] | None = Field(default=None, max_length=20)
    ground: GroundIn | None = Field(
        default=None,
        description="a ground surface's changed ground inputs (e.g. slab edge insulation); the "
        "fields given replace the surface's; with no new assembly the surface's is kept",
    )
    supply_leakage_after: Annotated[float, Field(ge=0, le=0.9, allow_inf_nan=False)] | None = Field(
        default=None, description="duct sealing: supply leakage fraction after"
    )
    return_leakage_after: Annotated[float, Field(ge=0, le=0.9, allow_inf_nan=False)] | None = Field(
        default=None, description="duct sealing: return leakage fraction after"
    )
    supply_r_after: Annotated[float, Field(ge=0.01, le=100, allow_inf_nan=False)] | None = Field(
        default=None, description="duct insulation: supply duct R after (films included)"
    )
    return_r_after: Annotated[float, Field(ge=0.01, le=100, allow_inf_nan=False)] | None = Field(
        default=None, description="duct insulation: return duct R after (films included)"
    )
    emissivity: Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="pipe insulation: the jacket's emissivity; omitted = 0.9 (common practice)",
    )
    shgc: Annotated[float, Field(ge=0, le=1, allow_inf_nan=False)] | None = Field(
        default=None,
        description="window upgrade (storm panel, replacement): the window's SHGC after, 0..1",
    )
    cost: CostIn = Field(default_factory=CostIn)
    rebate: Money = 0.0
    life_years: Annotated[float, Field(gt=0, le=100, allow_inf_nan=False)] | None = None

    @model_validator(mode="after")
    def _window(self) -> UpgradeIn:
        """A window upgrade: a window surface, its new U (``u``, ``r`` or an assembly) and
        SHGC, priced fixed + per_area (checked before :meth:`_shape`)."""
        if self.kind is None and self.shgc is not None:
            self.kind = "window"
        if self.kind != "window":
            if self.shgc is not None:
                raise ValueError(f"shgc belongs to a window upgrade, not one of kind {self.kind}")
            return self
        given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        wrong = [
            n
            for n in ("cfm50_after", "n50_after", "pipe_layers", "ground", "emissivity",
                      "supply_leakage_after", "return_leakage_after", "supply_r_after",
                      "return_r_after")
            if getattr(self, n) is not None
        ]  # fmt: skip
        if wrong:
            raise ValueError(f"a window upgrade does not take {', '.join(wrong)}")
        if self.surface is None or self.shgc is None or len(given) != 1:
            raise ValueError(
                "a window upgrade needs its window (surface), shgc and exactly one of u, r or "
                "assembly"
            )
        if self.cost.per_length:
            raise ValueError("a window upgrade is priced fixed + per_area, not per_length")
        return self

    @model_validator(mode="after")
    def _shape(self) -> UpgradeIn:
        if self.kind == "window":
            return self  # checked by _window
        assembly_given = [n for n in ("assembly", "r", "u") if getattr(self, n) is not None]
        sealing_given = [n for n in ("cfm50_after", "n50_after") if getattr(self, n) is not None]
        leak_after = [
            n
            for n in ("supply_leakage_after", "return_leakage_after")
            if getattr(self, n) is not None
        ]
        r_after = [n for n in ("supply_r_after", "return_r_after") if getattr(self, n) is not None]
        duct_fields = {"duct_sealing": leak_after, "duct_insulation": r_after}
        if self.kind is None and (leak_after or r_after) and not (leak_after and r_after):
            self.kind = "duct_sealing" if leak_after else "duct_insulation"
        if self.kind in duct_fields:
            wrong = (
                assembly_given
                + sealing_given
                + [
                    n
                    for n in ("surface", "pipe_layers", "ground", "emissivity")
                    if getattr(self, n) is not None
                ]
                + [n for kind, names in duct_fields.items() if kind != self.kind for n in names]
            )
            if wrong:
                raise ValueError(f"an upgrade of kind {self.kind} does not take {', '.join(wrong)}")
            if not duct_fields[self.kind]:
                after = (
                    "supply_leakage_after or return_leakage_after"
                    if self.kind == "duct_sealing"
                    else "supply_r_after or return_r_after"
                )
                raise ValueError(f"{self.kind.replace('_', ' ')} needs {after}")
            if self.cost.per_length or (self.kind == "duct_sealing" and self.cost.per_area):
                raise ValueError(
                    "duct sealing is priced fixed; duct insulation fixed + per_area of the ducts"
                )
            return self
        if leak_after or r_after:
            raise ValueError(
                "supply_/return_leakage_after belong to duct sealing and supply_/return_r_after "
                "to duct insulation"
            )
        if self.emissivity is not None and self.kind not in (None, "pipe_insulation"):
            raise ValueError("emissivity belongs to pipe insulation (the jacket)")
        if self.kind is None:
            if sealing_given:
                self.kind = "air_sealing"
            elif self.pipe_layers is not None:
                self.kind = "pipe_insulation"
            elif self.surface is not None and (assembly_given or self.ground is not None):
                self.kind = "assembly"
            else:
                raise ValueError(
                    "say what the upgrade does: a surface and a new assembly, cfm50_after for "
                    "air sealing, or pipe_layers for pipe insulation"
                )
        others = {
            "assembly": sealing_given + (["pipe_layers"] if self.pipe_layers is not None else []),
            "air_sealing": assembly_given
            + [n for n in ("surface", "pipe_layers") if getattr(self, n) is not None],
            "pipe_insulation": assembly_given + sealing_given,
        }[self.kind] + (["ground"] if self.ground is not None and self.kind != "assembly" else [])
        if others:
            raise ValueError(f"an upgrade of kind {self.kind} does not take {', '.join(others)}")
        if self.kind == "assembly":
            ground_only = not assembly_given and self.ground is not None
            if self.surface is None or (len(assembly_given) != 1 and not ground_only):
                raise ValueError(
                    "an assembly upgrade needs a surface and exactly one of assembly, r or u "
                    "(or, on a ground surface, a ground change alone)"
                )
            if self.cost.per_length:
                raise ValueError("an assembly upgrade is priced fixed + per_area, not per_length")
        elif self.kind == "air_sealing":
            if len(sealing_given) != 1:
                raise ValueError("air sealing needs exactly one of cfm50_after or n50_after")
            if self.cost.per_area or self.cost.per_length:
                raise ValueError("air sealing has no area or length: give its cost as fixed")
        else:
            if self.surface is None or self.pipe_layers is None:
                raise ValueError("pipe insulation needs the pipe run (surface) and pipe_layers")
            if self.cost.per_area:
                raise ValueError("pipe insulation is priced fixed + per_length, not per_area")
        return self


class PackageIn(Strict):
    """Upgrades done together; incremental savings are reported in this order."""

    id: Ident
    name: Name = ""
    upgrades: list[Ident] = Field(min_length=1, max_length=50)
