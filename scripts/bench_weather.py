"""Time Warmstead's weather-file reader against pvlib.iotools.read_tmy3.

Usage: ``.venv/bin/python scripts/bench_weather.py [repeats]``

Reads pvlib's bundled TMY3 file 723170TYA.CSV (8,760 hours) from memory with
``server.services.weather_files.parse_weather_file`` and from disk with
``pvlib.iotools.read_tmy3`` (pvlib needs a path), repeats each, and prints the median and the
fastest run of each and the ratio of the medians. Also times an EPW written from the same file.
"""

from __future__ import annotations

import pathlib
import statistics
import sys
import time
from collections.abc import Callable

import pvlib
from pvlib.iotools import read_tmy3

ROOT = pathlib.Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from server.services.weather_files import parse_weather_file  # noqa: E402

TMY3 = pathlib.Path(pvlib.__file__).parent / "data" / "723170TYA.CSV"


def timed(function: Callable[[], object], repeats: int) -> list[float]:
    function()  # warm up (imports, regex compilation, file cache)
    runs = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        runs.append(time.perf_counter() - start)
    return runs


def epw_from_tmy3(data: bytes) -> bytes:
    """A minimal EPW (8 header lines, dry-bulb in field 7) holding the TMY3 dry-bulb."""
    series = parse_weather_file(data)
    header = ["LOCATION,bench,ST,USA,TMY3,0,0,0,0,0"] + [f"HEADER {i}," for i in range(2, 9)]
    tail = "0.0,80,101300,0,0,300,0,0,0,0,0,0,0,180,2.0,5,5,16.1,77777,9,999999999,0,0.0,0,88,0,0,0"
    rows = [
        f"{d.year},{d.month},{d.day},{h + 1},60,A7A7E8*0?9?9?9,{t},{tail}"
        for d, h, t in zip(series.dates, series.hours or (), series.temperatures_c, strict=True)
    ]
    return ("\n".join(header + rows) + "\n").encode()


def main(repeats: int = 50) -> None:
    data = TMY3.read_bytes()
    ours = timed(lambda: parse_weather_file(data), repeats)
    theirs = timed(lambda: read_tmy3(str(TMY3), map_variables=True), max(5, repeats // 5))
    epw = epw_from_tmy3(data)
    ours_epw = timed(lambda: parse_weather_file(epw), repeats)
    hours = len(parse_weather_file(data).temperatures_c)
    print(f"file: {TMY3.name} ({len(data) / 1e6:.2f} MB, {hours} hours); pvlib {pvlib.__version__}")
    for label, runs in (
        ("warmstead parse_weather_file (TMY3)", ours),
        ("warmstead parse_weather_file (EPW) ", ours_epw),
        ("pvlib.iotools.read_tmy3           ", theirs),
    ):
        print(
            f"{label}: median {statistics.median(runs) * 1e3:7.2f} ms, "
            f"fastest {min(runs) * 1e3:7.2f} ms ({len(runs)} runs)"
        )
    ratio = statistics.median(theirs) / statistics.median(ours)
    print(f"ratio (pvlib median / warmstead median, TMY3): {ratio:.1f}x")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 50)
