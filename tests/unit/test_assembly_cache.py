"""The assembly results kept between calls: equal to a fresh calculation, and never used for
another catalog row, another field path or a refused assembly."""

from __future__ import annotations

import dataclasses

import pytest

from server.documents.assembly import AssemblyInput
from server.errors import InputError
from server.services import assembly_cache
from server.services.assembly import _evaluate, evaluate_assembly
from server.services.catalog import builtin_catalog

WALL = {
    "heat_flow": "horizontal",
    "films": "ashrae",
    "layers": [
        {"name": "stud bay", "thickness": 3.5, "cavity": {"r": 13.0},
         "framing": {"conductivity": 0.8, "fraction": 0.25}},
        {"name": "drywall", "thickness": 0.5, "material": "gypsum-board"},
    ],
}  # fmt: skip


def test_a_kept_result_equals_a_fresh_one_and_misses_on_a_changed_row() -> None:
    assembly_cache.clear()
    doc = AssemblyInput.model_validate(WALL)
    catalog = builtin_catalog()
    fresh = _evaluate(doc, units="ip", catalog=catalog, field="surfaces[0].assembly")
    first = evaluate_assembly(doc, units="ip", field="surfaces[0].assembly")
    again = evaluate_assembly(doc, units="ip", catalog=dict(catalog), field="surfaces[0].assembly")
    assert first.model_dump() == fresh.model_dump() == again.model_dump()
    assert assembly_cache.counts() == {"hits": 1, "misses": 1}
    # a caller changing its copy's lists leaves the kept result alone
    again.warnings.append("changed")
    assert (
        "changed" not in evaluate_assembly(doc, units="ip", field="surfaces[0].assembly").warnings
    )
    # a firm's gypsum twice as conductive: another row, computed again
    gypsum = catalog["gypsum-board"]
    assert gypsum.conductivity_w_mk is not None
    firm = {
        **catalog,
        "gypsum-board": dataclasses.replace(gypsum, conductivity_w_mk=2 * gypsum.conductivity_w_mk),
    }
    changed = evaluate_assembly(doc, units="ip", catalog=firm, field="surfaces[0].assembly")
    assert changed.r_total < first.r_total
    assert (
        changed.model_dump()
        == _evaluate(doc, units="ip", catalog=firm, field="surfaces[0].assembly").model_dump()
    )
    # the same numbers read in SI (thickness in mm) are another assembly: kept apart
    si = evaluate_assembly(doc, units="si", field="surfaces[0].assembly")
    assert (
        si.model_dump()
        == _evaluate(doc, units="si", catalog=catalog, field="surfaces[0].assembly").model_dump()
    )
    assert si.rsi_total != first.rsi_total


def test_a_refused_assembly_is_refused_every_time() -> None:
    assembly_cache.clear()
    bad = AssemblyInput.model_validate(
        {**WALL, "layers": [{"name": "x", "thickness": 1, "material": "no-such"}]}
    )
    for _ in range(2):
        with pytest.raises(InputError):
            evaluate_assembly(bad, units="ip", field="surfaces[2].assembly")
    assert assembly_cache.counts()["hits"] == 0
