"""The one registry of JSON routes under /api/v1."""

from fastapi import APIRouter

from server.api.routes import assembly, bills, degree_days, ground, house, houses, pipe

api_router = APIRouter(prefix="/api/v1")
for module in (assembly, pipe, degree_days, ground, bills, house, houses):
    api_router.include_router(module.router)
