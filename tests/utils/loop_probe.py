"""Which statements an engine ran from inside an asyncio task (an async route or dependency).

The app's database work belongs in the threadpool: a statement on the event loop holds up
every other request of the process while it waits. ``asyncio.current_task()`` is the test,
not ``get_running_loop()``: the browser fixtures keep a loop running on the test's own thread
(Playwright's sync API), but the test's code never runs inside a task of it.
"""

from __future__ import annotations

import asyncio
from typing import Any

from sqlalchemy import event


def statements_on_the_event_loop(engine: Any) -> list[str]:
    """A list that fills with the first line of each such statement ``engine`` runs from now
    on (the listener stays for the engine's life)."""
    seen: list[str] = []

    def record(_conn, _cursor, statement, _params, _context, _many):  # type: ignore[no-untyped-def]
        try:
            in_task = asyncio.current_task() is not None
        except RuntimeError:  # no loop in this thread: a threadpool worker, or the test itself
            in_task = False
        if in_task:
            seen.append(statement.split("\n", 1)[0][:120])

    event.listen(engine, "before_cursor_execute", record)
    return seen
