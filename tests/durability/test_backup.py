"""``warmstead backup`` / ``restore``: SQLite's online backup API, proved under live writes.

The backup is taken while another thread keeps committing new houses. A consistent snapshot
holds exactly the first n houses the writer committed (ids 1..n, nothing torn), passes
``PRAGMA integrity_check`` and, restored into a new path, gives the same rows in every table.
"""

from __future__ import annotations

import sqlite3
import threading
import time
from pathlib import Path

import pytest
from fastapi.testclient import TestClient

from server.app import create_app
from server.cli import CommandError, backup, main, migrate, restore
from server.config import Settings
from server.db import make_engine, make_session_factory, session_scope
from server.services.houses import create_house
from tests.utils.auth import signed_in_headers


def _tables(path: Path) -> dict[str, list[tuple[object, ...]]]:
    with sqlite3.connect(path) as connection:
        names = [
            r[0]
            for r in connection.execute(
                "SELECT name FROM sqlite_master WHERE type='table' ORDER BY name"
            )
        ]
        return {
            n: connection.execute(f"SELECT * FROM {n} ORDER BY rowid").fetchall() for n in names
        }


def _integrity(path: Path) -> str:
    with sqlite3.connect(path) as connection:
        return str(connection.execute("PRAGMA integrity_check").fetchone()[0])


@pytest.fixture
def live_db(tmp_path: Path) -> tuple[Path, str]:
    path = tmp_path / "live.db"
    url = f"sqlite:///{path}"
    migrate(url)
    return path, url


def test_backup_during_writes_is_a_consistent_snapshot_and_restores_row_for_row(
    tmp_path: Path, live_db: tuple[Path, str]
) -> None:
    path, url = live_db
    engine = make_engine(url)
    factory = make_session_factory(engine)
    with session_scope(factory) as session:
        from server.models import Organization

        org = Organization(name="Backup firm")
        session.add(org)
        session.flush()
        org_id = org.id
    stop = threading.Event()
    written: list[int] = []

    def writer() -> None:
        n = 0
        while not stop.is_set() and n < 2000:
            n += 1
            with session_scope(factory) as session:
                written.append(
                    create_house(session=session, organization_id=org_id, label=f"house {n}").id
                )

    thread = threading.Thread(target=writer)
    thread.start()
    try:
        while len(written) < 20:  # let the writer get going
            time.sleep(0.01)
        dest = tmp_path / "snap" / "backup.db"
        summary = backup(dest, database_url=url)
        during = len(written)
        time.sleep(0.05)  # and keep writing after the copy
    finally:
        stop.set()
        thread.join(timeout=30)
        engine.dispose()
    assert "integrity ok" in summary
    assert len(written) > during >= 20  # the writer ran before, during and after the copy
    assert _integrity(dest) == "ok"
    with sqlite3.connect(dest) as connection:
        ids = [r[0] for r in connection.execute("SELECT id FROM houses ORDER BY id")]
        mode = connection.execute("PRAGMA journal_mode").fetchone()[0]
    # A snapshot: the first n committed houses, no gaps, none of the later ones.
    assert ids == written[: len(ids)]
    assert 20 <= len(ids) <= len(written)
    assert mode == "delete"  # one self-contained file, no -wal beside it
    assert not Path(f"{dest}-wal").exists()

    new_path = tmp_path / "restored" / "warmstead.db"
    message = restore(dest, database_url=f"sqlite:///{new_path}")
    assert "integrity ok" in message
    assert _integrity(new_path) == "ok"
    assert _tables(new_path) == _tables(dest)
    # The source kept every house written after the copy.
    source_ids = [r[0] for r in _tables(path)["houses"]]
    assert source_ids == written


def test_the_app_runs_on_a_restored_database(tmp_path: Path, live_db: tuple[Path, str]) -> None:
    _path, url = live_db
    app = create_app(Settings(environment="test", database_url=url))
    headers = signed_in_headers(app, email="restore@example.com")
    with TestClient(app, follow_redirects=False) as client:
        made = client.post("/houses", data={"label": "Restored house"}, headers=headers)
        assert made.status_code == 303
        house_url = made.headers["location"]
    app.state.engine.dispose()
    dest = tmp_path / "backup.db"
    backup(dest, database_url=url)
    restored_url = f"sqlite:///{tmp_path / 'elsewhere.db'}"
    restore(dest, database_url=restored_url)
    other = create_app(Settings(environment="test", database_url=restored_url))
    with TestClient(other) as client:  # the same user and session cookie work there
        page = client.get(house_url, headers=headers)
    other.state.engine.dispose()
    assert page.status_code == 200
    assert "Restored house" in page.text


def test_backup_refusals_are_plain(tmp_path: Path, live_db: tuple[Path, str]) -> None:
    _path, url = live_db
    with pytest.raises(CommandError, match="pg_dump"):
        backup(tmp_path / "x.db", database_url="postgresql://postgres@127.0.0.1:5432/test")
    with pytest.raises(CommandError, match="in memory"):
        backup(tmp_path / "x.db", database_url="sqlite://")
    with pytest.raises(CommandError, match="no database"):
        backup(tmp_path / "x.db", database_url=f"sqlite:///{tmp_path / 'absent.db'}")
    (tmp_path / "taken.db").write_bytes(b"")
    with pytest.raises(CommandError, match="exists already"):
        backup(tmp_path / "taken.db", database_url=url)


def test_restore_checks_the_source_and_the_target(
    tmp_path: Path, live_db: tuple[Path, str]
) -> None:
    path, url = live_db
    target = f"sqlite:///{tmp_path / 'target.db'}"
    junk = tmp_path / "junk.db"
    junk.write_bytes(b"this is not a database" * 100)
    with pytest.raises(CommandError, match="not a SQLite database"):
        restore(junk, database_url=target)
    foreign = tmp_path / "foreign.db"
    with sqlite3.connect(foreign) as connection:
        connection.execute("CREATE TABLE notes (body TEXT)")
    with pytest.raises(CommandError, match="not a Warmstead database"):
        restore(foreign, database_url=target)
    with pytest.raises(CommandError, match="no backup file"):
        restore(tmp_path / "absent.db", database_url=target)
    good = tmp_path / "good.db"
    backup(good, database_url=url)
    # A database another process holds open (WAL side files present) is not overwritten...
    holder = sqlite3.connect(path)
    holder.execute("PRAGMA journal_mode=WAL")
    holder.execute("SELECT count(*) FROM houses").fetchone()
    try:
        with pytest.raises(CommandError, match="looks in use"):
            restore(good, database_url=url)
        # ...unless the operator says no process runs (e.g. after a crash).
        assert "integrity ok" in restore(good, database_url=url, force=True)
    finally:
        holder.close()
    assert _integrity(path) == "ok"


def test_the_command_line(tmp_path: Path, live_db: tuple[Path, str], monkeypatch, capsys) -> None:  # type: ignore[no-untyped-def]
    from server.config import get_settings

    _path, url = live_db
    monkeypatch.setenv("WARMSTEAD_DATABASE_URL", url)
    get_settings.cache_clear()
    try:
        assert main(["backup", str(tmp_path / "cli.db")]) == 0
        assert "backup written" in capsys.readouterr().out
        assert main(["backup", str(tmp_path / "cli.db")]) == 1
        assert "exists already" in capsys.readouterr().err
        monkeypatch.setenv("WARMSTEAD_DATABASE_URL", f"sqlite:///{tmp_path / 'new.db'}")
        get_settings.cache_clear()
        assert main(["restore", str(tmp_path / "cli.db")]) == 0
        assert "restored" in capsys.readouterr().out
    finally:
        get_settings.cache_clear()
