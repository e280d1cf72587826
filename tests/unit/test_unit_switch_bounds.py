"""Switching a house's units never turns a value its form accepted into one the other refuses.

The conversion is the one the units switch applies (server/services/convert.py); the forms are
the House page's settings sections (server/web/settings_forms.py) reading the text they show.
"""

from __future__ import annotations

from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from server.documents.house import DEGREE_DAYS, VOLUME, HouseDocument
from server.services.convert import convert_value
from server.web.settings_forms import form_values, parse_section
from tests.utils.houses import big_house_document

OTHER = {"ip": "si", "si": "ip"}


def _air(volume: float) -> dict[str, Any]:
    return {"cfm50": 3000.0, "n_factor": 18.0, "volume": volume}


def _accepts_air(volume: float, units: str) -> bool:
    """The air-leakage form, given the text it shows for ``volume``, saves it."""
    shown = form_values("air_leakage", _air(volume), units)
    doc, errors = parse_section("air_leakage", shown, units=units)
    return doc is not None and not errors


def _accepts_climate(hdd: float, units: str) -> bool:
    shown = form_values("climate", {"hdd": hdd, "cdd": hdd}, units)
    doc, errors = parse_section("climate", shown, units=units)
    return doc is not None and not errors


def test_three_cubic_feet_switched_to_metric_is_still_accepted() -> None:
    # 3 ft³ × 0.028316846592 m³/ft³ (0.3048³, exact) = 0.084950539776 m³; the old floor of
    # 1 m³ (the same number in both systems) refused it
    si = convert_value(3.0, "volume", "ip", "si")
    assert si == pytest.approx(0.084950539776, rel=1e-12)
    assert _accepts_air(3.0, "ip") and _accepts_air(si, "si")
    assert convert_value(si, "volume", "si", "ip") == pytest.approx(3.0, rel=1e-12)


def test_the_smallest_us_volume_shown_in_metric_is_not_rounded_below_the_floor() -> None:
    # 1 ft³ = 0.028316846592 m³; ten digits (0.02831684659) would fall under the floor
    si = convert_value(VOLUME.ip[0], "volume", "ip", "si")
    assert _accepts_air(si, "si")
    doc, _ = parse_section("air_leakage", form_values("air_leakage", _air(si), "si"), units="si")
    assert doc is not None and doc["volume"] == si


def test_a_metric_house_document_takes_a_small_volume() -> None:
    document = big_house_document(surfaces=1, upgrades_per_surface=0, packages=0)
    document["units"] = "si"
    document["air_leakage"] = {"cfm50": 100, "volume": 0.085}
    assert HouseDocument.model_validate(document).air_leakage.volume == 0.085  # type: ignore[union-attr]
    document["units"] = "ip"
    with pytest.raises(ValueError, match="ft³"):
        HouseDocument.model_validate(document)


@given(st.sampled_from(["ip", "si"]), st.data())
def test_every_accepted_volume_is_accepted_after_the_switch(
    units: str, data: st.DataObject
) -> None:
    low, high = VOLUME.ip if units == "ip" else VOLUME.si
    volume = data.draw(st.floats(min_value=low, max_value=high))
    assert _accepts_air(volume, units)
    switched = convert_value(volume, "volume", units, OTHER[units])  # type: ignore[arg-type]
    assert _accepts_air(switched, OTHER[units])


@given(st.sampled_from(["ip", "si"]), st.data())
def test_every_accepted_degree_day_total_is_accepted_after_the_switch(
    units: str, data: st.DataObject
) -> None:
    low, high = DEGREE_DAYS.ip if units == "ip" else DEGREE_DAYS.si
    hdd = data.draw(st.floats(min_value=low, max_value=high))
    assert _accepts_climate(hdd, units)
    switched = convert_value(hdd, "degree_days", units, OTHER[units])  # type: ignore[arg-type]
    assert _accepts_climate(switched, OTHER[units])


@pytest.mark.parametrize("span", [VOLUME, DEGREE_DAYS])
def test_span_ends_are_images_of_each_other(span: Any) -> None:
    # the metric bounds are the US bounds converted as the switch converts them, and back
    for ip_end, si_end in zip(span.ip, span.si, strict=True):
        assert convert_value(ip_end, span.quantity, "ip", "si") == si_end
    assert convert_value(span.si[1], span.quantity, "si", "ip") <= span.ip[1]
    assert convert_value(span.si[0], span.quantity, "si", "ip") >= span.ip[0]
