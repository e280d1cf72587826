"""Price book page (the firm's unit costs) and "Fill cost from price book" on an upgrade."""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Form, Request
from fastapi.responses import RedirectResponse

from server.errors import InputError
from server.services import houses as svc
from server.services import price_book as book
from server.services.number_text import NumberTextError, read_decimal
from server.web.deps import OrgDep, SessionDep, render
from server.web.forms import form_version

router = APIRouter()
FIELDS = ("name", "upgrade_type", "basis", "units", "unit_cost", "fixed_cost", "notes")


def _money(text: str, field: str, errors: dict[str, str], units: str = "ip") -> float:
    """A cost typed in a form: blank is 0; '$1,250.50' is 1250.5 (a decimal comma, '12,50',
    only on a metric item)."""
    cleaned = (text or "").replace("$", "").strip()
    if not cleaned:
        return 0.0
    try:
        return read_decimal(cleaned, decimal_comma=units == "si")
    except NumberTextError as exc:
        errors[field] = str(exc)
        return 0.0


def _errors(exc: InputError) -> dict[str, str]:
    return {e.field: e.message for e in exc.errors()}


def _values(form: dict[str, str], errors: dict[str, str]) -> dict[str, Any]:
    return {
        "name": form["name"], "upgrade_type": form["upgrade_type"], "basis": form["basis"],
        "units": form["units"], "unit_cost": _money(form["unit_cost"], "unit_cost", errors, form["units"]),
        "fixed_cost": _money(form["fixed_cost"], "fixed_cost", errors, form["units"]), "notes": form["notes"],
    }  # fmt: skip


def item_form(item: Any) -> dict[str, str]:
    """A row as the strings its edit form shows."""
    return {"name": item.name, "upgrade_type": item.upgrade_type, "basis": item.basis,
            "units": item.units, "unit_cost": f"{item.unit_cost:g}",
            "fixed_cost": f"{item.fixed_cost:g}", "notes": item.notes}  # fmt: skip


def page_context(session, org, *, form=None, errors=None, edit_id=None, edit_form=None,
                 edit_errors=None, message="") -> dict[str, Any]:  # type: ignore[no-untyped-def]  # fmt: skip
    items = book.list_items(session=session, organization_id=org.id)
    return {
        "items": [
            {
                "item": i,
                "example": book.is_example(i),
                "form": edit_form if i.id == edit_id and edit_form else item_form(i),
                "errors": edit_errors if i.id == edit_id and edit_errors else {},
            }  # fmt: skip
            for i in items
        ],
        "form": form or {"units": "ip", "basis": "per_area", "upgrade_type": "attic_fill"},
        "errors": errors or {},
        "types": book.UPGRADE_TYPES,
        "bases": book.BASES,
        "message": message,
        "edit_id": edit_id,
    }


@router.get("/price-book", name="price_book")
def price_book_page(request: Request, session: SessionDep, org: OrgDep):  # type: ignore[no-untyped-def]
    return render(request, "pages/price_book.html", page_context(session, org))


def _form(name, upgrade_type, basis, units, unit_cost, fixed_cost, notes) -> dict[str, str]:  # type: ignore[no-untyped-def]
    return dict(
        zip(FIELDS, (name, upgrade_type, basis, units, unit_cost, fixed_cost, notes), strict=True)
    )


@router.post("/price-book")
def add_item(  # type: ignore[no-untyped-def]
    request: Request, session: SessionDep, org: OrgDep, name: str = Form(""),
    upgrade_type: str = Form(""), basis: str = Form(""), units: str = Form("ip"),
    unit_cost: str = Form(""), fixed_cost: str = Form(""), notes: str = Form(""),
):  # fmt: skip
    form = _form(name, upgrade_type, basis, units, unit_cost, fixed_cost, notes)
    errors: dict[str, str] = {}
    values = _values(form, errors)
    if not errors:
        try:
            book.add_item(session=session, organization_id=org.id, **values)
            return RedirectResponse("/price-book", status_code=303)
        except InputError as exc:
            errors = _errors(exc)
    ctx = page_context(
        session, org, form=form, errors=errors, message="Not added: check the marked fields."
    )
    return render(request, "pages/price_book.html", ctx, status_code=422)


@router.post("/price-book/examples")
def add_examples(session: SessionDep, org: OrgDep) -> RedirectResponse:
    book.seed_examples(session=session, organization_id=org.id)
    return RedirectResponse("/price-book", status_code=303)


@router.post("/price-book/{item_id}")
def update_item(  # type: ignore[no-untyped-def]
    request: Request, session: SessionDep, org: OrgDep, item_id: int, name: str = Form(""),
    upgrade_type: str = Form(""), basis: str = Form(""), units: str = Form("ip"),
    unit_cost: str = Form(""), fixed_cost: str = Form(""), notes: str = Form(""),
):  # fmt: skip
    book.get_item(session=session, organization_id=org.id, item_id=item_id)  # 404 first
    form = _form(name, upgrade_type, basis, units, unit_cost, fixed_cost, notes)
    errors: dict[str, str] = {}
    values = _values(form, errors)
    if not errors:
        try:
            book.update_item(session=session, organization_id=org.id, item_id=item_id, **values)
            return RedirectResponse(f"/price-book#item-{item_id}", status_code=303)
        except InputError as exc:
            errors = _errors(exc)
    ctx = page_context(session, org, edit_id=item_id, edit_form=form, edit_errors=errors,
                       message="Not saved: check the marked fields.")  # fmt: skip
    return render(request, "pages/price_book.html", ctx, status_code=422)


@router.post("/price-book/{item_id}/delete")
def delete_item(session: SessionDep, org: OrgDep, item_id: int) -> RedirectResponse:
    book.delete_item(session=session, organization_id=org.id, item_id=item_id)
    return RedirectResponse("/price-book", status_code=303)


@router.post("/houses/{house_id}/upgrades/{upgrade_id}/price-item")
def fill_from_price_book(  # type: ignore[no-untyped-def]
    request: Request, session: SessionDep, org: OrgDep, house_id: int, upgrade_id: int,
    price_item: str = Form(""), version: str = Form(""), back: str = Form(""),
):  # fmt: skip
    """Link an upgrade to a price-book item (its cost then follows the item) or unlink it."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    upgrade = next((u for u in house.upgrades if u.id == upgrade_id), None)
    if upgrade is None:
        raise svc.NotFound
    target = back if back.startswith(f"/houses/{house.id}/") else f"/houses/{house.id}"
    try:
        svc.check_version(house, form_version({"version": version}))
        if price_item:
            items = {i.slug: i for i in book.list_items(session=session, organization_id=org.id)}
            if price_item not in items:
                raise InputError("price_item", "there is no such item in the price book")
            document = book.apply_price_item(upgrade.document, items[price_item], units=house.units)
        else:
            document = {k: v for k, v in upgrade.document.items() if k != "price_item"}
        upgrade.document = document
        svc.touch(house)  # written now: Conflict when another save of the house came first
    except (InputError, svc.Conflict) as exc:
        message = (
            "Someone else changed this house since you opened it: nothing was saved. Reload "
            "and try again."
            if isinstance(exc, svc.Conflict)
            else exc.message
        )
        from server.web.routes.quote import quote_response  # the page the form was on

        slug = target.rstrip("/").rsplit("/", 1)[-1] if "/quote/" in target else None
        if slug:
            return quote_response(request, session, org, house, slug,
                                  fill_error={"upgrade": upgrade.slug, "message": message},
                                  status_code=409 if isinstance(exc, svc.Conflict) else 422)  # fmt: skip
        ctx = page_context(session, org, message=f"Cost not filled for '{upgrade.name}': {message}")
        status = 409 if isinstance(exc, svc.Conflict) else 422
        return render(request, "pages/price_book.html", ctx, status_code=status)
    return RedirectResponse(target, status_code=303)
