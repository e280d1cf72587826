"""Code-target table against an outside dataset: building-energy-standards-data.

Outside source: building-energy-standards-data (0.3.x),
``building_energy_standards_data/database_files/envelope_requirements_IECC.json``: a list of
rows with ``template`` ("IECC-2021"), ``climate_zone_set`` ("ClimateZone 5", "ClimateZone 4C"),
``intended_surface_type`` ("ExteriorWall", "ExteriorRoof"), ``standards_construction_type``
("WoodFramed", "Attic and Other"), ``building_category`` and ``assembly_maximum_u_value``
(Btu/(h·ft²·°F), films included). These are the COMMERCIAL provisions (C402), not the
one- and two-family dwelling table our CSV holds, so the checks are only of shape: same zones,
the same direction from warm to cold, and U-factors of the same order.
"""

from __future__ import annotations

import json
from importlib import resources

import pytest

from server.physics.code_targets import SURFACE_KINDS, target_for
from server.services.code_target_data import load_code_targets

ROWS = load_code_targets()


def _besd_u(surface_type: str, construction_type: str) -> dict[str, float]:
    """IECC-2021 commercial 'Residential' (Group R) maximum U by zone label ('4A', '5', ...)."""
    path = resources.files("building_energy_standards_data").joinpath(
        "database_files", "envelope_requirements_IECC.json"
    )
    data = json.loads(path.read_text(encoding="utf-8"))
    return {
        row["climate_zone_set"].removeprefix("ClimateZone ").strip(): row[
            "assembly_maximum_u_value"
        ]
        for row in data
        if row["template"] == "IECC-2021"
        and row["building_category"] == "Residential"
        and row["intended_surface_type"] == surface_type
        and row["standards_construction_type"] == construction_type
    }


def _by_zone(values: dict[str, float]) -> list[float]:
    """Zones 0..8 in order; zone 4 is '4' or, where split by moisture, '4A'."""
    return [values.get(str(z), values.get(f"{z}A")) for z in range(9)]  # type: ignore[misc]


def _ours(kind: str, field: str) -> list[float | None]:
    return [getattr(target_for(ROWS, z, kind), field) for z in range(9)]


def test_dataset_zones_match_ours():
    # building-energy-standards-data: IECC-2021 wood-framed walls have zones 0-8 (4 split into
    # 4A/4B/4C); our table has one row per zone 0-8 for every surface kind.
    dataset_zones = {int(label[0]) for label in _besd_u("ExteriorWall", "WoodFramed")}
    assert dataset_zones == set(range(9))
    for kind in SURFACE_KINDS:
        assert sorted(r.climate_zone for r in ROWS if r.surface_kind == kind) == list(range(9))


@pytest.mark.parametrize(
    ("surface_type", "construction_type", "our_kind"),
    [
        ("ExteriorWall", "WoodFramed", "wood_frame_wall"),
        ("ExteriorRoof", "Attic and Other", "ceiling"),
    ],
)
def test_u_max_never_rises_from_warm_to_cold_in_the_dataset_and_in_ours(
    surface_type, construction_type, our_kind
):
    # building-energy-standards-data IECC-2021: wood-framed wall 0.064 (0-4A), 0.051 (5-7),
    # 0.032 (8); attic 0.027 (0-3), 0.021 (4-6), 0.017 (7-8): non-increasing warm -> cold.
    theirs = _by_zone(_besd_u(surface_type, construction_type))
    assert all(a >= b for a, b in zip(theirs, theirs[1:], strict=False))
    ours = _ours(our_kind, "u_max_ip")
    assert all(a >= b for a, b in zip(ours, ours[1:], strict=False))  # type: ignore[operator]
    # Plausibility only (commercial Group R vs one- and two-family dwellings): same order of
    # magnitude, within a factor of 2 zone by zone.
    for zone, (mine, dataset) in enumerate(zip(ours, theirs, strict=True)):
        assert 0.5 <= mine / dataset <= 2.0, f"zone {zone}: {mine} vs {dataset}"  # type: ignore[operator]
