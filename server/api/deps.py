"""Annotated dependencies shared by the JSON routes."""

from __future__ import annotations

from typing import Annotated

from fastapi import Depends

from server.services.catalog import Catalog, builtin_catalog


async def get_catalog() -> Catalog:
    """The material catalog for this request (built-in library; firms add theirs later).

    Async: it does no I/O, so it needs no threadpool hop."""
    return builtin_catalog()


CatalogDep = Annotated[Catalog, Depends(get_catalog)]
