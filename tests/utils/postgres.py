"""A PostgreSQL schema of one's own on a shared server (tests, and the benchmark's --postgres).

The app reaches it through ``search_path`` in the URL, so two runs on one server never share
tables.
"""

from __future__ import annotations

from sqlalchemy import text

from server.db import make_engine


def schema_url(base_url: str, schema: str) -> str:
    """``base_url`` with ``search_path`` set to ``schema``."""
    sep = "&" if "?" in base_url else "?"
    return f"{base_url}{sep}options=-csearch_path%3D{schema}"


def reset_schema(base_url: str, schema: str) -> None:
    """``schema`` empty and ready (dropped first if it was there)."""
    engine = make_engine(base_url)
    with engine.begin() as conn:
        conn.execute(text(f'DROP SCHEMA IF EXISTS "{schema}" CASCADE'))
        conn.execute(text(f'CREATE SCHEMA "{schema}"'))
    engine.dispose()


def drop_schema(base_url: str, schema: str) -> None:
    engine = make_engine(base_url)
    with engine.begin() as conn:
        conn.execute(text(f'DROP SCHEMA IF EXISTS "{schema}" CASCADE'))
    engine.dispose()
