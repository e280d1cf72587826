"""How every form's save ends: the service verb's answer, or the form again with the reason.

A route validates what was posted, then hands the service call to :func:`save_or_rerender`
with two answers: ``saved`` (usually a redirect) and ``rerender`` (the same page or fragment
with what was typed, the messages beside the fields, and the status). The verb's
:class:`~server.errors.InputError` comes back as its field messages and 422; a
:class:`~server.errors.Conflict` (the form was loaded before someone else's save, or lost the
race to it) as the one message of :func:`~server.web.conflicts.stale_form` and 409.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TypeVar

from server.errors import Conflict, InputError
from server.web.conflicts import KEPT, stale_form

Result = TypeVar("Result")
Answer = TypeVar("Answer")


def _same(field: str) -> str:
    return field


def save_or_rerender(
    *,
    call: Callable[[], Result],
    saved: Callable[[Result], Answer],
    rerender: Callable[[dict[str, str], int], Answer],
    conflict_key: str = "form",
    not_done: str = "nothing was saved",
    then: str = KEPT,
    field_key: Callable[[str], str] = _same,
) -> Answer:
    """Run ``call`` (the service verb) and answer ``saved(its result)``; when it refuses,
    ``rerender(errors, status)``.

    Parameters
    ----------
    call
        The save itself; it raises :class:`InputError` or :class:`Conflict` before storing
        anything.
    saved
        The answer to a stored save (a 303 to the saved thing, or the fragment that says so).
    rerender
        The form again: messages by form field and the status (422 or 409).
    conflict_key
        The form field the conflict message is shown beside (``form``: the form's head).
    not_done, then
        What was not done and what to do next, in the conflict message
        (:func:`~server.web.conflicts.stale_form`).
    field_key
        The form field an :class:`InputError`'s field path is shown beside (itself unless the
        form names it otherwise); the first message for a field is kept.
    """
    try:
        result = call()
    except InputError as exc:
        errors: dict[str, str] = {}
        for error in exc.errors():
            errors.setdefault(field_key(error.field), error.message)
        return rerender(errors, 422)
    except Conflict:
        return rerender({conflict_key: stale_form(not_done, then=then)}, 409)
    return saved(result)
