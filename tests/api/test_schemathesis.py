"""Schema-driven fuzzing of /api/v1 (schemathesis, in-process, bounded).

Every operation of the OpenAPI schema gets generated requests (valid, invalid, and the
schema's edge cases) and three checks on each answer: no 5xx (``not_a_server_error``), the
status code is one the schema documents (``status_code_conformance``) and the body matches the
documented schema for that code (``response_schema_conformance``). Random bodies almost never
compute, so known-good documents (the API.md examples) are sent as well, to check the 200
bodies against the schema too.

The calculators (/api/v1/calc/*) are stateless; the saved-house routes write to a throwaway
SQLite file migrated for this module. Bounded: ``MAX_EXAMPLES`` generated cases per operation
plus schemathesis's coverage cases for the calculators (about 2,000 requests in all),
15 to 30 s on a busy 2-core machine.
"""

from __future__ import annotations

import copy
import os
import re
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
import schemathesis
from hypothesis import HealthCheck, settings
from schemathesis import checks

from server.app import create_app
from server.cli import migrate
from server.config import Settings
from tests.utils.auth import signed_in_headers
from tests.utils.examples import API_GROUND_SI, API_WALL_IP

MAX_EXAMPLES = 30
CHECKS = [
    checks.not_a_server_error,
    checks.status_code_conformance,
    checks.response_schema_conformance,
]
CALC = r"^/api/v1/calc/"
#: every operation under /api/v1 and the test that fuzzes it (a new route must be added here)
EXPECTED_OPERATIONS = {
    "POST /api/v1/calc/assembly",
    "POST /api/v1/calc/thickness",
    "POST /api/v1/calc/pipe",
    "POST /api/v1/calc/degree-days",
    "POST /api/v1/calc/house",
    "POST /api/v1/calc/bills",
    "POST /api/v1/calc/ground",
    "GET /api/v1/houses/{house_id}/document",
    "POST /api/v1/houses",
}
BOUNDED = settings(
    max_examples=MAX_EXAMPLES,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much],
)


#: the app is built at import (schemathesis reads its schema then); the engine connects lazily
#: and the module fixture below migrates the file before the first request
DB_PATH = Path(tempfile.gettempdir()) / f"warmstead-fuzz-{os.getpid()}.db"
APP = create_app(Settings(environment="test", database_url=f"sqlite:///{DB_PATH}"))
SCHEMA = schemathesis.openapi.from_asgi("/openapi.json", APP)
calculators = SCHEMA.include(path_regex=CALC)
#: the saved-house routes take the calc/house document, whose edge cases the calculators'
#: coverage phase already walks: here generated cases only (the coverage phase doubles the time)
saved_houses = schemathesis.openapi.from_asgi(
    "/openapi.json",
    APP,
    config=schemathesis.Config.from_dict({"phases": {"coverage": {"enabled": False}}}),
).exclude(path_regex=CALC)


@pytest.fixture(scope="module", autouse=True)
def migrated_database() -> Iterator[None]:
    DB_PATH.unlink(missing_ok=True)
    migrate(f"sqlite:///{DB_PATH}")
    yield
    APP.state.engine.dispose()
    for suffix in ("", "-wal", "-shm"):
        Path(f"{DB_PATH}{suffix}").unlink(missing_ok=True)


@pytest.fixture(scope="module")
def signed_in(migrated_database: None) -> dict[str, str]:
    """Cookie and CSRF headers of a signed-in admin of a new firm (for the saved-house routes)."""
    return signed_in_headers(APP, email="fuzzer@example.com")


@pytest.fixture(scope="module")
def api_schema() -> Any:
    return SCHEMA


@calculators.parametrize()
@BOUNDED
def test_calculators_never_fail_and_answer_as_documented(case: Any) -> None:
    case.call_and_validate(checks=CHECKS)


@saved_houses.parametrize()
@BOUNDED
def test_saved_house_routes_never_fail_and_answer_as_documented(
    case: Any, signed_in: dict[str, str]
) -> None:
    case.call_and_validate(checks=CHECKS, headers=signed_in)


def test_every_api_operation_is_fuzzed(api_schema: Any) -> None:
    found = {
        f"{result.ok().method.upper()} {result.ok().path}"
        for result in api_schema.get_all_operations()
        if result.ok().path.startswith("/api/v1/")
    }
    assert found == EXPECTED_OPERATIONS, "add the new operation to EXPECTED_OPERATIONS"


# --- known-good documents: the 200 answers must match the schema too ------------------------

WALL_IP = copy.deepcopy(API_WALL_IP)  # ../shared/API.md, POST /api/v1/calc/assembly
PIPE_SI = {  # ../shared/API.md, POST /api/v1/calc/pipe
    "units": "si",
    "pipe_outer_diameter": 22.0,
    "layers": [{"thickness": 19.0, "conductivity": 0.035}],
    "fluid_temperature": 55.0,
    "ambient_temperature": 15.0,
    "length": 10.0,
}
ATTIC = {
    "heat_flow": "up",
    "films": "ashrae",
    "layers": [
        {
            "name": "joist bay",
            "thickness": 5.5,
            "cavity": {"r": 19.0},
            "framing": {"conductivity": 0.80, "fraction": 0.10},
        },
        {"name": "drywall", "thickness": 0.5, "material": "gypsum-board"},
    ],
}
HOUSE_IP = {  # ../shared/API.md, POST /api/v1/calc/house (its layers filled in)
    "units": "ip",
    "climate": {"hdd": 5400, "cdd": 900, "heating_base": 65, "cooling_base": 65},
    "heating": {"fuel": "natural_gas", "efficiency": 0.80, "price": 1.45},
    "cooling": {"seer": 13, "electricity_price": 0.16},
    "air_leakage": {"cfm50": 3200, "n_factor": 18, "volume": 12000},
    "surfaces": [{"id": "attic", "kind": "ceiling", "area": 1000, "assembly": ATTIC}],
    "upgrades": [
        {
            "id": "attic-r49",
            "surface": "attic",
            "assembly": {
                **ATTIC,
                "layers": [{"name": "cellulose", "r": 38.0}, *ATTIC["layers"]],
            },
            "cost": {"fixed": 300, "per_area": 1.20},
            "rebate": 200,
            "life_years": 30,
        },
        {"id": "air-seal", "cfm50_after": 2200, "cost": {"fixed": 900}, "life_years": 20},
    ],
    "packages": [{"id": "attic-and-sealing", "upgrades": ["attic-r49", "air-seal"]}],
    "economics": {
        "discount_rate": 0.03,
        "fuel_escalation": 0.02,
        "years": 20,
        "loan": {"apr": 0.06, "years": 10},
    },
}
GROUND_SI = API_GROUND_SI  # ../shared/API.md, POST /api/v1/calc/ground
BILLS_IP = {  # ../shared/API.md, POST /api/v1/calc/bills (three months of reads)
    "units": "ip",
    "fuel": "natural_gas",
    "periods": [
        {"start": "2025-01-01", "end": "2025-01-31", "use": 150.0},
        {"start": "2025-01-31", "end": "2025-03-02", "use": 120.0, "estimated": True},
        {"start": "2025-03-02", "end": "2025-04-01", "use": 60.0},
    ],
    "daily_temperatures": {
        "start": "2025-01-01",
        "values": [30.0] * 30 + [38.0] * 30 + [50.0] * 30,
    },
    "normal_temperatures": {"values": [50.0] * 365},
    "efficiency": 0.8,
}
DAILY_CSV = b"date,temperature\n2023-01-01,30\n2023-01-02,40\n2023-01-03,70\n"

GOOD = [
    ("/api/v1/calc/assembly", WALL_IP, "application/json"),
    ("/api/v1/calc/thickness", {"units": "ip", "target_r": 49, "material": "cellulose-loose-fill"},
     "application/json"),
    ("/api/v1/calc/pipe", PIPE_SI, "application/json"),
    ("/api/v1/calc/pipe", {**PIPE_SI, "surface_coefficient": 9.0}, "application/json"),
    ("/api/v1/calc/house", HOUSE_IP, "application/json"),
    ("/api/v1/calc/bills", BILLS_IP, "application/json"),
    ("/api/v1/calc/ground", GROUND_SI, "application/json"),
    ("/api/v1/calc/ground", {**GROUND_SI, "type": "slab"}, "application/json"),
    ("/api/v1/calc/degree-days", {"file": DAILY_CSV, "units": "ip"}, "multipart/form-data"),
    ("/api/v1/calc/degree-days", {"file": DAILY_CSV, "units": "si", "heating_base": "18"},
     "multipart/form-data"),
    ("/api/v1/houses", HOUSE_IP, "application/json"),
]  # fmt: skip


@pytest.mark.parametrize(("path", "body", "media_type"), GOOD, ids=lambda v: str(v)[:40])
def test_known_good_documents_compute_and_match_the_schema(
    api_schema: Any, signed_in: dict[str, str], path: str, body: dict[str, Any], media_type: str
) -> None:
    case = api_schema[path]["POST"].Case(body=body, media_type=media_type)
    response = case.call(headers=signed_in if path == "/api/v1/houses" else None)
    assert response.status_code in (200, 201), response.text[:300]
    case.validate_response(response, checks=CHECKS)


def test_the_documented_error_body_is_what_a_bad_request_gets(api_schema: Any) -> None:
    # Bytes that are not JSON text at all -> 400; a JSON body that cannot compute -> 422;
    # both bodies are the documented ErrorBody (detail + errors naming fields).
    op = api_schema["/api/v1/calc/pipe"]["POST"]
    for body, status in ((b"\x15\xff\xfe", 400), ({**PIPE_SI, "pipe_outer_diameter": -1}, 422)):
        case = op.Case(body=body, media_type="application/json")
        response = case.call()
        assert response.status_code == status, response.text
        case.validate_response(response, checks=CHECKS)
        assert re.search(r"\w", response.json()["detail"])


@pytest.mark.parametrize(
    ("method", "path", "body"),
    [("GET", "/api/v1/houses/1/document", None), ("POST", "/api/v1/houses", HOUSE_IP)],
)
def test_saved_house_routes_refuse_strangers_as_documented(
    method: str, path: str, body: dict[str, Any] | None
) -> None:
    operation = SCHEMA[path.replace("/1/", "/{house_id}/")][method]
    if body is None:
        case = operation.Case(path_parameters={"house_id": 1})
    else:
        case = operation.Case(body=body, media_type="application/json")
    response = case.call()
    assert response.status_code == 401, response.text[:200]  # not signed in
    case.validate_response(response, checks=CHECKS)
    with_cookie_no_token = case.call(headers={"Cookie": "warmstead_session=forged"})
    assert with_cookie_no_token.status_code == 401  # a forged cookie is no session
    case.validate_response(with_cookie_no_token, checks=CHECKS)
