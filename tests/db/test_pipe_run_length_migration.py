"""Migration 0008: a pipe run's length moves from ``surfaces.area`` to ``surfaces.length`` (and
back on downgrade), with the data of a house saved at 0007, on SQLite and PostgreSQL."""

from __future__ import annotations

import os
from collections.abc import Iterator
from pathlib import Path

import pytest
from alembic import command
from alembic.config import Config
from sqlalchemy import inspect, text
from sqlalchemy.exc import IntegrityError

from server.config import ROOT
from server.db import make_engine
from tests.conftest import _pg_reachable, drop_pg_schema, pg_schema_url, reset_pg_schema

NOW = "2026-12-01 09:00:00+00:00"


def _config(url: str) -> Config:
    config = Config(str(ROOT / "alembic.ini"))
    config.attributes["database_url"] = url
    return config


@pytest.fixture(params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)])
def empty_url(request: pytest.FixtureRequest, tmp_path: Path) -> Iterator[str]:
    """A database with no tables yet, on each backend."""
    if request.param == "sqlite":
        yield f"sqlite:///{tmp_path / 'm.db'}"
        return
    reason = _pg_reachable()
    if reason:
        pytest.skip(reason)
    schema = f"warmstead_pipe_length_{os.getpid()}"
    reset_pg_schema(schema)
    try:
        yield pg_schema_url(schema)
    finally:
        drop_pg_schema(schema)


def _save_house_at_0007(url: str) -> None:
    """One house as 0007 stored it: a wall of 120 ft², a pipe run of 40 ft in ``area``, and an
    air-sealing upgrade row whose kind was left empty."""
    engine = make_engine(url)
    with engine.begin() as conn:
        conn.execute(text("INSERT INTO organizations (id, name, created_at) VALUES (1, 'Firm', :t)"),
                     {"t": NOW})  # fmt: skip
        conn.execute(
            text(
                "INSERT INTO houses (id, organization_id, label, address, notes, units, climate,"
                " heating, economics, version, created_at, updated_at)"
                " VALUES (1, 1, 'House', '', '', 'ip', '{}', '{}', '{}', 1, :t, :t)"
            ),
            {"t": NOW},
        )
        surface = (
            "INSERT INTO surfaces (id, house_id, position, slug, name, kind, area, orientation,"
            " assembly, details, notes) VALUES (:id, 1, :id, :slug, :slug, :kind, :area, '',"
            " '{}', :details, '')"
        )
        conn.execute(text(surface), {"id": 1, "slug": "wall", "kind": "wall", "area": 120.0,
                                     "details": "{}"})  # fmt: skip
        conn.execute(text(surface), {"id": 2, "slug": "hot-water", "kind": "pipe_run", "area": 40.0,
                                     "details": '{"hours_per_year": 3000}'})  # fmt: skip
        conn.execute(
            text(
                "INSERT INTO upgrades (id, house_id, surface_id, position, slug, name, kind,"
                " document) VALUES (1, 1, NULL, 0, 'seal', 'Seal', '',"
                ' \'{"cfm50_after": 2200, "cost": {"fixed": 900}}\')'
            )
        )
    engine.dispose()


def _surfaces(url: str) -> dict[str, tuple[float | None, float | None]]:
    """slug -> (area, length); length None when the column is not there."""
    engine = make_engine(url)
    has_length = "length" in {c["name"] for c in inspect(engine).get_columns("surfaces")}
    columns = "slug, area, length" if has_length else "slug, area, NULL"
    with engine.connect() as conn:
        rows = conn.execute(text(f"SELECT {columns} FROM surfaces ORDER BY id")).all()
    engine.dispose()
    return {slug: (area, length) for slug, area, length in rows}


def test_pipe_run_length_moves_to_its_column_and_back(empty_url: str) -> None:
    config = _config(empty_url)
    command.upgrade(config, "0007")
    _save_house_at_0007(empty_url)

    command.upgrade(config, "0008")
    # the pipe run's 40 ft is its length now and it has no area; the wall keeps its 120 ft²
    assert _surfaces(empty_url) == {"wall": (120.0, None), "hot-water": (None, 40.0)}
    engine = make_engine(empty_url)
    with engine.connect() as conn:
        kind = conn.execute(text("SELECT kind FROM upgrades WHERE id = 1")).scalar()
    assert kind == "air_sealing"  # from its cfm50_after, once, so the code reads the column
    for kind, area, length in (
        ("wall", None, None),
        ("pipe_run", 5.0, 5.0),
        ("pipe_run", None, None),
    ):
        with pytest.raises(IntegrityError), engine.begin() as conn:  # the CHECK refuses each
            conn.execute(
                text(
                    "INSERT INTO surfaces (house_id, position, slug, name, kind, area, length,"
                    " orientation, assembly, details, notes)"
                    " VALUES (1, 9, 'bad', 'bad', :kind, :area, :length, '', '{}', '{}', '')"
                ),
                {"kind": kind, "area": area, "length": length},
            )
    engine.dispose()

    command.downgrade(config, "0007")
    assert _surfaces(empty_url) == {"wall": (120.0, None), "hot-water": (40.0, None)}
    engine = make_engine(empty_url)
    assert "length" not in {c["name"] for c in inspect(engine).get_columns("surfaces")}
    engine.dispose()
