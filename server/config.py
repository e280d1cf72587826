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

    @model_validator(mode="after")
    def _refuse_default_secret(self) -> Settings:
        if self.environment == "production" and self.secret_key == DEV_SECRET:
            raise ValueError(
                "set WARMSTEAD_SECRET_KEY: the development secret is refused in production"
            )
        return self


@lru_cache
def get_settings() -> Settings:
    """The process's settings, built once on first use (never at import)."""
    return Settings()
