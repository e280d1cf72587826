"""The access log (server/access_log.py): one line per request, share-link tokens blanked."""

from __future__ import annotations

import logging
from typing import Any

import pytest

from server.access_log import AccessLog, loggable_path
from tests.utils.loop import run


@pytest.mark.parametrize(
    ("path", "logged"),
    [
        ("/s/Zm9vYmFyYmF6cXV4", "/s/…"),
        ("/s/Zm9vYmFyYmF6cXV4/print", "/s/…/print"),
        ("/s/", "/s/"),
        ("/houses/3/compare", "/houses/3/compare"),
        ("/static/app.css", "/static/app.css"),
    ],
)
def test_share_tokens_never_reach_the_log(path: str, logged: str) -> None:
    assert loggable_path(path) == logged


def _request(app: Any, path: str) -> None:
    scope = {"type": "http", "method": "GET", "path": path, "query_string": b"next=/x",
             "headers": [], "client": ("192.0.2.7", 5000)}  # fmt: skip

    async def receive() -> dict[str, Any]:
        return {"type": "http.request", "body": b""}

    async def send(_message: dict[str, Any]) -> None:
        return None

    run(app(scope, receive, send))


def test_one_line_with_status_and_time(caplog: pytest.LogCaptureFixture) -> None:
    async def teapot(scope: Any, receive: Any, send: Any) -> None:
        await send({"type": "http.response.start", "status": 418, "headers": []})
        await send({"type": "http.response.body", "body": b""})

    with caplog.at_level(logging.INFO, logger="warmstead.access"):
        _request(AccessLog(teapot), "/s/secret-token-value")
    (record,) = caplog.records
    line = record.getMessage()
    assert line.startswith('192.0.2.7 "GET /s/…" 418 ')
    assert "secret-token-value" not in line and "next=" not in line
    assert line.endswith(" ms")


def test_a_crash_is_logged_as_500(caplog: pytest.LogCaptureFixture) -> None:
    async def broken(scope: Any, receive: Any, send: Any) -> None:
        raise RuntimeError("boom")

    with caplog.at_level(logging.INFO, logger="warmstead.access"), pytest.raises(RuntimeError):
        _request(AccessLog(broken), "/houses")
    assert '"GET /houses" 500 ' in caplog.records[0].getMessage()
