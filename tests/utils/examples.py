"""The worked example of ../shared/API.md, POST /api/v1/calc/assembly, for every test that
posts it: a 2x4 wall at 16 in. on centre, R-13 batts (r_parallel_path 11.85 in API.md).

Take a copy (``copy.deepcopy``) before changing it; the modules that use it bind their own.
"""

from __future__ import annotations

from typing import Any

API_WALL_IP: dict[str, Any] = {
    "units": "ip",
    "heat_flow": "horizontal",
    "films": "ashrae",
    "layers": [
        {"name": "siding", "r": 0.62},
        {"name": "sheathing", "thickness": 0.4375, "r": 0.62},
        {
            "name": "stud bay",
            "thickness": 3.5,
            "cavity": {"r": 13.0},
            "framing": {"conductivity": 0.80, "fraction": 0.25},
        },
        {"name": "drywall", "thickness": 0.5, "conductivity": 1.11},
    ],
}

#: The worked example of ../shared/API.md, POST /api/v1/calc/ground: a heated basement
#: (take a copy before changing it).
API_GROUND_SI: dict[str, Any] = {
    "units": "si",
    "type": "heated_basement",
    "floor_area": 120.0,
    "exposed_perimeter": 46.0,
    "wall_thickness": 300,
    "soil_conductivity": 2.0,
    "floor_r": 0.5,
    "depth": 2.0,
    "wall_r": 0.2,
}
