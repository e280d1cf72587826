"""Saved houses and their surfaces. Every function is scoped by organization."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from sqlalchemy import func, or_, select
from sqlalchemy.orm import Session, object_session, selectinload

from server.db import lost_race
from server.documents.assembly import AssemblyInput, AssemblyResult
from server.documents.common import Units
from server.errors import Conflict, InputError, NotFound
from server.models import House, Organization, Surface, utcnow
from server.services import house_changes  # noqa: F401  (a child row's change touches its house)
from server.services.assembly import evaluate_assembly
from server.services.catalog import Catalog
from server.services.code_check import code_verdict
from server.services.slugs import unique_slug
from server.services.typical import typical_assemblies

SURFACE_KINDS = {
    "ceiling": "Attic floor / ceiling",
    "cathedral_roof": "Cathedral roof",
    "wall": "Wall",
    "kneewall": "Kneewall",
    "rim_joist": "Rim joist",
    "floor": "Floor over unheated space",
    "slab": "Slab on ground",
    "basement_floor": "Basement floor",
    "basement_wall": "Basement wall",
    "door": "Door",
    "window": "Window",
}
DEFAULT_HEAT_FLOW = {
    "ceiling": "up",
    "cathedral_roof": "up",
    "floor": "down",
    "slab": "down",
    "basement_floor": "down",
}


#: the largest id the id columns hold on both backends (PostgreSQL INTEGER: 2**31 - 1); a larger
#: one in a URL names nothing, and the drivers cannot even send it (a 500 before this check)
MAX_ID = 2**31 - 1


def _real_id(*ids: int) -> None:
    if not all(0 < i <= MAX_ID for i in ids):
        raise NotFound


def default_organization(*, session: Session) -> Organization:
    """The firm used before accounts exist: the first one, created on demand."""
    org = session.scalars(select(Organization).order_by(Organization.id).limit(1)).first()
    if org is None:
        org = Organization(name="Our firm")
        session.add(org)
        session.flush()
    return org


def list_houses(
    *, session: Session, organization_id: int, query: str = ""
) -> list[tuple[House, int]]:
    """The firm's houses (newest first) with their surface counts; ``query`` filters by text."""
    count = (
        select(Surface.house_id, func.count(Surface.id).label("n"))
        .group_by(Surface.house_id)
        .subquery()
    )
    stmt = (
        select(House, func.coalesce(count.c.n, 0))
        .outerjoin(count, count.c.house_id == House.id)
        .where(House.organization_id == organization_id)
        .order_by(House.updated_at.desc(), House.id.desc())
    )
    if query.strip():
        like = f"%{query.strip()}%"
        stmt = stmt.where(or_(House.label.ilike(like), House.address.ilike(like)))
    return [(h, n) for h, n in session.execute(stmt).all()]


def get_house(*, session: Session, organization_id: int, house_id: int) -> House:
    _real_id(house_id)
    house = session.scalars(
        select(House)
        .where(House.id == house_id, House.organization_id == organization_id)
        .options(selectinload(House.surfaces))
    ).first()
    if house is None:
        raise NotFound
    return house


def get_surface(
    *, session: Session, organization_id: int, house_id: int, surface_id: int
) -> Surface:
    _real_id(house_id, surface_id)
    surface = session.scalars(
        select(Surface)
        .join(House)
        .where(
            Surface.id == surface_id,
            Surface.house_id == house_id,
            House.organization_id == organization_id,
        )
    ).first()
    if surface is None:
        raise NotFound
    return surface


def create_house(
    *, session: Session, organization_id: int, label: str, address: str = "", units: Units = "ip"
) -> House:
    label = label.strip()
    if not label:
        raise InputError("label", "give the house a name, e.g. the street address or the owner")
    if units not in ("ip", "si"):
        raise InputError("units", "units must be ip or si")
    house = House(
        organization_id=organization_id,
        label=label[:200],
        address=address.strip()[:300],
        units=units,
        climate={},
        heating={},
        economics={},
    )
    session.add(house)
    session.flush()
    return house


def check_version(house: House, expected_version: int | None) -> None:
    """Raise :class:`Conflict` when the form was loaded from an older version of the house."""
    if expected_version is not None and expected_version != house.version:
        raise Conflict(house.version)


def touch(house: House) -> None:
    """Mark the house changed and write every pending change of its session now.

    The write bumps ``version`` (optimistic lock) and ``updated_at``; its UPDATE matches the
    row only while the version is still the one this request read. So of two saves made at
    the same instant from the same version (two people, two tabs), one is written and the
    other raises :class:`Conflict`, the same answer as a form loaded before someone else's
    save: its changes are rolled back, nothing of it is stored (see :func:`write_or_conflict`).
    """
    house.updated_at = utcnow()
    session = object_session(house)
    if session is not None:
        write_or_conflict(session, house)


def write_or_conflict(session: Session, house: House) -> None:
    """Flush ``session``; when the database says another save of the house got there first
    (:func:`server.db.lost_race`), roll this request's changes back and raise :class:`Conflict`
    with the version now stored. The session stays usable for the conflict page."""
    house_id = house.id
    try:
        session.flush()
    except Exception as exc:
        if not lost_race(exc):
            raise
        session.rollback()
        stored = session.scalar(select(House.version).where(House.id == house_id))
        raise Conflict(stored or 0) from exc


def add_surface(
    *,
    session: Session,
    house: House,
    name: str,
    kind: str,
    area: float,
    typical: str | None = None,
    expected_version: int | None = None,
) -> Surface:
    """Add a surface, optionally starting from a typical assembly."""
    check_version(house, expected_version)
    found = typical_assemblies().get(typical) if typical else None
    if typical and found is None:
        raise InputError("typical", "there is no such typical assembly")
    kind = kind or (found.kind if found else "wall")
    if kind not in SURFACE_KINDS:
        raise InputError("kind", "choose what kind of surface this is")
    if not (area > 0 and area < 1e7):
        raise InputError("area", "must be greater than zero")
    units: Units = house.units  # type: ignore[assignment]
    if found is not None:
        assembly = found.assembly(units).model_dump(exclude_none=True)
        name = name.strip() or found.label
    else:
        assembly = {
            "heat_flow": DEFAULT_HEAT_FLOW.get(kind, "horizontal"),
            "films": "ashrae",
            "layers": [{"name": "as found", "r": 1.0}],
        }
    name = name.strip() or SURFACE_KINDS[kind]
    surface = Surface(
        house=house,
        position=len(house.surfaces),
        slug=unique_slug(name, {s.slug for s in house.surfaces}, fallback="surface"),
        name=name[:200],
        kind=kind,
        area=area,
        assembly=assembly,
    )
    session.add(surface)
    touch(house)
    session.flush()
    return surface


def checked_assembly(
    house: House, assembly: dict[str, Any], *, catalog: Catalog, expected_version: int | None
) -> tuple[dict[str, Any], AssemblyResult]:
    """The document to store and its result, for a surface's or an upgrade's assembly.

    Raises :class:`Conflict` for a stale form and InputError when it cannot compute, before
    anything is changed.
    """
    check_version(house, expected_version)
    doc = AssemblyInput.model_validate(assembly)
    result = evaluate_assembly(doc, units=house.units, catalog=catalog, field="assembly")  # type: ignore[arg-type]
    return doc.model_dump(exclude_none=True), result


def save_assembly(
    *,
    session: Session,
    house: House,
    surface: Surface,
    assembly: dict[str, Any],
    catalog: Catalog,
    expected_version: int | None,
) -> AssemblyResult:
    """Validate, compute and save a surface's assembly. Nothing is saved if it cannot compute."""
    stored, result = checked_assembly(
        house, assembly, catalog=catalog, expected_version=expected_version
    )
    surface.assembly = stored
    touch(house)
    session.flush()
    return result


def update_surface(
    *, session: Session, house: House, surface: Surface, name: str, kind: str, area: float,
    expected_version: int | None,
) -> None:  # fmt: skip
    check_version(house, expected_version)
    if surface.kind == "pipe_run":  # its length and pipe are set on the pipe run's own form
        raise InputError("kind", "a pipe run stays a pipe run: delete it to add a surface instead")
    if kind not in SURFACE_KINDS:
        raise InputError("kind", "choose what kind of surface this is")
    if not (area > 0 and area < 1e7):
        raise InputError("area", "must be greater than zero")
    surface.name = (name.strip() or SURFACE_KINDS[kind])[:200]
    surface.kind = kind
    surface.area = area
    touch(house)
    session.flush()


def delete_surface(
    *, session: Session, house: House, surface: Surface, expected_version: int | None
) -> None:
    check_version(house, expected_version)
    session.delete(surface)
    touch(house)
    session.flush()


@dataclass
class SurfaceRow:
    surface: Surface
    result: AssemblyResult | None
    ua: float | None
    share: float | None
    error: str | None
    code: Any = None  # CodeVerdict of the prescriptive target, when the zone is known


def surface_rows(
    house: House, catalog: Catalog, targets: Any = None
) -> tuple[list[SurfaceRow], float]:
    """Each surface with its R, U, UA (U × area) and share of the envelope UA."""
    rows: list[SurfaceRow] = []
    for surface in house.surfaces:
        if surface.kind == "pipe_run":
            continue  # pipe runs have their own table (pipe_rows)
        try:
            result = evaluate_assembly(
                AssemblyInput.model_validate(surface.assembly),
                units=house.units,  # type: ignore[arg-type]
                catalog=catalog,
            )
        except (InputError, ValueError) as exc:
            rows.append(SurfaceRow(surface, None, None, None, str(exc)))
            continue
        verdict = code_verdict(house.climate, surface.kind, result, targets)
        ua = result.u_factor * (surface.area or 0.0)  # every surface but a pipe run has an area
        rows.append(SurfaceRow(surface, result, ua, None, None, verdict))
    total = sum(r.ua or 0.0 for r in rows)
    for row in rows:
        if row.ua is not None and total > 0:
            row.share = row.ua / total
    return rows, total


def add_pipe_run(
    *, session: Session, house: House, name: str, length: float, pipe: dict[str, Any],
    hours_per_year: float, expected_version: int | None,
) -> Surface:  # fmt: skip
    """A hot-water or heating pipe run: length (ft / m), pipe spec as /calc/pipe, hours hot."""
    from pydantic import ValidationError

    from server.documents.house import PipeIn

    check_version(house, expected_version)
    if not (0 < length < 1e5):
        raise InputError("length", "must be greater than zero")
    if not (0 < hours_per_year <= 8784):
        raise InputError("hours_per_year", "must be between 0 and 8,784 hours")
    try:
        spec = PipeIn.model_validate(pipe).model_dump(exclude_none=True)
    except ValidationError as exc:
        err = exc.errors()[0]
        where = ".".join(str(p) for p in err["loc"]) or "pipe"
        raise InputError(where, str(err["msg"]).removeprefix("Value error, ")) from None
    name = name.strip() or "Pipe run"
    surface = Surface(
        house=house, position=len(house.surfaces), slug=unique_slug(name, {s.slug for s in house.surfaces}, fallback="surface"),
        name=name[:200], kind="pipe_run", area=None, length=length, assembly={},
        details={"pipe": spec, "hours_per_year": hours_per_year},
    )  # fmt: skip
    session.add(surface)
    touch(house)
    session.flush()
    return surface


def pipe_rows(house: House) -> list[tuple[Surface, Any]]:
    """Each pipe run with its /calc/pipe result (or the error text)."""
    from server.documents.pipe import PipeRequest
    from server.services.pipe import compute_pipe

    rows: list[tuple[Surface, Any]] = []
    for surface in house.surfaces:
        if surface.kind != "pipe_run":
            continue
        try:
            from server.services.systems import pipe_request_fields

            request = PipeRequest.model_validate(
                {"units": house.units, **pipe_request_fields(surface.details["pipe"]), "length": surface.length,
                 "hours_per_year": surface.details.get("hours_per_year")}
            )  # fmt: skip
            rows.append((surface, compute_pipe(request)))
        except (InputError, ValueError, KeyError) as exc:
            rows.append((surface, str(exc)))
    return rows
