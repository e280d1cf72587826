"""Annotated dependencies shared by the JSON routes.

The API imports nothing of the pages' package (``web``): what it shares with them lives in
``server.deps`` (the request's session, the signed-in user and firm) and ``server.services``
(the user lookup of a session cookie, the firm's catalog).
"""

from __future__ import annotations

from typing import Annotated

from fastapi import Depends, Request
from starlette.concurrency import run_in_threadpool

from server.services import accounts
from server.services.catalog import Catalog, builtin_catalog
from server.services.library import catalog_for


async def get_catalog(request: Request) -> Catalog:
    """The material catalog for this request.

    Anonymous (no valid session cookie): the built-in library, with no query and no threadpool
    hop. With a valid session cookie of an active user: that user's firm's catalog (built-in
    plus the firm's own materials, as the pages compute), looked up in one hop (the user and
    firm, then the firm's materials). A cookie that no longer names an active session counts
    as anonymous: the calculators are public and never answer 401.
    """
    data = getattr(request.state, "session_data", None)
    if data is None:
        return builtin_catalog()
    return await run_in_threadpool(_signed_in_catalog, request)


def _signed_in_catalog(request: Request) -> Catalog:
    """The session's firm's catalog (a session of its own, closed here: read only)."""
    data = request.state.session_data
    with request.app.state.session_factory() as session:
        found = accounts.user_for_session(
            session=session,
            user_id=data.user_id,
            session_version=data.session_version,
            nonce=data.nonce,
        )
        if found is None:
            return builtin_catalog()
        return catalog_for(session=session, organization_id=found[1].id)


CatalogDep = Annotated[Catalog, Depends(get_catalog)]
