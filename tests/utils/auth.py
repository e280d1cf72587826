"""Signed-in requests without the login form: a user in the database and a signed cookie.

For tests and scripts that drive the app (in-process or a server subprocess) and need to be
someone: the cookie is the one :func:`server.security.issue_session` makes at sign-in, so the
app's own checks (signature, user active, session version, CSRF) all run as usual.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session, sessionmaker

from server.db import make_engine, make_session_factory, session_scope
from server.models import Organization, User
from server.security import (
    CSRF_HEADER,
    SESSION_COOKIE,
    csrf_for_session,
    issue_session,
    read_session,
)
from server.services.accounts import create_user

PASSWORD = "load-and-fault-tests-only"  # never a real account: the databases are throwaway


def create_signed_in_user(
    factory: sessionmaker[Session], *, email: str, firm: str = "Test firm", role: str = "admin"
) -> tuple[int, int, int]:
    """Create a firm and a user in it; returns (organization id, user id, session version)."""
    with session_scope(factory) as session:
        existing = session.scalars(select(User).where(User.email == email)).first()
        if existing is not None:
            return existing.organization_id, existing.id, existing.session_version
        org = Organization(name=firm)
        session.add(org)
        session.flush()
        user = create_user(
            session=session, organization_id=org.id, email=email, password=PASSWORD, role=role
        )
        return org.id, user.id, user.session_version


def session_headers(secret_key: str, *, user_id: int, session_version: int) -> dict[str, str]:
    """``Cookie`` and ``X-CSRF-Token`` headers of a fresh sign-in of that user."""
    value = issue_session(secret_key, user_id=user_id, session_version=session_version)
    data = read_session(secret_key, value)
    assert data is not None
    return {"Cookie": f"{SESSION_COOKIE}={value}", CSRF_HEADER: csrf_for_session(secret_key, data)}


def signed_in_headers(app: Any, *, email: str, firm: str = "Test firm") -> dict[str, str]:
    """Headers of a signed-in admin of a new firm, for requests to ``app`` (in-process)."""
    _org, user_id, version = create_signed_in_user(
        app.state.session_factory, email=email, firm=firm
    )
    return session_headers(app.state.settings.secret_key, user_id=user_id, session_version=version)


def signed_in_headers_for_url(
    database_url: str, secret_key: str, *, email: str, firm: str = "Test firm"
) -> tuple[int, dict[str, str]]:
    """(organization id, headers) for a server process on ``database_url`` with ``secret_key``."""
    engine = make_engine(database_url)
    try:
        org_id, user_id, version = create_signed_in_user(
            make_session_factory(engine), email=email, firm=firm
        )
    finally:
        engine.dispose()
    return org_id, session_headers(secret_key, user_id=user_id, session_version=version)
