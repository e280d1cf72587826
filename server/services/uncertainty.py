"""Savings ranges in a house document (``uncertainty`` -> each package's ``range``).

Rules decided here (the contract gave the names):

* Ranges are made for the packages and for ``best`` (with ``optimize``), not for each upgrade
  alone. Every one is evaluated on the same draws (common random numbers), by
  :func:`server.physics.uncertainty.simulate` on the array core.
* ``samples`` 0, or every spread 0, gives p10 = p50 = p90 = the option's own point figure
  (copied, so exactly equal) and ``probability_pays_back`` 1 or 0 from its own cash flow.
* With ``bills`` and a calibration ratio, the heating savings of every sample are scaled by the
  ratio and the point figures are the ``calibrated`` ones; ``uncertainty.calibrated`` says so.
  The spreads are not narrowed by the calibration.
* A house the array core does not model (:func:`server.physics.variants.unsupported`: ducts,
  heat pump by bins, ventilation, pipe runs placed elsewhere, window or duct upgrades) gets
  no ranges: ``uncertainty.available`` is false, each ``range`` null, and a warning says why.
* The U spreads apply to the as-found U of each surface (what is there and unseen); an
  upgrade's new assembly keeps its U. Surfaces facing a buffer space whose b is computed keep
  their U (b depends on their sum); a warning names them.
* Weather: ``spreads.weather`` if given; else, with ``annual_hdd`` (several past years), the
  coefficient of variation of those totals (sample standard deviation / mean); else 10 %.
"""

from __future__ import annotations

import math
import statistics
from typing import Literal

import numpy as np

from server.documents.house import (
    HouseDocument,
    HouseResult,
    OptionFigures,
    Quantiles,
    RangeFigures,
    UncertainInput,
    UncertaintyFigures,
    UncertaintyIn,
)
from server.errors import InputError
from server.physics import house_model as model
from server.physics import uncertainty as mc
from server.physics.variants import Variants, unsupported

QUANTILE_METHOD = (
    "Hyndman and Fan definition 7 (linear between order statistics, numpy's default) over "
    "numpy Generator(PCG64(seed)) draws, every package on the same draws"
)

#: surface kinds by what one can see of them
CLOSED_KINDS = frozenset(
    {"wall", "floor", "cathedral_roof", "rim_joist", "kneewall", "slab", "basement_floor",
     "basement_wall", "other"}
)  # fmt: skip
OPEN_KINDS = frozenset({"ceiling"})
RATED_KINDS = frozenset({"window", "door"})

#: default spread and its source, by input name (the names of uncertainty.spreads)
DEFAULTS: dict[str, tuple[Literal["lognormal", "normal"], float, str]] = {
    "closed_assembly_u": (
        "lognormal",
        0.20,
        "from memory: the fill, voids, settling and framing share of a closed cavity are "
        "unseen; field U-factors of uninspected walls commonly differ from the nominal by "
        "15–25 %",
    ),
    "open_assembly_u": (
        "lognormal",
        0.08,
        "common practice: an attic floor is seen and its insulation depth measured",
    ),
    "window_u": ("lognormal", 0.05, "common practice: a rated or labelled product"),
    "air_sealing": (
        "lognormal",
        0.30,
        "common practice: the CFM50 air sealing reaches is known only at the test-out",
    ),
    "heating_efficiency": (
        "lognormal",
        0.05,
        "common practice: field seasonal efficiency against the rating (cycling, setup); "
        "capped at 1 for a rated efficiency of at most 1",
    ),
    "weather": (
        "normal",
        0.10,
        "common practice: year-to-year coefficient of variation of annual heating "
        "degree-days of about 10 %",
    ),
    "fuel_price": (
        "lognormal",
        0.10,
        "from memory: the price actually paid over the typed one (tariff changes, blended "
        "rates); applied to the heating savings",
    ),
    "fuel_escalation": (
        "normal",
        0.01,
        "from memory: spread of long-run real fuel-price escalation, about 1 % a year",
    ),
}
GIVEN = "given in the document (uncertainty.spreads)"


def _spread(wanted: UncertaintyIn, name: str) -> tuple[float, str]:
    given = getattr(wanted.spreads, name)
    if given is not None:
        return float(given), GIVEN
    if name == "weather" and wanted.annual_hdd is not None:
        values = wanted.annual_hdd
        cv = statistics.stdev(values) / statistics.fmean(values)
        return cv, (
            f"the spread of the {len(values)} annual heating degree-day totals given "
            "(uncertainty.annual_hdd): sample standard deviation / mean"
        )
    _, value, source = DEFAULTS[name]
    return value, source


def _surface_category(kind: str) -> str:
    """The spread name of a surface kind (a kind not listed counts as closed)."""
    if kind in CLOSED_KINDS:
        return "closed_assembly_u"
    if kind in OPEN_KINDS:
        return "open_assembly_u"
    if kind in RATED_KINDS:
        return "window_u"
    return "closed_assembly_u"


def _inputs(
    wanted: UncertaintyIn, house: model.House, upgrades: list[model.Upgrade]
) -> tuple[dict[str, float], list[UncertainInput]]:
    """The spread of each input by name, and the ``uncertainty.inputs`` list."""
    spreads: dict[str, float] = {}
    rows = []
    for name, (distribution, _, _) in DEFAULTS.items():
        value, source = _spread(wanted, name)
        spreads[name] = value
        if name.endswith("_u"):
            kinds = sorted({s.kind for s in house.surfaces if _surface_category(s.kind) == name})
            count = sum(1 for s in house.surfaces if _surface_category(s.kind) == name)
            where = f"as-found U of {count} surface(s)" + (f": {', '.join(kinds)}" if kinds else "")
        elif name == "air_sealing":
            sealing = [u.id for u in upgrades if isinstance(u, model.AirSealingUpgrade)]
            where = (
                "the CFM50 reduction of " + ", ".join(sealing)
                if sealing
                else "no air-sealing upgrade in this house"
            )
        elif name == "heating_efficiency":
            where = "the heating system's efficiency (envelope and pipe-run losses)"
        elif name == "weather":
            where = "each analysis year's heating degree-days (the whole degree-day table scales)"
        elif name == "fuel_price":
            where = "the heating fuel price (cooling electricity keeps its price)"
        else:
            where = "the escalation of all energy savings (economics.fuel_escalation)"
        rows.append(
            UncertainInput(
                name=name, distribution=distribution, spread=value, applies_to=where, source=source
            )
        )
    return spreads, rows


def _point(
    option: OptionFigures, calibrated: bool
) -> tuple[float, float, float | None, float | None]:
    """(annual savings, NPV, simple payback, SIR) of the option, calibrated when so."""
    if calibrated and option.calibrated is not None:
        c = option.calibrated
        return c.annual_savings, c.npv, c.simple_payback_years, c.sir
    return option.annual_savings, option.npv, option.simple_payback_years, option.sir


def _point_range(option: OptionFigures, calibrated: bool) -> RangeFigures:
    savings, npv, payback, sir = _point(option, calibrated)
    # constant savings: the discounted cumulative series is monotone, so it reaches zero
    # within the years exactly when it starts there (no net cost) or ends there (NPV ≥ 0)
    pays = option.net_cost <= 0 or npv >= 0
    return RangeFigures(
        annual_savings=Quantiles(p10=savings, p50=savings, p90=savings),
        npv=Quantiles(p10=npv, p50=npv, p90=npv),
        simple_payback_years=Quantiles(p10=payback, p50=payback, p90=payback),
        sir=Quantiles(p10=sir, p50=sir, p90=sir),
        probability_pays_back=1.0 if pays else 0.0,
    )


def _quantiles(column: np.ndarray) -> Quantiles:
    values = [None if not math.isfinite(v) else float(v) for v in column]
    return Quantiles(p10=values[0], p50=values[1], p90=values[2])


def attach_ranges(
    doc: HouseDocument,
    house: model.House,
    upgrades: list[model.Upgrade],
    result: HouseResult,
) -> None:
    """With ``doc.uncertainty``: fill ``range`` of each package (and ``best``) and
    ``result.uncertainty``. Without it nothing changes."""
    wanted = doc.uncertainty
    if wanted is None:
        return
    spreads, inputs = _inputs(wanted, house, upgrades)
    ratio = None if result.calibration is None else result.calibration.ratio
    calibrated = ratio is not None
    targets = list(result.packages) + ([result.best] if result.best is not None else [])
    warnings: list[str] = []
    available = True
    if calibrated:
        warnings.append(
            f"the heating savings of every sample are scaled by the calibration ratio "
            f"({ratio:.3f}); the spreads themselves are not narrowed by the bills"
        )
    reason = unsupported(house, upgrades)
    if reason is not None:
        available = False
        warnings.append(
            f"no ranges for this house: the Monte Carlo runs on the array core, which does not "
            f"model {reason}"
        )
        for option in targets:
            option.range = None
    elif wanted.samples == 0 or all(v == 0 for v in spreads.values()):
        for option in targets:
            option.range = _point_range(option, calibrated)
    elif targets:
        try:
            variants = Variants(house, upgrades)
            selections = np.stack([variants.selection(o.upgrades) for o in targets])
        except ValueError as exc:  # compute_house checked these already; a guard against a 500
            raise InputError("upgrades", str(exc)) from None
        by_surface = mc.spread_groups(variants)
        kinds = {s.id: s.kind for s in house.surfaces}
        kept = sorted(s.id for s in house.surfaces if s.id not in by_surface)
        if kept:
            warnings.append(
                "surfaces facing a buffer space with a computed b keep their U (no U spread): "
                + ", ".join(kept)
            )
        figures = mc.simulate(
            variants,
            selections,
            mc.Spreads(
                surface_u={s: spreads[_surface_category(kinds[s])] for s in by_surface},
                air_sealing=spreads["air_sealing"],
                heating_efficiency=spreads["heating_efficiency"],
                weather=spreads["weather"],
                fuel_price=spreads["fuel_price"],
                fuel_escalation=spreads["fuel_escalation"],
            ),
            samples=wanted.samples,
            seed=wanted.seed,
            heating_ratio=1.0 if ratio is None else ratio,
        )
        savings = mc.quantiles(figures.annual_savings)
        npv = mc.quantiles(figures.npv)
        payback = mc.quantiles(figures.simple_payback_years)
        sir = mc.quantiles(figures.sir)
        share = figures.pays_back.mean(axis=0)
        for k, option in enumerate(targets):
            option.range = RangeFigures(
                annual_savings=_quantiles(savings[:, k]),
                npv=_quantiles(npv[:, k]),
                simple_payback_years=_quantiles(payback[:, k]),
                sir=_quantiles(sir[:, k]),
                probability_pays_back=float(share[k]),
            )
    result.uncertainty = UncertaintyFigures(
        samples=wanted.samples,
        seed=wanted.seed,
        available=available,
        calibrated=calibrated,
        quantile_method=QUANTILE_METHOD,
        inputs=inputs,
        warnings=warnings,
    )
