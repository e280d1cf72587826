"""House page routes: the Bills section (meter-read periods, their weather, the fit).

Both are plain ``def`` routes taking the posted form (files spooled already): the work is
:func:`server.services.bill_submission.submit_bills`; a saved form goes back to the House
page (303), htmx gets the section alone; a rejected one the House page with every row kept
(422), or 409 when someone else saved the house first.
"""

from __future__ import annotations

from typing import Any, BinaryIO

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session
from starlette.datastructures import UploadFile

from server.errors import InputError
from server.models import House, Organization
from server.services import houses as svc
from server.services.bill_forms import rows_from_form
from server.services.bill_submission import Submission, remove_bills, submit_bills
from server.services.library import catalog_for
from server.web.conflicts import stale_form
from server.web.deps import OrgDep, PostedFields, PostedForm, SessionDep
from server.web.forms import form_version
from server.web.pages.bills import bills_context
from server.web.pages.house import house_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender

router = APIRouter()
#: largest file taken by each upload field [bytes] (the readers bound their rows as well)
MAX_UPLOAD_BYTES = 32 * 1024 * 1024


def _respond(request: Request, session: Session, org: Organization, house: House,
             ctx: dict[str, Any], status: int) -> Response:  # fmt: skip
    if status == 200 and not is_htmx(request):
        return RedirectResponse(f"/houses/{house.id}#sec-bills", status_code=303)
    return page_or_fragment(
        request, page="pages/house.html", fragment="partials/house_bills.html", context=ctx,
        page_context=lambda: house_context(session=session, organization_id=org.id, house_id=house.id),
        status_code=status,
    )  # fmt: skip


def _upload(value: object) -> tuple[str, BinaryIO] | None:
    """A file field that holds a file (a form without one posts an empty part)."""
    if not isinstance(value, UploadFile) or not (value.filename or value.size):
        return None
    if (value.size or 0) > MAX_UPLOAD_BYTES:
        raise InputError("file", f"{value.filename}: the file is larger than 32 MB")
    return (value.filename or "the file")[:80], value.file


def _context(session: Session, org: Organization, house: House, sub: Submission,
             message: str) -> dict[str, Any]:  # fmt: skip
    return bills_context(
        house=house, catalog=catalog_for(session=session, organization_id=org.id),
        rows=sub.rows, errors=sub.errors, paste=sub.paste, paste_rows=sub.paste_rows,
        weather_mode=sub.weather_mode, degree_day_base=sub.degree_day_base,
        weather_kept=sub.weather_kept, message=message,
    )  # fmt: skip


@router.post("/houses/{house_id}/bills")
def save_house_bills(
    request: Request, session: SessionDep, org: OrgDep, form: PostedForm, house_id: int
) -> Response:
    """Save the house's bills from the table, a paste, a CSV or a Green Button file."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    fields = {name: value for name, value in form.items() if isinstance(value, str)}
    try:
        version = form_version(fields)
        uploads = {key: _upload(form.get(key)) for key in ("csv_file", "green_button_file")}
        weather = [u for u in (_upload(v) for v in form.getlist("weather_file")) if u is not None]
    except InputError as exc:
        sub = Submission(rows=rows_from_form(fields), errors={"form": exc.message},
                         paste=fields.get("paste", ""), weather_kept=fields.get("weather_kept", ""))  # fmt: skip
        ctx = _context(session, org, house, sub, "Not saved: see the message.")
        return _respond(request, session, org, house, ctx, 422)
    sub = submit_bills(session=session, house=house, fields=fields, csv_file=uploads["csv_file"],
                       green_button_file=uploads["green_button_file"], weather_files=weather,
                       expected_version=version)  # fmt: skip
    if sub.conflict:
        sub.errors["form"] = stale_form()
        ctx = _context(session, org, house, sub, "Not saved.")
        return _respond(request, session, org, house, ctx, 409)
    if not sub.saved:
        bad = sum(1 for r in sub.rows if r.errors) + len(sub.paste_rows)
        message = (
            f"Not saved: {bad} row{'s' if bad != 1 else ''} need{'s' if bad == 1 else ''} a "
            "look (marked below); every row is kept here."
            if bad
            else "Not saved: see the marked parts."
        )
        return _respond(
            request, session, org, house, _context(session, org, house, sub, message), 422
        )
    assert sub.fit is not None
    count = sub.fit.periods_used
    ctx = bills_context(house=house, catalog=catalog_for(session=session, organization_id=org.id),
                        message=f"Bills saved: {count} period{'s' if count != 1 else ''}.")  # fmt: skip
    return _respond(request, session, org, house, ctx, 200)


@router.post("/houses/{house_id}/bills/remove")
def remove_house_bills(
    request: Request, session: SessionDep, org: OrgDep, data: PostedFields, house_id: int
) -> Response:
    """Remove the house's bills (the model is then no longer compared with them)."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)

    def rerender(errors: dict[str, str], status: int) -> Response:
        return _respond(
            request, session, org, house, bills_context(house=house, errors=errors), status
        )

    def saved(_: None) -> Response:
        ctx = bills_context(house=house, message="Bills removed.")
        return _respond(request, session, org, house, ctx, 200)

    return save_or_rerender(
        call=lambda: remove_bills(session=session, house=house, expected_version=form_version(data)),
        saved=saved, rerender=rerender, conflict_key="remove", field_key=lambda _: "remove",
        not_done="the bills were not removed", then="Reload to see their change.",
    )  # fmt: skip
