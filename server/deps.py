"""Dependencies the JSON and HTML routes share: the request's database session, the signed-in
user and their firm.

Both ``server.api`` and ``server.web`` import this module (never each other); the pages' own
dependencies (CSRF, posted forms, templates) stay in :mod:`server.web.deps`, which re-exports
these. The app-wide sign-in rule and who may call what are described there.
"""

from __future__ import annotations

from collections.abc import AsyncIterator, Callable
from dataclasses import dataclass
from typing import Annotated, TypeVar

import anyio
from fastapi import Depends, Request
from sqlalchemy.orm import Session
from starlette.concurrency import run_in_threadpool

from server.models import Organization, User
from server.services import accounts

_UNSET = object()
T = TypeVar("T")


@dataclass(frozen=True, slots=True)
class Viewer:
    """The signed-in user as templates see it: plain values that outlive the DB session (error
    pages render after the session has rolled back)."""

    id: int
    email: str
    name: str
    role: str

    @classmethod
    def of(cls, user: User) -> Viewer:
        return cls(id=user.id, email=user.email, name=user.name, role=user.role)


class SignInRequired(Exception):
    """No valid session for a route that needs one (303 to /login, or 401 for the API)."""


async def get_session(request: Request) -> AsyncIterator[Session]:
    """One session per request; committed when the route returns without error.

    Async on purpose: making a session does no I/O (it connects on its first query, inside a
    route's threadpool hop), so only the ending, which may talk to the database, takes a hop,
    and none when the request never touched the database.
    """
    session: Session = request.app.state.session_factory()
    try:
        yield session
    except BaseException:
        await _finish(session, commit=False)
        raise
    await _finish(session, commit=True)


async def _finish(session: Session, *, commit: bool) -> None:
    if not session.in_transaction() and not (session.new or session.dirty or session.deleted):
        session.close()  # never connected, nothing pending: no I/O
        return
    with anyio.CancelScope(shield=True):  # a client gone away must not leak a connection
        await run_in_threadpool(_end, session, commit)


def _end(session: Session, commit: bool) -> None:
    try:
        if commit:
            session.commit()
        else:
            session.rollback()
    except Exception:
        session.rollback()
        raise
    finally:
        session.close()


async def run_unit(session: Session, work: Callable[[], T]) -> T:
    """``work()`` in the threadpool, then the session's transaction ended in that same hop:
    committed when it returns, rolled back when it raises.

    For async routes whose database work is one unit: one hop in all, where a sync route takes
    two (its body, then the session dependency's commit). What the route does afterwards on the
    event loop must not touch the database (loaded columns only).
    """

    def unit() -> T:
        try:
            value = work()
            session.commit()
        except BaseException:
            session.rollback()
            raise
        return value

    return await run_in_threadpool(unit)


#: scope="function": the commit runs when the route returns, before the response is sent, so
#: a 201/303 is never sent for a save that is not committed (tests/durability/test_crash.py)
SessionDep = Annotated[Session, Depends(get_session, scope="function")]


async def get_current_user(request: Request, session: SessionDep) -> User | None:
    """The signed-in user, or None (no cookie, bad signature, expired, revoked or inactive).

    Looked up once per request (the app-wide gate asks first; routes then get the same row),
    with one threadpool hop, and none without a valid session cookie."""
    cached: User | None | object = getattr(request.state, "user", _UNSET)
    if cached is not _UNSET:
        return cached if isinstance(cached, User) else None
    data = getattr(request.state, "session_data", None)
    found = None
    if data is not None:
        found = await run_in_threadpool(
            accounts.user_for_session,
            session=session,
            user_id=data.user_id,
            session_version=data.session_version,
            nonce=data.nonce,
        )
    user = found[0] if found else None
    request.state.organization = found[1] if found else None
    request.state.user = user
    request.state.viewer = Viewer.of(user) if user is not None else None
    return user


async def require_user(user: Annotated[User | None, Depends(get_current_user)]) -> User:
    """The signed-in user; anyone else is sent to sign in (no I/O: runs on the event loop)."""
    if user is None:
        raise SignInRequired
    return user


CurrentUser = Annotated[User, Depends(require_user)]


async def get_organization(
    request: Request, session: SessionDep, user: CurrentUser
) -> Organization:
    """The signed-in user's firm: every firm-owned query is filtered on its id.

    Async because it normally reads only what :func:`get_current_user` already loaded (one
    threadpool hop fewer per request); the query below is a fallback run off the event loop.
    """
    org = getattr(request.state, "organization", None)
    if isinstance(org, Organization) and org.id == user.organization_id:
        return org
    return await run_in_threadpool(accounts.organization_of, session=session, user=user)


OrgDep = Annotated[Organization, Depends(get_organization)]
