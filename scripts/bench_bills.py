"""Time the bills fit's base search: a year of daily temperatures, 12, 24 and 36 periods.

Usage: ``.venv/bin/python scripts/bench_bills.py [repeats]`` (``make bench`` runs it).

The daily means are those of pvlib's bundled TMY3 file 723170TYA.CSV (8,760 hours averaged by
day, 365 days), laid end to end for as many years as the periods need. Bills of 30-day periods
are synthesised from them with a known baseload, heating slope and base (2 therm/day,
0.25 therm/(K·day), 16 °C: invented, plausible for a gas-heated house) so the search has a
real minimum to find. Each case is fitted ``repeats`` times by
:func:`server.physics.bills.fit_bills` (the heating search, then with the cooling term an
electric meter tries) and the median and fastest run are printed against the target of 20 ms
(issue 15). A benchmark, not a test: the figures depend on the machine.
"""

from __future__ import annotations

import pathlib
import statistics
import sys
import time

import numpy as np
import pvlib

ROOT = pathlib.Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from server.physics import bill_model, bills  # noqa: E402
from server.services.weather_files import parse_weather_file  # noqa: E402

TMY3 = pathlib.Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"
TARGET_MS = 20.0
PERIOD_DAYS = 30
ALPHA, BETA, BASE_C = 2.0, 0.25, 16.0


def daily_means() -> np.ndarray:
    series = parse_weather_file(TMY3.read_bytes())
    temps = np.asarray(series.temperatures_c, dtype=float)
    return temps[: 365 * 24].reshape(365, 24).mean(axis=1)


def synthetic_bills(daily: np.ndarray, count: int) -> tuple[np.ndarray, list[bill_model.Period]]:
    years = -(-(count * PERIOD_DAYS) // 365)
    temps = np.tile(daily, years)
    periods = []
    for k in range(count):
        first = k * PERIOD_DAYS
        hdd = float(np.maximum(BASE_C - temps[first : first + PERIOD_DAYS], 0.0).sum())
        periods.append(bill_model.Period(first, PERIOD_DAYS, ALPHA * PERIOD_DAYS + BETA * hdd))
    return temps, periods


def timed_ms(
    daily: np.ndarray, periods: list[bill_model.Period], cooling: bool, repeats: int
) -> list[float]:
    bills.fit_bills(daily, periods, cooling=cooling)  # warm up
    runs = []
    for _ in range(repeats):
        start = time.perf_counter()
        bills.fit_bills(daily, periods, cooling=cooling)
        runs.append((time.perf_counter() - start) * 1e3)
    return runs


def main(repeats: int = 51) -> int:
    daily = daily_means()
    print(
        f"daily means: {TMY3.name}, {len(daily)} days; {repeats} runs per case; target {TARGET_MS:g} ms"
    )
    slow = False
    for count in (12, 24, 36):
        temps, periods = synthetic_bills(daily, count)
        fit = bills.fit_bills(temps, periods)
        for cooling in (False, True):
            runs = timed_ms(temps, periods, cooling, repeats)
            median = statistics.median(runs)
            slow = slow or median >= TARGET_MS
            label = "heating + cooling tried" if cooling else "heating"
            print(
                f"{count:3d} periods, {label:24s} median {median:6.2f} ms, fastest "
                f"{min(runs):6.2f} ms {'OK' if median < TARGET_MS else 'SLOW'}"
            )
        print(
            f"    recovered: base {fit.base_c:.2f} °C (true {BASE_C:g}), slope "
            f"{fit.heating_slope:.4f} (true {BETA:g}), baseload {fit.baseload_per_day:.3f} "
            f"(true {ALPHA:g})"
        )
    return 1 if slow else 0


if __name__ == "__main__":
    sys.exit(main(int(sys.argv[1]) if len(sys.argv) > 1 else 51))
