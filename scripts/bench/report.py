"""The load test's printed report: the table of every target, the targets met or missed."""

from __future__ import annotations

import os
from typing import Any

from bench.client import Load

TARGET_RATIO = 0.50
TARGET_P99_MS = 100.0
TARGET_FIRST_LOAD_KB = 80.0


def median_run(runs: list[Load]) -> Load:
    """The run with the median throughput (its own p50/p99 go with it)."""
    return sorted(runs, key=lambda r: r.rps)[len(runs) // 2]


def report(rows: list[tuple[str, int, Load]], extra: dict[str, Any], connections: int) -> int:
    print(f"\ncompare page HTML: {extra['html_bytes']:,} bytes (bare page: the same); "
          f"calc/house response: {extra['api_bytes']:,} bytes")  # fmt: skip
    print(f"\n{'target (median round)':<34}{'workers':>8}{'req/s':>9}{'p50 ms':>9}{'p99 ms':>9}"
          f"{'errors':>8}")  # fmt: skip
    for label, workers, r in rows:
        print(f"{label:<34}{workers:>8}{r.rps:>9.1f}{r.p50_ms:>9.1f}{r.p99_ms:>9.1f}"
              f"{r.errors:>8}")  # fmt: skip
    print("\nevery round (req/s / p99 ms):")
    for (label, workers), runs in extra["rounds"].items():
        shown = ", ".join(f"{r.rps:.0f}/{r.p99_ms:.0f}" for r in runs)
        print(f"  {label}, {workers} worker(s): {shown}")
    ok = True
    verdicts: dict[int, bool] = {}
    print()
    for workers in sorted({w for _, w, _ in rows}):
        compare = next(r for label, w, r in rows if label == "compare page" and w == workers)
        bare = next(r for label, w, r in rows if label == "bare page" and w == workers)
        ratio = compare.rps / bare.rps if bare.rps else 0.0
        ratio_ok = ratio >= TARGET_RATIO
        p99_ok = compare.p99_ms <= TARGET_P99_MS
        verdicts[workers] = ratio_ok and p99_ok and compare.errors == 0
        ok &= verdicts[workers]
        print(f"{workers} worker(s): compare/bare throughput {ratio:.0%} "
              f"({'meets' if ratio_ok else 'MISSES'} >= {TARGET_RATIO:.0%}); compare p99 at "
              f"{connections} connections {compare.p99_ms:.1f} ms "
              f"({'meets' if p99_ok else 'MISSES'} <= {TARGET_P99_MS:.0f} ms; bare page "
              f"{bare.p99_ms:.1f} ms)")  # fmt: skip
        start_s, first_s = extra[f"cold_{workers}"]
        pages_biggest, pages_together = extra[f"rss_pages_{workers}"]
        biggest, together = extra[f"rss_{workers}"]
        bare_biggest, _ = extra[f"bare_rss_{workers}"]
        print(f"  cold start: {start_s:.2f} s to the first /healthz 200, {first_s:.2f} s to the "
              f"first compare page")  # fmt: skip
        print(f"  peak RSS (VmHWM) after the page loads: {pages_biggest:.0f} MB per process, "
              f"{pages_together:.0f} MB in all; after the calculator load: {biggest:.0f} MB per "
              f"process, {together:.0f} MB in all (bare page: {bare_biggest:.0f} MB)")  # fmt: skip
    fl = extra["first_load"]
    fl_ok = fl["total_kb"] <= TARGET_FIRST_LOAD_KB and not fl["external"]
    ok &= fl_ok
    print(f"\nfirst load of the compare page with gzip: {fl['total_kb']:.1f} KB "
          f"({'meets' if fl['total_kb'] <= TARGET_FIRST_LOAD_KB else 'MISSES'} <= "
          f"{TARGET_FIRST_LOAD_KB:.0f} KB)")  # fmt: skip
    for path, wire, raw in fl["parts"]:
        print(f"  {path}: {wire / 1024:.1f} KB on the wire ({raw / 1024:.1f} KB unpacked)")
    print("  references to other hosts: " + (", ".join(fl["external"]) or "none"))
    print(f"\nload average after: {extra['load_after']:.2f} (other work on this machine skews "
          "every figure; compare the interleaved rounds)")  # fmt: skip
    per_core = os.cpu_count() or 1
    if per_core in verdicts:
        met = verdicts[per_core] and fl_ok
        print(f"at one worker per core ({per_core} worker(s), as the README deploys): "
              + ("all targets met" if met else "some targets missed (see above)"))  # fmt: skip
    print("every row met its targets" if ok else "not every row met its targets (see above)")
    return 0
