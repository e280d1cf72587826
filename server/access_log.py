"""One line per HTTP request on the ``warmstead.access`` logger, without secrets in it.

Replaces uvicorn's access log, which wrote every path as requested: a homeowner's share link
``/s/<token>`` is the key to that house's figures, so a log reader could open it. Here the
token is written as ``/s/…``, and query strings are left out (a ``next=`` or a selection says
nothing the operator needs). The line: client address, method, path, status, milliseconds.

A token is blanked wherever it stands, not only in the one well-formed ``/s/<token>``: a client
may send ``//s/<T>``, ``/./s/<T>``, ``/S/<T>``, ``/s//<T>``, ``/static/../s/<T>`` or any of them
percent-encoded (uvicorn decodes one level into ``scope["path"]``, a doubly encoded request keeps
``%73`` or ``%2F`` there). The path is read as a browser or a proxy in front might read it:
percent-decoded until it no longer changes, split on ``/`` and ``\\``. Blanked are (1) the first
real segment after any segment ``s`` (any case), and (2) any segment shaped like a token (32+
characters of the ``token_urlsafe`` alphabet with an upper-case letter or ``_``, which no slug
of this app has), for a token whose ``s`` was resolved away (``/s/../<T>``). Such a path is
written in its decoded form with the blanks; every other path as it came. Control characters
are written as ``%XX`` so that a path cannot start a forged line.
"""

from __future__ import annotations

import logging
import re
import time
from urllib.parse import unquote

from starlette.types import ASGIApp, Message, Receive, Scope, Send

LOGGER = logging.getLogger("warmstead.access")
BLANK = "…"
_SEPARATORS = re.compile(r"[/\\]")
#: a segment that may be a share token although no ``s`` segment precedes it (see module doc)
_TOKEN_LIKE = re.compile(r"^(?=[A-Za-z0-9_-]*[A-Z_])[A-Za-z0-9_-]{32,}$")
_CONTROL = re.compile(r"[\x00-\x1f\x7f]")
_DECODE_ROUNDS = 8  #: percent-decoding stops here at the latest (a path encoded 8 times over)


def _decoded(path: str) -> str:
    """``path`` percent-decoded until it no longer changes."""
    for _ in range(_DECODE_ROUNDS):
        once = unquote(path, errors="replace")
        if once == path:
            break
        path = once
    return path


def _blanked_segments(segments: list[str]) -> list[str] | None:
    """The segments with share tokens blanked, or None when none was found."""
    out = list(segments)
    found = False
    for i, segment in enumerate(segments):
        if _TOKEN_LIKE.match(segment):
            out[i], found = BLANK, True
        if segment.lower() != "s":
            continue
        for j in range(i + 1, len(segments)):
            if segments[j] not in ("", ".", ".."):
                out[j], found = BLANK, True
                break
            if segments[j] == "..":
                break
    return out if found else None


def _printable(path: str) -> str:
    return _CONTROL.sub(lambda m: f"%{ord(m.group()):02X}", path)


def loggable_path(path: str) -> str:
    """``path`` with anything secret in it blanked (the share-link token), wherever it stands
    (see the module doc), and control characters written as ``%XX``."""
    blanked = _blanked_segments(_SEPARATORS.split(_decoded(path)))
    if blanked is not None:
        path = "/".join(blanked)
    return _printable(path)


class AccessLog:
    """ASGI middleware writing the access line when the response has been sent."""

    def __init__(self, app: ASGIApp, logger: logging.Logger = LOGGER) -> None:
        self.app = app
        self.logger = logger

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http" or not self.logger.isEnabledFor(logging.INFO):
            await self.app(scope, receive, send)
            return
        began = time.perf_counter()
        status = 500  # what the client gets if the app raises before answering

        async def send_noting_status(message: Message) -> None:
            nonlocal status
            if message["type"] == "http.response.start":
                status = message["status"]
            await send(message)

        try:
            await self.app(scope, receive, send_noting_status)
        finally:
            client = scope.get("client")
            self.logger.info(
                '%s "%s %s" %d %.1f ms',
                client[0] if client else "-",
                scope.get("method", "-"),
                loggable_path(scope.get("path", "")),
                status,
                (time.perf_counter() - began) * 1e3,
            )
