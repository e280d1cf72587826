"""Engine and session factory. SQLite gets WAL, foreign keys and a busy timeout."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager

from sqlalchemy import Engine, create_engine, event
from sqlalchemy.engine import make_url
from sqlalchemy.engine.interfaces import DBAPIConnection
from sqlalchemy.exc import DBAPIError
from sqlalchemy.orm import Session, sessionmaker
from sqlalchemy.orm.exc import StaleDataError
from sqlalchemy.pool import ConnectionPoolEntry, StaticPool


def normalise_url(url: str) -> str:
    """Accept ``postgresql://`` and ``postgres://`` and use the psycopg 3 driver for them."""
    if url.startswith("postgres://"):
        url = "postgresql://" + url.removeprefix("postgres://")
    if url.startswith("postgresql://"):
        url = "postgresql+psycopg://" + url.removeprefix("postgresql://")
    return url


def make_engine(url: str, *, echo: bool = False, pool_size: int = 10) -> Engine:
    """Create an engine for ``url`` with the project's connection settings.

    ``pool_size`` connections stay open per process (10 more may open under a burst); the
    admission gate (server/admission.py) lets no more requests in than that."""
    url = normalise_url(url)
    parsed = make_url(url)
    if parsed.get_backend_name() == "sqlite":
        in_memory = parsed.database in (None, "", ":memory:")
        if not in_memory and parsed.database:
            from pathlib import Path

            Path(parsed.database).parent.mkdir(parents=True, exist_ok=True)
        engine = create_engine(
            url,
            echo=echo,
            connect_args={"check_same_thread": False, "timeout": 15},
            **(
                {"poolclass": StaticPool}
                if in_memory
                else {"pool_size": pool_size, "max_overflow": 10}
            ),
        )
        event.listen(engine, "connect", _sqlite_pragmas)
        return engine
    return create_engine(url, echo=echo, pool_pre_ping=True, pool_size=pool_size, max_overflow=10)


def _sqlite_pragmas(dbapi_connection: DBAPIConnection, _record: ConnectionPoolEntry) -> None:
    cursor = dbapi_connection.cursor()
    cursor.execute("PRAGMA journal_mode=WAL")
    cursor.execute("PRAGMA foreign_keys=ON")
    cursor.execute("PRAGMA busy_timeout=15000")
    cursor.execute("PRAGMA synchronous=NORMAL")
    cursor.close()


#: PostgreSQL SQLSTATEs of a write that lost to a concurrent one: serialization_failure,
#: deadlock_detected, lock_not_available, unique_violation (PostgreSQL manual, Appendix A)
_PG_RACE_STATES = frozenset({"40001", "40P01", "55P03", "23505"})
#: SQLite result codes of the same (sqlite.org/rescode.html): SQLITE_BUSY and SQLITE_LOCKED
#: with their extended codes ("database is locked" after the busy timeout), and a unique value
_SQLITE_RACE_PREFIXES = ("SQLITE_BUSY", "SQLITE_LOCKED", "SQLITE_CONSTRAINT_UNIQUE")


def lost_race(exc: BaseException) -> bool:
    """Whether ``exc`` means another save got there first, not that this one is wrong.

    True for an optimistic-lock miss (the row's version changed since it was read:
    ``StaleDataError``), a unique value another request took a moment before, a PostgreSQL
    serialization failure, deadlock or lock timeout, and SQLite's "database is locked" after
    the busy timeout. Such a save is answered as a conflict (nothing stored, try again);
    anything else is a real error.
    """
    if isinstance(exc, StaleDataError):
        return True
    if not isinstance(exc, DBAPIError):
        return False
    state = getattr(exc.orig, "sqlstate", None)
    if state is not None:  # psycopg
        return state in _PG_RACE_STATES
    name = getattr(exc.orig, "sqlite_errorname", None)
    return isinstance(name, str) and name.startswith(_SQLITE_RACE_PREFIXES)


def make_session_factory(engine: Engine) -> sessionmaker[Session]:
    return sessionmaker(bind=engine, expire_on_commit=False, autoflush=False)


@contextmanager
def session_scope(factory: sessionmaker[Session]) -> Iterator[Session]:
    """A session that commits on success and rolls back on error."""
    session = factory()
    try:
        yield session
        session.commit()
    except Exception:
        session.rollback()
        raise
    finally:
        session.close()
