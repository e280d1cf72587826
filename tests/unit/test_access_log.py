"""The access log (server/access_log.py): one line per request, share-link tokens blanked."""

from __future__ import annotations

import logging
from typing import Any
from urllib.parse import unquote

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


#: a token as ``secrets.token_urlsafe(32)`` makes them (43 characters; this one typed by hand)
TOKEN = "q7Vx0-3mZ_pK1sT9bWc4nR8yLd2Hf6Ju5Ea0Go7Qi1M"
#: the token percent-encoded character by character (what a client may send for it)
ENCODED_TOKEN = "".join(f"%{ord(ch):02X}" for ch in TOKEN)


def _leaks_token(logged: str) -> bool:
    """True when any 8 characters in a row of :data:`TOKEN` can be read from ``logged``, as
    written or after percent-decoding it (once, twice, ...)."""
    seen = {logged}
    text = logged
    for _ in range(5):
        text = unquote(text)
        seen.add(text)
    windows = {TOKEN[i : i + 8] for i in range(len(TOKEN) - 7)}
    return any(window in form for form in seen for window in windows)


@pytest.mark.parametrize(
    "path",
    [
        f"/s/{TOKEN}",
        f"//s/{TOKEN}",
        f"/./s/{TOKEN}",
        f"/S/{TOKEN}",
        f"/s//{TOKEN}",
        f"/static/../s/{TOKEN}",
        f"/s/./{TOKEN}",
        f"/s/{TOKEN}/",
        f"/s\\{TOKEN}",
        f"/s/{TOKEN}/quote/x",
        # percent-encoded forms as they reach the app: uvicorn decodes one level of the
        # request line into scope["path"], so a doubly encoded request still shows %XX here
        f"/%73/{TOKEN}",
        f"/%53/{TOKEN}",
        f"/s%2F{TOKEN}",
        f"/s%2f{TOKEN}",
        f"/%2573/{TOKEN}",
        f"/s/{ENCODED_TOKEN}",
        f"/%2E/s/{TOKEN}",
        f"/s/..%2F{TOKEN}",
        # a token that stands alone (the "s" segment resolved away by "..")
        f"/s/../{TOKEN}",
        f"/{TOKEN}",
    ],
)
def test_a_share_token_is_blanked_wherever_it_stands(path: str) -> None:
    logged = loggable_path(path)
    assert not _leaks_token(logged), f"{path!r} logged as {logged!r}"
    assert "…" in logged


def test_malformed_share_paths_are_blanked_in_the_written_line(
    caplog: pytest.LogCaptureFixture,
) -> None:
    async def not_found(scope: Any, receive: Any, send: Any) -> None:
        await send({"type": "http.response.start", "status": 404, "headers": []})
        await send({"type": "http.response.body", "body": b""})

    with caplog.at_level(logging.INFO, logger="warmstead.access"):
        for path in (f"//s/{TOKEN}", f"/S/{TOKEN}", f"/s//{TOKEN}", f"/%73/{TOKEN}"):
            _request(AccessLog(not_found), path)
    lines = [record.getMessage() for record in caplog.records]
    assert len(lines) == 4
    for line in lines:
        assert not _leaks_token(line), line
        assert " 404 " in line


@pytest.mark.parametrize(
    ("path", "logged"),
    [
        # ordinary paths are written as they came, long slugs included
        ("/houses/12/surfaces/34", "/houses/12/surfaces/34"),
        (
            "/price-book/dense-pack-cellulose-wall-fill",
            "/price-book/dense-pack-cellulose-wall-fill",
        ),
        ("/houses/3/quote/attic-and-walls", "/houses/3/quote/attic-and-walls"),
        # a line break in the path cannot start a forged log line
        ('/houses\n127.0.0.1 "GET /x" 200', '/houses%0A127.0.0.1 "GET /x" 200'),
    ],
)
def test_ordinary_paths_are_kept_and_control_characters_escaped(path: str, logged: str) -> None:
    assert loggable_path(path) == logged
