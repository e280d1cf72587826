"""A create form posted twice makes one row: its idempotency key is honoured once.

Each create form (a new house, surface, upgrade, package, pipe run or share link) carries a
random key, put in when the page is rendered (:func:`new_key`). The first post of a key that
completes stores (firm, user, key) with where it led; a repeat of that key, be it the page's
automatic resubmit after an answer lost on the way or a second tap, gets the same place back
and creates nothing. Two posts of one key at the same moment may both do their work, but only
one can insert the key (unique constraint ``uq_idempotency_keys_org_user_key``): the other's
transaction is rolled back, so its rows vanish, and it answers with the first one's location.
"""

from __future__ import annotations

import re
import secrets
from collections.abc import Callable, Mapping
from datetime import timedelta

from sqlalchemy import delete, select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import IdempotencyKey, utcnow
from server.services.houses import Conflict

#: the form field that carries the key
FIELD = "idempotency_key"
#: how long a key is honoured; a resubmit comes within minutes (common practice for retry
#: windows), a day also covers a tablet that was offline until the next morning
KEEP = timedelta(hours=24)
#: 16 random bytes (128 bits) as URL-safe base64 is 22 characters; accept 16 to 64 of them
_SHAPE = re.compile(r"[A-Za-z0-9_-]{16,64}")


def new_key() -> str:
    """A fresh random key (128 bits) for one rendering of a create form."""
    return secrets.token_urlsafe(16)


def read_key(posted: str | Mapping[str, str]) -> str | None:
    """The posted key (the field's text, or the posted fields), or None when the form sent none
    or not one of ours: then the post is handled as it always was."""
    text = (posted if isinstance(posted, str) else str(posted.get(FIELD, ""))).strip()
    return text if _SHAPE.fullmatch(text) else None


def find(
    *, session: Session, organization_id: int, user_id: int, key: str, purpose: str
) -> str | None:
    """Where the first post of ``key`` led, or None when the key is new (or expired)."""
    row = session.scalars(
        select(IdempotencyKey).where(
            IdempotencyKey.organization_id == organization_id,
            IdempotencyKey.user_id == user_id,
            IdempotencyKey.key == key,
            IdempotencyKey.expires_at > utcnow(),
        )
    ).first()
    if row is None:
        return None
    if row.purpose != purpose:
        raise InputError(FIELD, "this form was already sent for something else: reload the page")
    return row.location


def remember(
    *, session: Session, organization_id: int, user_id: int, key: str, purpose: str,
    location: str,
) -> None:  # fmt: skip
    """Store ``key`` as honoured (raises IntegrityError when a concurrent post stored it first).

    The firm's expired keys are pruned in the same transaction, so an old key can never block
    the insert."""
    now = utcnow()
    session.execute(
        delete(IdempotencyKey).where(
            IdempotencyKey.organization_id == organization_id, IdempotencyKey.expires_at <= now
        )
    )
    session.add(IdempotencyKey(organization_id=organization_id, user_id=user_id, key=key,
                               purpose=purpose, location=location[:500], created_at=now,
                               expires_at=now + KEEP))  # fmt: skip
    session.flush()


def once(
    *, session: Session, organization_id: int, user_id: int, key: str | None, purpose: str,
    work: Callable[[], str],
) -> tuple[str, bool]:  # fmt: skip
    """Run ``work`` (it creates the rows and returns the location to send the user to) unless
    ``key`` was honoured already. Returns (location, repeated).

    ``work`` raising InputError or Conflict stores nothing; a Conflict may also be a concurrent
    post of this very key that saved the house first, so the key is looked up again then."""
    if key is None:
        return work(), False

    def first_answer() -> str | None:
        return find(session=session, organization_id=organization_id, user_id=user_id, key=key,
                    purpose=purpose)  # fmt: skip

    prior = first_answer()
    if prior is not None:
        return prior, True
    try:
        location = work()
        remember(session=session, organization_id=organization_id, user_id=user_id, key=key,
                 purpose=purpose, location=location)  # fmt: skip
    except (IntegrityError, Conflict):
        session.rollback()  # this post's rows go; the first post's answer stands
        prior = first_answer()
        if prior is None:
            raise
        return prior, True
    return location, False
