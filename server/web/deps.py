"""Dependencies for the HTML and JSON routes: session, signed-in user, firm, CSRF, templates.

Who may call what (decided here, proved by tests/security/test_route_matrix.py):

- Public, no sign-in: the stateless calculators under ``/api/v1/calc/`` (they store and read
  nothing of any firm), the homeowner's shared view ``/s/...`` (its token is the key),
  ``/login``, ``/healthz``, ``/static``, ``/openapi.json`` and ``/docs``.
- Everything else needs a signed-in, active user: pages redirect (303) to
  ``/login?next=<path>``, ``/api/`` routes answer 401 ``{"detail": "sign in first"}``.
- Every POST/PUT/PATCH/DELETE except ``/api/v1/calc/`` must carry the CSRF token (form field
  ``csrf_token`` or header ``X-CSRF-Token``), else 403.

Both rules are app-wide dependencies (:func:`signed_in_gate`, :func:`csrf_protect`) so a new
route cannot forget them; ``CurrentUser``/``OrgDep`` on a route say the same thing again.
"""

from __future__ import annotations

from typing import Annotated, Any

from fastapi import Depends, Request
from fastapi.responses import HTMLResponse
from fastapi.templating import Jinja2Templates
from jinja2 import pass_context
from markupsafe import Markup
from starlette.datastructures import FormData

from server.config import ROOT
from server.deps import (  # shared with the API; re-exported here for the pages
    CurrentUser,
    OrgDep,
    SessionDep,
    SignInRequired,
    Viewer,
    get_current_user,
    get_organization,
    get_session,
    require_user,
    run_unit,
)
from server.errors import NotFound
from server.models import User
from server.security import CSRF_FIELD, CSRF_HEADER, tokens_match
from server.web import formatting
from server.web.idempotency import idempotency_field

__all__ = [  # what the pages import from here (the first ten are server.deps' own)
    "CurrentUser", "OrgDep", "SessionDep", "SignInRequired", "Viewer", "get_current_user",
    "get_organization", "get_session", "require_user", "run_unit",
    "AdminUser", "CsrfRejected", "PostedFields", "PostedForm", "csrf_field", "csrf_protect",
    "csrf_token", "current_user", "is_public", "make_templates", "posted_fields", "posted_form",
    "render", "require_admin", "signed_in_gate",
]  # fmt: skip
SAFE_METHODS = frozenset({"GET", "HEAD", "OPTIONS", "TRACE"})
PUBLIC_PATHS = frozenset({"/login", "/healthz", "/openapi.json", "/docs", "/docs/oauth2-redirect",
                          "/redoc", "/sw.js", "/offline"})  # fmt: skip
PUBLIC_PREFIXES = ("/s/", "/static/", "/api/v1/calc/")
CSRF_EXEMPT_PREFIXES = ("/api/v1/calc/",)  # stateless, public, called by other tools


class CsrfRejected(Exception):
    """A state-changing request without the right CSRF token (403)."""


def is_public(path: str) -> bool:
    """Paths anyone may call without signing in."""
    return path in PUBLIC_PATHS or path == "/s" or path.startswith(PUBLIC_PREFIXES)


async def require_admin(user: CurrentUser) -> User:
    """A signed-in admin; staff get 404 (the page does not exist for them)."""
    if user.role != "admin":
        raise NotFound
    return user


AdminUser = Annotated[User, Depends(require_admin)]


async def posted_form(request: Request) -> FormData:
    """The posted form, read on the event loop before the route runs.

    So that routes taking a form can be plain ``def`` routes, which FastAPI runs in the
    threadpool: an ``async def`` route doing its database work would hold up every other
    request of the process while a statement waited (a SQLite write may wait seconds for the
    file's lock). tests/conftest.py fails any test whose statements run on the event loop.
    """
    return await request.form()


PostedForm = Annotated[FormData, Depends(posted_form)]


async def posted_fields(form: PostedForm) -> dict[str, str]:
    """The posted form's fields as text, one value per name (the last, as a form read gives):
    what the page routes parse. Routes that need repeated names or files take PostedForm."""
    return {name: str(value) for name, value in form.items()}


PostedFields = Annotated[dict[str, str], Depends(posted_fields)]


async def signed_in_gate(request: Request, session: SessionDep) -> None:
    """App-wide: every route outside :func:`is_public` needs a signed-in user."""
    if is_public(request.url.path):
        return
    if await get_current_user(request, session) is None:
        raise SignInRequired


async def csrf_protect(request: Request) -> None:
    """App-wide: state-changing requests must echo the CSRF token (header or form field)."""
    if request.method in SAFE_METHODS or request.url.path.startswith(CSRF_EXEMPT_PREFIXES):
        return
    expected = getattr(request.state, "csrf_token", None)
    given: object = request.headers.get(CSRF_HEADER)
    if not given:
        content_type = request.headers.get("content-type", "")
        if content_type.startswith(("application/x-www-form-urlencoded", "multipart/form-data")):
            given = (await request.form()).get(CSRF_FIELD)
    if not tokens_match(expected, given):
        raise CsrfRejected


def _request_state(context: dict[str, Any], name: str) -> Any:
    request = context.get("request")
    state = getattr(request, "state", None) if request is not None else None
    return getattr(state, name, None) if state is not None else None


@pass_context
def csrf_token(context: dict[str, Any]) -> str:
    """This visitor's CSRF token (for ``hx-headers`` on ``<body>``)."""
    return str(_request_state(context, "csrf_token") or "")


@pass_context
def csrf_field(context: dict[str, Any]) -> Markup:
    """The hidden CSRF input for a POST form (token from ``request.state.csrf_token``)."""
    token = _request_state(context, "csrf_token")
    if not token:
        return Markup("")
    return Markup('<input type="hidden" name="csrf_token" value="{}">').format(token)


@pass_context
def current_user(context: dict[str, Any]) -> Viewer | None:
    """The signed-in user when this request looked them up (None on public pages)."""
    return _request_state(context, "viewer")  # type: ignore[no-any-return]


def make_templates(*, auto_reload: bool = True) -> Jinja2Templates:
    """The templates; ``auto_reload=False`` skips the file-date check on every render (kept
    for development, where an edited template should show on the next request)."""
    templates = Jinja2Templates(directory=str(ROOT / "templates"))
    templates.env.auto_reload = auto_reload
    templates.env.globals["csrf_field"] = csrf_field
    templates.env.globals["csrf_token"] = csrf_token
    templates.env.globals["idempotency_field"] = idempotency_field
    templates.env.globals["current_user"] = current_user
    templates.env.filters.update(formatting.FILTERS)
    templates.env.globals.update(formatting.GLOBALS)
    return templates


def render(
    request: Request, name: str, context: dict[str, Any], status_code: int = 200
) -> HTMLResponse:
    """Render a template; ``is_htmx`` tells a template whether only a fragment is wanted."""
    templates: Jinja2Templates = request.app.state.templates
    context = {"is_htmx": request.headers.get("HX-Request") == "true", **context}
    return templates.TemplateResponse(request, name, context, status_code=status_code)
