"""Alembic is the only way tables are made: upgrade head and downgrade base on both backends."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from alembic import command
from alembic.config import Config
from sqlalchemy import inspect, text

from server.config import ROOT
from server.db import make_engine
from tests.conftest import _pg_reachable, drop_pg_schema, pg_schema_url, reset_pg_schema

TABLES = {
    "organizations",
    "materials",
    "houses",
    "surfaces",
    "upgrades",
    "packages",
    "users",
    "login_attempts",
    "share_links",
    "price_book_items",
    "code_targets",
    "revoked_sessions",
    "idempotency_keys",
    "photos",
}


def _config(url: str) -> Config:
    config = Config(str(ROOT / "alembic.ini"))
    config.attributes["database_url"] = url
    return config


def _round_trip(url: str) -> None:
    config = _config(url)
    command.upgrade(config, "head")
    engine = make_engine(url)
    names = set(inspect(engine).get_table_names())
    assert TABLES <= names, f"missing after upgrade: {TABLES - names}"
    engine.dispose()
    command.downgrade(config, "base")
    engine = make_engine(url)
    left = set(inspect(engine).get_table_names()) - {"alembic_version"}
    engine.dispose()
    assert left == set(), f"left after downgrade: {left}"
    command.upgrade(config, "head")  # and up again: downgrade really undid everything


def test_sqlite_upgrade_downgrade(tmp_path: Path) -> None:
    _round_trip(f"sqlite:///{tmp_path / 'm.db'}")


@pytest.mark.postgres
def test_postgres_upgrade_downgrade() -> None:
    reason = _pg_reachable()
    if reason:
        pytest.skip(reason)
    schema = f"warmstead_migrations_{os.getpid()}"
    reset_pg_schema(schema)
    try:
        _round_trip(pg_schema_url(schema))
    finally:
        drop_pg_schema(schema)


def test_sqlite_pragmas(tmp_path: Path) -> None:
    """WAL journal and enforced foreign keys on every SQLite connection (DESIGN.md §3)."""
    engine = make_engine(f"sqlite:///{tmp_path / 'p.db'}")
    with engine.connect() as conn:
        assert conn.execute(text("PRAGMA journal_mode")).scalar() == "wal"
        assert conn.execute(text("PRAGMA foreign_keys")).scalar() == 1
        assert conn.execute(text("PRAGMA busy_timeout")).scalar() == 15000
    engine.dispose()


def test_builtin_library_seeded(db_url: str) -> None:
    """`warmstead migrate` loads every row of server/data/materials.csv."""
    from server.services.material_data import load_builtin_materials

    engine = make_engine(db_url)
    with engine.connect() as conn:
        count = conn.execute(
            text("SELECT count(*) FROM materials WHERE organization_id IS NULL")
        ).scalar()
    engine.dispose()
    assert count == len(load_builtin_materials())
