"""/api/v1 route for the pipe-insulation calculator."""

from fastapi import APIRouter

from server.api.errors import ERROR_RESPONSES
from server.documents.pipe import PipeRequest, PipeResult
from server.services.pipe import compute_pipe

router = APIRouter(tags=["calculators"])


@router.post("/calc/pipe", response_model=PipeResult, responses=ERROR_RESPONSES)
def calc_pipe(request: PipeRequest) -> PipeResult:
    """Heat loss, surface temperature and R of an insulated pipe run (stateless)."""
    return compute_pipe(request)
