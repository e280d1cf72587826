"""A saved pipe run keeps its length in ``surfaces.length`` (never ``area``), through the house
document's export and import and a unit switch; an upgrade's kind comes from its row."""

from __future__ import annotations

from types import SimpleNamespace

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import text
from sqlalchemy.orm import Session

from server.errors import InputError
from server.models import Organization, Surface
from server.services import house_units
from server.services import houses as svc
from server.services import price_book as book
from server.services import upgrades as upg
from server.services.house_document import house_document, import_house

PIPE = {"pipe_outer_diameter": 0.875, "layers": [], "fluid_temperature": 130.0,
        "ambient_temperature": 60.0}  # fmt: skip


def _house(session: Session):  # type: ignore[no-untyped-def]
    org = Organization(name="Pipe firm")
    session.add(org)
    session.flush()
    house = svc.create_house(session=session, organization_id=org.id, label="Pipe house")
    house.climate = {"hdd": 5400}
    house.heating = {"fuel": "natural_gas", "efficiency": 0.8, "price": 1.45}
    house.air_leakage = {"cfm50": 3000, "n_factor": 18, "volume": 12000}
    session.flush()
    return org, house


def test_pipe_run_length_column_round_trip(session: Session) -> None:
    org, house = _house(session)
    run = svc.add_pipe_run(session=session, house=house, name="Hot water", length=40.0, pipe=PIPE,
                           hours_per_year=3000.0, expected_version=None)  # fmt: skip
    session.commit()
    row = session.execute(
        text("SELECT area, length FROM surfaces WHERE id = :id"), {"id": run.id}
    ).one()
    assert (row.area, row.length) == (None, 40.0)
    ((pipe_row, result),) = svc.pipe_rows(house)
    assert pipe_row is run and not isinstance(result, str)

    doc = house_document(house)
    (surface,) = doc.surfaces
    assert surface.length == 40.0 and surface.area is None
    copy = import_house(session=session, organization_id=org.id, document=doc)
    session.commit()
    (imported,) = copy.surfaces
    assert (imported.area, imported.length) == (None, 40.0)

    house_units.switch_units(session=session, house=copy, units="si", expected_version=None)
    session.commit()
    # 40 ft × 0.3048 m/ft (exact, NIST SP 811 appendix B) = 12.192 m
    assert session.get(Surface, imported.id).length == pytest.approx(12.192)  # type: ignore[union-attr]
    assert session.get(Surface, imported.id).area is None  # type: ignore[union-attr]


def test_upgrade_kind_comes_from_the_row(session: Session) -> None:
    _org, house = _house(session)
    run = svc.add_pipe_run(session=session, house=house, name="Hot water", length=40.0, pipe=PIPE,
                           hours_per_year=3000.0, expected_version=None)  # fmt: skip
    sleeves = upg.add_pipe_insulation(session=session, house=house, surface=run, name="Sleeves",
                                      thickness=0.75, conductivity=0.25, expected_version=None)  # fmt: skip
    sealing = upg.add_air_sealing(session=session, house=house, name="Seal", cfm50_after=2000.0,
                                  fixed=900.0, rebate=0.0, life_years=20.0, expected_version=None)  # fmt: skip
    # the stored documents carry no kind: the export names the row's
    assert "kind" not in sleeves.document and "kind" not in sealing.document
    kinds = {u.id: u.kind for u in house_document(house).upgrades}
    assert kinds == {"sleeves": "pipe_insulation", "seal": "air_sealing"}
    # a pipe insulation row is priced per length whatever its document holds
    upg.update_upgrade(session=session, house=house, upgrade=sleeves, name="Sleeves", fixed=40.0,
                       per_area=1.5, rebate=0.0, life_years=20.0, expected_version=None)  # fmt: skip
    assert sleeves.document["cost"] == {"fixed": 40.0, "per_length": 1.5}
    upg.update_upgrade(session=session, house=house, upgrade=sealing, name="Seal", fixed=900.0,
                       per_area=3.0, rebate=0.0, life_years=20.0, expected_version=None)  # fmt: skip
    assert sealing.document["cost"] == {"fixed": 900.0, "per_area": 0.0, "per_length": 0.0}


def test_price_item_fits_the_row_kind() -> None:
    """Duct sealing is priced fixed only (UpgradeIn); its document has no key the old guess knew,
    which took it for an assembly and let a per-area price on."""
    per_area = SimpleNamespace(slug="wrap", name="Wrap", basis="per_area", units="ip",
                               unit_cost=2.0, fixed_cost=100.0)  # fmt: skip
    doc = {"supply_leakage_after": 0.05, "cost": {"fixed": 500.0}}
    with pytest.raises(InputError, match="duct sealing takes a price fixed price per job"):
        book.apply_price_item(doc, per_area, kind="duct_sealing", units="ip")
    out = book.apply_price_item(doc, per_area, kind="duct_insulation", units="si")
    # $2/ft² ÷ 0.09290304 m²/ft² = $21.5278/m²
    assert out["cost"] == {"fixed": 100.0, "per_area": pytest.approx(21.527821)}


def test_pipe_run_is_not_edited_as_a_surface(client: TestClient) -> None:
    house = client.post("/houses", data={"label": "Pipe house"}, follow_redirects=False).headers[
        "location"
    ]
    form = {"name": "Hot water", "length": "40", "pipe_outer_diameter": "7/8",
            "fluid_temperature": "130", "ambient_temperature": "55", "hours_per_year": "3000",
            "thickness": "", "conductivity": ""}  # fmt: skip
    run = client.post(f"{house}/pipes", data=form, follow_redirects=False).headers["location"]
    assert "40 ft of pipe" in client.get(run).text
    r = client.post(run, data={"name": "Now a wall", "kind": "wall", "area": "100"})
    assert r.status_code == 422 and "a pipe run stays a pipe run" in r.text
    assert "40 ft of pipe" in client.get(run).text
