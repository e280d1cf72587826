"""Dependencies for the HTML routes: session, current firm, templates."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Annotated, Any

from fastapi import Depends, Request
from fastapi.templating import Jinja2Templates
from jinja2 import pass_context
from markupsafe import Markup
from sqlalchemy.orm import Session

from server.config import ROOT
from server.models import Organization
from server.services.houses import default_organization
from server.web import formatting


def get_session(request: Request) -> Iterator[Session]:
    """One session per request; committed when the route returns without error."""
    session: Session = request.app.state.session_factory()
    try:
        yield session
        session.commit()
    except Exception:
        session.rollback()
        raise
    finally:
        session.close()


SessionDep = Annotated[Session, Depends(get_session)]


def get_organization(session: SessionDep) -> Organization:
    """The signed-in user's firm (before accounts: the default firm)."""
    return default_organization(session=session)


OrgDep = Annotated[Organization, Depends(get_organization)]


@pass_context
def csrf_field(context: dict[str, Any]) -> Markup:
    """The hidden CSRF input for a POST form (token from ``request.state.csrf_token``)."""
    request = context.get("request")
    token = getattr(getattr(request, "state", None), "csrf_token", "") if request else ""
    if not token:
        return Markup("")
    return Markup('<input type="hidden" name="csrf_token" value="{}">').format(token)


def make_templates() -> Jinja2Templates:
    templates = Jinja2Templates(directory=str(ROOT / "templates"))
    templates.env.globals["csrf_field"] = csrf_field
    templates.env.filters.update(formatting.FILTERS)
    templates.env.globals.update(formatting.GLOBALS)
    return templates


def render(request: Request, name: str, context: dict[str, Any], status_code: int = 200):  # type: ignore[no-untyped-def]
    """Render a template; ``is_htmx`` tells a template whether only a fragment is wanted."""
    templates: Jinja2Templates = request.app.state.templates
    context = {"is_htmx": request.headers.get("HX-Request") == "true", **context}
    return templates.TemplateResponse(request, name, context, status_code=status_code)
