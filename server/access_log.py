"""One line per HTTP request on the ``warmstead.access`` logger, without secrets in it.

Replaces uvicorn's access log, which wrote every path as requested: a homeowner's share link
``/s/<token>`` is the key to that house's figures, so a log reader could open it. Here the
token is written as ``/s/…``, and query strings are left out (a ``next=`` or a selection says
nothing the operator needs). The line: client address, method, path, status, milliseconds.
"""

from __future__ import annotations

import logging
import time

from starlette.types import ASGIApp, Message, Receive, Scope, Send

LOGGER = logging.getLogger("warmstead.access")
SHARED_PREFIX = "/s/"


def loggable_path(path: str) -> str:
    """``path`` with anything secret in it blanked (the share-link token)."""
    if path.startswith(SHARED_PREFIX) and len(path) > len(SHARED_PREFIX):
        rest = path[len(SHARED_PREFIX) :]
        tail = rest[rest.index("/") :] if "/" in rest else ""
        return SHARED_PREFIX + "…" + tail
    return path


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
