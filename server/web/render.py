"""How a page route answers: the whole page, or for htmx only the fragment it swaps."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

from fastapi import Request
from starlette.responses import Response

from server.web.deps import render


def is_htmx(request: Request) -> bool:
    """Whether htmx sent the request (it sets ``HX-Request: true``) and wants a fragment."""
    return request.headers.get("HX-Request") == "true"


def page_or_fragment(
    request: Request,
    *,
    page: str,
    fragment: str | None = None,
    context: Mapping[str, Any],
    page_context: Callable[[], Mapping[str, Any]] | None = None,
    status_code: int = 200,
) -> Response:
    """``fragment`` with ``context`` for htmx, else ``page`` at ``status_code``.

    The fragment is always answered with 200: htmx swaps only 2xx answers by default, so a
    rejected form's messages travel inside the fragment. The whole page gets what
    ``page_context()`` builds (the page around a section, built only when it is shown) with
    ``context`` over it. Without ``fragment`` the page is rendered in both cases (a template
    that wants only its body for htmx reads ``is_htmx``).
    """
    if fragment is not None and is_htmx(request):
        return render(request, fragment, dict(context))
    full = {**(page_context() if page_context is not None else {}), **context}
    return render(request, page, full, status_code=status_code)
