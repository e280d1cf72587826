"""Share links: the firm's list on the House page, and the homeowner's read-only view /s/<token>.

The homeowner's view needs no account: the token is the key (what it shows:
:mod:`server.web.pages.shared`). An unknown, expired or revoked token gets one and the same 404
page.
"""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Form, Query, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import House, Organization, ShareLink
from server.services import houses as svc
from server.services import idempotency as idem
from server.services import sharing
from server.services.number_text import NumberTextError, read_integer
from server.web.deps import CurrentUser, OrgDep, SessionDep, render
from server.web.pages.house import house_context
from server.web.pages.shared import shared_context
from server.web.pages.sharing import qr_svg, share_context
from server.web.render import is_htmx, page_or_fragment

router = APIRouter()
#: headers on every homeowner page: no token in a Referer, no caching, no indexing
SHARED_HEADERS = {
    "Referrer-Policy": "no-referrer",
    "Cache-Control": "no-store",
    "X-Robots-Tag": "noindex, nofollow",
}


def _respond(request: Request, session: Session, org: Organization, house: House,
             ctx: dict[str, Any], status: int = 200) -> Response:  # fmt: skip
    """htmx: the section alone; otherwise the whole House page with the section filled in."""
    return page_or_fragment(
        request, page="pages/house.html", fragment="partials/share_links.html", context=ctx,
        page_context=lambda: house_context(session=session, organization_id=org.id, house_id=house.id),
        status_code=status,
    )  # fmt: skip


@router.get("/houses/{house_id}/share-links", name="share_links")
def share_links(request: Request, session: SessionDep, org: OrgDep, house_id: int) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    ctx = share_context(session=session, organization_id=org.id, house=house)
    return _respond(request, session, org, house, ctx)


@router.post("/houses/{house_id}/share-links")
def create_share_link(
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    house_id: int,
    label: str = Form(""),
    days_valid: str = Form(str(sharing.DEFAULT_DAYS)),
    idempotency_key: str = Form(""),
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    form = {"label": label, "days_valid": days_valid}
    errors: dict[str, str] = {}
    made: dict[str, str] = {}
    repeated = False
    try:
        days: int | None = read_integer(days_valid)
    except NumberTextError:
        days = None
    if days is None:
        errors["days_valid"] = f"give a whole number of days, 1 to {sharing.MAX_DAYS}"
    else:

        def work() -> str:
            _link, made["token"] = sharing.create_link(
                session=session, organization_id=org.id, house_id=house.id, label=label,
                days_valid=days, created_by_id=user.id,
            )  # fmt: skip
            return f"/houses/{house.id}/share-links#share-links"

        try:  # the same form posted again (a resubmit after a lost answer) makes no second link
            _location, repeated = idem.once(session=session, organization_id=org.id, user_id=user.id,
                                            key=idem.read_key(idempotency_key), purpose="share_link", work=work)  # fmt: skip
        except InputError as exc:
            errors[exc.field] = exc.message
    if errors:
        ctx = share_context(session=session, organization_id=org.id, house=house, form=form,
                            errors=errors)  # fmt: skip
        return _respond(request, session, org, house, ctx, status=422)
    if repeated:  # only the token's hash is stored, so the first answer's link cannot be shown
        ctx = share_context(session=session, organization_id=org.id, house=house, repeated=True)
        return _respond(request, session, org, house, ctx)
    url = str(request.url_for("shared_view", token=made["token"]))
    new = {"url": url, "qr": qr_svg(url), "label": label.strip(), "days": days}
    ctx = share_context(session=session, organization_id=org.id, house=house, new=new)
    response = _respond(request, session, org, house, ctx)
    response.headers["Cache-Control"] = "no-store"  # the page holds the token once
    return response


@router.post("/houses/{house_id}/share-links/{link_id}/revoke")
def revoke_share_link(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, link_id: int
) -> Response:
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    sharing.revoke(session=session, organization_id=org.id, link_id=link_id, house_id=house.id)
    if is_htmx(request):
        ctx = share_context(session=session, organization_id=org.id, house=house)
        return render(request, "partials/share_links.html", ctx)
    return RedirectResponse(f"/houses/{house.id}/share-links#share-links", status_code=303)


# --- the homeowner's view ----------------------------------------------------------------------


def _not_found(request: Request) -> Response:
    response = render(request, "pages/share_not_found.html", {}, status_code=404)
    response.headers.update(SHARED_HEADERS)
    return response


@router.get("/s/{token}", name="shared_view")
def shared_view(
    request: Request, session: SessionDep, token: str, pick: list[str] = Query(default=[])
) -> Response:
    link: ShareLink | None = sharing.resolve_token(session=session, token=token)
    if link is None:
        return _not_found(request)
    try:
        house = svc.get_house(
            session=session, organization_id=link.organization_id, house_id=link.house_id
        )
    except svc.NotFound:
        return _not_found(request)
    context = shared_context(session=session, link=link, house=house, token=token, pick=pick)
    if not is_htmx(request):  # a toggle is not a new view
        sharing.record_view(session=session, link=link)
    response = render(request, "pages/shared.html", context)
    response.headers.update(SHARED_HEADERS)
    return response
