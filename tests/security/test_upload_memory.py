"""An anonymous weather upload cannot exhaust a worker's memory.

``POST /api/v1/calc/degree-days`` needs no account. A 1,000,000-row CSV (about 19.5 MB, under
the 20 MB upload limit and the 25 MB body limit) must be refused with a 422 naming the row
limit after a bounded read, and the worker's resident memory must stay under 150 MB, with one
such upload and with four at once.

How it is measured: ``warmstead serve`` runs on 127.0.0.1 with one worker (uvicorn then serves
in the process it starts, so that pid is the worker); a thread samples ``VmRSS`` in
``/proc/<pid>/status`` every 5 ms while the uploads run, and ``VmHWM`` (the kernel's record of
the process's peak resident set) is read at the end, so a peak between two samples counts too.
Bounded: 5 uploads on loopback, at most 120 s each.
"""

from __future__ import annotations

import secrets
import threading
from collections.abc import Iterator
from concurrent.futures import ThreadPoolExecutor
from datetime import datetime, timedelta
from pathlib import Path

import httpx
import pytest

from server.cli import migrate
from server.services.weather_lines import MAX_DATA_LINES
from tests.utils.server import Server, server_env, start_server

URL = "/api/v1/calc/degree-days"
ROWS = 1_000_000
PEAK_LIMIT_KB = 150 * 1024


def _status_kb(pid: int, key: str) -> int:
    for line in Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith(key + ":"):
            return int(line.split()[1])
    raise AssertionError(f"no {key} in /proc/{pid}/status")


@pytest.fixture(scope="module")
def big_csv(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """1,000,000 hourly rows from 1900 on (114 years): ``1900-01-01 00:00,3``."""
    path = tmp_path_factory.mktemp("upload") / "million.csv"
    start = datetime(1900, 1, 1)
    with path.open("w") as out:
        out.write("timestamp,temp_c\n")
        for day in range(ROWS // 24 + 1):
            date_text = (start + timedelta(days=day)).strftime("%Y-%m-%d")
            count = min(24, ROWS - day * 24)
            out.write("".join(f"{date_text} {h:02d}:00,{(day + h) % 10}\n" for h in range(count)))
    assert 19_000_000 < path.stat().st_size < 20 * 1024 * 1024
    return path


@pytest.fixture(scope="module")
def server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Server]:
    url = f"sqlite:///{tmp_path_factory.mktemp('db') / 'upload.db'}"
    migrate(url)
    running = start_server(server_env(url, secrets.token_urlsafe(32)))
    try:
        yield running
    finally:
        running.stop()


class _Sampler:
    """Largest VmRSS seen [kB] while it runs."""

    def __init__(self, pid: int) -> None:
        self.pid, self.peak_kb = pid, 0
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)

    def _run(self) -> None:
        while not self._stop.is_set():
            self.peak_kb = max(self.peak_kb, _status_kb(self.pid, "VmRSS"))
            self._stop.wait(0.005)

    def __enter__(self) -> _Sampler:
        self._thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self._stop.set()
        self._thread.join()


def _upload(base_url: str, path: Path) -> httpx.Response:
    with path.open("rb") as handle:
        return httpx.post(
            base_url + URL,
            files={"file": ("million.csv", handle, "text/csv")},
            data={"units": "si"},
            timeout=120,
        )


def _assert_refused(response: httpx.Response) -> None:
    assert response.status_code == 422, response.text[:300]
    body = response.json()
    assert body["errors"][0]["field"] == "file"
    message = body["errors"][0]["message"]
    # The message names the limit in plain words: a leap year of hourly rows.
    assert "8,784" in message and f"{MAX_DATA_LINES:,}" in message, message


def test_one_million_rows_are_refused_within_150_mb(server: Server, big_csv: Path) -> None:
    pid = server.process.pid
    # Warm up: a small valid upload loads every module the route uses.
    small = "timestamp,temp_c\n" + "".join(f"2021-01-01 {h:02d}:00,5\n" for h in range(24))
    warm = httpx.post(
        server.base_url + URL, files={"file": ("w.csv", small.encode())}, data={"units": "si"}
    )
    assert warm.status_code == 200, warm.text
    before_kb = _status_kb(pid, "VmRSS")

    with _Sampler(pid) as one:
        _assert_refused(_upload(server.base_url, big_csv))
    with _Sampler(pid) as four, ThreadPoolExecutor(4) as pool:
        for response in pool.map(lambda _: _upload(server.base_url, big_csv), range(4)):
            _assert_refused(response)
    high_water_kb = _status_kb(pid, "VmHWM")
    report = (
        f"worker RSS before {before_kb / 1024:.0f} MB; peak with 1 upload "
        f"{one.peak_kb / 1024:.0f} MB, with 4 at once {four.peak_kb / 1024:.0f} MB; "
        f"VmHWM {high_water_kb / 1024:.0f} MB"
    )
    print(report)
    assert max(one.peak_kb, four.peak_kb, high_water_kb) < PEAK_LIMIT_KB, report
