"""A ``warmstead serve`` subprocess on 127.0.0.1 for fault and load tests (and scripts)."""

from __future__ import annotations

import os
import signal
import socket
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

import httpx

WARMSTEAD = Path(sys.executable).parent / "warmstead"


def free_port() -> int:
    """A TCP port on 127.0.0.1 that nothing listens on right now."""
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


def server_env(database_url: str, secret_key: str, **extra: str) -> dict[str, str]:
    return {
        **os.environ,
        "WARMSTEAD_DATABASE_URL": database_url,
        "WARMSTEAD_SECRET_KEY": secret_key,
        "WARMSTEAD_ENVIRONMENT": "test",
        **extra,
    }


def run_cli(*args: str, env: dict[str, str]) -> str:
    """Run ``warmstead <args>``; returns its output (raises on a non-zero exit)."""
    done = subprocess.run([str(WARMSTEAD), *args], env=env, capture_output=True, text=True)
    if done.returncode != 0:
        raise RuntimeError(f"warmstead {' '.join(args)} failed: {done.stderr or done.stdout}")
    return done.stdout


@dataclass
class Server:
    """One running ``warmstead serve``; ``started_s`` is process start -> first 200."""

    process: subprocess.Popen[bytes]
    base_url: str
    started_s: float

    def kill(self) -> None:
        """SIGKILL the server and its workers (its own process group only)."""
        if self.process.poll() is None:
            os.killpg(self.process.pid, signal.SIGKILL)
        self.process.wait(timeout=10)

    def stop(self) -> None:
        """SIGTERM (graceful), then SIGKILL after 10 s."""
        if self.process.poll() is None:
            os.killpg(self.process.pid, signal.SIGTERM)
            try:
                self.process.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.kill()


def start_server(
    env: dict[str, str], *, port: int | None = None, workers: int = 1, ready_path: str = "/healthz",
    timeout_s: float = 30.0,
) -> Server:  # fmt: skip
    """Start ``warmstead serve`` and wait until ``ready_path`` answers 200."""
    port = port or free_port()
    started = time.perf_counter()
    process = subprocess.Popen(
        [str(WARMSTEAD), "serve", "--host", "127.0.0.1", "--port", str(port),
         "--workers", str(workers)],
        env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True,
    )  # fmt: skip
    base = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + timeout_s
    while time.monotonic() < deadline:
        if process.poll() is not None:
            raise RuntimeError(f"warmstead serve exited with status {process.returncode}")
        try:
            if httpx.get(base + ready_path, timeout=1.0).status_code == 200:
                return Server(process, base, time.perf_counter() - started)
        except httpx.HTTPError:
            pass
        time.sleep(0.02)
    Server(process, base, 0.0).kill()
    raise RuntimeError(f"warmstead serve did not answer within {timeout_s:.0f} s")
