"""Load on one URL from ``wrk`` (when installed) or an asyncio + httpx client, and the bytes of
a page's first load (gzip) with its CSS and JS."""

from __future__ import annotations

import asyncio
import re
import statistics
import subprocess
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any


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
