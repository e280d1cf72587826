"""The ``warmstead`` command: serve, migrate, demo."""

from __future__ import annotations

import argparse
import sys
import time

from server.config import ROOT, get_settings


def migrate(database_url: str | None = None) -> None:
    """Bring the database to the newest schema (Alembic) and refresh the built-in library."""
    from alembic import command
    from alembic.config import Config

    from server.db import make_engine, make_session_factory, session_scope
    from server.services.library import sync_builtin_materials

    url = database_url or get_settings().database_url
    config = Config(str(ROOT / "alembic.ini"))
    config.attributes["database_url"] = url
    command.upgrade(config, "head")
    engine = make_engine(url)
    with session_scope(make_session_factory(engine)) as session:
        sync_builtin_materials(session=session)
    engine.dispose()


def demo(database_url: str | None = None) -> int:
    """Load the demo house and the demo sign-ins (idempotent). Returns the house's id."""
    from server.db import make_engine, make_session_factory, session_scope
    from server.services.demo import load_demo_accounts, load_demo_house

    engine = make_engine(database_url or get_settings().database_url)
    with session_scope(make_session_factory(engine)) as session:
        house_id = load_demo_house(session=session)
        load_demo_accounts(session=session)
    engine.dispose()
    return house_id


def serve(host: str, port: int, workers: int) -> None:
    import uvicorn

    uvicorn.run(
        "server.main:app",
        host=host,
        port=port,
        workers=workers,
        proxy_headers=False,
        log_level="info",
    )


def main(argv: list[str] | None = None) -> int:
    settings = get_settings()
    parser = argparse.ArgumentParser(
        prog="warmstead", description="Compare insulation upgrades on a house."
    )
    sub = parser.add_subparsers(dest="command", required=True)
    p_serve = sub.add_parser("serve", help="serve the app (default 127.0.0.1:8000)")
    p_serve.add_argument("--host", default=settings.host)
    p_serve.add_argument("--port", type=int, default=settings.port)
    p_serve.add_argument("--workers", type=int, default=settings.workers)
    sub.add_parser("migrate", help="create or upgrade the database schema and the built-in library")
    sub.add_parser("demo", help="load the demo house")
    args = parser.parse_args(argv)
    if args.command == "migrate":
        started = time.perf_counter()
        migrate()
        print(f"database ready ({time.perf_counter() - started:.2f} s)")
    elif args.command == "demo":
        house_id = demo()
        from server.services.demo import DEMO_ACCOUNTS

        print(f"demo house loaded: /houses/{house_id}")
        print("demo sign-ins (development only; deactivate them on a real server):")
        for email, password, firm, role in DEMO_ACCOUNTS:
            print(f"  {email} / {password}  ({role}, {firm})")
    elif args.command == "serve":
        serve(args.host, args.port, args.workers)
    return 0


if __name__ == "__main__":
    sys.exit(main())
