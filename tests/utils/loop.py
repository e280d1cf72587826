"""Run a coroutine to completion from a test, whatever loop the test process already runs.

The browser fixtures (Playwright's sync API) keep an event loop running on the main thread for
the whole session, and ``asyncio.run`` refuses to start inside one; a fresh thread has none.
"""

from __future__ import annotations

import asyncio
import threading
from collections.abc import Coroutine
from typing import Any, TypeVar

T = TypeVar("T")


def run(coro: Coroutine[Any, Any, T]) -> T:
    """``asyncio.run(coro)`` on a thread of its own; its result or exception comes back here."""
    outcome: dict[str, Any] = {}

    def target() -> None:
        try:
            outcome["value"] = asyncio.run(coro)
        except BaseException as exc:  # handed back to the caller below
            outcome["error"] = exc

    thread = threading.Thread(target=target, name="test-event-loop")
    thread.start()
    thread.join()
    if "error" in outcome:
        raise outcome["error"]
    return outcome["value"]  # type: ignore[no-any-return]
