"""Where the heat goes: each path's share of the heat a house loses in a year, in plain words.

Every figure is read from one evaluated house (:class:`server.documents.house.HouseFigures`),
never computed by a formula of its own:

* envelope surfaces, air leakage and mechanical ventilation: their share of the UA times the
  annual heating load (the degree-day load is UA × HDD × 24 h, so each part of the UA carries
  the same share of the load; a surface facing a buffer space counts b · U · A, ISO 13789, and
  a ground surface its ISO 13370 U);
* ducts: the load the distribution loses, load / η_dist − load (the model buys
  load / η_dist, :func:`server.physics.house_model.evaluate`);
* pipe runs: the loss each run counts (``counted_loss``), or its whole loss when none is given.
"""

from __future__ import annotations

from dataclasses import dataclass

from server.documents.house import GROUND_SURFACE_KINDS, HouseFigures

#: MMBtu in Btu (ip) and kWh (si): the energy figure shown beside each share
MMBTU = 1e6


@dataclass(frozen=True, slots=True)
class HeatFlow:
    """One path heat leaves by: words, annual heat (Btu ip, kWh si) and share of the total."""

    label: str
    kind: str
    annual: float
    share: float


def _surface_label(name: str, kind: str, adjacent: str, spaces: dict[str, str]) -> str:
    if adjacent == "ground" or kind in GROUND_SURFACE_KINDS:
        return f"{name}, into the ground"
    if adjacent in spaces:
        space = spaces[adjacent] or adjacent
        return f"{name}, to the {space[:1].lower()}{space[1:]}"
    return name


def _surface_kind(kind: str, adjacent: str, spaces: dict[str, str]) -> str:
    if kind in ("window", "door"):
        return kind
    if adjacent == "ground" or kind in GROUND_SURFACE_KINDS:
        return "ground"
    return "buffer" if adjacent in spaces else "surface"


def heat_flows(figures: HouseFigures) -> list[HeatFlow]:
    """The paths of ``figures`` largest first (zero paths left out); shares add up to 1."""
    load = figures.heating_load
    spaces = {space.id: space.label for space in figures.spaces}
    rows: list[tuple[str, str, float]] = [
        (
            _surface_label(s.name or s.id, s.kind, s.adjacent, spaces),
            _surface_kind(s.kind, s.adjacent, spaces),
            s.share_of_ua * load,
        )
        for s in figures.surfaces
    ]
    if figures.ua > 0:
        air = figures.ua_infiltration / figures.ua * load
        vent = figures.ua_ventilation / figures.ua * load
        rows.append(("Air leakage (drafts through gaps)", "air", air))
        rows.append(("Mechanical ventilation", "ventilation", vent))
    dist = figures.distribution
    if dist is not None and dist.efficiency > 0:
        rows.append(("Ducts (heat lost on the way to the rooms)", "ducts",
                     load / dist.efficiency - load))  # fmt: skip
    for pipe in figures.pipes:
        lost = pipe.annual_loss if pipe.counted_loss is None else pipe.counted_loss
        words = "hot-water pipe" if pipe.service == "domestic_hot_water" else "heating pipe"
        rows.append((f"{pipe.name or pipe.id} ({words})", "pipe", lost))
    total = sum(value for _, _, value in rows if value > 0)
    flows = [
        HeatFlow(label, kind, value, value / total if total > 0 else 0.0)
        for label, kind, value in rows
        if value > 0
    ]
    return sorted(flows, key=lambda f: f.annual, reverse=True)


def energy_text(value: float, units: str) -> str:
    """Annual heat in words: MMBtu (ip) or kWh (si)."""
    if units == "ip":
        return f"{value / MMBTU:,.1f} MMBtu"
    return f"{value:,.0f} kWh"
