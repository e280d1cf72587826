"""POST /api/v1/calc/house: the whole-house comparison of upgrades and packages."""

from fastapi import APIRouter
from fastapi.responses import Response

from server.api.deps import CatalogDep
from server.api.errors import ERROR_RESPONSES
from server.documents.house import HouseDocument, HouseResult
from server.services.comparison import house_result_json

router = APIRouter(tags=["calculators"])


@router.post("/calc/house", response_model=HouseResult, responses=ERROR_RESPONSES)
def calc_house(document: HouseDocument, catalog: CatalogDep) -> Response:
    """Energy, cost, CO2 and economics of the as-found house, each upgrade and each package.

    Materials (`layers[].material`, `cavity.material`, `framing.material`) are looked up in
    a catalog that depends on the caller. Without a session cookie: the built-in library
    only. With the session cookie of a signed-in user: the built-in library plus that user's
    firm's own materials, the catalog the firm's pages compute with, so a house exported
    from `GET /api/v1/houses/{id}/document` computes the same figures here as on its compare
    page. A slug in neither is a 422 naming the field (another firm's materials are unknown).
    """
    # Serialized once, by the service: returned as a model, it would be validated again
    # against HouseResult first, for a model compute_house has just built and checked.
    # Each upgrade alone carries its summary unless `detail.upgrades_alone` is "full".
    return Response(house_result_json(document, catalog=catalog), media_type="application/json")
