"""Application factory: ``create_app(settings)`` builds the FastAPI app."""

from __future__ import annotations

from urllib.parse import urlencode

from fastapi import Depends, FastAPI, Request
from fastapi.responses import HTMLResponse, JSONResponse, RedirectResponse, Response
from fastapi.staticfiles import StaticFiles
from sqlalchemy.exc import DataError
from starlette.datastructures import MutableHeaders
from starlette.middleware.gzip import GZipMiddleware
from starlette.requests import cookie_parser
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from server import security
from server.access_log import AccessLog
from server.admission import AdmissionGate
from server.api import api_router
from server.api.errors import install_error_handlers
from server.config import ROOT, Settings, get_settings
from server.db import make_engine, make_session_factory
from server.security import (
    ANON_CSRF_COOKIE,
    ANON_MAX_AGE_SECONDS,
    SESSION_COOKIE,
    SESSION_REFRESH_SECONDS,
    cookie_header,
    csrf_for_anon,
    csrf_for_session,
    expired_cookie_header,
    is_shared_view,
    new_anon_cookie,
    read_anon_cookie,
    read_session,
    refresh_session,
    safe_next,
    security_headers,
    session_cookie_header,
)
from server.services.houses import NotFound
from server.web import web_router
from server.web.conflicts import install_conflict_handlers
from server.web.deps import (
    CsrfRejected,
    SignInRequired,
    csrf_protect,
    make_templates,
    signed_in_gate,
)

FORBIDDEN_PAGE = """{% extends "base.html" %}{% block title %}Not sent{% endblock %}
{% block content %}<h1>Not sent</h1>
<p>This form was not accepted because it did not carry this page's security token (it may be
old, or it did not come from Warmstead). Nothing was changed. Go back, reload the page and try
again.</p>{% endblock %}"""


class SecurityMiddleware:
    """Reads the session (or anonymous CSRF) cookie into ``request.state``; on every response
    sets the security headers, ``Cache-Control: no-store`` and any cookie to (re)issue.

    ``request.state.session_data`` is the verified cookie (who, which session version); the
    database check (user active, version current, session not signed out) happens in
    :func:`server.web.deps.get_current_user`. An exception that escapes the app is answered
    here (500, with the same headers) before it goes on to the server's log.
    """

    def __init__(self, app: ASGIApp, settings: Settings) -> None:
        self.app = app
        self.settings = settings

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        path: str = scope["path"]
        secret = self.settings.secret_key
        secure = scope.get("scheme") == "https" or self.settings.cookie_secure
        raw = next((v for k, v in scope.get("headers", []) if k == b"cookie"), b"")
        cookies = cookie_parser(raw.decode("latin-1"))
        state = scope.setdefault("state", {})
        static = path.startswith("/static/")
        new_cookies: list[tuple[str, str]] = []
        data = read_session(secret, cookies.get(SESSION_COOKIE))
        if data is not None:
            state["session_data"] = data
            state["csrf_token"] = csrf_for_session(secret, data)
            if security.clock() - data.issued_at >= SESSION_REFRESH_SECONDS and not static:
                value = refresh_session(secret, data)
                header = session_cookie_header(value, signed_in_at=data.signed_in_at, secure=secure)
                new_cookies.append((SESSION_COOKIE, header))
        else:
            if cookies.get(SESSION_COOKIE):  # tampered, expired or from an old key: drop it
                new_cookies.append(
                    (SESSION_COOKIE, expired_cookie_header(SESSION_COOKIE, secure=secure))
                )
            nonce = read_anon_cookie(secret, cookies.get(ANON_CSRF_COOKIE))
            if nonce is None and not static:
                value, nonce = new_anon_cookie(secret)
                header = cookie_header(
                    ANON_CSRF_COOKIE, value, max_age=ANON_MAX_AGE_SECONDS, secure=secure
                )
                new_cookies.append((ANON_CSRF_COOKIE, header))
            if nonce is not None:
                state["csrf_token"] = csrf_for_anon(secret, nonce)
        force_no_store = data is not None or is_shared_view(path)
        started = False

        async def send_with_headers(message: Message) -> None:
            nonlocal started
            if message["type"] == "http.response.start":
                started = True
                headers = MutableHeaders(scope=message)
                for name, value in security_headers(path):
                    headers[name] = value
                # a signed-in response is never stored, except one its route marked "private"
                # (a photo's image: the browser alone keeps it; sign-out clears that cache)
                private = headers.get("cache-control", "").startswith("private")
                unset = "cache-control" not in headers
                if not static and ((force_no_store and not private) or unset):
                    headers["Cache-Control"] = "no-store"
                already = {v.split("=", 1)[0].strip() for v in headers.getlist("set-cookie")}
                for name, header in new_cookies:
                    if name not in already:
                        headers.append("set-cookie", header)
            await send(message)

        try:
            await self.app(scope, receive, send_with_headers)
        except Exception:
            # Starlette's own 500 is made by its outermost middleware, outside this one, so it
            # would go out without these headers: answer here, then let the error go on to be
            # logged (that middleware sees the answer sent and sends nothing more).
            if not started:
                await _internal_error(path, send_with_headers)
            raise


async def _internal_error(path: str, send: Send) -> None:
    """The 500 of an unhandled exception, saying nothing of it: JSON under /api/, else text."""
    if path.startswith("/api/"):
        body = b'{"detail": "internal server error", "errors": []}'
        kind = b"application/json"
    else:
        body, kind = b"Internal Server Error", b"text/plain; charset=utf-8"
    headers = [(b"content-type", kind), (b"content-length", str(len(body)).encode())]
    await send({"type": "http.response.start", "status": 500, "headers": headers})
    await send({"type": "http.response.body", "body": body})


def _install_security_handlers(app: FastAPI) -> None:
    forbidden = app.state.templates.env.from_string(FORBIDDEN_PAGE)

    @app.exception_handler(SignInRequired)
    async def _sign_in(request: Request, _exc: SignInRequired) -> Response:
        if request.url.path.startswith("/api/"):
            return JSONResponse({"detail": "sign in first", "errors": []}, status_code=401)
        location = "/login"
        if request.method in ("GET", "HEAD"):
            target = request.url.path + (f"?{request.url.query}" if request.url.query else "")
            location += "?" + urlencode({"next": safe_next(target)})
        if request.headers.get("HX-Request") == "true":
            return Response(status_code=401, headers={"HX-Redirect": location})
        return RedirectResponse(location, status_code=303)

    @app.exception_handler(CsrfRejected)
    async def _csrf(request: Request, _exc: CsrfRejected) -> Response:
        if request.url.path.startswith("/api/"):
            body = {
                "detail": "missing or wrong CSRF token (send the X-CSRF-Token header)",
                "errors": [],
            }
            return JSONResponse(body, status_code=403)
        html = forbidden.render(request=request)
        return HTMLResponse(html, status_code=403)


def create_app(settings: Settings | None = None) -> FastAPI:
    """Build the app for ``settings``. Creates the engine lazily-connecting; never migrates."""
    settings = settings or get_settings()
    # No /docs or /redoc pages: they load script from a CDN and run inline script, which the
    # CSP forbids; the schema itself is served at /openapi.json.
    app = FastAPI(
        docs_url=None,
        redoc_url=None,
        title="Warmstead",
        version="0.1.0",
        summary="Compare insulation upgrades on a house.",
        dependencies=[Depends(signed_in_gate), Depends(csrf_protect)],
    )
    app.state.settings = settings
    app.state.engine = make_engine(
        settings.database_url, echo=settings.sql_echo, pool_size=settings.db_pool_size
    )
    app.state.session_factory = make_session_factory(app.state.engine)
    app.state.templates = make_templates(auto_reload=settings.environment == "development")
    install_error_handlers(app)
    _install_security_handlers(app)
    install_conflict_handlers(app)
    # outermost first: security headers on every answer, gzip after the gate has let go
    app.add_middleware(
        AdmissionGate,
        limit=settings.max_active_requests,
        max_body_bytes=settings.max_body_bytes,
    )
    app.add_middleware(GZipMiddleware, minimum_size=800)
    app.add_middleware(SecurityMiddleware, settings=settings)
    app.add_middleware(AccessLog)
    app.mount("/static", StaticFiles(directory=str(ROOT / "static")), name="static")
    app.include_router(api_router)
    app.include_router(web_router)

    @app.exception_handler(NotFound)
    async def _not_found(request: Request, _exc: NotFound) -> Response:
        if request.url.path.startswith("/api/"):
            return JSONResponse({"detail": "not found", "errors": []}, status_code=404)
        html = app.state.templates.get_template("pages/not_found.html").render(request=request)
        return HTMLResponse(html, status_code=404)

    # An id beyond the database's integer range cannot name a row: answer 404, never 500
    # (SQLite raises OverflowError binding it, PostgreSQL a DataError "integer out of range").
    @app.exception_handler(OverflowError)
    async def _overflow(request: Request, exc: OverflowError) -> Response:
        return await _not_found(request, NotFound())

    @app.exception_handler(DataError)
    async def _data_error(request: Request, exc: DataError) -> Response:
        return await _not_found(request, NotFound())

    @app.get("/healthz", include_in_schema=False)
    def healthz() -> dict[str, str]:
        return {"status": "ok"}

    return app
