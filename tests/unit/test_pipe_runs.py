"""Which share of a pipe run's loss counts, and its outer emissivity (rules by hand)."""

from __future__ import annotations

import pytest

from server.physics import pipe_runs


def test_heating_water_counts_b_of_its_loss():
    # hot only in the heating season: in the house (b = 0) it heats the house, no loss
    assert pipe_runs.counted_share("heating_water", 0.0, 0.6) == 0.0
    assert pipe_runs.counted_share("heating_water", 1.0, 0.6) == 1.0
    assert pipe_runs.counted_share("heating_water", 0.4, 0.6) == pytest.approx(0.4)


def test_domestic_hot_water_counts_outside_the_heating_season():
    # 1 − s · (1 − b): s = 0.6 in the house → 0.4; in a space of b 0.5 → 1 − 0.3 = 0.7
    assert pipe_runs.counted_share("domestic_hot_water", 0.0, 0.6) == pytest.approx(0.4)
    assert pipe_runs.counted_share("domestic_hot_water", 0.5, 0.6) == pytest.approx(0.7)
    assert pipe_runs.counted_share("domestic_hot_water", 1.0, 0.6) == 1.0


def test_nothing_said_counts_in_full():
    assert pipe_runs.counted_share(None, None, 0.5) == 1.0
    assert pipe_runs.counted_share("domestic_hot_water", None, 0.5) == 1.0


def test_outer_emissivity():
    assert pipe_runs.outer_emissivity(None, False, "copper") == 0.1  # bare copper, from memory
    assert pipe_runs.outer_emissivity(None, True, "copper") == 0.9  # its jacket
    assert pipe_runs.outer_emissivity(0.3, False, "copper") == 0.3  # as typed
    assert pipe_runs.outer_emissivity(None, False, None) == 0.9
