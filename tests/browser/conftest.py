"""A real server (uvicorn in a subprocess, its own SQLite file) and Debian's chromium."""

from __future__ import annotations

import os
import shutil
import socket
import subprocess
import sys
import time
from collections.abc import Iterator
from pathlib import Path

import httpx
import pytest

CHROMIUM = "/usr/bin/chromium"
ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--no-first-run",
    "--disable-sync",
]
ARTIFACTS = Path(__file__).resolve().parents[2] / "test-artifacts"


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@pytest.fixture(scope="session")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    db = tmp_path_factory.mktemp("live") / "live.db"
    env = {
        **os.environ,
        "WARMSTEAD_DATABASE_URL": f"sqlite:///{db}",
        "WARMSTEAD_ENVIRONMENT": "test",
    }
    exe = Path(sys.executable).parent / "warmstead"
    subprocess.run([str(exe), "migrate"], env=env, check=True, capture_output=True)
    subprocess.run([str(exe), "demo"], env=env, check=True, capture_output=True)
    port = _free_port()
    proc = subprocess.Popen(
        [str(exe), "serve", "--host", "127.0.0.1", "--port", str(port)],
        env=env,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + 20
    while time.monotonic() < deadline:
        try:
            if httpx.get(base + "/healthz", timeout=0.5).status_code == 200:
                break
        except httpx.HTTPError:
            time.sleep(0.1)
    else:
        proc.kill()
        pytest.fail("the server did not start within 20 s")
    yield base
    proc.terminate()
    proc.wait(timeout=10)


@pytest.fixture(scope="session")
def browser():  # type: ignore[no-untyped-def]
    if not Path(CHROMIUM).exists() and not shutil.which("chromium"):
        pytest.skip(
            "Debian's chromium is not installed (make browser installs it); browser tests skipped"
        )
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=ARGS, headless=True)
        yield b
        b.close()


@pytest.fixture
def shot_dir() -> Path:
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS
