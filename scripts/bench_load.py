"""Loopback load test of Warmstead: the compare page of a large house, POST /api/v1/calc/house,
and a bare FastAPI + Jinja2 page of the same HTML size served the same way, in one run.

Usage: ``.venv/bin/python scripts/bench_load.py [--seconds 5] [--rounds 3] [--connections 32]
[--workers 1 2] [--client auto|wrk|python] [--postgres URL]`` (``make bench`` runs it with the
defaults, on SQLite; about two minutes). The compare page and the bare page are loaded in interleaved rounds and the
median round is reported, so that other work on the machine weighs on both alike.

Everything runs on 127.0.0.1 in a temp directory: a migrated SQLite file (or, with
``--postgres``, a schema of its own on that server, dropped at the end) holding one house of
40 surfaces, 5 upgrades on each and 6 packages (tests/utils/houses.py), a signed-in user
(cookie made as at sign-in), ``warmstead serve`` (uvloop + httptools when installed) and the
bare app under the same uvicorn settings. Load comes from ``wrk`` when installed (C, one
thread, so the client takes little of the CPU the servers need), else from an asyncio + httpx
client. Reported: req/s, p50 and p99 latency per target and worker count, the compare/bare
throughput ratio (target >= 50 %), p99 at 32 connections (target <= 100 ms), cold start
(process start -> first 200 of /healthz and of the compare page), peak RSS of the server
processes (VmHWM), and the compare page's first load with gzip (HTML + CSS + JS, target
<= 80 KB) with any reference to another host.

The parts live in scripts/bench/: the bare page (bare_app), the database and the servers
(servers), the load clients and the first-load bytes (client), the printed report (report);
this file runs them.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from bench.client import Load, first_load, load  # noqa: E402
from bench.report import median_run, report  # noqa: E402
from bench.servers import (  # noqa: E402
    peak_rss_mb,
    postgres_schema,
    prepare,
    start_bare,
    start_warmstead,
)

#: the calculator answers 2 MB per request for this house and takes ~0.1 s of CPU: 32 at
#: once would only measure the queue, so it gets a few connections
API_CONNECTIONS = 4


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--seconds", type=float, default=5.0)
    parser.add_argument("--connections", type=int, default=32)
    parser.add_argument("--workers", type=int, nargs="+", default=[1, 2])
    parser.add_argument("--client", choices=["auto", "wrk", "python"], default="auto")
    parser.add_argument("--rounds", type=int, default=3, help="interleaved rounds per page")
    parser.add_argument("--postgres", metavar="URL", help="serve from PostgreSQL at URL (a schema "
                        "of its own, dropped afterwards) instead of a SQLite file")  # fmt: skip
    args = parser.parse_args()
    client = args.client
    if client == "auto":
        client = "wrk" if shutil.which("wrk") else "python"
    work = Path(tempfile.mkdtemp(prefix="warmstead-bench-"))
    try:
        return run(work, args.seconds, args.connections, args.workers, client, args.rounds,
                   args.postgres)  # fmt: skip
    finally:
        shutil.rmtree(work, ignore_errors=True)
        if args.postgres:
            postgres_schema(args.postgres, drop=True)


def run(
    work: Path, seconds: float, connections: int, worker_counts: list[int], client: str,
    rounds: int, postgres: str | None = None,
) -> int:  # fmt: skip
    import httpx

    database = "PostgreSQL" if postgres else "SQLite"
    print(f"Warmstead load test: {connections} connections, {rounds} rounds of {seconds:.0f} s "
          f"per page, client {client}, {os.cpu_count()} CPUs, {database}, loopback only; load "
          f"average before: {os.getloadavg()[0]:.2f}")  # fmt: skip
    setup = prepare(work, postgres)
    compare_path = f"/houses/{setup.house_id}/compare"
    body = json.dumps(setup.document).encode()
    rows: list[tuple[str, int, Load]] = []
    rounds_seen: dict[tuple[str, int], list[Load]] = {}
    extra: dict[str, Any] = {}
    for workers in worker_counts:
        server = start_warmstead(setup, workers)
        bare = None
        try:
            began = time.perf_counter()
            first = httpx.get(server.base_url + compare_path, headers=setup.headers, timeout=60)
            first.raise_for_status()
            extra[f"cold_{workers}"] = (
                server.started_s, server.started_s + time.perf_counter() - began
            )  # fmt: skip
            size = len(first.content)
            if "html_bytes" not in extra:
                extra["html_bytes"] = size
                extra["first_load"] = first_load(server.base_url, compare_path, setup.headers)
                api = httpx.post(server.base_url + "/api/v1/calc/house", content=body,
                                 headers={"Content-Type": "application/json"}, timeout=60)  # fmt: skip
                api.raise_for_status()
                extra["api_bytes"] = len(api.content)
            bare = start_bare(size, workers)
            assert len(httpx.get(bare.base_url + "/bare").content) == size, "sizes must match"
            common = {"connections": connections, "client": client, "work": work}
            pages = (
                ("compare page", server.base_url + compare_path, setup.headers),
                ("bare page", bare.base_url + "/bare", {}),
            )
            for _label, url, headers in pages:
                load(url, headers, seconds=1, **common)  # type: ignore[arg-type]  # warm-up
            for _ in range(rounds):  # interleaved, so a noisy neighbour hits both alike
                for label, url, headers in pages:
                    result = load(url, headers, seconds=seconds, **common)  # type: ignore[arg-type]
                    rounds_seen.setdefault((label, workers), []).append(result)
            for label, _url, _headers in pages:
                rows.append((label, workers, median_run(rounds_seen[(label, workers)])))
            fresh = load(server.base_url + compare_path, setup.headers, seconds=seconds,
                         fresh_picks=True, **common)  # type: ignore[arg-type]  # fmt: skip
            rows.append(("compare, new selection", workers, fresh))
            extra[f"rss_pages_{workers}"] = peak_rss_mb(server.process.pid)
            extra[f"bare_rss_{workers}"] = peak_rss_mb(bare.process.pid)
            api_url = server.base_url + "/api/v1/calc/house"
            api_common = {**common, "connections": API_CONNECTIONS, "body": body}
            load(api_url, setup.headers, seconds=1, **api_common)  # type: ignore[arg-type]
            api_load = load(api_url, setup.headers, seconds=seconds, **api_common)  # type: ignore[arg-type]
            rows.append((f"POST /api/v1/calc/house (c={API_CONNECTIONS})", workers, api_load))
            extra[f"rss_{workers}"] = peak_rss_mb(server.process.pid)
        finally:
            server.stop()
            if bare is not None:
                bare.stop()
    extra["rounds"] = rounds_seen
    extra["load_after"] = os.getloadavg()[0]
    return report(rows, extra, connections)


if __name__ == "__main__":
    sys.exit(main())
