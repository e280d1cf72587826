"""In-process timing of the whole-house core on the load-test house (40 surfaces x 5 upgrades x
6 packages, tests/utils/houses.py): calc/house compute and its response size, the compare
page's computation of a fresh selection, 2,000 Monte Carlo samples of every package, and the
optimizer over every allowed set (6^40).

Usage: ``.venv/bin/python scripts/bench_core.py [--repeat 20] [--tree DIR] [--only
compute,page]`` (``make bench`` runs it; ``--only`` times some parts only). ``--tree`` times another checkout of the code (say, the commit before a change:
``git archive <commit> | tar -x -C DIR``) with this same script, so two trees are compared
with one method. Each figure is the median of ``--repeat`` runs after one warm-up, wall clock
(``time.perf_counter``); the assembly calculator's own results are computed on every run (no
cache is warmed between runs unless the code keeps one itself).
"""

from __future__ import annotations

import argparse
import copy
import json
import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

#: the figures of issue 16 point 3
TARGET_SPEEDUP = 10.0
#: calc/house compute and the compare page's fresh selection at commit c27e8d8 [ms] (this
#: script, one run on the development machine): the baseline of TARGET_SPEEDUP
BASELINE_MS = {"compute_ms": 113.8, "page_compute_ms": 51.1}
TARGET_MC_MS = 300.0
TARGET_OPTIMIZE_MS = 1000.0
TARGET_RESPONSE_KB = 200.0


def _median_ms(work: Callable[[], Any], repeat: int) -> float:
    work()  # warm-up
    times = []
    for _ in range(repeat):
        began = time.perf_counter()
        work()
        times.append((time.perf_counter() - began) * 1e3)
    return statistics.median(times)


PARTS = ("compute", "api", "page", "mc", "optimize")


def measure(repeat: int, parts: tuple[str, ...] = PARTS) -> dict[str, float]:
    """The core's figures [ms, bytes] for the load-test house, in this process's tree (only
    those of ``parts``)."""
    from server.documents.house import HouseDocument
    from server.services import comparison as service
    from server.services.comparison import compute_house
    from tests.utils.houses import big_house_document

    body = big_house_document(surfaces=40, upgrades_per_surface=5, packages=6)
    doc = HouseDocument.model_validate(body)
    picked = copy.deepcopy(body)
    picked["packages"].append(
        {"id": "your-selection", "name": "Your selection", "upgrades": ["s3-u1", "s17-u0"]}
    )
    with_mc = HouseDocument.model_validate({**body, "uncertainty": {"samples": 2000, "seed": 7}})
    with_opt = HouseDocument.model_validate(
        {**body, "optimize": {"budget": 9000, "objective": "npv"}}
    )

    def api() -> bytes:
        # what POST /api/v1/calc/house does: validate, compute, serialize once
        document = HouseDocument.model_validate(body)
        if hasattr(service, "house_result_json"):  # the route's serializer, where it exists
            return service.house_result_json(document).encode()  # type: ignore[no-any-return]
        return compute_house(document).model_dump_json().encode()

    def page() -> None:
        # what the compare page computes for a new selection: packages only
        compute_house(HouseDocument.model_validate(picked), upgrades_alone=False)

    figures: dict[str, float] = {}
    if "compute" in parts:
        figures["compute_ms"] = _median_ms(
            lambda: (
                compute_house(doc, upgrades_alone="summary")  # type: ignore[arg-type]
                if hasattr(service, "house_result_json")
                else compute_house(doc)
            ),
            repeat,
        )
    if "api" in parts:
        figures["api_ms"] = _median_ms(api, repeat)
        figures["response_bytes"] = float(len(api()))
    if "page" in parts:
        figures["page_compute_ms"] = _median_ms(page, repeat)
    if "mc" in parts or "optimize" in parts:
        base = _median_ms(lambda: compute_house(doc, upgrades_alone=False), repeat)
    if "mc" in parts:
        figures["mc_ms"] = (
            _median_ms(lambda: compute_house(with_mc, upgrades_alone=False), repeat) - base
        )
    if "optimize" in parts:
        figures["optimize_ms"] = (
            _median_ms(lambda: compute_house(with_opt, upgrades_alone=False), repeat) - base
        )
    return figures


def _speedup(figures: dict[str, float], key: str) -> str:
    """`` (N.N× c27e8d8, meets >= 10×)``: the ratio to the baseline, for compute and page."""
    ratio = BASELINE_MS[key] / figures[key]
    verdict = "meets" if ratio >= TARGET_SPEEDUP else "MISSES"
    return f" ({ratio:.1f}× c27e8d8, {verdict} >= {TARGET_SPEEDUP:.0f}×)"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--repeat", type=int, default=20)
    parser.add_argument("--tree", type=Path, help="time the code of this checkout instead")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON only")
    parser.add_argument(
        "--only",
        default=",".join(PARTS),
        help=f"comma-separated parts to time, of {', '.join(PARTS)} (default: all)",
    )
    args = parser.parse_args()
    parts = tuple(p.strip() for p in args.only.split(",") if p.strip())
    unknown = [p for p in parts if p not in PARTS]
    if unknown:
        parser.error(f"unknown part(s) {', '.join(unknown)}; choose from {', '.join(PARTS)}")
    root = (args.tree or Path(__file__).resolve().parent.parent).resolve()
    sys.path.insert(0, str(root))
    figures = measure(args.repeat, parts)
    if args.json:
        print(json.dumps(figures))
        return 0
    print(f"whole-house core, load-test house (median of {args.repeat}, tree {root}):")
    if "compute_ms" in figures:
        print(
            f"  calc/house compute:              {figures['compute_ms']:8.1f} ms"
            + _speedup(figures, "compute_ms")
        )
    if "api_ms" in figures:
        print(f"  calc/house validate+compute+JSON:{figures['api_ms']:8.1f} ms")
        kb = figures["response_bytes"] / 1024
        verdict = "meets" if kb <= TARGET_RESPONSE_KB else "MISSES"
        print(
            f"  calc/house response:             {kb:8.1f} KB "
            f"({verdict} <= {TARGET_RESPONSE_KB:.0f})"
        )
    if "page_compute_ms" in figures:
        print(
            f"  compare page, new selection:     {figures['page_compute_ms']:8.1f} ms"
            + _speedup(figures, "page_compute_ms")
        )
    if "mc_ms" in figures:
        verdict = "meets" if figures["mc_ms"] <= TARGET_MC_MS else "MISSES"
        print(f"  Monte Carlo, 2,000 samples:      {figures['mc_ms']:8.1f} ms ({verdict} <= 300)")
    if "optimize_ms" in figures:
        verdict = "meets" if figures["optimize_ms"] <= TARGET_OPTIMIZE_MS else "MISSES"
        print(
            f"  optimizer (6^40 sets):           {figures['optimize_ms']:8.1f} ms "
            f"({verdict} <= 1000)"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
