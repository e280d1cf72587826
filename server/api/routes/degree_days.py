"""/api/v1 route for the degree_days calculator (filled in by its owner)."""

from fastapi import APIRouter

router = APIRouter(tags=["calculators"])
