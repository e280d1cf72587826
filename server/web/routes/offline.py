"""Working offline: the service worker script, its fallback page and the outbox's check-in.

- ``GET /sw.js``: static/sw.js served from the root so its scope can be the whole site
  (``Service-Worker-Allowed: /``). Public: the browser re-checks it on its own, signed in or
  not. The security headers and ``Cache-Control: no-store`` come from the app's middleware
  like every other answer, so a new worker is picked up at the next page load.
- ``GET /offline``: the page the worker shows for a page it has not kept. Public and the same
  for everyone (it names no user and carries no token), so it can be kept in the app shell.
- ``GET /offline/state``: who is signed in here (the key the worker files pages under) and
  this session's CSRF token, read by the outbox before it sends what waits. Signed in only:
  after a sign-out the gate sends the outbox to /login, which it takes as "sign in first".
"""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import FileResponse, HTMLResponse, JSONResponse

from server.config import ROOT
from server.web.deps import CurrentUser

router = APIRouter()
SERVICE_WORKER = ROOT / "static" / "sw.js"


def user_key(user_id: int) -> str:
    """The name the worker files one user's pages and outbox under (as base.html writes it)."""
    return f"u{int(user_id)}"


@router.get("/sw.js", name="service_worker")
async def service_worker() -> FileResponse:
    return FileResponse(
        SERVICE_WORKER,
        media_type="text/javascript",
        headers={"Service-Worker-Allowed": "/"},
    )


@router.get("/offline", name="offline")
async def offline_page(request: Request) -> HTMLResponse:
    templates = request.app.state.templates
    html = templates.get_template("pages/offline.html").render()
    return HTMLResponse(html)


@router.get("/offline/state", name="offline_state")
async def offline_state(request: Request, user: CurrentUser) -> JSONResponse:
    token = str(getattr(request.state, "csrf_token", "") or "")
    return JSONResponse({"user": user_key(user.id), "csrf_token": token})
