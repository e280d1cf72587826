"""Shared fixtures: a migrated database per backend, an app and clients on it.

DB tests run on SQLite always and on PostgreSQL when ``WARMSTEAD_TEST_POSTGRES_URL`` (default
postgresql://postgres@127.0.0.1:5432/test) answers; otherwise the PostgreSQL cases skip with a
message saying so. Each backend is migrated once per run (Alembic, the only way tables are
made); every test then starts from empty tables (firm rows deleted, built-in library kept).

Clients: ``client`` is signed in as the admin of "Firm A" (the first firm, so the demo house
lands there) and sends its CSRF token on every request; ``other_client`` is the admin of "Firm B";
``anon_client`` is nobody. Signing in here skips the login form (a session cookie is issued
directly, as :func:`server.security.issue_session` does at sign-in); the form itself is tested in
tests/security. The browser fixtures (``live_server``, ``browser``, ``signed_in``) live at the
end of this file so tests/browser and tests/security share one server per run.
"""

from __future__ import annotations

import os
import shutil
import socket
import subprocess
import sys
import time
import warnings
from collections.abc import Iterator
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import httpx
import pytest
from sqlalchemy import text

warnings.filterwarnings("ignore", message=".*httpx2.*")

from argon2 import PasswordHasher  # noqa: E402
from fastapi.testclient import TestClient  # noqa: E402

from server.app import create_app  # noqa: E402
from server.cli import migrate  # noqa: E402
from server.config import Settings  # noqa: E402
from server.db import make_engine, session_scope  # noqa: E402
from server.models import Organization, User  # noqa: E402
from server.security import (  # noqa: E402
    CSRF_HEADER,
    SESSION_COOKIE,
    csrf_for_session,
    issue_session,
    read_session,
)
from tests.utils.loop_probe import statements_on_the_event_loop  # noqa: E402
from tests.utils.postgres import drop_schema, reset_schema, schema_url  # noqa: E402

TEST_PASSWORD = "test-password-0123"
#: argon2id with small parameters, for test users (the app's defaults take ~0.2 s a hash here)
CHEAP_HASHER = PasswordHasher(time_cost=1, memory_cost=1024, parallelism=1)

PG_URL = os.environ.get("WARMSTEAD_TEST_POSTGRES_URL", "postgresql://postgres@127.0.0.1:5432/test")
#: one schema per test run, so two runs on one server never trample each other
PG_SCHEMA = f"warmstead_test_{os.getpid()}"
TABLES_CHILD_FIRST = [
    "code_targets", "share_links", "price_book_items", "login_attempts", "packages", "upgrades", "surfaces",
    "houses", "revoked_sessions", "idempotency_keys", "users", "organizations",
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
    return schema_url(PG_URL, schema)


def reset_pg_schema(schema: str) -> None:
    reset_schema(PG_URL, schema)


def drop_pg_schema(schema: str) -> None:
    drop_schema(PG_URL, schema)


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
def app(db_url: str, tmp_path: Path):  # type: ignore[no-untyped-def]
    # photos in the test's own directory (on PostgreSQL the default is var/photos of the project)
    application = create_app(Settings(environment="test", database_url=db_url,
                                      photo_dir=tmp_path / "photos"))  # fmt: skip
    on_loop = statements_on_the_event_loop(application.state.engine)
    yield application
    application.state.engine.dispose()
    # Every test through the app checks this: a statement on the event loop stalls every other
    # request of the process while it waits (see server/web/deps.py, posted_form and run_unit).
    assert not on_loop, f"statements run on the event loop: {on_loop[:5]}"


@dataclass(frozen=True)
class Account:
    """A test user: its firm, id and the session version its cookie was issued for."""

    organization_id: int
    user_id: int
    email: str
    role: str
    session_version: int = 1


@lru_cache(maxsize=1)
def cheap_password_hash() -> str:
    """An argon2id hash of :data:`TEST_PASSWORD` with small parameters (fast to verify)."""
    return CHEAP_HASHER.hash(TEST_PASSWORD)


def make_account(app, *, firm: str | None, email: str, role: str = "admin",
                 organization_id: int | None = None) -> Account:  # type: ignore[no-untyped-def]  # fmt: skip
    """A user (in a new firm called ``firm``, or in ``organization_id``) with TEST_PASSWORD."""
    with session_scope(app.state.session_factory) as s:
        if organization_id is None:
            org = Organization(name=firm or "Test firm")
            s.add(org)
            s.flush()
            organization_id = org.id
        user = User(organization_id=organization_id, email=email, name="", role=role,
                    password_hash=cheap_password_hash(), is_active=True, session_version=1)  # fmt: skip
        s.add(user)
        s.flush()
        return Account(organization_id, user.id, email, role, user.session_version)


def sign_in(test_client: TestClient, app, account: Account) -> str:  # type: ignore[no-untyped-def]
    """Give ``test_client`` a session cookie for ``account``; send its CSRF token on every
    request. Returns the token."""
    secret = app.state.settings.secret_key
    value = issue_session(secret, user_id=account.user_id, session_version=account.session_version)
    data = read_session(secret, value)
    assert data is not None
    test_client.cookies.set(SESSION_COOKIE, value, domain="testserver.local")
    token = csrf_for_session(secret, data)
    test_client.headers[CSRF_HEADER] = token
    return token


@pytest.fixture
def firm_a(app) -> Account:  # type: ignore[no-untyped-def]
    """The admin of Firm A, the first firm in the database."""
    return make_account(app, firm="Firm A", email="admin@firm-a.invalid")


@pytest.fixture
def firm_b(app, firm_a: Account) -> Account:  # type: ignore[no-untyped-def]
    """The admin of Firm B (made after Firm A, so Firm A stays the first firm)."""
    return make_account(app, firm="Firm B", email="admin@firm-b.invalid")


@pytest.fixture
def client(app, firm_a: Account) -> Iterator[TestClient]:  # type: ignore[no-untyped-def]
    """Signed in as Firm A's admin, CSRF header on every request."""
    with TestClient(app) as test_client:
        sign_in(test_client, app, firm_a)
        yield test_client


@pytest.fixture
def other_client(app, firm_b: Account) -> Iterator[TestClient]:  # type: ignore[no-untyped-def]
    """Signed in as Firm B's admin, CSRF header on every request."""
    with TestClient(app) as test_client:
        sign_in(test_client, app, firm_b)
        yield test_client


@pytest.fixture
def anon_client(app) -> Iterator[TestClient]:  # type: ignore[no-untyped-def]
    """Nobody signed in, no CSRF header."""
    with TestClient(app) as test_client:
        yield test_client


@pytest.fixture
def session(app):  # type: ignore[no-untyped-def]
    s = app.state.session_factory()
    yield s
    s.close()


# --- real server and real browser (tests/browser, tests/security) ---------------------------

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--no-first-run",
    "--disable-sync",
]
ARTIFACTS = Path(__file__).resolve().parents[1] / "test-artifacts"
#: made by `warmstead demo` (server/services/demo.py) in the live server's database
DEMO_EMAIL, DEMO_PASSWORD = "auditor@demo.invalid", "warmstead-demo"


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@pytest.fixture(scope="session")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """uvicorn in a subprocess on its own SQLite file, migrated, demo house and sign-ins loaded."""
    db = tmp_path_factory.mktemp("live") / "live.db"
    env = {
        **os.environ,
        "WARMSTEAD_DATABASE_URL": f"sqlite:///{db}",
        "WARMSTEAD_ENVIRONMENT": "test",
    }
    exe = Path(sys.executable).parent / "warmstead"
    subprocess.run([str(exe), "migrate"], env=env, check=True, capture_output=True)
    subprocess.run([str(exe), "demo"], env=env, check=True, capture_output=True)
    port = _free_port()
    proc = subprocess.Popen(
        [str(exe), "serve", "--host", "127.0.0.1", "--port", str(port)],
        env=env,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        try:
            if httpx.get(base + "/healthz", timeout=0.5).status_code == 200:
                break
        except httpx.HTTPError:
            time.sleep(0.1)
    else:
        proc.kill()
        pytest.fail("the server did not start within 60 s")
    yield base
    proc.terminate()
    proc.wait(timeout=10)


@pytest.fixture(scope="session")
def browser():  # type: ignore[no-untyped-def]
    if not Path(CHROMIUM).exists() and not shutil.which("chromium"):
        pytest.skip(
            "Debian's chromium is not installed (make browser installs it); browser tests skipped"
        )
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS, headless=True)
        yield b
        b.close()


def log_in(page, base: str, email: str = DEMO_EMAIL, password: str = DEMO_PASSWORD) -> None:  # type: ignore[no-untyped-def]
    """Sign in through the real /login form (as a person would) and wait for the houses list."""
    page.goto(base + "/login")
    page.get_by_label("E-mail").fill(email)
    page.get_by_label("Password").fill(password)
    page.get_by_role("button", name="Sign in").click()
    page.wait_for_url(base + "/houses")


@pytest.fixture(scope="session")
def signed_in(browser, live_server: str) -> dict:  # type: ignore[no-untyped-def]
    """Storage state (cookies) of the demo auditor, signed in once through /login.

    Use as ``browser.new_page(storage_state=signed_in, ...)``; a page without it is anonymous
    (the homeowner's view)."""
    context = browser.new_context()
    page = context.new_page()
    log_in(page, live_server)
    state = context.storage_state()
    context.close()
    return state  # type: ignore[no-any-return]


@pytest.fixture
def shot_dir() -> Path:
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS


def unfold(details) -> None:  # type: ignore[no-untyped-def]
    """Open a folded House page section (a <details>) the way a person does: tap its summary."""
    if details.get_attribute("open") is None:
        details.locator("summary").first.click()
