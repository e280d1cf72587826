"""The one registry of JSON routes under /api/v1."""

from fastapi import APIRouter

from server.api.routes import assembly, bills, calc_house, degree_days, ground, houses, pipe

api_router = APIRouter(prefix="/api/v1")
for module in (assembly, pipe, degree_days, ground, bills, calc_house, houses):
    api_router.include_router(module.router)
