"""The servers of the load test and what they serve: a migrated database with one big house,
``warmstead serve`` and the bare app under the same uvicorn options, and their peak memory."""

from __future__ import annotations

import os
import re
import secrets
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from bench.bare_app import BARE_SIZE_ENV

ROOT = Path(__file__).resolve().parents[2]


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
        sys.executable, "-m", "uvicorn", "bench.bare_app:bare_app_factory", "--factory",
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
