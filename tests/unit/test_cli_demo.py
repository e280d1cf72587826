"""``warmstead demo`` loads sign-ins with published passwords: never on a production server."""

from __future__ import annotations

from pathlib import Path

import pytest

from server.cli import main
from server.config import get_settings


def test_demo_is_refused_in_production(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    database = tmp_path / "prod.db"
    monkeypatch.setenv("WARMSTEAD_ENVIRONMENT", "production")
    monkeypatch.setenv("WARMSTEAD_SECRET_KEY", "a-real-secret-for-this-test-only-0123456789")
    monkeypatch.setenv("WARMSTEAD_DATABASE_URL", f"sqlite:///{database}")
    get_settings.cache_clear()
    try:
        assert main(["demo"]) == 1
    finally:
        get_settings.cache_clear()
    assert "published passwords" in capsys.readouterr().err
    assert not database.exists()  # nothing was created
