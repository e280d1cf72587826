"""The ``warmstead`` command: serve, migrate, demo, backup, restore."""

from __future__ import annotations

import argparse
import importlib.util
import os
import shutil
import sqlite3
import sys
import time
from pathlib import Path
from typing import Any

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


def server_options() -> dict[str, str]:
    """uvloop and httptools when installed (``uvicorn[standard]``), else uvicorn's defaults.

    With several workers the plain asyncio loop added ~44 ms to every keep-alive request on
    the project's 2-core machine (measured), so they are always asked for.
    """
    return {
        "loop": "uvloop" if importlib.util.find_spec("uvloop") else "auto",
        "http": "httptools" if importlib.util.find_spec("httptools") else "auto",
    }


def log_config() -> dict[str, Any]:
    """uvicorn's logging set-up, with our access log (server/access_log.py: share-link tokens
    blanked) on stdout in place of uvicorn's own."""
    import copy

    from uvicorn.config import LOGGING_CONFIG

    config = copy.deepcopy(LOGGING_CONFIG)
    config["formatters"]["warmstead"] = {
        "format": "%(asctime)s %(message)s", "datefmt": "%Y-%m-%dT%H:%M:%S%z",
    }  # fmt: skip
    config["handlers"]["warmstead_access"] = {
        "formatter": "warmstead", "class": "logging.StreamHandler", "stream": "ext://sys.stdout",
    }  # fmt: skip
    config["loggers"]["warmstead.access"] = {
        "handlers": ["warmstead_access"], "level": "INFO", "propagate": False,
    }  # fmt: skip
    return config


def serve(host: str, port: int, workers: int) -> None:
    import uvicorn

    uvicorn.run(
        "server.main:app",  # an import string: each worker process builds its own app
        host=host,
        port=port,
        workers=workers,
        proxy_headers=False,
        log_level="info",
        access_log=False,  # ours instead: server/access_log.py
        log_config=log_config(),
        **server_options(),  # type: ignore[arg-type]
    )


# --- backup and restore (SQLite) -------------------------------------------------------------


class CommandError(Exception):
    """A refusal in plain words (printed, exit status 1)."""


def sqlite_file(database_url: str | None = None) -> Path:
    """The database file of a SQLite URL; PostgreSQL and in-memory databases are refused."""
    from sqlalchemy.engine import make_url

    from server.db import normalise_url

    url = make_url(normalise_url(database_url or get_settings().database_url))
    if url.get_backend_name() != "sqlite":
        raise CommandError(
            f"the database is {url.get_backend_name()}, not SQLite: back it up with the "
            "database's own tools (for PostgreSQL: pg_dump --format=custom, and pg_restore)"
        )
    if url.database in (None, "", ":memory:"):
        raise CommandError("the database is in memory: there is no file to back up")
    return Path(url.database)


def _integrity(connection: sqlite3.Connection) -> str:
    rows = connection.execute("PRAGMA integrity_check").fetchall()
    return "; ".join(str(r[0]) for r in rows)


def _copy(source: sqlite3.Connection, target: sqlite3.Connection) -> None:
    """SQLite's online backup API, all pages in one step: one consistent snapshot of the
    source (in WAL mode its writers carry on meanwhile)."""
    source.backup(target, pages=-1)


def photos_beside(backup_file: Path) -> Path:
    """Where a backup keeps its photos: the directory ``<backup file>-photos`` beside it."""
    return backup_file.with_name(backup_file.name + "-photos")


def photo_root(database_url: str | None = None, photo_dir: Path | None = None) -> Path:
    """The photo directory of the database backed up or restored: ``photo_dir``, else
    ``WARMSTEAD_PHOTO_DIR``, else ``photos`` beside the SQLite file (as the app finds it)."""
    if photo_dir is not None:
        return photo_dir
    configured = get_settings().photo_dir
    return configured if configured is not None else sqlite_file(database_url).parent / "photos"


def backup(dest: Path, *, database_url: str | None = None, photo_dir: Path | None = None) -> str:
    """Copy the live SQLite database to ``dest`` (a new file) and its photos to
    ``<dest>-photos/`` (:func:`photos_beside`). Returns a one-line summary.

    Photo files never change once written (a new photo has a new name), so the photos are
    copied before the database's snapshot and once more after it (only files not yet copied):
    every photo of the snapshot has its file in the copy, and files of photos the snapshot does
    not hold are left out."""
    path = sqlite_file(database_url)
    if not path.exists():
        raise CommandError(f"there is no database at {path} (run warmstead migrate first)")
    if dest.exists() or photos_beside(dest).exists():
        raise CommandError(f"{dest} exists already: choose a new file name")
    dest.parent.mkdir(parents=True, exist_ok=True)
    photos_from = photo_root(database_url, photo_dir)
    photos_partial = dest.with_name(f".{dest.name}-photos.partial-{os.getpid()}")
    _copy_new_files(photos_from, photos_partial)
    partial = dest.with_name(f".{dest.name}.partial-{os.getpid()}")
    source = sqlite3.connect(path, timeout=30)
    target = sqlite3.connect(partial)
    try:
        _copy(source, target)
        target.execute("PRAGMA journal_mode=DELETE")  # the copy is one self-contained file
        verdict = _integrity(target)
        houses = _count(target, "houses")
    finally:
        target.close()
        source.close()
    if verdict != "ok":
        partial.unlink(missing_ok=True)
        shutil.rmtree(photos_partial, ignore_errors=True)
        raise CommandError(f"the copy failed its integrity check ({verdict}); nothing written")
    _copy_new_files(photos_from, photos_partial)  # those added while the snapshot was taken
    photos = _keep_only(photos_partial, _photo_files(partial))
    with open(partial, "rb") as handle:
        os.fsync(handle.fileno())
    os.replace(photos_partial, photos_beside(dest))
    os.replace(partial, dest)
    _fsync_dir(dest.parent)
    size_mb = dest.stat().st_size / 1e6
    return (f"backup written: {dest} ({size_mb:.2f} MB, {houses} houses, integrity ok) and "
            f"{photos} photos in {photos_beside(dest)}")  # fmt: skip


def _copy_new_files(source: Path, target: Path) -> None:
    """Copy each file under ``source`` that ``target`` does not hold yet (flushed to disk)."""
    target.mkdir(parents=True, exist_ok=True)
    if not source.is_dir():
        return
    for item in sorted(source.rglob("*")):
        if not item.is_file() or item.name.startswith("."):  # a file being written: not yet
            continue
        copy = target / item.relative_to(source)
        if copy.exists():
            continue
        copy.parent.mkdir(parents=True, exist_ok=True)
        shutil.copy2(item, copy)
        with open(copy, "rb") as handle:
            os.fsync(handle.fileno())


def _photo_files(database: Path) -> set[str] | None:
    """The relative paths of the photo files a database's rows name (None: no photos table)."""
    connection = sqlite3.connect(f"{database.resolve().as_uri()}?mode=ro", uri=True)
    try:
        rows = connection.execute(
            "SELECT organization_id, house_id, storage_key, content_type FROM photos"
        ).fetchall()
    except sqlite3.OperationalError:
        return None
    finally:
        connection.close()
    ext = {"image/jpeg": "jpg", "image/png": "png"}
    return {f"{org}/{house}/{key}.{ext.get(kind, 'jpg')}" for org, house, key, kind in rows}


def _keep_only(directory: Path, wanted: set[str] | None) -> int:
    """Remove the files under ``directory`` not in ``wanted``; the number of files kept."""
    kept = 0
    for item in sorted(directory.rglob("*"), reverse=True):
        if item.is_file():
            if wanted is not None and item.relative_to(directory).as_posix() not in wanted:
                item.unlink()
            else:
                kept += 1
        elif item.is_dir() and not any(item.iterdir()):
            item.rmdir()
    return kept


def restore(source_file: Path, *, database_url: str | None = None, force: bool = False,
            photo_dir: Path | None = None) -> str:  # fmt: skip
    """Write a backup over the configured SQLite database (through the backup API), and its
    photos (``<backup>-photos/``, when the backup has them) in place of the photo directory."""
    path = sqlite_file(database_url)
    if not source_file.is_file():
        raise CommandError(f"there is no backup file at {source_file}")
    source = sqlite3.connect(f"{source_file.resolve().as_uri()}?mode=ro", uri=True)
    try:
        try:
            verdict = _integrity(source)
        except sqlite3.DatabaseError as exc:
            raise CommandError(f"{source_file} is not a SQLite database ({exc})") from None
        if verdict != "ok":
            raise CommandError(f"{source_file} fails its integrity check ({verdict}); not restored")
        tables = {r[0] for r in source.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        if not {"alembic_version", "houses"} <= tables:
            raise CommandError(f"{source_file} is not a Warmstead database (no houses table)")
        in_use = [p.name for p in _side_files(path) if p.exists()]
        if in_use and not force:
            raise CommandError(
                f"{path} looks in use ({', '.join(in_use)} present): stop every warmstead "
                "process first; if none is running (it stopped uncleanly), pass --force"
            )
        path.parent.mkdir(parents=True, exist_ok=True)
        target = sqlite3.connect(path, timeout=30)
        try:
            _copy(source, target)
            target.commit()
            verdict = _integrity(target)
            houses = _count(target, "houses")
        finally:
            target.close()
    finally:
        source.close()
    if verdict != "ok":
        raise CommandError(f"the restored database fails its integrity check ({verdict})")
    saved_photos = photos_beside(source_file)
    if not saved_photos.is_dir():
        return (f"restored {source_file} into {path} ({houses} houses, integrity ok); the "
                f"backup has no {saved_photos.name}, so the photo directory was left as it is")  # fmt: skip
    photos = _put_photos_back(saved_photos, photo_root(database_url, photo_dir))
    return f"restored {source_file} into {path} ({houses} houses, integrity ok) and {photos} photos"


def _put_photos_back(saved: Path, root: Path) -> int:
    """Copy ``saved`` beside ``root``, then swap it in by renames (the old one removed last)."""
    root.parent.mkdir(parents=True, exist_ok=True)
    incoming = root.with_name(f".{root.name}.restore-{os.getpid()}")
    outgoing = root.with_name(f".{root.name}.old-{os.getpid()}")
    shutil.rmtree(incoming, ignore_errors=True)
    _copy_new_files(saved, incoming)
    if root.exists():
        os.replace(root, outgoing)
    os.replace(incoming, root)
    _fsync_dir(root.parent)
    shutil.rmtree(outgoing, ignore_errors=True)
    return sum(1 for item in root.rglob("*") if item.is_file())


def _side_files(path: Path) -> list[Path]:
    return [path.with_name(path.name + "-wal"), path.with_name(path.name + "-shm")]


def _count(connection: sqlite3.Connection, table: str) -> int:
    try:
        return int(connection.execute(f"SELECT count(*) FROM {table}").fetchone()[0])
    except sqlite3.OperationalError:
        return 0


def _fsync_dir(directory: Path) -> None:
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:  # pragma: no cover - platforms without directory handles
        return
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def settings_problem() -> str | None:
    """Why the settings cannot be used, in plain words (None when they can): read before
    anything starts, so that a refusal (production without a secret) is one clear line."""
    from pydantic import ValidationError

    try:
        get_settings()
    except ValidationError as exc:
        return "; ".join(_problem_text(e["loc"], str(e["msg"])) for e in exc.errors())
    return None


def _problem_text(loc: tuple[int | str, ...], message: str) -> str:
    message = message.removeprefix("Value error, ")
    return f"WARMSTEAD_{str(loc[0]).upper()}: {message}" if loc else message


def main(argv: list[str] | None = None) -> int:
    problem = settings_problem()
    if problem is not None:
        print(f"warmstead: refusing to start: {problem}", file=sys.stderr)
        return 1
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
    p_backup = sub.add_parser(
        "backup", help="copy the SQLite database to a new file, live, and its photos beside it"
    )
    p_backup.add_argument(
        "dest",
        type=Path,
        help="the backup file to write (must not exist); photos go to DEST-photos/",
    )
    p_restore = sub.add_parser("restore", help="put a backup in place of the SQLite database")
    p_restore.add_argument(
        "src", type=Path, help="a file written by warmstead backup (its SRC-photos/ too)"
    )
    p_restore.add_argument(
        "--force", action="store_true", help="restore although the database looks in use"
    )
    args = parser.parse_args(argv)
    if args.command == "migrate":
        started = time.perf_counter()
        migrate()
        print(f"database ready ({time.perf_counter() - started:.2f} s)")
    elif args.command == "demo":
        if get_settings().environment == "production":
            print("warmstead demo: refused with WARMSTEAD_ENVIRONMENT=production: the demo "
                  "sign-ins have published passwords. Create real users on the Users page.",
                  file=sys.stderr)  # fmt: skip
            return 1
        house_id = demo()
        from server.services.demo import DEMO_ACCOUNTS

        print(f"demo house loaded: /houses/{house_id}")
        print("demo sign-ins (development only; deactivate them on a real server):")
        for email, password, org_name, role in DEMO_ACCOUNTS:
            print(f"  {email} / {password}  ({role}, {org_name})")
    elif args.command == "serve":
        serve(args.host, args.port, args.workers)
    elif args.command in ("backup", "restore"):
        try:
            if args.command == "backup":
                print(backup(args.dest))
            else:
                print(restore(args.src, force=args.force))
        except CommandError as exc:
            print(f"warmstead {args.command}: {exc}", file=sys.stderr)
            return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
