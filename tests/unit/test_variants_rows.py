"""The one-pass paths of the array core and the options are the slow paths, float for float.

* :meth:`Variants.prefix_selections` / :meth:`Variants.single_selections` give the rows of
  :meth:`Variants.selection` of each prefix / each upgrade alone;
* :meth:`Variants.group_sums` (gathered, running sums) gives exactly the sums of a loop over
  the groups that starts at 0 and adds each group's value in turn;
* :meth:`Options.summaries` gives the money figures of :func:`economics.appraise` exactly;
* comparison's summary builder and the assembly cache's copy make what pydantic's
  ``model_construct`` and ``model_copy`` make (same ``__dict__``, fields set, JSON).

Equality here is ``==`` on floats (not a tolerance): the figures of calc/house must not move.
Seeded random houses (variable base, buffer spaces with b computed and given, air sealing,
pipe runs: tests/utils/random_houses.py) and the 40-surface load-test house.
"""

from __future__ import annotations

import random

import numpy as np
import pytest

from server.documents.house import HouseDocument, OptionFigures
from server.physics import economics
from server.physics.variants import Variants, adjustment_factor, unsupported
from server.services import assembly_cache
from server.services.assembly import evaluate_assembly
from server.services.comparison import _SUMMARY_KEYS, _construct, compute_house
from server.services.house_options import Options
from tests.api.test_house_api import DOC_IP
from tests.utils.house_models import model_of_document
from tests.utils.houses import big_house_document
from tests.utils.random_houses import random_house


def _loop_sums(variants: Variants, sel: np.ndarray) -> tuple[list[float], ...]:
    """The sums as a plain loop over the groups computes them (the reference)."""
    n = sel.shape[0]
    ua, pipe, installed, rebate = np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n)
    coupled = {g for space in variants.coupled for g in space.groups}
    for g in range(len(variants.groups)):
        column = sel[:, g]
        if g not in coupled:
            ua += variants.ua[g][column]
        pipe += variants.pipe[g][column]
        installed += variants.installed[g][column]
        rebate += variants.rebate[g][column]
    for space in variants.coupled:
        h_iu = np.zeros(n)
        for g in space.groups:
            h_iu += variants.ua[g][sel[:, g]]
        ua += adjustment_factor(h_iu, space.h_ue_w_per_k) * h_iu
    return ua.tolist(), pipe.tolist(), installed.tolist(), rebate.tolist()


def _houses() -> list[tuple[object, list[object]]]:
    rng = random.Random(1616)
    found = [random_house(rng, spaces=True if k % 2 else None) for k in range(30)]
    doc = HouseDocument.model_validate(big_house_document(surfaces=40, upgrades_per_surface=5))
    found.append(model_of_document(doc))
    return [(h, u) for h, u in found if unsupported(h, u) is None]  # type: ignore[arg-type]


HOUSES = _houses()


@pytest.mark.parametrize("case", range(len(HOUSES)))
def test_rows_and_sums_equal_the_slow_paths(case: int) -> None:
    house, upgrades = HOUSES[case]
    for cap in (1, 4096):  # buffer spaces as coupled groups, and as one product group
        variants = Variants(house, upgrades, group_cap=cap)  # type: ignore[arg-type]
        rng = random.Random(case)
        # a package: at most one upgrade per target, in a random order
        by_target: dict[str, list[str]] = {}
        for u in upgrades:
            target = u.surface_id if hasattr(u, "surface_id") else type(u).__name__  # type: ignore[attr-defined]
            by_target.setdefault(target, []).append(u.id)  # type: ignore[attr-defined]
        package = [rng.choice(names) for names in by_target.values()]
        rng.shuffle(package)
        prefixes = variants.prefix_selections(package)
        for k in range(len(package)):
            assert prefixes[k].tolist() == variants.selection(package[: k + 1]).tolist()
        ids = [u.id for u in upgrades]  # type: ignore[attr-defined]
        singles = variants.single_selections(ids)
        for k, name in enumerate(ids):
            assert singles[k].tolist() == variants.selection([name]).tolist()
        picks = np.random.default_rng(case).integers(
            0, variants.sizes, size=(300, len(variants.sizes))
        )
        rows = np.vstack([prefixes, singles, picks]).astype(np.int64)
        fast = [a.tolist() for a in variants.group_sums(rows)]
        assert fast == list(_loop_sums(variants, rows))


def test_prefix_rows_refuse_what_a_selection_refuses() -> None:
    house, upgrades = HOUSES[-1]
    variants = Variants(house, upgrades)  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="there is no upgrade 'nope'"):
        variants.prefix_selections(["s0-u0", "nope"])
    with pytest.raises(ValueError, match="both change surface s0"):
        variants.prefix_selections(["s0-u0", "s1-u0", "s0-u1"])


@pytest.mark.parametrize("case", range(0, len(HOUSES), 3))
def test_summary_money_equals_the_full_appraisal(case: int) -> None:
    house, upgrades = HOUSES[case]
    options = Options(house, upgrades)  # type: ignore[arg-type]
    econ = house.economics  # type: ignore[attr-defined]
    for summary, upgrade in zip(options.summaries(), upgrades, strict=True):
        full = economics.appraise(
            installed_cost=upgrade.installed_cost,  # type: ignore[attr-defined]
            rebates=upgrade.rebate,  # type: ignore[attr-defined]
            annual_savings=summary.appraisal.annual_savings,
            discount_rate=econ.discount_rate,
            escalation_rate=econ.escalation_rate,
            years=econ.years,
        )
        money = summary.appraisal
        for name in ("installed_cost", "rebates", "net_cost", "annual_savings",
                     "simple_payback_years", "present_value", "npv", "sir"):  # fmt: skip
            assert getattr(money, name) == getattr(full, name), name
        one = options.summary_money(upgrade.installed_cost, upgrade.rebate, money.annual_savings)  # type: ignore[attr-defined]
        assert one == money


def test_summary_builder_makes_what_model_construct_makes() -> None:
    values = {name: None for name in _SUMMARY_KEYS}
    values.update(id="attic-r49", name="Attic to R-49", upgrades=["attic-r49"], warnings=["w"],
                  annual_savings=123.25, npv=-4.5, sir=0.75)  # fmt: skip
    made, reference = _construct(dict(values)), OptionFigures.model_construct(**values)
    assert made.__dict__ == reference.__dict__
    assert list(made.__dict__) == list(reference.__dict__)  # the same field order
    assert made.model_fields_set == reference.model_fields_set
    assert made.model_dump_json() == reference.model_dump_json()
    assert made.spaces == [] and made.spaces is not _construct(dict(values)).spaces


def test_summary_response_of_the_api_example_is_unchanged_by_detail() -> None:
    doc = HouseDocument.model_validate(DOC_IP)
    full = compute_house(doc).upgrades
    summary = compute_house(doc, upgrades_alone="summary").upgrades
    for a, b in zip(full, summary, strict=True):
        for name in ("annual_savings", "net_cost", "simple_payback_years", "npv", "sir",
                     "co2_avoided", "present_value", "heating_cost", "total_cost"):  # fmt: skip
            assert getattr(a, name) == getattr(b, name), name


def test_assembly_cache_copy_is_model_copy() -> None:
    assembly = HouseDocument.model_validate(DOC_IP).surfaces[1].assembly
    assert assembly is not None
    result = evaluate_assembly(assembly, units="ip")
    copied = assembly_cache._copy(result)
    reference = result.model_copy(
        update={"warnings": list(result.warnings), "layers": list(result.layers)}
    )
    assert copied.__dict__ == reference.__dict__
    assert copied.model_fields_set == reference.model_fields_set
    assert copied.model_dump_json() == reference.model_dump_json()
    assert copied.layers is not result.layers and copied.warnings is not result.warnings
    # the API.md example wall: R 11.85 by the parallel-path method (API.md)
    assert round(result.r_parallel_path, 2) == 11.85
