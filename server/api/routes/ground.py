"""POST /api/v1/calc/ground: floors and walls against the ground (ISO 13370)."""

from fastapi import APIRouter

from server.api.errors import ERROR_RESPONSES
from server.documents.ground import GroundRequest, GroundResult
from server.services.ground import compute_ground

router = APIRouter(tags=["calculators"])


@router.post("/calc/ground", response_model=GroundResult, responses=ERROR_RESPONSES)
def calc_ground(request: GroundRequest) -> GroundResult:
    """U of a slab on ground, a heated basement or a suspended floor, and H_g (stateless)."""
    return compute_ground(request)
