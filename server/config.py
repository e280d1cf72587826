"""Settings: one typed class, read from the environment (prefix ``WARMSTEAD_``) on demand."""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path

from pydantic import model_validator
from pydantic_settings import BaseSettings, SettingsConfigDict

ROOT = Path(__file__).resolve().parent.parent
DEV_SECRET = "dev-only-secret-change-me"


class Settings(BaseSettings):
    """Application settings. Every field can be set as ``WARMSTEAD_<NAME>``."""

    model_config = SettingsConfigDict(env_prefix="WARMSTEAD_", env_file=None, extra="ignore")

    environment: str = "development"  # development | test | production
    database_url: str = f"sqlite:///{ROOT / 'var' / 'warmstead.db'}"
    secret_key: str = DEV_SECRET
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

    @model_validator(mode="after")
    def _refuse_default_secret(self) -> Settings:
        if self.environment == "production" and self.secret_key == DEV_SECRET:
            raise ValueError(
                "set WARMSTEAD_SECRET_KEY: the development secret is refused in production"
            )
        if not 1 <= self.max_active_requests <= self.db_pool_size:
            raise ValueError(
                "WARMSTEAD_MAX_ACTIVE_REQUESTS must be between 1 and WARMSTEAD_DB_POOL_SIZE "
                f"({self.db_pool_size}): each request inside the app may hold a connection"
            )
        return self


@lru_cache
def get_settings() -> Settings:
    """The process's settings, built once on first use (never at import)."""
    return Settings()
