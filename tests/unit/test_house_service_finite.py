"""The whole-house result can never carry inf or NaN (documents.house.FiniteOut)."""

from __future__ import annotations

import math

import pytest
from pydantic import ValidationError

from server.documents.house import HouseDocument, SurfaceFigures
from server.errors import InputError
from server.services import comparison as house_service
from server.services.comparison import TOO_LARGE, compute_house
from tests.utils.houses import big_house_document


@pytest.mark.parametrize("bad", [math.inf, -math.inf, math.nan])
def test_a_result_part_refuses_a_non_finite_figure(bad: float) -> None:
    with pytest.raises(ValidationError) as caught:
        SurfaceFigures(id="s", kind="wall", name="", area=1.0, r=bad, u=1.0, ua=1.0,
                       share_of_ua=0.1)  # fmt: skip
    assert caught.value.errors()[0]["type"] == "finite_number"


def test_compute_house_answers_an_overflow_as_an_input_error(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # Input ranges keep real documents far from overflow; this is the last guard, so force it:
    # the as-found figures come back with an infinite envelope UA.
    original = house_service._figures

    def overflowing(*args, **kwargs):  # type: ignore[no-untyped-def]
        return {**original(*args, **kwargs), "ua_envelope": math.inf}

    monkeypatch.setattr(house_service, "_figures", overflowing)
    doc = HouseDocument.model_validate(big_house_document(surfaces=2, upgrades_per_surface=1))
    with pytest.raises(InputError) as caught:
        compute_house(doc)
    assert caught.value.field == "body" and caught.value.message == TOO_LARGE
