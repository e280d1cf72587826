"""POST /api/v1/calc/bills: what the bills say (variable-base degree-day regression)."""

from fastapi import APIRouter

from server.api.errors import ERROR_RESPONSES
from server.documents.bills import BillsRequest, BillsResult
from server.services.bills import compute_bills

router = APIRouter(tags=["calculators"])


@router.post("/calc/bills", response_model=BillsResult, responses=ERROR_RESPONSES)
def calc_bills(request: BillsRequest) -> BillsResult:
    """Baseload, heating slope and base temperature fitted to meter-read periods, with
    weather-normalised annual use, the apparent UA and ASHRAE Guideline 14 fit statistics."""
    return compute_bills(request)
