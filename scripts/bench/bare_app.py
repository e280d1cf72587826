"""The bare page: FastAPI + Jinja2, the same middleware, the same size as the compare page.

Served by uvicorn as ``bench.bare_app:bare_app_factory`` (``--app-dir scripts``), so this
module imports nothing of Warmstead.
"""

from __future__ import annotations

import os
from typing import Any

BARE_SIZE_ENV = "WARMSTEAD_BENCH_BARE_BYTES"

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
