"""Price book page (the firm's unit costs) and "Fill cost from price book" on an upgrade."""

from __future__ import annotations

from typing import Any

from fastapi import APIRouter, Form, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from server.errors import InputError
from server.services import houses as svc
from server.services import price_book as book
from server.services.number_text import NumberTextError, read_decimal
from server.web.deps import OrgDep, SessionDep, render
from server.web.forms import form_version
from server.web.pages.price_book import price_book_context
from server.web.pages.quote import quote_context
from server.web.saving import save_or_rerender

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


@router.get("/price-book", name="price_book")
def price_book_page(request: Request, session: SessionDep, org: OrgDep) -> HTMLResponse:
    context = price_book_context(session=session, organization_id=org.id)
    return render(request, "pages/price_book.html", context)


def _form(name: str, upgrade_type: str, basis: str, units: str, unit_cost: str, fixed_cost: str,
          notes: str) -> dict[str, str]:  # fmt: skip
    return dict(
        zip(FIELDS, (name, upgrade_type, basis, units, unit_cost, fixed_cost, notes), strict=True)
    )


@router.post("/price-book")
def add_item(
    request: Request, session: SessionDep, org: OrgDep, name: str = Form(""),
    upgrade_type: str = Form(""), basis: str = Form(""), units: str = Form("ip"),
    unit_cost: str = Form(""), fixed_cost: str = Form(""), notes: str = Form(""),
) -> Response:  # fmt: skip
    form = _form(name, upgrade_type, basis, units, unit_cost, fixed_cost, notes)
    errors: dict[str, str] = {}
    values = _values(form, errors)
    if not errors:
        try:
            book.add_item(session=session, organization_id=org.id, **values)
            return RedirectResponse("/price-book", status_code=303)
        except InputError as exc:
            errors = _errors(exc)
    ctx = price_book_context(session=session, organization_id=org.id, form=form, errors=errors,
                             message="Not added: check the marked fields.")  # fmt: skip
    return render(request, "pages/price_book.html", ctx, status_code=422)


@router.post("/price-book/examples")
def add_examples(session: SessionDep, org: OrgDep) -> RedirectResponse:
    book.seed_examples(session=session, organization_id=org.id)
    return RedirectResponse("/price-book", status_code=303)


@router.post("/price-book/{item_id}")
def update_item(
    request: Request, session: SessionDep, org: OrgDep, item_id: int, name: str = Form(""),
    upgrade_type: str = Form(""), basis: str = Form(""), units: str = Form("ip"),
    unit_cost: str = Form(""), fixed_cost: str = Form(""), notes: str = Form(""),
) -> Response:  # fmt: skip
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
    ctx = price_book_context(session=session, organization_id=org.id, edit_id=item_id, edit_form=form,
                             edit_errors=errors, message="Not saved: check the marked fields.")  # fmt: skip
    return render(request, "pages/price_book.html", ctx, status_code=422)


@router.post("/price-book/{item_id}/delete")
def delete_item(session: SessionDep, org: OrgDep, item_id: int) -> RedirectResponse:
    book.delete_item(session=session, organization_id=org.id, item_id=item_id)
    return RedirectResponse("/price-book", status_code=303)


@router.post("/houses/{house_id}/upgrades/{upgrade_id}/price-item")
def fill_from_price_book(
    request: Request, session: SessionDep, org: OrgDep, house_id: int, upgrade_id: int,
    price_item: str = Form(""), version: str = Form(""), back: str = Form(""),
) -> Response:  # fmt: skip
    """Link an upgrade to a price-book item (its cost then follows the item) or unlink it."""
    house = svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    upgrade = next((u for u in house.upgrades if u.id == upgrade_id), None)
    if upgrade is None:
        raise svc.NotFound
    target = back if back.startswith(f"/houses/{house.id}/") else f"/houses/{house.id}"

    def rerender(errors: dict[str, str], status: int) -> Response:
        message = errors["price_item"]
        slug = target.rstrip("/").rsplit("/", 1)[-1] if "/quote/" in target else None
        if slug:  # the page the form was on
            quote = quote_context(session=session, organization=org, house=house, package_slug=slug,
                                  fill_error={"upgrade": upgrade.slug, "message": message})  # fmt: skip
            return render(request, "pages/quote.html", quote, status_code=status)
        ctx = price_book_context(session=session, organization_id=org.id,
                                 message=f"Cost not filled for '{upgrade.name}': {message}")  # fmt: skip
        return render(request, "pages/price_book.html", ctx, status_code=status)

    return save_or_rerender(
        call=lambda: book.link_price_item(session=session, organization_id=org.id, house=house, upgrade=upgrade,
                                          price_item=price_item, expected_version=form_version({"version": version})),
        saved=lambda _: RedirectResponse(target, status_code=303), rerender=rerender,
        conflict_key="price_item", field_key=lambda _: "price_item",
    )  # fmt: skip
