"""Sign in, sign out, your own account (password), and the firm admin's Users page."""

from __future__ import annotations

from typing import Annotated, Any

from fastapi import APIRouter, Depends, Form, Request
from fastapi.responses import RedirectResponse, Response

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
from server.web.deps import AdminUser, CurrentUser, SessionDep, get_current_user, render
from server.web.pages.account import (
    BAD_LOGIN,
    account_context,
    login_context,
    login_wait_error,
    password_wait_error,
    users_context,
)

router = APIRouter()
MaybeUser = Annotated[User | None, Depends(get_current_user)]


def _secure(request: Request) -> bool:
    return request.url.scheme == "https" or bool(request.app.state.settings.cookie_secure)


def _client(request: Request) -> str:
    return request.client.host if request.client else "unknown"


def _login_page(request: Request, *, email: str = "", next_path: str = "", error: str = "",
                status_code: int = 200, headers: dict[str, str] | None = None) -> Response:  # fmt: skip
    development = request.app.state.settings.environment == "development"
    context = login_context(development=development, email=email, next_path=next_path,
                            error=error)  # fmt: skip
    response = render(request, "pages/login.html", context, status_code=status_code)
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
        message = login_wait_error(exc.retry_after)
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


def _account_page(request: Request, user: User, *, errors: dict[str, str] | None = None,
                  done: str = "", status_code: int = 200) -> Response:  # fmt: skip
    context = account_context(user=user, errors=errors, done=done)
    return render(request, "pages/account.html", context, status_code=status_code)


@router.get("/account", name="account")
def account_page(request: Request, user: CurrentUser, done: str = "") -> Response:
    return _account_page(request, user, done=done)


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
        error = {"current_password": password_wait_error(exc.retry_after)}
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


def _users_page(request: Request, context: dict[str, Any], status_code: int = 200) -> Response:
    return render(request, "pages/admin_users.html", context, status_code=status_code)


@router.get("/admin/users", name="admin_users")
def admin_users_page(
    request: Request, session: SessionDep, admin: AdminUser, done: str = ""
) -> Response:
    return _users_page(request, users_context(session=session, admin=admin, done=done))


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
        context = users_context(session=session, admin=admin, form=form,
                                errors={exc.field: exc.message})  # fmt: skip
        return _users_page(request, context, status_code=422)
    if password:
        return RedirectResponse("/admin/users?done=added", status_code=303)
    context = users_context(session=session, admin=admin, done="added",
                            new_password=(user.email, temporary))  # fmt: skip
    return _users_page(request, context)


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
        context = users_context(session=session, admin=admin,
                                row_errors={user_id: exc.message})  # fmt: skip
        return _users_page(request, context, status_code=422)
    if password:
        return RedirectResponse("/admin/users?done=reset", status_code=303)
    context = users_context(session=session, admin=admin, done="reset",
                            new_password=(user.email, temporary))  # fmt: skip
    return _users_page(request, context)


@router.post("/admin/users/{user_id}/active")
def set_active(
    request: Request, session: SessionDep, admin: AdminUser, user_id: int, active: str = Form("")
) -> Response:
    wanted = active == "1"
    try:
        accounts.set_active(session=session, admin=admin, user_id=user_id, active=wanted)
    except InputError as exc:
        context = users_context(session=session, admin=admin,
                                row_errors={user_id: exc.message})  # fmt: skip
        return _users_page(request, context, status_code=422)
    return RedirectResponse(
        f"/admin/users?done={'activated' if wanted else 'deactivated'}", status_code=303
    )
