"""Shared fixtures: a migrated database per backend, an app and a client on it.

DB tests run on SQLite always and on PostgreSQL when ``WARMSTEAD_TEST_POSTGRES_URL`` (default
postgresql://postgres@127.0.0.1:5432/test) answers; otherwise the PostgreSQL cases skip with a
message saying so. Each backend is migrated once per run (Alembic, the only way tables are
made); every test then starts from empty tables (firm rows deleted, built-in library kept).
"""

from __future__ import annotations

import os
import shutil
import warnings
from collections.abc import Iterator
from pathlib import Path

import pytest
from sqlalchemy import text

warnings.filterwarnings("ignore", message=".*httpx2.*")

from fastapi.testclient import TestClient  # noqa: E402

from server.app import create_app  # noqa: E402
from server.cli import migrate  # noqa: E402
from server.config import Settings  # noqa: E402
from server.db import make_engine  # noqa: E402

PG_URL = os.environ.get("WARMSTEAD_TEST_POSTGRES_URL", "postgresql://postgres@127.0.0.1:5432/test")
#: one schema per test run, so two runs on one server never trample each other
PG_SCHEMA = f"warmstead_test_{os.getpid()}"
TABLES_CHILD_FIRST = [
    "share_links", "price_book_items", "login_attempts", "packages", "upgrades", "surfaces",
    "houses", "users", "organizations",
]  # fmt: skip


def _pg_reachable() -> str | None:
    try:
        engine = make_engine(PG_URL)
        with engine.connect() as conn:
            conn.execute(text("select 1"))
        engine.dispose()
        return None
    except Exception as exc:  # pragma: no cover - depends on the machine
        return f"PostgreSQL at {PG_URL} is not reachable ({type(exc).__name__}); PostgreSQL tests skipped"


def pg_schema_url(schema: str) -> str:
    sep = "&" if "?" in PG_URL else "?"
    return f"{PG_URL}{sep}options=-csearch_path%3D{schema}"


def reset_pg_schema(schema: str) -> None:
    engine = make_engine(PG_URL)
    with engine.begin() as conn:
        conn.execute(text(f'DROP SCHEMA IF EXISTS "{schema}" CASCADE'))
        conn.execute(text(f'CREATE SCHEMA "{schema}"'))
    engine.dispose()


def drop_pg_schema(schema: str) -> None:
    engine = make_engine(PG_URL)
    with engine.begin() as conn:
        conn.execute(text(f'DROP SCHEMA IF EXISTS "{schema}" CASCADE'))
    engine.dispose()


@pytest.fixture(scope="session")
def sqlite_template(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("db") / "template.db"
    migrate(f"sqlite:///{path}")
    return path


@pytest.fixture(scope="session")
def pg_migrated() -> Iterator[str]:
    reason = _pg_reachable()
    if reason:
        pytest.skip(reason)
    reset_pg_schema(PG_SCHEMA)
    url = pg_schema_url(PG_SCHEMA)
    migrate(url)
    yield url
    drop_pg_schema(PG_SCHEMA)


@pytest.fixture(params=["sqlite", pytest.param("postgres", marks=pytest.mark.postgres)])
def db_url(request: pytest.FixtureRequest, tmp_path: Path) -> Iterator[str]:
    """A migrated, empty database (built-in library loaded) on each backend."""
    if request.param == "sqlite":
        template: Path = request.getfixturevalue("sqlite_template")
        path = tmp_path / "test.db"
        shutil.copy(template, path)
        yield f"sqlite:///{path}"
        return
    url: str = request.getfixturevalue("pg_migrated")
    yield url
    engine = make_engine(url)
    with engine.begin() as conn:
        conn.execute(text("DELETE FROM materials WHERE organization_id IS NOT NULL"))
        for table in TABLES_CHILD_FIRST:
            conn.execute(text(f"DELETE FROM {table}"))
    engine.dispose()


@pytest.fixture
def app(db_url: str):  # type: ignore[no-untyped-def]
    application = create_app(Settings(environment="test", database_url=db_url))
    yield application
    application.state.engine.dispose()


@pytest.fixture
def client(app) -> Iterator[TestClient]:  # type: ignore[no-untyped-def]
    with TestClient(app) as test_client:
        yield test_client


@pytest.fixture
def session(app):  # type: ignore[no-untyped-def]
    s = app.state.session_factory()
    yield s
    s.close()
