"""The last word on saves that lost a race: 409 "someone else saved first", never a 500.

Saves of a house go through :func:`server.services.houses.touch`, which writes at once and
turns a lost race into :class:`~server.errors.Conflict`; each page answers that through
:func:`server.web.saving.save_or_rerender`: :func:`stale_form`'s message beside the form
(what was typed kept) and 409. This handler is for the rest: a database refusal that means
another request got there first (:func:`server.db.lost_race`: a unique name taken a moment
before, SQLite's "database is locked", a PostgreSQL serialization failure or deadlock, a
version miss outside ``touch``), and a row that another request deleted while this one was
showing it (``ObjectDeletedError`` when the page reloads it). The request's transaction has
been rolled back by then (``get_session``), so nothing of it was stored; the answer says so
and touches no database.
"""

from __future__ import annotations

from fastapi import FastAPI, Request
from fastapi.responses import HTMLResponse, JSONResponse, Response
from sqlalchemy.exc import IntegrityError, OperationalError
from sqlalchemy.orm.exc import ObjectDeletedError, StaleDataError

from server.db import lost_race

MESSAGE = (
    "Someone else saved at the same moment, so nothing of yours was saved. Go back, reload "
    "the page to see what is saved now, and try again."
)
#: what a page says beside a form loaded before someone else's save (the route answers 409)
KEPT = "What you typed is kept here: reload to see their change, then enter it again."


def stale_form(done: str = "nothing was saved", *, then: str = KEPT) -> str:
    """The one message for a form that met :class:`~server.errors.Conflict`: who, what was
    not done (``done``), and what to do next (``then``)."""
    return f"Someone else saved this house after you opened it, so {done}. {then}"


PAGE = """{% extends "base.html" %}{% block title %}Not saved{% endblock %}
{% block content %}<h1>Not saved</h1>
<p role="alert">{{ message }}</p>{% endblock %}"""


def install_conflict_handlers(app: FastAPI) -> None:
    """409 for the database errors of a lost race; every other one goes on to be a 500."""
    page = app.state.templates.env.from_string(PAGE)

    async def lost(request: Request, exc: Exception) -> Response:
        if not (isinstance(exc, ObjectDeletedError) or lost_race(exc)):
            raise exc
        if request.url.path.startswith("/api/"):
            return JSONResponse({"detail": MESSAGE, "errors": []}, status_code=409)
        return HTMLResponse(page.render(request=request, message=MESSAGE), status_code=409)

    for kind in (StaleDataError, ObjectDeletedError, IntegrityError, OperationalError):
        app.add_exception_handler(kind, lost)
