"""The one registry of HTML routes."""

from fastapi import APIRouter

from server.web.routes import (
    auth,
    bills,
    code_targets,
    compare,
    house_settings,
    houses,
    library,
    offline,
    photos,
    pipe_runs,
    price_book,
    quote,
    sharing,
    spaces,
    surfaces,
    systems,
    tools,
    upgrades,
)

web_router = APIRouter(include_in_schema=False)
for module in (auth, houses, house_settings, surfaces, pipe_runs, upgrades, compare, library, tools, sharing,
               price_book, quote, code_targets, spaces, systems, bills, photos, offline):  # fmt: skip
    web_router.include_router(module.router)
