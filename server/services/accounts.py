"""Firm accounts: users, sign-in with rate limiting, admin password reset and deactivation.

Every function takes a keyword-only ``session``; admin actions are scoped to the admin's firm
and raise :class:`~server.services.houses.NotFound` (404, never 403) for anyone else's user.

Rate limit (rows in ``login_attempts``, so it holds across processes), within
:data:`WINDOW_SECONDS`:

- per account: at most :data:`EMAIL_FAILURE_LIMIT` failed sign-ins per e-mail since its last
  success;
- per client address: refused once failures from that address name
  :data:`CLIENT_ACCOUNT_LIMIT` different e-mails (known or not). A firm's office shares one
  address, so a count of failures per address let one person's typos (or a colleague's
  password manager retrying) lock out everyone behind it; counting different accounts stops
  the guessing that spreads over many accounts, which is what the address limit is for, and
  leaves one person's mistakes to their own account's limit.

A limited try is refused before any password check and is not recorded, so waiting out the
window always works. The trade-offs (common practice): the e-mail limit lets anyone delay one
person's sign-in by 15 min; an office where 7 different people each fail within 15 min is
refused until the first of them leaves the window; and an address trying 6 accounts gets their
5 tries each, 30 guesses per window, what the former limit of 30 failures per address allowed.
Guessing from many addresses is limited only per account.
"""

from __future__ import annotations

import math
import re
import secrets
from dataclasses import dataclass
from datetime import UTC, datetime, timedelta

from sqlalchemy import bindparam, delete, func, select
from sqlalchemy.dialects.postgresql import insert as postgresql_insert
from sqlalchemy.dialects.sqlite import insert as sqlite_insert
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import LoginAttempt, Organization, RevokedSession, User
from server.security import (
    SESSION_ABSOLUTE_SECONDS,
    dummy_verify,
    hash_password,
    password_needs_rehash,
    utc_now,
    verify_password,
)
from server.services.houses import NotFound

WINDOW_SECONDS = 15 * 60
EMAIL_FAILURE_LIMIT = 5
#: different e-mails failing from one address that make it a spraying address: with at most
#: 5 tries per account, 6 accounts give 6 x 5 = 30 guesses per window, the budget of the former
#: limit of 30 failures per address, and an office is refused only when 7 people fail at once
CLIENT_ACCOUNT_LIMIT = 7
KEEP_ATTEMPTS_SECONDS = 86400  #: older rows are pruned when a new one is recorded
PASSWORD_MIN, PASSWORD_MAX = 10, 1024
ROLES = ("admin", "staff")
_EMAIL = re.compile(r"^[^@\s]+@[^@\s]+\.[^@\s]+$")


@dataclass
class RateLimited(Exception):
    """Too many failed sign-ins; try again after ``retry_after`` seconds."""

    retry_after: int


def normalise_email(email: str) -> str:
    """E-mails are compared and stored trimmed and lower-case."""
    return email.strip().lower()


def _aware(moment: datetime) -> datetime:
    """SQLite returns naive datetimes (stored as UTC); PostgreSQL aware ones."""
    return moment if moment.tzinfo else moment.replace(tzinfo=UTC)


def check_password_rules(password: str, field: str = "password") -> None:
    """Raise InputError unless ``password`` is 10 to 1024 characters."""
    if len(password) < PASSWORD_MIN:
        raise InputError(field, f"use at least {PASSWORD_MIN} characters")
    if len(password) > PASSWORD_MAX:
        raise InputError(field, f"use at most {PASSWORD_MAX} characters")


def generate_password() -> str:
    """A temporary password: 12 URL-safe random characters (72 bits)."""
    return secrets.token_urlsafe(9)


def create_user(
    *,
    session: Session,
    organization_id: int,
    email: str,
    password: str,
    role: str = "staff",
    name: str = "",
) -> User:
    """Add a user to a firm. E-mails are unique across all firms."""
    email = normalise_email(email)
    if not _EMAIL.match(email) or len(email) > 254:
        raise InputError("email", "enter an e-mail address like name@example.com")
    if role not in ROLES:
        raise InputError("role", "choose admin or staff")
    check_password_rules(password)
    if session.scalars(select(User.id).where(User.email == email)).first() is not None:
        raise InputError("email", "there is already an account with this e-mail")
    user = User(
        organization_id=organization_id,
        email=email,
        name=name.strip()[:200],
        password_hash=hash_password(password),
        role=role,
        is_active=True,
        session_version=1,
    )
    session.add(user)
    session.flush()
    return user


def _retry_after(times: list[datetime], limit: int, now: datetime) -> int | None:
    """Seconds until fewer than ``limit`` of ``times`` (newest first) are inside the window."""
    if len(times) < limit:
        return None
    leaves = _aware(times[limit - 1]) + timedelta(seconds=WINDOW_SECONDS)
    return max(1, math.ceil((leaves - now).total_seconds()))


def check_rate_limit(*, session: Session, email: str, client: str) -> None:
    """Raise :class:`RateLimited` when this e-mail has failed too often, or this client against
    too many different e-mails (see the module doc)."""
    now = utc_now()
    since = now - timedelta(seconds=WINDOW_SECONDS)
    email = normalise_email(email)
    last_success = session.scalar(
        select(func.max(LoginAttempt.created_at)).where(
            LoginAttempt.email == email, LoginAttempt.succeeded.is_(True)
        )
    )
    if last_success is not None and _aware(last_success) > since:
        since = _aware(last_success)
    by_email = session.scalars(
        select(LoginAttempt.created_at)
        .where(
            LoginAttempt.email == email,
            LoginAttempt.succeeded.is_(False),
            LoginAttempt.created_at > since,
        )
        .order_by(LoginAttempt.created_at.desc())
        .limit(EMAIL_FAILURE_LIMIT)
    ).all()
    # per address: each different e-mail's latest failure, newest first; the address is free
    # again when the CLIENT_ACCOUNT_LIMIT-th of them leaves the window
    latest = func.max(LoginAttempt.created_at)
    by_client = session.scalars(
        select(latest)
        .where(
            LoginAttempt.client == client,
            LoginAttempt.succeeded.is_(False),
            LoginAttempt.created_at > now - timedelta(seconds=WINDOW_SECONDS),
        )
        .group_by(LoginAttempt.email)
        .order_by(latest.desc())
        .limit(CLIENT_ACCOUNT_LIMIT)
    ).all()
    waits = [
        w
        for w in (
            _retry_after(list(by_email), EMAIL_FAILURE_LIMIT, now),
            _retry_after(list(by_client), CLIENT_ACCOUNT_LIMIT, now),
        )
        if w is not None
    ]
    if waits:
        raise RateLimited(max(waits))


def record_attempt(*, session: Session, email: str, client: str, succeeded: bool) -> None:
    """Store one sign-in try (and drop rows older than a day)."""
    now = utc_now()
    session.execute(
        delete(LoginAttempt).where(
            LoginAttempt.created_at < now - timedelta(seconds=KEEP_ATTEMPTS_SECONDS)
        )
    )
    session.add(
        LoginAttempt(
            email=normalise_email(email)[:254],
            client=client[:64],
            succeeded=succeeded,
            created_at=now,
        )
    )
    session.flush()


def authenticate(*, session: Session, email: str, password: str, client: str) -> User | None:
    """The active user with this e-mail and password, or None. Raises :class:`RateLimited`.

    Takes the same time whether or not the e-mail exists (an unknown e-mail still runs one
    argon2 verification), and says nothing about which of the two was wrong.
    """
    email = normalise_email(email)
    check_rate_limit(session=session, email=email, client=client)
    user = session.scalars(select(User).where(User.email == email)).first() if email else None
    if user is None:
        dummy_verify(password)
        ok = False
    else:
        ok = verify_password(user.password_hash, password) and user.is_active
    record_attempt(session=session, email=email, client=client, succeeded=ok)
    if not ok or user is None:
        return None
    if password_needs_rehash(user.password_hash):
        user.password_hash = hash_password(password)
    user.last_login_at = utc_now()
    session.flush()
    return user


#: built once: every signed-in request runs it (building it each time cost ~40 % of the lookup).
#: The outer join finds the sign-out of this very session, if any, in the same query.
_USER_AND_ORGANIZATION = (
    select(User, Organization, RevokedSession.nonce)
    .join(Organization, Organization.id == User.organization_id)
    .outerjoin(RevokedSession, RevokedSession.nonce == bindparam("nonce"))
    .where(User.id == bindparam("user_id"))
)


def user_for_session(
    *, session: Session, user_id: int, session_version: int, nonce: str
) -> tuple[User, Organization] | None:
    """The user a session cookie names and their firm (one query), if the user is still active
    and the session not revoked (signed out here, or everywhere); else None."""
    row = session.execute(_USER_AND_ORGANIZATION, {"user_id": user_id, "nonce": nonce}).first()
    if row is None:
        return None
    user, org, revoked = row
    if not user.is_active or user.session_version != session_version or revoked is not None:
        return None
    return user, org


def revoke_session(*, session: Session, user: User, nonce: str, signed_in_at: float) -> None:
    """Sign out one session (one device): every copy of its cookie is refused from now on, the
    user's other sessions carry on. Rows of sessions past their absolute limit are pruned."""
    now = utc_now()
    session.execute(delete(RevokedSession).where(RevokedSession.expires_at < now))
    ends = datetime.fromtimestamp(signed_in_at + SESSION_ABSOLUTE_SECONDS, UTC)
    # INSERT ... ON CONFLICT DO NOTHING (both backends): two sign-outs of one session at once
    # (a double click on two tabs) both succeed
    insert = postgresql_insert if session.get_bind().dialect.name == "postgresql" else sqlite_insert
    session.execute(
        insert(RevokedSession)
        .values(nonce=nonce, user_id=user.id, revoked_at=now, expires_at=ends)
        .on_conflict_do_nothing(index_elements=["nonce"])
    )


def organization_of(*, session: Session, user: User) -> Organization:
    """The user's firm."""
    org = session.get(Organization, user.organization_id)
    if org is None:  # pragma: no cover - prevented by the foreign key
        raise NotFound
    return org


def list_users(*, session: Session, organization_id: int) -> list[User]:
    """The firm's users, admins first, then by e-mail."""
    return list(
        session.scalars(
            select(User)
            .where(User.organization_id == organization_id)
            .order_by(User.role, User.email)
        )
    )


def get_user(*, session: Session, organization_id: int, user_id: int) -> User:
    """A user of this firm, else :class:`NotFound`."""
    user = session.scalars(
        select(User).where(User.id == user_id, User.organization_id == organization_id)
    ).first()
    if user is None:
        raise NotFound
    return user


def _require_admin(admin: User) -> None:
    if admin.role != "admin" or not admin.is_active:
        raise NotFound


def reset_password_by_admin(
    *, session: Session, admin: User, user_id: int, new_password: str
) -> User:
    """Set a user's password (same firm only) and end all their sessions."""
    _require_admin(admin)
    user = get_user(session=session, organization_id=admin.organization_id, user_id=user_id)
    check_password_rules(new_password)
    user.password_hash = hash_password(new_password)
    user.session_version += 1
    session.flush()
    return user


def set_active(*, session: Session, admin: User, user_id: int, active: bool) -> User:
    """Deactivate (ending their sessions) or reactivate a user of the admin's firm."""
    _require_admin(admin)
    user = get_user(session=session, organization_id=admin.organization_id, user_id=user_id)
    if user.id == admin.id and not active:
        raise InputError("active", "you cannot deactivate your own account")
    if user.is_active and not active:
        user.session_version += 1
    user.is_active = active
    session.flush()
    return user


def change_own_password(
    *, session: Session, user: User, current: str, new: str, repeat: str, client: str
) -> User:
    """A signed-in user sets their own password. The current one must be given (a device left
    signed in is not enough), with the sign-in form's rate limit on wrong tries; all their
    other sessions end (``session_version`` moves on). Raises :class:`RateLimited`."""
    check_rate_limit(session=session, email=user.email, client=client)
    if not verify_password(user.password_hash, current):
        record_attempt(session=session, email=user.email, client=client, succeeded=False)
        raise InputError("current_password", "that is not your current password")
    check_password_rules(new, field="new_password")
    if new != repeat:
        raise InputError("repeat_password", "the two new passwords differ; type the same one twice")
    if new == current:
        raise InputError("new_password", "choose a password other than your current one")
    user.password_hash = hash_password(new)
    user.session_version += 1
    session.flush()
    return user


def end_all_sessions(*, session: Session, user: User) -> None:
    """Sign the user out on every device (bumps ``session_version``)."""
    user.session_version += 1
    session.flush()
