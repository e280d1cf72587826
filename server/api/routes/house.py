"""POST /api/v1/calc/house: the whole-house comparison of upgrades and packages."""

from fastapi import APIRouter

from server.api.deps import CatalogDep
from server.api.errors import ERROR_RESPONSES
from server.documents.house import HouseDocument, HouseResult
from server.services.house import compute_house

router = APIRouter(tags=["calculators"])


@router.post("/calc/house", response_model=HouseResult, responses=ERROR_RESPONSES)
def calc_house(document: HouseDocument, catalog: CatalogDep) -> HouseResult:
    """Energy, cost, CO2 and economics of the as-found house, each upgrade and each package."""
    return compute_house(document, catalog=catalog)
