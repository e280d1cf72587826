"""Buffer spaces of a house document (ISO 13789): ids and what each surface faces, the pure
house with its spaces, and each space's figures in one variant."""

from __future__ import annotations

from dataclasses import replace

from server.documents.house import (
    HouseDocument,
    SpaceFigures,
)
from server.physics import buffer_spaces as buffers
from server.physics import house_model as model
from server.physics.units import from_si, to_si
from server.services.house_input import _Build

SPACE_ASSUMPTION = (
    "Buffer spaces (ISO 13789): a surface facing an unconditioned space counts b · U · A, "
    "b = H_ue / (H_iu + H_ue) recomputed for every variant; H_ue counts the space's exposed "
    "parts and its air changes at 0.018 Btu/(ft³·°F); air moving between the house and the "
    "space is not counted. Such surfaces take still-air films on that side (ASHRAE "
    "Handbook—Fundamentals; ISO 6946 Rse = Rsi) unless their assembly says otherwise."
)


def _space_assumptions(doc: HouseDocument) -> list[str]:
    return [SPACE_ASSUMPTION] if doc.spaces else []


def _check_spaces(doc: HouseDocument, build: _Build) -> None:
    """Space ids and what each surface faces; records the surfaces that take still air."""
    ids = [space.id for space in doc.spaces]
    for index, space in enumerate(doc.spaces):
        path = f"spaces[{index}]"
        if space.id in (buffers.OUTDOORS, buffers.GROUND):
            build.problem(
                f"{path}.id", f"'{space.id}' names what lies behind a surface with no space"
            )
        elif space.id in ids[:index]:
            build.problem(f"{path}.id", f"'{space.id}' is used twice")
        parts = [n for n in ("exposed", "volume", "air_changes") if getattr(space, n) is not None]
        if space.b is not None and parts:
            build.problem(
                f"{path}.b",
                f"give either b or exposed, volume and air_changes, not both (got {', '.join(parts)})",
            )
        elif space.b is None:
            for name in ("volume", "air_changes"):
                if getattr(space, name) is None:
                    build.problem(f"{path}.{name}", "is required unless the space gives b")
    known = set(ids)
    facing: set[str] = set()
    for index, surface in enumerate(doc.surfaces):
        behind = surface.adjacent
        if behind == buffers.OUTDOORS:
            continue
        path = f"surfaces[{index}].adjacent"
        if surface.kind == "pipe_run":
            build.problem(path, "a pipe run's surroundings are its pipe's ambient_temperature")
        elif behind != buffers.GROUND and behind not in known:
            choices = ", ".join(["outdoors", "ground", *ids])
            build.problem(path, f"there is no space '{behind}' (choose one of: {choices})")
        elif behind in known:
            facing.add(surface.id)
    build.raise_problems()
    used = {s.adjacent for s in doc.surfaces}
    build.warnings.extend(
        f"space '{ident}': no surface faces it, so it changes nothing"
        for ident in ids
        if ident not in used
    )
    build.still_air = frozenset(facing)


def _with_spaces(doc: HouseDocument, house: model.House) -> model.House:
    """The pure house with what lies behind each surface and the buffer spaces in SI."""
    if not doc.spaces and all(s.adjacent == buffers.OUTDOORS for s in doc.surfaces):
        return house
    units = doc.units
    adjacent = {s.id: s.adjacent for s in doc.surfaces}
    spaces = tuple(
        buffers.BufferSpace(
            id=space.id,
            exposed=tuple(
                buffers.ExposedPart(to_si(part.area, "area", units), to_si(part.u, "u", units))
                for part in space.exposed or []
            ),
            volume_m3=0.0 if space.volume is None else to_si(space.volume, "volume", units),
            air_changes_per_h=space.air_changes or 0.0,
            b=space.b,
        )
        for space in doc.spaces
    )
    return replace(
        house,
        surfaces=tuple(replace(s, adjacent=adjacent.get(s.id, s.adjacent)) for s in house.surfaces),
        spaces=spaces,
    )


def _space_figures(
    doc: HouseDocument, house: model.House, energy: model.HouseEnergy
) -> list[SpaceFigures]:
    """Each buffer space's b, H_iu, H_ue in one evaluated house, in the document's units."""
    figures = []
    for space in doc.spaces:
        found = energy.spaces[space.id]
        figures.append(
            SpaceFigures(
                id=space.id,
                label=space.label,
                b=found.b,
                b_given=found.b_given,
                h_iu=from_si(found.h_iu_w_per_k, "ua", doc.units),
                h_ue=None
                if found.h_ue_w_per_k is None
                else from_si(found.h_ue_w_per_k, "ua", doc.units),
                ua=from_si(found.b * found.h_iu_w_per_k, "ua", doc.units),
                surfaces=[s.id for s in house.surfaces if s.adjacent == space.id],
            )
        )
    return figures
