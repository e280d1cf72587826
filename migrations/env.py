"""Alembic environment: the URL comes from the caller's config or from Settings."""

from __future__ import annotations

from alembic import context

from server.config import get_settings
from server.db import make_engine, normalise_url
from server.models import Base

config = context.config
target_metadata = Base.metadata


def _url() -> str:
    return normalise_url(config.attributes.get("database_url") or get_settings().database_url)


def run_migrations_offline() -> None:
    context.configure(
        url=_url(), target_metadata=target_metadata, literal_binds=True, render_as_batch=True
    )
    with context.begin_transaction():
        context.run_migrations()


def run_migrations_online() -> None:
    connection = config.attributes.get("connection")
    if connection is not None:
        context.configure(
            connection=connection, target_metadata=target_metadata, render_as_batch=True
        )
        with context.begin_transaction():
            context.run_migrations()
        return
    engine = make_engine(_url())
    with engine.connect() as conn:
        context.configure(connection=conn, target_metadata=target_metadata, render_as_batch=True)
        with context.begin_transaction():
            context.run_migrations()
    engine.dispose()


if context.is_offline_mode():
    run_migrations_offline()
else:
    run_migrations_online()
