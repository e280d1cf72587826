"""The signing secret: never a string published with the source (server/config.py).

An install without ``WARMSTEAD_SECRET_KEY`` makes its own random secret once and keeps it in a
file (mode 0600) that every worker reads; production refuses to start without a set secret.
"""

from __future__ import annotations

import multiprocessing
import stat
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient
from pydantic import ValidationError

from server.app import create_app
from server.cli import main
from server.config import Settings, get_settings, secret_from_file
from server.db import session_scope
from server.security import SESSION_COOKIE, issue_session
from server.services.demo import load_demo_house
from tests.conftest import make_account
from tests.security.conftest import SQLITE_ONLY

#: the built-in development secret every install used to sign its cookies with (it was
#: ``DEV_SECRET`` in server/config.py, readable by anyone who has the source)
OLD_BUILT_IN_SECRET = "dev-only-secret-change-me"


@pytest.fixture
def no_secret_set(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """No ``WARMSTEAD_SECRET_KEY`` in the environment; the secret file in this test's folder."""
    monkeypatch.delenv("WARMSTEAD_SECRET_KEY", raising=False)
    monkeypatch.delenv("WARMSTEAD_ENVIRONMENT", raising=False)
    path = tmp_path / "keys" / "secret_key"
    monkeypatch.setenv("WARMSTEAD_SECRET_KEY_FILE", str(path))
    return path


@SQLITE_ONLY
def test_a_cookie_signed_with_the_old_built_in_secret_is_refused(
    db_url: str, no_secret_set: Path
) -> None:
    # a default install (development, nothing set), as `make run` serves it
    app = create_app(Settings(database_url=db_url))
    try:
        admin = make_account(app, firm="Firm A", email="admin@firm-a.invalid")
        with session_scope(app.state.session_factory) as s:
            house_id = load_demo_house(session=s)
        forged = issue_session(OLD_BUILT_IN_SECRET, user_id=admin.user_id, session_version=1)
        with TestClient(app) as attacker:
            attacker.cookies.set(SESSION_COOKIE, forged, domain="testserver.local")
            r = attacker.get(f"/houses/{house_id}", follow_redirects=False)
            assert r.status_code == 303
            assert r.headers["location"] == f"/login?next=%2Fhouses%2F{house_id}"
            # the forged cookie is dropped, not kept
            assert any(c.startswith(f"{SESSION_COOKIE}=;") for c in
                       r.headers.get_list("set-cookie"))  # fmt: skip
        # the install's own secret, made on first use, does sign real sessions
        own = no_secret_set.read_text().strip()
        assert own == app.state.settings.secret_key and own != OLD_BUILT_IN_SECRET
        genuine = issue_session(own, user_id=admin.user_id, session_version=1)
        with TestClient(app) as owner:
            owner.cookies.set(SESSION_COOKIE, genuine, domain="testserver.local")
            assert owner.get(f"/houses/{house_id}").status_code == 200
    finally:
        app.state.engine.dispose()


def test_the_secret_is_made_once_random_and_private(no_secret_set: Path) -> None:
    first = Settings(database_url="sqlite://")
    assert no_secret_set.is_file()
    assert stat.S_IMODE(no_secret_set.stat().st_mode) == 0o600
    # 32 random bytes, URL-safe base64: 43 characters (256 bits)
    assert len(first.secret_key) == 43
    # the next start (and every other worker) reads the same secret
    assert Settings(database_url="sqlite://").secret_key == first.secret_key
    # another install makes another secret
    other = no_secret_set.with_name("other_secret_key")
    assert secret_from_file(other) != first.secret_key
    # an explicitly set secret wins and writes nothing
    no_secret_set.unlink()
    set_one = Settings(database_url="sqlite://", secret_key="s" * 40)
    assert set_one.secret_key == "s" * 40 and not no_secret_set.exists()


def test_the_secret_file_lives_beside_a_sqlite_database_by_default(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.delenv("WARMSTEAD_SECRET_KEY", raising=False)
    monkeypatch.delenv("WARMSTEAD_SECRET_KEY_FILE", raising=False)
    settings = Settings(environment="development", database_url=f"sqlite:///{tmp_path}/w.db")
    assert settings.secret_key_path() == tmp_path / "secret_key"
    assert (tmp_path / "secret_key").read_text().strip() == settings.secret_key


def _race(path: str, barrier: Any, results: Any) -> None:
    barrier.wait()
    results.put(secret_from_file(Path(path)))


def test_workers_starting_at_once_agree_on_one_secret(tmp_path: Path) -> None:
    path = tmp_path / "secret_key"
    workers = 6
    context = multiprocessing.get_context("fork")
    barrier, results = context.Barrier(workers), context.Queue()
    processes = [context.Process(target=_race, args=(str(path), barrier, results))
                 for _ in range(workers)]  # fmt: skip
    for process in processes:
        process.start()
    found = [results.get(timeout=30) for _ in range(workers)]
    for process in processes:
        process.join(timeout=30)
        assert process.exitcode == 0
    assert len(set(found)) == 1
    assert path.read_text().strip() == found[0]
    assert [p.name for p in tmp_path.iterdir()] == ["secret_key"]  # no temporary files left


def test_an_empty_secret_file_is_refused_not_replaced(tmp_path: Path) -> None:
    path = tmp_path / "secret_key"
    path.write_text("\n")
    with pytest.raises(ValueError, match="secret_key"):
        secret_from_file(path)
    assert path.read_text() == "\n"


def test_production_without_a_set_secret_is_refused(no_secret_set: Path) -> None:
    with pytest.raises(ValidationError, match="WARMSTEAD_SECRET_KEY"):
        Settings(environment="production", database_url="sqlite://")
    # not even when another run has left a secret file behind
    secret_from_file(no_secret_set)
    with pytest.raises(ValidationError, match="WARMSTEAD_SECRET_KEY"):
        Settings(environment="production", database_url="sqlite://")
    # nor with the published development string set by hand
    with pytest.raises(ValidationError, match="published"):
        Settings(environment="production", database_url="sqlite://",
                 secret_key=OLD_BUILT_IN_SECRET)  # fmt: skip
    assert Settings(environment="production", secret_key="p" * 40).secret_key == "p" * 40


def test_the_environment_is_one_of_three(no_secret_set: Path) -> None:
    for name in ("development", "test", "production"):
        assert Settings(environment=name, secret_key="e" * 40).environment == name
    with pytest.raises(ValidationError, match="environment"):
        Settings(environment="staging", secret_key="e" * 40)


def test_the_command_refuses_to_start_production_with_a_clear_message(
    no_secret_set: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    monkeypatch.setenv("WARMSTEAD_ENVIRONMENT", "production")
    get_settings.cache_clear()
    try:
        assert main(["serve"]) == 1
    finally:
        get_settings.cache_clear()
    err = capsys.readouterr().err
    assert err.startswith("warmstead: refusing to start: set WARMSTEAD_SECRET_KEY")
    assert "WARMSTEAD_SECRET_KEY" in err and "Traceback" not in err
    assert not no_secret_set.exists()


def test_the_test_environment_keeps_a_throwaway_secret_in_memory(no_secret_set: Path) -> None:
    first = Settings(environment="test", database_url="sqlite://")
    second = Settings(environment="test", database_url="sqlite://")
    assert first.secret_key == second.secret_key  # one per process
    assert len(first.secret_key) == 43 and first.secret_key != OLD_BUILT_IN_SECRET
    assert not no_secret_set.exists()
