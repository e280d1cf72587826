"""Builders of house documents of any size (the POST /api/v1/calc/house document).

``big_house_document()`` gives the load-test house: 40 surfaces, 5 candidate upgrades on each
and 6 packages. Every assembly differs a little from every other (thicknesses step by 1/8 in),
so no cache can fold two of them into one: it is the worst case for the compute path, not a
typical house (where walls of one kind share one assembly).
"""

from __future__ import annotations

from typing import Any

#: surface kinds in turn, with their heat-flow direction (ASHRAE film choice)
_KINDS = (
    ("wall", "horizontal"),
    ("ceiling", "up"),
    ("floor", "down"),
    ("rim_joist", "horizontal"),
    ("kneewall", "horizontal"),
)


def _framed_assembly(heat_flow: str, bay_in: float, extra_in: float = 0.0) -> dict[str, Any]:
    """Outside to inside: siding, sheathing, a framed bay, optional added fill, drywall (ip)."""
    layers: list[dict[str, Any]] = [
        {"name": "cladding", "r": 0.62},
        {"name": "sheathing", "thickness": 0.5, "material": "osb"},
        {
            "name": "framed bay",
            "thickness": bay_in,
            "cavity": {"material": "fiberglass-batt"},
            "framing": {"conductivity": 0.80, "fraction": 0.15},
        },
    ]
    if extra_in > 0:
        layers.append(
            {"name": "added fill", "thickness": extra_in, "material": "cellulose-dense-pack"}
        )
    layers.append({"name": "drywall", "thickness": 0.5, "material": "gypsum-board"})
    return {"heat_flow": heat_flow, "films": "ashrae", "layers": layers}


def big_house_document(
    *, surfaces: int = 40, upgrades_per_surface: int = 5, packages: int = 6, name: str = ""
) -> dict[str, Any]:
    """A valid ip house document of the given size (no air-sealing upgrade).

    Package ``p`` takes upgrade ``(s + p) % upgrades_per_surface`` of every surface ``s`` (one
    upgrade per surface, as the calculator requires), at most 50 upgrades (the document's cap).
    """
    surface_rows: list[dict[str, Any]] = []
    upgrade_rows: list[dict[str, Any]] = []
    for s in range(surfaces):
        kind, heat_flow = _KINDS[s % len(_KINDS)]
        bay = 3.5 + 0.125 * s
        surface_rows.append(
            {
                "id": f"s{s}",
                "kind": kind,
                "name": f"{kind.replace('_', ' ')} {s}",
                "area": 100.0 + 10.0 * s,
                "assembly": _framed_assembly(heat_flow, bay),
            }
        )
        for u in range(upgrades_per_surface):
            upgrade_rows.append(
                {
                    "id": f"s{s}-u{u}",
                    "name": f"surface {s}: add {1 + u} in of dense-pack",
                    "surface": f"s{s}",
                    "assembly": _framed_assembly(heat_flow, bay, extra_in=1.0 + u),
                    "cost": {"fixed": 100.0 + 10 * u, "per_area": 1.0 + 0.25 * u},
                    "rebate": 25.0 * u,
                    "life_years": 30,
                }
            )
    package_rows = []
    for p in range(packages):
        chosen = [f"s{s}-u{(s + p) % upgrades_per_surface}" for s in range(surfaces)][:50]
        package_rows.append({"id": f"pkg{p}", "name": f"Package {p + 1}", "upgrades": chosen})
    return {
        "units": "ip",
        "name": name or f"Load-test house ({surfaces} surfaces)",
        "climate": {"hdd": 5400, "cdd": 900, "heating_base": 65, "cooling_base": 65},
        "heating": {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.45},
        "cooling": {"seer": 13, "electricity_price": 0.16},
        "air_leakage": {"cfm50": 3200, "n_factor": 18, "volume": 12000},
        "surfaces": surface_rows,
        "upgrades": upgrade_rows,
        "packages": package_rows if upgrades_per_surface else [],
        "economics": {
            "discount_rate": 0.03,
            "fuel_escalation": 0.02,
            "years": 20,
            "loan": {"apr": 0.06, "years": 10},
        },
    }
