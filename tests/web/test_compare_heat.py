"""Where the heat goes and modelled vs bills, from the demo house's own result (ducts, buffer
spaces, a slab, windows and two years of invented bills): hand arithmetic in the comments."""

from __future__ import annotations

import math

import pytest

from server.db import session_scope
from server.models import House
from server.services.bill_comparison import modelled_periods
from server.services.comparison import compute_house
from server.services.demo import load_demo_house
from server.services.heat_flows import heat_flows
from server.services.house_document import house_document


@pytest.fixture
def demo_result(app):  # type: ignore[no-untyped-def]
    with session_scope(app.state.session_factory) as s:
        house = s.get(House, load_demo_house(session=s))
        assert house is not None
        return compute_house(house_document(house), upgrades_alone=False)


def test_where_the_heat_goes_adds_up(demo_result) -> None:  # type: ignore[no-untyped-def]
    found = demo_result.as_found
    flows = heat_flows(found)
    by_kind: dict[str, float] = {}
    for f in flows:
        by_kind[f.kind] = by_kind.get(f.kind, 0.0) + f.annual
    assert math.isclose(sum(f.share for f in flows), 1.0, rel_tol=1e-12)
    # surfaces + air + ventilation = UA × HDD × 24 h = the heating load (shares of the UA)
    envelope = sum(v for k, v in by_kind.items() if k not in ("ducts", "pipe"))
    assert math.isclose(envelope, found.heating_load, rel_tol=1e-12)
    # ducts: the model buys load / η_dist, so they lose load × (1/η − 1)
    eta = found.distribution.efficiency
    assert math.isclose(by_kind["ducts"], found.heating_load * (1 / eta - 1), rel_tol=1e-12)
    labels = [f.label for f in flows]
    assert any(label.endswith(", into the ground") for label in labels)  # the slab
    assert any(", to the " in label for label in labels)  # the attic and crawlspace floors
    assert "window" in by_kind and "Air leakage (drafts through gaps)" in labels
    # a surface facing a buffer space counts b·U·A: its share is its (b-reduced) UA share
    buffered = next(s for s in found.surfaces if s.adjacent not in ("outdoors", "ground"))
    row = next(f for f in flows if f.label.startswith(buffered.name + ", to the "))
    assert math.isclose(row.annual, buffered.ua / found.ua * found.heating_load, rel_tol=1e-12)
    assert buffered.b < 1


def test_modelled_vs_bills_period_by_period(demo_result) -> None:  # type: ignore[no-untyped-def]
    calibration = demo_result.calibration
    fit = calibration.fit
    periods = modelled_periods(calibration)
    assert len(periods) == len(fit.periods) == 24
    alpha = fit.baseload_per_day
    for period, row in zip(periods, fit.periods, strict=True):
        # the bills' heating part β·HDD_i over the model's: exactly the calibration ratio
        # (β·HDD_normal / model use), since the model is spread by HDD_i / HDD_normal
        bills_heating = fit.heating_slope * row.hdd
        model_heating = period.model - alpha * row.days
        if row.hdd > 0:
            assert math.isclose(bills_heating / model_heating, calibration.ratio, rel_tol=1e-9)
    # the bills' normalised heating use is β · HDD_normal(τ) (the calc/bills contract)
    assert math.isclose(calibration.bills_heating_use,
                        fit.heating_slope * fit.heating_degree_days_normal, rel_tol=1e-12)  # fmt: skip
