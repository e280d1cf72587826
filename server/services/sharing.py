"""Read-only homeowner links: create, resolve, revoke, count views.

The token is ``secrets.token_urlsafe(32)``: 32 random bytes = 256 bits from the operating
system's CSPRNG (at least the 128 bits the design asks for). Only its SHA-256 hex digest is
stored; the token itself is shown once, when the link is made, and never written anywhere.
An unknown, expired or revoked token resolves to ``None`` alike, so a caller cannot tell them
apart (the page says "not found" for all three).
"""

from __future__ import annotations

import hashlib
import hmac
import re
import secrets
from datetime import UTC, datetime, timedelta

from sqlalchemy import select, update
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import ShareLink, utcnow
from server.services.houses import NotFound, get_house

#: random bytes per token (256 bits; the design's floor is 128 bits)
TOKEN_BYTES = 32
DEFAULT_DAYS = 30
MAX_DAYS = 90
#: what ``token_urlsafe`` can produce; anything else is refused before touching the database
_TOKEN_SHAPE = re.compile(r"^[A-Za-z0-9_-]{20,100}$")


def hash_token(token: str) -> str:
    """SHA-256 hex digest of the token: the only form that is stored."""
    return hashlib.sha256(token.encode("ascii")).hexdigest()


def _aware(moment: datetime | None) -> datetime | None:
    """SQLite hands back naive datetimes; they were written in UTC."""
    if moment is None or moment.tzinfo is not None:
        return moment
    return moment.replace(tzinfo=UTC)


def is_active(link: ShareLink, *, now: datetime | None = None) -> bool:
    """Not revoked and not past its expiry."""
    now = now or utcnow()
    expires = _aware(link.expires_at)
    return link.revoked_at is None and expires is not None and expires > now


def create_link(
    *,
    session: Session,
    organization_id: int,
    house_id: int,
    label: str = "",
    days_valid: int = DEFAULT_DAYS,
    created_by_id: int | None = None,
) -> tuple[ShareLink, str]:
    """Make a link to one of the firm's houses; returns the row and the token (shown once)."""
    get_house(session=session, organization_id=organization_id, house_id=house_id)
    if not isinstance(days_valid, int) or not 1 <= days_valid <= MAX_DAYS:
        raise InputError("days_valid", f"choose how long the link works: 1 to {MAX_DAYS} days")
    label = label.strip()
    if len(label) > 200:
        raise InputError("label", "keep the label under 200 characters")
    token = secrets.token_urlsafe(TOKEN_BYTES)
    link = ShareLink(
        organization_id=organization_id,
        house_id=house_id,
        token_hash=hash_token(token),
        label=label,
        created_by_id=created_by_id,
        created_at=utcnow(),
        expires_at=utcnow() + timedelta(days=days_valid),
        view_count=0,
    )
    session.add(link)
    session.flush()
    return link, token


def resolve_token(*, session: Session, token: str) -> ShareLink | None:
    """The active link for ``token``, or None when it is unknown, expired or revoked."""
    if not isinstance(token, str) or not _TOKEN_SHAPE.match(token):
        return None
    digest = hash_token(token)
    link = session.scalars(select(ShareLink).where(ShareLink.token_hash == digest)).first()
    if link is None or not hmac.compare_digest(link.token_hash, digest):
        return None
    return link if is_active(link) else None


def list_links(*, session: Session, organization_id: int, house_id: int) -> list[ShareLink]:
    """The firm's links to one house, newest first (raises NotFound for another firm's house)."""
    get_house(session=session, organization_id=organization_id, house_id=house_id)
    return list(
        session.scalars(
            select(ShareLink)
            .where(ShareLink.organization_id == organization_id, ShareLink.house_id == house_id)
            .order_by(ShareLink.created_at.desc(), ShareLink.id.desc())
        )
    )


def revoke(
    *, session: Session, organization_id: int, link_id: int, house_id: int | None = None
) -> ShareLink:
    """Stop a link working (idempotent). Another firm's link is NotFound, never 'forbidden'."""
    stmt = select(ShareLink).where(
        ShareLink.id == link_id, ShareLink.organization_id == organization_id
    )
    if house_id is not None:
        stmt = stmt.where(ShareLink.house_id == house_id)
    link = session.scalars(stmt).first()
    if link is None:
        raise NotFound
    if link.revoked_at is None:
        link.revoked_at = utcnow()
        session.flush()
    return link


def record_view(*, session: Session, link: ShareLink) -> None:
    """Count one view (an atomic increment in SQL, safe with several app processes)."""
    session.execute(
        update(ShareLink)
        .where(ShareLink.id == link.id)
        .values(view_count=ShareLink.view_count + 1, last_viewed_at=utcnow())
        .execution_options(synchronize_session=False)
    )
    session.expire(link, ["view_count", "last_viewed_at"])
