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
"""

from __future__ import annotations

import argparse
import asyncio
import json
import os
import re
import secrets
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

TARGET_RATIO = 0.50
#: the calculator answers 2 MB per request for this house and takes ~0.1 s of CPU: 32 at
#: once would only measure the queue, so it gets a few connections
API_CONNECTIONS = 4
TARGET_P99_MS = 100.0
TARGET_FIRST_LOAD_KB = 80.0
BARE_SIZE_ENV = "WARMSTEAD_BENCH_BARE_BYTES"


# --- the bare page: FastAPI + Jinja2, the same middleware, the same size -----------------------

#: a table of rows with two values each: about 1,030 substitutions at the compare page's
#: size, as many as the compare page's own template makes (counted: ~1,030 escapes)
BARE_TEMPLATE = """<!doctype html><html lang="en"><head><meta charset="utf-8">
<title>Bare page</title></head><body><main><h1>Bare page</h1><table>
{% for row in rows %}<tr><th scope="row">{{ row.name }}</th><td class="num">{{ row.value }}</td>
<td>a fixed note of a typical label length</td></tr>
{% endfor %}</table><p>{{ pad }}</p></main></body></html>"""


def make_bare_app(size_bytes: int) -> Any:
    """A FastAPI app whose one sync route renders a Jinja2 table of ``size_bytes`` bytes."""
    import jinja2
    from fastapi import FastAPI
    from fastapi.responses import HTMLResponse
    from starlette.middleware.gzip import GZipMiddleware

    env = jinja2.Environment(autoescape=True)
    template = env.from_string(BARE_TEMPLATE)
    rows: list[dict[str, str]] = []
    while len(template.render(rows=rows, pad="").encode()) < size_bytes:
        rows.append({"name": f"Option {len(rows)}", "value": f"{len(rows) * 12.345:,.0f}"})
    rows.pop()
    pad = "p" * max(0, size_bytes - len(template.render(rows=rows, pad="").encode()))
    app = FastAPI()
    app.add_middleware(GZipMiddleware, minimum_size=800)

    @app.get("/bare", response_class=HTMLResponse)
    def bare() -> HTMLResponse:  # sync like the compare route: one threadpool hop
        return HTMLResponse(template.render(rows=rows, pad=pad))

    @app.get("/healthz")
    def healthz() -> dict[str, str]:
        return {"status": "ok"}

    return app


def bare_app_factory() -> Any:
    """uvicorn ``--factory`` entry point (each worker builds its own)."""
    return make_bare_app(int(os.environ[BARE_SIZE_ENV]))


# --- set-up ---------------------------------------------------------------------------------


@dataclass
class Setup:
    directory: Path
    database_url: str
    secret_key: str
    headers: dict[str, str]
    house_id: int
    document: dict[str, Any]


BENCH_SCHEMA = f"warmstead_bench_{os.getpid()}"


def postgres_schema(base_url: str, *, drop: bool = False) -> str:
    """A fresh schema of its own on ``base_url`` (the URL that uses it), or drop it."""
    from tests.utils.postgres import drop_schema, reset_schema, schema_url

    (drop_schema if drop else reset_schema)(base_url, BENCH_SCHEMA)
    return schema_url(base_url, BENCH_SCHEMA)


def prepare(directory: Path, postgres: str | None = None) -> Setup:
    from server.cli import migrate
    from server.db import make_engine, make_session_factory, session_scope
    from server.documents.house import HouseDocument
    from server.services.house_document import import_house
    from tests.utils.auth import signed_in_headers_for_url
    from tests.utils.houses import big_house_document

    url = postgres_schema(postgres) if postgres else f"sqlite:///{directory / 'bench.db'}"
    secret = secrets.token_urlsafe(32)
    migrate(url)
    org_id, headers = signed_in_headers_for_url(url, secret, email="bench@example.com")
    document = big_house_document(surfaces=40, upgrades_per_surface=5, packages=6)
    engine = make_engine(url)
    with session_scope(make_session_factory(engine)) as session:
        house = import_house(
            session=session,
            organization_id=org_id,
            document=HouseDocument.model_validate(document),
        )
        house_id = house.id
    engine.dispose()
    return Setup(directory, url, secret, headers, house_id, document)


# --- processes --------------------------------------------------------------------------------


def _tree(pid: int) -> list[int]:
    """``pid`` and its descendants (uvicorn's workers), from /proc."""
    children: dict[int, list[int]] = {}
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
            children.setdefault(int(fields[1]), []).append(int(stat.parent.name))
        except (OSError, IndexError, ValueError):
            continue
    out, todo = [], [pid]
    while todo:
        current = todo.pop()
        out.append(current)
        todo.extend(children.get(current, []))
    return out


def peak_rss_mb(pid: int) -> tuple[float, float]:
    """(largest single process, sum over the tree) of VmHWM, the peak resident set [MB]."""
    peaks = []
    for member in _tree(pid):
        try:
            status = Path(f"/proc/{member}/status").read_text()
        except OSError:
            continue
        found = re.search(r"^VmHWM:\s+(\d+) kB", status, re.M)
        if found:
            peaks.append(int(found.group(1)) / 1024)
    return (max(peaks) if peaks else 0.0, sum(peaks))


def start_warmstead(setup: Setup, workers: int) -> Any:
    from tests.utils.server import server_env, start_server

    return start_server(server_env(setup.database_url, setup.secret_key), workers=workers)


def start_bare(size_bytes: int, workers: int) -> Any:
    """The bare app under uvicorn with the options ``warmstead serve`` uses."""
    import httpx

    from server.cli import server_options
    from tests.utils.server import Server, free_port

    port = free_port()
    options = server_options()
    command = [
        sys.executable, "-m", "uvicorn", "bench_load:bare_app_factory", "--factory",
        "--app-dir", str(ROOT / "scripts"), "--host", "127.0.0.1", "--port", str(port),
        "--workers", str(workers), "--loop", options["loop"], "--http", options["http"],
        "--log-level", "info", "--no-proxy-headers",
    ]  # fmt: skip
    env = {**os.environ, BARE_SIZE_ENV: str(size_bytes)}
    started = time.perf_counter()
    process = subprocess.Popen(
        command, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
        start_new_session=True,
    )  # fmt: skip
    base = f"http://127.0.0.1:{port}"
    for _ in range(600):
        try:
            if httpx.get(base + "/healthz", timeout=1).status_code == 200:
                return Server(process, base, time.perf_counter() - started)
        except httpx.HTTPError:
            time.sleep(0.05)
    Server(process, base, 0).kill()
    raise RuntimeError("the bare app did not start")


# --- load -------------------------------------------------------------------------------------


@dataclass
class Load:
    requests: int
    errors: int
    seconds: float
    p50_ms: float
    p99_ms: float
    client: str

    @property
    def rps(self) -> float:
        return self.requests / self.seconds if self.seconds else 0.0


def _wrk_duration_ms(text: str) -> float:
    value, unit = re.fullmatch(r"([\d.]+)(us|ms|s|m)", text).groups()  # type: ignore[union-attr]
    return float(value) * {"us": 1e-3, "ms": 1.0, "s": 1e3, "m": 6e4}[unit]


#: the n-th request's query string of a fresh selection: two upgrades on two different
#: surfaces, unique for the first 7,800 requests, so no kept context can answer it
FRESH_PICK_LUA = """counter = 0
request = function()
  counter = counter + 1
  local a = counter % 40
  local x = math.floor(counter / 40) % 5
  local b = (a + 1 + math.floor(counter / 200) % 39) % 40
  return wrk.format("GET", wrk.path .. "?pick=s" .. a .. "-u" .. x .. "&pick=s" .. b .. "-u0")
end"""


def fresh_pick_query(counter: int) -> str:
    """The same query strings as :data:`FRESH_PICK_LUA` (for the Python client)."""
    a, x = counter % 40, (counter // 40) % 5
    b = (a + 1 + (counter // 200) % 39) % 40
    return f"?pick=s{a}-u{x}&pick=s{b}-u0"


def run_wrk(
    url: str, headers: dict[str, str], seconds: float, connections: int, work: Path,
    body: bytes | None = None, fresh_picks: bool = False,
) -> Load:  # fmt: skip
    script = work / "wrk.lua"
    lines = [FRESH_PICK_LUA] if fresh_picks else []
    if body is not None:
        (work / "body.json").write_bytes(body)
        lines += [
            'local f = io.open("' + str(work / "body.json") + '", "rb")',
            'wrk.body = f:read("*all")',
            "f:close()",
            'wrk.method = "POST"',
            'wrk.headers["Content-Type"] = "application/json"',
        ]
    script.write_text("\n".join(lines) + "\n")
    command = ["wrk", "-t1", f"-c{connections}", f"-d{seconds:.0f}s", "--timeout", "60s",
               "--latency", "-s", str(script)]  # fmt: skip
    for name, value in headers.items():
        command += ["-H", f"{name}: {value}"]
    out = subprocess.run(command + [url], capture_output=True, text=True, check=True).stdout
    requests = int(re.search(r"(\d+) requests in", out).group(1))  # type: ignore[union-attr]
    elapsed = re.search(r"requests in ([\d.]+\w+),", out).group(1)  # type: ignore[union-attr]
    errors = sum(int(n) for n in re.findall(r"(?:connect|read|write|timeout) (\d+)", out))
    non_2xx = re.search(r"Non-2xx or 3xx responses: (\d+)", out)
    errors += int(non_2xx.group(1)) if non_2xx else 0
    p50 = re.search(r"^\s+50%\s+(\S+)", out, re.M).group(1)  # type: ignore[union-attr]
    p99 = re.search(r"^\s+99%\s+(\S+)", out, re.M).group(1)  # type: ignore[union-attr]
    return Load(
        requests, errors, _wrk_duration_ms(elapsed) / 1e3, _wrk_duration_ms(p50),
        _wrk_duration_ms(p99), "wrk",
    )  # fmt: skip


async def _python_load(
    url: str, headers: dict[str, str], seconds: float, connections: int, body: bytes | None,
    fresh_picks: bool = False,
) -> Load:  # fmt: skip
    import httpx

    latencies: list[float] = []
    errors = 0
    limits = httpx.Limits(max_connections=connections, max_keepalive_connections=connections)
    async with httpx.AsyncClient(headers=headers, limits=limits, timeout=30) as client:
        send_headers = {"Content-Type": "application/json"} if body is not None else {}
        deadline = time.perf_counter() + seconds

        counter = 0

        async def one_connection() -> None:
            nonlocal errors, counter
            while time.perf_counter() < deadline:
                counter += 1
                target = url + fresh_pick_query(counter) if fresh_picks else url
                start = time.perf_counter()
                try:
                    if body is None:
                        response = await client.get(target)
                    else:
                        response = await client.post(url, content=body, headers=send_headers)
                    ok = response.status_code < 400
                except httpx.HTTPError:
                    ok = False
                latencies.append((time.perf_counter() - start) * 1e3)
                errors += 0 if ok else 1

        began = time.perf_counter()
        await asyncio.gather(*(one_connection() for _ in range(connections)))
        elapsed = time.perf_counter() - began
    latencies.sort()
    p50 = statistics.median(latencies) if latencies else 0.0
    p99 = latencies[min(len(latencies) - 1, int(0.99 * len(latencies)))] if latencies else 0.0
    return Load(len(latencies), errors, elapsed, p50, p99, "python")


def load(
    url: str, headers: dict[str, str], *, seconds: float, connections: int, client: str,
    work: Path, body: bytes | None = None, fresh_picks: bool = False,
) -> Load:  # fmt: skip
    assert url.startswith("http://127.0.0.1:"), "loopback only"
    if client == "wrk":
        return run_wrk(url, headers, seconds, connections, work, body, fresh_picks)
    return asyncio.run(_python_load(url, headers, seconds, connections, body, fresh_picks))


# --- first load ------------------------------------------------------------------------------

_REF = re.compile(r"""\b(?:src|href)\s*=\s*["']([^"']+)["']""", re.I)
_CSS_URL = re.compile(r"""url\(\s*["']?([^"')]+)""", re.I)


def first_load(base: str, path: str, headers: dict[str, str]) -> dict[str, Any]:
    """Bytes on the wire (gzip) of the page and the CSS/JS it loads; references to elsewhere."""
    import httpx

    sent = {**headers, "Accept-Encoding": "gzip"}
    total, parts, external = 0, [], []
    with httpx.Client(base_url=base, headers=sent, timeout=30) as client:
        page = client.get(path)
        page.raise_for_status()
        total += page.num_bytes_downloaded
        parts.append((path, page.num_bytes_downloaded, len(page.content)))
        html = page.text
        refs = _REF.findall(html)
        external += [r for r in refs if re.match(r"^(https?:)?//", r)]
        assets = re.findall(r"""<(?:script[^>]+src|link[^>]+href)\s*=\s*["'](/[^"']+)["']""", html)
        for asset in dict.fromkeys(assets):
            if asset.startswith("/static/"):
                response = client.get(asset)
                total += response.num_bytes_downloaded
                parts.append((asset, response.num_bytes_downloaded, len(response.content)))
                if asset.endswith(".css"):
                    external += [u for u in _CSS_URL.findall(response.text) if "//" in u]
    return {"total_kb": total / 1024, "parts": parts, "external": external}


# --- the run ---------------------------------------------------------------------------------


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


def _median_run(runs: list[Load]) -> Load:
    """The run with the median throughput (its own p50/p99 go with it)."""
    return sorted(runs, key=lambda r: r.rps)[len(runs) // 2]


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
                rows.append((label, workers, _median_run(rounds_seen[(label, workers)])))
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


if __name__ == "__main__":
    sys.exit(main())
