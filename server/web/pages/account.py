"""Sign-in, your own account and the admin's Users page (templates/pages/login.html,
account.html, admin_users.html).

The words these pages say after an action live here too: ``done`` codes (from a redirect's
query string) become the message at the top, a rate limit's wait becomes a sentence.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from sqlalchemy.orm import Session

from server.models import User
from server.security import safe_next
from server.services import accounts
from server.services.demo import DEMO_ACCOUNTS

BAD_LOGIN = "That e-mail and password do not match an active account. Check both and try again."
ACCOUNT_DONE = {
    "password": "Password changed. You are still signed in here; every other device is signed "
    "out and needs the new password.",
}
USERS_DONE = {
    "added": "User added. Give them their temporary password in person or by phone.",
    "reset": "Password changed. Their old sessions have ended; give them the new password.",
    "deactivated": "User deactivated: they are signed out everywhere and cannot sign in.",
    "activated": "User reactivated: they can sign in again.",
}


def wait_text(retry_after_s: int) -> str:
    """A rate limit's wait in words, rounded to whole minutes, at least one.

    >>> wait_text(30), wait_text(900)
    ('about 1 minute', 'about 15 minutes')
    """
    minutes = max(1, round(retry_after_s / 60))
    return f"about {minutes} minute{'s' if minutes != 1 else ''}"


def login_wait_error(retry_after_s: int) -> str:
    """The sign-in page's message when the tries for this e-mail or client ran out."""
    return (f"Too many tries. Wait {wait_text(retry_after_s)}, "
            "then try again, or ask your firm's admin to reset your password.")  # fmt: skip


def password_wait_error(retry_after_s: int) -> str:
    """The Account page's current-password error when the wrong tries ran out."""
    return f"too many wrong tries; wait {wait_text(retry_after_s)} and try again"


def login_context(
    *, development: bool, email: str = "", next_path: str = "", error: str = ""
) -> dict[str, Any]:
    """The sign-in form: the e-mail typed (never the password), where to go after (only a
    path on this site), the error, and the demo sign-ins on a development server only."""
    return {"email": email, "next": safe_next(next_path, default=""), "error": error,
            "demo": DEMO_ACCOUNTS if development else ()}  # fmt: skip


def account_context(
    *, user: User, errors: Mapping[str, str] | None = None, done: str = ""
) -> dict[str, Any]:
    """Who is signed in and the change-password form. Typed passwords are never sent back
    into the form, right or wrong; ``done`` names what the last change did."""
    return {"me": user, "errors": errors or {}, "message": ACCOUNT_DONE.get(done, ""),
            "min_length": accounts.PASSWORD_MIN, "nav": "account"}  # fmt: skip


def users_context(
    *,
    session: Session,
    admin: User,
    form: Mapping[str, str] | None = None,
    errors: Mapping[str, str] | None = None,
    row_errors: Mapping[int, str] | None = None,
    done: str = "",
    new_password: tuple[str, str] | None = None,
) -> dict[str, Any]:
    """The admin's organization's users, the add-user form (``form`` as typed, with
    ``errors``), one row's error (``row_errors`` by user id), the message for ``done``, and a
    generated password to hand over once (``new_password``: e-mail, password)."""
    return {
        "users": accounts.list_users(session=session, organization_id=admin.organization_id),
        "me": admin,
        "form": form if form is not None else {"role": "staff"},
        "errors": errors or {},
        "row_errors": row_errors or {},
        "message": USERS_DONE.get(done, ""),
        "new_password": new_password,
        "nav": "users",
        "min_length": accounts.PASSWORD_MIN,
    }
