"""Settings: one typed class, read from the environment (prefix ``WARMSTEAD_``) on demand.

The signing secret (session cookies, CSRF tokens) is never a string shipped with the source:

- ``WARMSTEAD_SECRET_KEY`` set: that one (production requires it, so that every process on
  every machine signs with the same key and none depends on a file on one disk).
- Otherwise, in development: a random secret made once per install and kept in
  ``WARMSTEAD_SECRET_KEY_FILE`` (default: ``secret_key`` beside a SQLite database file, else
  ``var/secret_key`` under the project root, for PostgreSQL or an in-memory SQLite), mode 0600.
  It is written to a temporary file and linked into place, so workers starting at once all read
  the one secret that got there first (:func:`secret_from_file`).
- Otherwise, in test: a random secret per process, kept in memory only.
"""

from __future__ import annotations

import os
import secrets
from enum import StrEnum
from functools import lru_cache
from pathlib import Path

from pydantic import Field, model_validator
from pydantic_settings import BaseSettings, SettingsConfigDict

ROOT = Path(__file__).resolve().parent.parent
DEFAULT_SECRET_KEY_FILE = ROOT / "var" / "secret_key"
SECRET_BYTES = 32  #: random bytes of a generated secret (256 bits, URL-safe base64: 43 chars)
#: secrets that have been published (in this project's history) and are never accepted
PUBLISHED_SECRETS = frozenset({"dev-only-secret-change-me"})


class Environment(StrEnum):
    """Where the app runs: development (``make run``), test (the test suite), production."""

    development = "development"
    test = "test"
    production = "production"


def secret_from_file(path: Path) -> str:
    """The secret kept in ``path``, made there first (random, mode 0600) when there is none.

    Safe when several processes start at once: each writes its own temporary file and links it
    to ``path``; the link fails for all but the first, and every process then reads ``path``,
    which never exists half-written. Raises ``ValueError`` for an empty or unreadable file
    (never replaced: signed-in users would all be signed out, and it may be a mistake).
    """
    if not path.exists():
        try:
            _make_secret_file(path)
        except OSError as exc:
            raise ValueError(
                f"cannot make the secret key file {path} ({exc}): set WARMSTEAD_SECRET_KEY, "
                "or WARMSTEAD_SECRET_KEY_FILE to a path this process may write"
            ) from None
    try:
        value = path.read_text(encoding="utf-8").strip()
    except (OSError, UnicodeDecodeError) as exc:
        raise ValueError(f"cannot read the secret key file {path}: {exc}") from None
    if not value:
        raise ValueError(
            f"the secret key file {path} is empty: delete it to have a new secret made (this "
            "signs everyone out), or set WARMSTEAD_SECRET_KEY"
        )
    return value


def _make_secret_file(path: Path) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    temporary = path.with_name(f".{path.name}.{os.getpid()}.{secrets.token_hex(4)}")
    fd = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    try:
        with os.fdopen(fd, "w") as handle:
            handle.write(secrets.token_urlsafe(SECRET_BYTES) + "\n")
            handle.flush()
            os.fsync(handle.fileno())
        try:
            os.link(temporary, path)  # atomic, and fails when the name exists
        except FileExistsError:
            pass  # another process was first: its secret is the one
    finally:
        temporary.unlink(missing_ok=True)


@lru_cache(maxsize=1)
def _process_secret() -> str:
    """The test environment's secret: random, one per process, in memory only."""
    return secrets.token_urlsafe(SECRET_BYTES)


class Settings(BaseSettings):
    """Application settings. Every field can be set as ``WARMSTEAD_<NAME>``."""

    model_config = SettingsConfigDict(env_prefix="WARMSTEAD_", env_file=None, extra="ignore")

    environment: Environment = Environment.development
    database_url: str = f"sqlite:///{ROOT / 'var' / 'warmstead.db'}"
    #: empty: made and kept per install (see the module doc); required in production
    secret_key: str = Field(default="", repr=False)
    #: where a development install keeps its generated secret (see :meth:`secret_key_path`)
    secret_key_file: Path | None = None
    host: str = "127.0.0.1"
    port: int = 8000
    workers: int = 1
    sql_echo: bool = False
    #: mark cookies Secure even when the request looks like http (TLS ended at a proxy)
    cookie_secure: bool = False
    #: requests inside the app at once per process (the rest wait their turn, first come
    #: first served; see server/admission.py). At most the database pool's size.
    max_active_requests: int = 8
    #: connections per process in the database pool (SQLAlchemy ``pool_size``; 10 more may
    #: open briefly under a burst)
    db_pool_size: int = 10
    #: the largest request body taken [bytes]; larger ones get 413
    max_body_bytes: int = 25 * 1024 * 1024
    #: where photos are kept (files, outside the database); unset: see :meth:`photo_path`
    photo_dir: Path | None = None
    #: the largest photo file taken per upload [bytes]
    photo_max_bytes: int = 10 * 1024 * 1024
    #: the most all of one house's stored photos may take together [bytes]
    house_photo_max_bytes: int = 200 * 1024 * 1024

    def secret_key_path(self) -> Path:
        """``secret_key_file`` when set; else ``secret_key`` beside a SQLite database file;
        else (PostgreSQL, in-memory SQLite) ``var/secret_key`` under the project root."""
        if self.secret_key_file is not None:
            return self.secret_key_file
        from sqlalchemy.engine import make_url
        from sqlalchemy.exc import ArgumentError

        try:
            url = make_url(self.database_url)
        except ArgumentError:
            return DEFAULT_SECRET_KEY_FILE
        if url.get_backend_name() == "sqlite" and url.database not in (None, "", ":memory:"):
            return Path(url.database).parent / "secret_key"
        return DEFAULT_SECRET_KEY_FILE

    def photo_path(self) -> Path:
        """``photo_dir`` when set; else ``photos`` beside a SQLite database file (``var/photos``
        for the default database); else (PostgreSQL, in-memory SQLite) ``var/photos`` under the
        project root."""
        if self.photo_dir is not None:
            return self.photo_dir
        beside = self._sqlite_directory()
        return (beside if beside is not None else ROOT / "var") / "photos"

    def _sqlite_directory(self) -> Path | None:
        from sqlalchemy.engine import make_url
        from sqlalchemy.exc import ArgumentError

        try:
            url = make_url(self.database_url)
        except ArgumentError:
            return None
        if url.get_backend_name() == "sqlite" and url.database not in (None, "", ":memory:"):
            return Path(url.database).parent
        return None

    @model_validator(mode="after")
    def _check(self) -> Settings:
        if not 1 <= self.max_active_requests <= self.db_pool_size:
            raise ValueError(
                "WARMSTEAD_MAX_ACTIVE_REQUESTS must be between 1 and WARMSTEAD_DB_POOL_SIZE "
                f"({self.db_pool_size}): each request inside the app may hold a connection"
            )
        self.secret_key = self.secret_key.strip()
        if self.secret_key in PUBLISHED_SECRETS:
            raise ValueError(
                "WARMSTEAD_SECRET_KEY is a published string (it is in Warmstead's source), so "
                "anyone could sign a session with it: set a random one, e.g. from "
                "python -c 'import secrets; print(secrets.token_urlsafe(32))'"
            )
        if not self.secret_key:
            if self.environment == Environment.production:
                raise ValueError(
                    "set WARMSTEAD_SECRET_KEY: production needs a secret set for every process "
                    "(e.g. python -c 'import secrets; print(secrets.token_urlsafe(32))'); it is "
                    "never made on its own there"
                )
            if self.environment == Environment.test:
                self.secret_key = _process_secret()
            else:
                self.secret_key = secret_from_file(self.secret_key_path())
        return self


@lru_cache
def get_settings() -> Settings:
    """The process's settings, built once on first use (never at import)."""
    return Settings()
