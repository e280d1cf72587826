"""POST /api/v1/calc/assembly and /calc/thickness."""

from fastapi import APIRouter

from server.api.deps import CatalogDep
from server.api.errors import ERROR_RESPONSES
from server.documents.assembly import (
    AssemblyRequest,
    AssemblyResult,
    ThicknessRequest,
    ThicknessResult,
)
from server.services.assembly import evaluate_assembly, thickness_needed

router = APIRouter(tags=["calculators"])


@router.post("/calc/assembly", response_model=AssemblyResult, responses=ERROR_RESPONSES)
def calc_assembly(request: AssemblyRequest, catalog: CatalogDep) -> AssemblyResult:
    """R-value and U-factor of layers in series with framed layers (parallel path, ISO 6946).

    Material slugs are looked up in the built-in library; with the session cookie of a
    signed-in user, in the built-in library plus that user's firm's own materials (the
    catalog the firm's pages use).
    """
    return evaluate_assembly(request, units=request.units, catalog=catalog)


@router.post("/calc/thickness", response_model=ThicknessResult, responses=ERROR_RESPONSES)
def calc_thickness(request: ThicknessRequest, catalog: CatalogDep) -> ThicknessResult:
    """Thickness of a material needed to reach a target R (L = R × k).

    The material is looked up as in `POST /calc/assembly`: the built-in library, plus the
    signed-in user's firm's own materials when the request carries a session cookie.
    """
    return thickness_needed(request, catalog=catalog)
