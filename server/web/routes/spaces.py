"""House page routes: unconditioned buffer spaces (add, save, delete), ISO 13789."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import RedirectResponse, Response
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import House, Organization
from server.services import houses as houses_svc
from server.services import idempotency as idem
from server.services import spaces as svc
from server.web.deps import CurrentUser, OrgDep, PostedFields, SessionDep
from server.web.forms import form_version
from server.web.pages.house import house_context
from server.web.pages.spaces import spaces_context
from server.web.render import is_htmx, page_or_fragment
from server.web.saving import save_or_rerender

router = APIRouter()


def _respond(
    request: Request, session: Session, org: Organization, house: House, status: int,
    **context: Any,
) -> Response:  # fmt: skip
    """Saved without htmx: back to the card; else the card (htmx) or the whole House page with
    the card's messages and what was typed, at ``status``."""
    if status == 200 and not is_htmx(request):
        return RedirectResponse(f"/houses/{house.id}#spaces", status_code=303)
    ctx = spaces_context(session=session, organization_id=org.id, house=house, **context)
    return page_or_fragment(
        request, page="pages/house.html", fragment="partials/house_spaces.html",
        context={"house": house, **ctx},
        page_context=lambda: house_context(session=session, organization_id=org.id, house_id=house.id),
        status_code=status,
    )  # fmt: skip


def _version(data: dict[str, str], errors: dict[str, str]) -> int | None:
    try:
        return form_version(data)
    except InputError as exc:
        errors["form"] = exc.message
        return None


def _saved(request: Request, session: Session, org: Organization, house: House,
           message: str) -> Callable[[object], Response]:  # fmt: skip
    return lambda _: _respond(request, session, org, house, 200, message=message)


@router.post("/houses/{house_id}/spaces")
def add_space(
    request: Request, session: SessionDep, org: OrgDep, user: CurrentUser, data: PostedFields,
    house_id: int,
) -> Response:  # fmt: skip
    house = houses_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    space, errors = svc.read_space_form(data, house.units)  # type: ignore[arg-type]
    version = _version(data, errors)

    def rerender(errors: dict[str, str], status: int) -> Response:
        return _respond(request, session, org, house, status, space_id="new", typed=data,
                        errors=errors, message="Not added: check the marked fields.")  # fmt: skip

    if errors:
        return rerender(errors, 422)

    def work() -> str:
        svc.add_space(session=session, house=house, space=space, expected_version=version)
        return f"/houses/{house.id}#spaces"

    def add() -> None:  # the same form posted again answers as the first time, adding nothing
        idem.once(session=session, organization_id=org.id, user_id=user.id,
                  key=idem.read_key(data), purpose="space", work=work)  # fmt: skip

    return save_or_rerender(call=add, rerender=rerender,
                            saved=_saved(request, session, org, house, "Space added."))  # fmt: skip


@router.post("/houses/{house_id}/spaces/{space_id}")
def save_space(
    request: Request, session: SessionDep, org: OrgDep, data: PostedFields, house_id: int,
    space_id: str,
) -> Response:  # fmt: skip
    house = houses_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    if not any(s.get("id") == space_id for s in svc.spaces_of(house)):
        raise houses_svc.NotFound
    space, errors = svc.read_space_form(data, house.units)  # type: ignore[arg-type]
    version = _version(data, errors)

    def rerender(errors: dict[str, str], status: int) -> Response:
        return _respond(request, session, org, house, status, space_id=space_id, typed=data,
                        errors=errors, message="Not saved: check the marked fields.")  # fmt: skip

    if errors:
        return rerender(errors, 422)
    return save_or_rerender(
        call=lambda: svc.save_space(session=session, house=house, space_id=space_id, space=space,
                                    expected_version=version),
        saved=_saved(request, session, org, house, "Space saved."), rerender=rerender,
    )  # fmt: skip


@router.post("/houses/{house_id}/spaces/{space_id}/delete")
def delete_space(
    request: Request, session: SessionDep, org: OrgDep, data: PostedFields, house_id: int,
    space_id: str,
) -> Response:  # fmt: skip
    house = houses_svc.get_house(session=session, organization_id=org.id, house_id=house_id)
    errors: dict[str, str] = {}
    version = _version(data, errors)

    def rerender(errors: dict[str, str], status: int) -> Response:
        # SpaceInUse ("delete"): what still lies in the space, and the offer to release it
        return _respond(request, session, org, house, status, space_id=space_id, errors=errors,
                        refused="delete" in errors, message="Not deleted.")  # fmt: skip

    if errors:
        return rerender(errors, 422)
    return save_or_rerender(
        call=lambda: svc.delete_space(session=session, house=house, space_id=space_id,
                                      expected_version=version, release=data.get("release") == "1"),
        saved=_saved(request, session, org, house, "Space deleted."), rerender=rerender,
        not_done="the space was not deleted",
    )  # fmt: skip
