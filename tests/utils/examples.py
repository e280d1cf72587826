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
