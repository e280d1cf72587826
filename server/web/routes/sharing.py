"""Share links: the firm's list on the House page, and the homeowner's read-only view /s/<token>.

The homeowner's view needs no account: the token is the key. It shows the compare page's
figures (the same :func:`compare_context`) in plain words, the charts, toggles that recompute
without saving, cautions, and no edit controls or links into the firm's pages. An unknown,
expired or revoked token gets one and the same 404 page.
"""

from __future__ import annotations

from typing import Any

import segno
from fastapi import APIRouter, Form, Query, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import House, Organization, ShareLink, utcnow
from server.services import houses as svc
from server.services import idempotency as idem
from server.services import sharing
from server.services.library import catalog_for
from server.services.number_text import NumberTextError, read_integer
from server.web.deps import CurrentUser, OrgDep, SessionDep, render
from server.web.routes.compare import compare_context

router = APIRouter()
#: headers on every homeowner page: no token in a Referer, no caching, no indexing
SHARED_HEADERS = {
    "Referrer-Policy": "no-referrer",
    "Cache-Control": "no-store",
    "X-Robots-Tag": "noindex, nofollow",
}


def qr_svg(url: str) -> str:
    """The link as an inline SVG QR code (no style attributes, so a strict CSP allows it)."""
    code = segno.make(url, error="m")
    return code.svg_inline(
        scale=5, border=2, dark="#1b2730", light="#ffffff", svgclass="qr",
        title="QR code of the homeowner's link",
    )  # fmt: skip


def _when(moment: Any) -> str:
    return moment.strftime("%Y-%m-%d") if moment else "—"


def share_context(
    *, session: Session, organization_id: int, house: House, new: dict | None = None,
    form: dict | None = None, errors: dict | None = None,
) -> dict[str, Any]:  # fmt: skip
    """Context for templates/partials/share_links.html (key ``share``)."""
    now = utcnow()
    rows = []
    links = sharing.list_links(session=session, organization_id=organization_id, house_id=house.id)
    for link in links:
        if link.revoked_at is not None:
            status = "revoked " + _when(link.revoked_at)
        elif not sharing.is_active(link, now=now):
            status = "expired"
        else:
            status = "active"
        rows.append({"id": link.id, "label": link.label or "—", "created": _when(link.created_at),
                     "expires": _when(link.expires_at), "views": link.view_count,
                     "last_viewed": _when(link.last_viewed_at), "status": status,
                     "active": status == "active"})  # fmt: skip
    return {
        "share": {
            "rows": rows,
            "new": new,
            "form": form or {"label": "", "days_valid": str(sharing.DEFAULT_DAYS)},
            "errors": errors or {},
            "max_days": sharing.MAX_DAYS,
        }
    }


def _respond(request: Request, session: Session, org: Organization, house: House,
             ctx: dict, status: int = 200):  # type: ignore[no-untyped-def]  # fmt: skip
    """htmx: the section alone; otherwise the whole House page with the section filled in."""
    if request.headers.get("HX-Request") == "true":
        return render(request, "partials/share_links.html", {"house": house, **ctx})
    from server.web.routes.houses import _house_context  # the full House page

    full = _house_context(session, org, house.id)
    full.update(ctx)
    return render(request, "pages/house.html", full, status_code=status)


@router.get("/houses/{house_id}/share-links", name="share_links")
def share_links(request: Request, session: SessionDep, org: OrgDep, house_id: int):  # type: ignore[no-untyped-def]
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    ctx = share_context(session=session, organization_id=org.id, house=house)
    return _respond(request, session, org, house, ctx)


@router.post("/houses/{house_id}/share-links")
def create_share_link(  # type: ignore[no-untyped-def]
    request: Request,
    session: SessionDep,
    org: OrgDep,
    user: CurrentUser,
    house_id: int,
    label: str = Form(""),
    days_valid: str = Form(str(sharing.DEFAULT_DAYS)),
    idempotency_key: str = Form(""),
):
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
        ctx = share_context(session=session, organization_id=org.id, house=house)
        ctx["share"]["repeated"] = True
        return _respond(request, session, org, house, ctx)
    url = str(request.url_for("shared_view", token=made["token"]))
    new = {"url": url, "qr": qr_svg(url), "label": label.strip(), "days": days}
    ctx = share_context(session=session, organization_id=org.id, house=house, new=new)
    response = _respond(request, session, org, house, ctx)
    response.headers["Cache-Control"] = "no-store"  # the page holds the token once
    return response


@router.post("/houses/{house_id}/share-links/{link_id}/revoke")
def revoke_share_link(  # type: ignore[no-untyped-def]
    request: Request, session: SessionDep, org: OrgDep, house_id: int, link_id: int
):
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    sharing.revoke(session=session, organization_id=org.id, link_id=link_id, house_id=house.id)
    if request.headers.get("HX-Request") == "true":
        ctx = share_context(session=session, organization_id=org.id, house=house)
        return render(request, "partials/share_links.html", {"house": house, **ctx})
    return RedirectResponse(f"/houses/{house.id}/share-links#share-links", status_code=303)


# --- the homeowner's view ----------------------------------------------------------------------


def _not_found(request: Request) -> Response:
    response = render(request, "pages/share_not_found.html", {}, status_code=404)
    response.headers.update(SHARED_HEADERS)
    return response


def _plain_options(result: Any) -> list[dict[str, Any]]:
    """Each package's money figures for the plain-words cards."""
    return [
        {
            "id": p.id,
            "name": p.name or p.id,
            "annual_savings": p.annual_savings,
            "monthly_savings": p.monthly_savings,
            "installed_cost": p.installed_cost,
            "rebates": p.rebates,
            "net_cost": p.net_cost,
            "payback": p.simple_payback_years,
            "loan": p.monthly_loan_payment,
            "co2_avoided": p.co2_avoided,
            "total_cost": p.total_cost,
        }  # fmt: skip
        for p in result.packages
    ]


@router.get("/s/{token}", name="shared_view")
def shared_view(  # type: ignore[no-untyped-def]
    request: Request, session: SessionDep, token: str, pick: list[str] = Query(default=[])
):
    link: ShareLink | None = sharing.resolve_token(session=session, token=token)
    if link is None:
        return _not_found(request)
    try:
        house = svc.get_house(
            session=session, organization_id=link.organization_id, house_id=link.house_id
        )
    except svc.NotFound:
        return _not_found(request)
    org = session.get(Organization, link.organization_id)
    catalog = catalog_for(session=session, organization_id=link.organization_id)
    context = compare_context(house, catalog, pick)
    is_htmx = request.headers.get("HX-Request") == "true"
    if not is_htmx:  # a toggle is not a new view
        sharing.record_view(session=session, link=link)
    result = context.get("result")
    options = _plain_options(result) if result is not None else []
    selection = next((o for o in options if o["id"] == "your-selection"), None)
    context.update(
        {
            "token": token,
            "firm_name": org.name if org else "",
            "options": [o for o in options if o["id"] != "your-selection"],
            "selection": selection,
            "as_found_cost": result.as_found.total_cost if result is not None else None,
        }
    )
    response = render(request, "pages/shared.html", context)
    response.headers.update(SHARED_HEADERS)
    return response
