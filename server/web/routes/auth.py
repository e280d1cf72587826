"""Sign in, sign out, your own account (password), and the firm admin's Users page."""

from __future__ import annotations

from typing import Annotated, Any

from fastapi import APIRouter, Depends, Form, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server import security
from server.errors import InputError
from server.models import User
from server.security import (
    SESSION_COOKIE,
    expired_cookie_header,
    issue_session,
    safe_next,
    session_cookie_header,
)
from server.services import accounts
from server.services.demo import DEMO_ACCOUNTS
from server.web.deps import AdminUser, CurrentUser, SessionDep, get_current_user, render

router = APIRouter()
MaybeUser = Annotated[User | None, Depends(get_current_user)]
BAD_LOGIN = "That e-mail and password do not match an active account. Check both and try again."
DONE = {
    "added": "User added. Give them their temporary password in person or by phone.",
    "reset": "Password changed. Their old sessions have ended; give them the new password.",
    "deactivated": "User deactivated: they are signed out everywhere and cannot sign in.",
    "activated": "User reactivated: they can sign in again.",
}


def _secure(request: Request) -> bool:
    return request.url.scheme == "https" or bool(request.app.state.settings.cookie_secure)


def _client(request: Request) -> str:
    return request.client.host if request.client else "unknown"


def _wait_text(retry_after_s: int) -> str:
    """'about 1 minute', 'about 15 minutes': a rate limit's wait in words."""
    minutes = max(1, round(retry_after_s / 60))
    return f"about {minutes} minute{'s' if minutes != 1 else ''}"


def _login_page(request: Request, *, email: str = "", next_path: str = "", error: str = "",
                status_code: int = 200, headers: dict[str, str] | None = None) -> Response:  # fmt: skip
    settings = request.app.state.settings
    demo = DEMO_ACCOUNTS if settings.environment == "development" else ()
    response = render(
        request,
        "pages/login.html",
        {"email": email, "next": safe_next(next_path, default=""), "error": error, "demo": demo},
        status_code=status_code,
    )
    response.headers.update(headers or {})
    return response


@router.get("/login", name="login")
def login_page(request: Request, user: MaybeUser, next: str = "") -> Response:  # noqa: A002
    if user is not None:
        return RedirectResponse(safe_next(next), status_code=303)
    return _login_page(request, next_path=next)


@router.post("/login")
def login(
    request: Request,
    session: SessionDep,
    email: str = Form(""),
    password: str = Form(""),
    next_path: str = Form("", alias="next"),
) -> Response:
    try:
        user = accounts.authenticate(
            session=session, email=email, password=password, client=_client(request)
        )
    except accounts.RateLimited as exc:
        message = (f"Too many tries. Wait {_wait_text(exc.retry_after)}, "
                   "then try again, or ask your firm's admin to reset your password.")  # fmt: skip
        return _login_page(request, email=email.strip(), next_path=next_path, error=message,
                           status_code=429, headers={"Retry-After": str(exc.retry_after)})  # fmt: skip
    if user is None:
        return _login_page(
            request, email=email.strip(), next_path=next_path, error=BAD_LOGIN, status_code=401
        )
    now = security.clock()
    value = issue_session(
        request.app.state.settings.secret_key,
        user_id=user.id,
        session_version=user.session_version,
        signed_in_at=now,
    )
    response = RedirectResponse(safe_next(next_path), status_code=303)
    response.headers.append(
        "set-cookie", session_cookie_header(value, signed_in_at=now, secure=_secure(request))
    )
    return response


@router.post("/logout")
def logout(
    request: Request, session: SessionDep, user: CurrentUser, everywhere: str = Form("")
) -> Response:
    # This session ends on the server (a copy of the cookie is refused too); the user's other
    # devices stay signed in unless "everywhere" was asked for.
    data = request.state.session_data
    accounts.revoke_session(session=session, user=user, nonce=data.nonce,
                            signed_in_at=data.signed_in_at)  # fmt: skip
    if everywhere:
        accounts.end_all_sessions(session=session, user=user)
    response = RedirectResponse("/login", status_code=303)
    response.headers.append(
        "set-cookie", expired_cookie_header(SESSION_COOKIE, secure=_secure(request))
    )
    # The pages kept for offline use and the outbox go with the session (static/offline.js
    # asks first when changes still wait, then deletes them itself; this covers the rest).
    response.headers["Clear-Site-Data"] = '"cache", "storage"'
    return response


ACCOUNT_DONE = {
    "password": "Password changed. You are still signed in here; every other device is signed "
    "out and needs the new password.",
}


def _account_page(request: Request, user: User, *, errors: dict[str, str] | None = None,
                  message: str = "", status_code: int = 200) -> Response:  # fmt: skip
    # Typed passwords are never sent back into the form, right or wrong.
    context = {"me": user, "errors": errors or {}, "message": message,
               "min_length": accounts.PASSWORD_MIN, "nav": "account"}  # fmt: skip
    return render(request, "pages/account.html", context, status_code=status_code)


@router.get("/account", name="account")
def account_page(request: Request, user: CurrentUser, done: str = "") -> Response:
    return _account_page(request, user, message=ACCOUNT_DONE.get(done, ""))


@router.post("/account/password")
def change_password(
    request: Request,
    session: SessionDep,
    user: CurrentUser,
    current_password: str = Form(""),
    new_password: str = Form(""),
    repeat_password: str = Form(""),
) -> Response:
    try:
        accounts.change_own_password(session=session, user=user, current=current_password,
                                     new=new_password, repeat=repeat_password,
                                     client=_client(request))  # fmt: skip
    except accounts.RateLimited as exc:
        error = {"current_password": f"too many wrong tries; wait {_wait_text(exc.retry_after)} "
                                     "and try again"}  # fmt: skip
        response = _account_page(request, user, errors=error, status_code=429)
        response.headers["Retry-After"] = str(exc.retry_after)
        return response
    except InputError as exc:
        return _account_page(request, user, errors={exc.field: exc.message}, status_code=422)
    # This device stays signed in: a new cookie for the new session version, same sign-in time.
    data = request.state.session_data
    value = issue_session(request.app.state.settings.secret_key, user_id=user.id,
                          session_version=user.session_version, signed_in_at=data.signed_in_at)  # fmt: skip
    response = RedirectResponse("/account?done=password", status_code=303)
    response.headers.append("set-cookie", session_cookie_header(
        value, signed_in_at=data.signed_in_at, secure=_secure(request)))  # fmt: skip
    return response


def _admin_page(request: Request, session: Session, admin: User, *, status_code: int = 200,
                **extra: Any) -> Response:  # fmt: skip
    context: dict[str, Any] = {
        "users": accounts.list_users(session=session, organization_id=admin.organization_id),
        "me": admin,
        "form": {"role": "staff"},
        "errors": {},
        "row_errors": {},
        "message": "",
        "new_password": None,
        "nav": "users",
        "min_length": accounts.PASSWORD_MIN,
    }
    context.update(extra)
    return render(request, "pages/admin_users.html", context, status_code=status_code)


@router.get("/admin/users", name="admin_users")
def admin_users_page(
    request: Request, session: SessionDep, admin: AdminUser, done: str = ""
) -> Response:
    return _admin_page(request, session, admin, message=DONE.get(done, ""))


@router.post("/admin/users")
def add_user(
    request: Request,
    session: SessionDep,
    admin: AdminUser,
    email: str = Form(""),
    name: str = Form(""),
    role: str = Form("staff"),
    password: str = Form(""),
) -> Response:
    temporary = password or accounts.generate_password()
    try:
        user = accounts.create_user(session=session, organization_id=admin.organization_id,
                                    email=email, password=temporary, role=role, name=name)  # fmt: skip
    except InputError as exc:
        form = {"email": email, "name": name, "role": role}
        return _admin_page(request, session, admin, form=form, errors={exc.field: exc.message},
                           status_code=422)  # fmt: skip
    if password:
        return RedirectResponse("/admin/users?done=added", status_code=303)
    return _admin_page(request, session, admin, message=DONE["added"],
                       new_password=(user.email, temporary))  # fmt: skip


@router.post("/admin/users/{user_id}/password")
def reset_password(
    request: Request, session: SessionDep, admin: AdminUser, user_id: int, password: str = Form("")
) -> Response:
    temporary = password or accounts.generate_password()
    try:
        user = accounts.reset_password_by_admin(
            session=session, admin=admin, user_id=user_id, new_password=temporary
        )
    except InputError as exc:
        return _admin_page(request, session, admin, row_errors={user_id: exc.message},
                           status_code=422)  # fmt: skip
    if password:
        return RedirectResponse("/admin/users?done=reset", status_code=303)
    return _admin_page(request, session, admin, message=DONE["reset"],
                       new_password=(user.email, temporary))  # fmt: skip


@router.post("/admin/users/{user_id}/active")
def set_active(
    request: Request, session: SessionDep, admin: AdminUser, user_id: int, active: str = Form("")
) -> Response:
    wanted = active == "1"
    try:
        accounts.set_active(session=session, admin=admin, user_id=user_id, active=wanted)
    except InputError as exc:
        return _admin_page(request, session, admin, row_errors={user_id: exc.message},
                           status_code=422)  # fmt: skip
    return RedirectResponse(
        f"/admin/users?done={'activated' if wanted else 'deactivated'}", status_code=303
    )
