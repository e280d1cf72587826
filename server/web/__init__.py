"""The one registry of HTML routes."""

from fastapi import APIRouter

from server.web.routes import compare, house_settings, houses, library, surfaces, tools

web_router = APIRouter(include_in_schema=False)
for module in (houses, house_settings, surfaces, compare, library, tools):
    web_router.include_router(module.router)
