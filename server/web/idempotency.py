"""The hidden idempotency key of a create form (see :mod:`server.services.idempotency`)."""

from __future__ import annotations

from markupsafe import Markup

from server.services.idempotency import FIELD, new_key


def idempotency_field() -> Markup:
    """A hidden input with a fresh random key: one per rendering of the form, so the same
    rendered form posted again (a resubmit, a second tap) is recognised as a repeat."""
    return Markup('<input type="hidden" name="{}" value="{}">').format(FIELD, new_key())
