"""House document -> pure house model -> comparison -> result in the document's units.

Rules decided here (the contract was silent):

* Errors (HTTP 422, each naming its field): duplicate surface, upgrade or package ids; an
  upgrade naming an unknown surface, or the wrong kind of surface; a package naming an
  unknown upgrade, listing one twice, or holding two upgrades that change the same surface,
  pipe run or the air leakage; air sealing on a house without ``air_leakage``, or to a
  target above the as-found leakage.
* Warnings (computed anyway): an assembly upgrade that does not lower the surface's U; air
  sealing to exactly the as-found figure; an upgrade expected to last less than the study
  period; rebates above the cost; savings of zero or less; the default N-factor.
* Incremental savings of a package are in its listed order (see
  :func:`server.physics.house_model.evaluate_option`).
* Pipe-run losses are bought at the heating system's fuel, efficiency and price.
* A ``slab``, ``basement_floor`` or ``basement_wall`` with a ``ground`` object takes its U from
  ISO 13370 (:func:`server.services.ground.ground_surface`); the model then holds that U over
  the surface's area (UA / area), so packages and upgrades need nothing else. An upgrade's
  ``ground`` replaces the fields it gives (slab edge insulation, say).

The work is split by topic: document -> model in :mod:`.house_input` (surfaces, air leakage),
:mod:`.house_upgrades`, :mod:`.house_spaces` (buffer spaces); the options evaluated in
:mod:`.house_options`; model -> result in :mod:`.house_figures` and :mod:`.house_design`.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, Literal

from pydantic import ValidationError

from server.documents.house import HouseDocument, HouseFigures, HouseResult, OptionFigures
from server.errors import InputError
from server.physics import economics
from server.physics import house_model as model
from server.services import gains as gains_svc
from server.services import systems as systems_svc
from server.services.calibration import calibrate
from server.services.catalog import Catalog
from server.services.house_design import INDOOR_DESIGN_C, OVERSIZED_RATIO
from server.services.house_figures import _figures, _fuel, _option
from server.services.house_input import _Build, _check_ids, _house
from server.services.house_options import SUMMARY_FIELDS, Options, Summary
from server.services.house_spaces import _check_spaces, _space_assumptions, _with_spaces
from server.services.house_upgrades import SurfaceLookup, _upgrade
from server.services.optimize import attach_optimum
from server.services.uncertainty import attach_ranges

__all__ = [
    "ASSUMPTIONS", "INDOOR_DESIGN_C", "OVERSIZED_RATIO", "STEP_ORDER", "TOO_LARGE",
    "compute_house", "house_result_json", "model_of_document",
]  # fmt: skip

STEP_ORDER = (
    "listed: step i is what upgrade i saves on the house that already has upgrades 1..i-1 of "
    "the package, so the steps add up to the package's savings"
)
ASSUMPTIONS = (
    "Degree-day method (ASHRAE Handbook—Fundamentals, energy estimating): heating = UA × HDD × "
    "24 h, cooling = UA × CDD × 24 h (sensible only), at fixed system efficiencies.",
    "Infiltration UA = 0.018 Btu/(ft³·°F) × (ACH50 / N) × volume (LBL N-factor, common practice).",
    "With this method savings of separate measures add up exactly; each package is still "
    "computed as one modified house.",
    "Pipe-run losses are bought at the heating system's fuel, efficiency and price.",
    "Economics per NIST Handbook 135: costs at year 0, savings at each year's end, escalated "
    "by the fuel escalation and discounted by the discount rate; no replacement or residual "
    "values.",
    "The cash-flow chart draws the discounted cumulative series (its last point is the NPV).",
    "All figures are estimates; the locally adopted code and licensed professionals decide.",
)


TOO_LARGE = "these inputs give numbers too large to compute; check areas, R and prices"


def model_of_document(
    doc: HouseDocument, *, catalog: Catalog | None = None, with_windows: bool = True
) -> tuple[model.House, list[model.Upgrade], list[str]]:
    """The checked pure house, its upgrades and the warnings found on the way (document ->
    model). Raises :class:`InputError` (HTTP 422) naming the field of every problem found."""
    build = _Build(units=doc.units, catalog=catalog)
    _check_ids(doc, build)
    _check_spaces(doc, build)
    econ = doc.economics
    try:
        economics.present_value_of_savings(
            1.0, econ.discount_rate, econ.fuel_escalation, econ.years
        )
    except ValueError as exc:
        raise InputError("economics.discount_rate", str(exc)) from None
    house = _with_spaces(doc, _house(doc, build))
    if with_windows:
        house = gains_svc.with_windows(doc, house, build.warnings)
    lookup = SurfaceLookup(doc, house)
    pure = [_upgrade(doc, i, u, house, build, lookup) for i, u in enumerate(doc.upgrades)]
    build.raise_problems()
    return house, [u for u in pure if u is not None], build.warnings


_SUMMARY_KEYS = (
    "id", "name", "upgrades", "annual_savings", "installed_cost", "rebates", "net_cost",
    "simple_payback_years", "npv", "sir", "present_value", "co2_avoided", "heating_cost",
    "heating_fuel_saved", "total_cost", "calibrated", "range", "warnings",
)  # fmt: skip


def _construct_plan(keys: tuple[str, ...]) -> list[tuple[str, bool, Any]] | None:
    """What :meth:`OptionFigures.model_construct` does with exactly ``keys`` given: each field
    in order, given or its default (None: the model has what this plan does not mirror)."""
    if OptionFigures.__pydantic_post_init__ or OptionFigures.__pydantic_root_model__:
        return None
    plan = []
    for field_name, field in OptionFigures.model_fields.items():
        if field.alias is not None or field.validation_alias is not None:
            return None
        if field_name in keys:
            plan.append((field_name, True, None))
        elif not field.is_required():
            if field.default_factory is not None:
                return None
            default = field.default
            if not (default is None or type(default) is float or default == []):
                return None
            plan.append((field_name, False, default))
    return plan


_PLAN = _construct_plan(_SUMMARY_KEYS)
_SUMMARY_SET = frozenset(_SUMMARY_KEYS)


def _construct(values: dict[str, Any]) -> OptionFigures:
    """``OptionFigures.model_construct(**values)`` (``values``: the keys of _SUMMARY_KEYS),
    built from the plan made once: the same ``__dict__`` (an empty list default a new list
    each time, as pydantic copies it) and fields set."""
    if _PLAN is None:
        return OptionFigures.model_construct(**values)
    fields = {
        name: values[name] if given else ([] if type(default) is list else default)
        for name, given, default in _PLAN
    }
    made = OptionFigures.__new__(OptionFigures)
    object.__setattr__(made, "__dict__", fields)
    object.__setattr__(made, "__pydantic_fields_set__", set(_SUMMARY_SET))
    object.__setattr__(made, "__pydantic_extra__", None)
    object.__setattr__(made, "__pydantic_private__", None)
    return made


def _summary(name: str, found: Summary) -> OptionFigures:
    """An upgrade alone with only its savings and money figures set (``upgrades_alone=
    "summary"``): built without validation from figures checked finite here."""
    money = found.appraisal
    values: dict[str, Any] = {
        "id": found.id, "name": name, "upgrades": list(found.upgrade_ids),
        "annual_savings": money.annual_savings, "installed_cost": money.installed_cost,
        "rebates": money.rebates, "net_cost": money.net_cost,
        "simple_payback_years": money.simple_payback_years, "npv": money.npv, "sir": money.sir,
        "present_value": money.present_value, "co2_avoided": found.co2_avoided_kg,
        "heating_cost": found.heating_cost, "heating_fuel_saved": found.heating_fuel_saved,
        "total_cost": found.total_cost, "calibrated": None, "range": None,
    }  # fmt: skip
    numbers = [v for v in values.values() if isinstance(v, float)]
    if not all(math.isfinite(v) for v in numbers):
        raise InputError("body", TOO_LARGE)
    warnings = list(found.warnings)
    if money.annual_savings <= 0:
        warnings.append("saves nothing at today's prices, so it never pays back")
    values["warnings"] = warnings
    return _construct(values)


def compute_house(
    doc: HouseDocument,
    *,
    catalog: Catalog | None = None,
    upgrades_alone: bool | Literal["summary"] = True,
) -> HouseResult:
    """As-found house, each upgrade alone and each package, in ``doc.units``.

    Each distinct assembly is evaluated once by the assembly calculator. With
    ``upgrades_alone=False`` the result lists no single-upgrade options (``upgrades`` is
    empty; every upgrade is still checked): for pages that show only the packages. With
    ``"summary"`` each upgrade alone carries only its savings and money figures (the fields of
    :data:`server.services.house_options.SUMMARY_FIELDS`, plus ``installed_cost``,
    ``rebates``, ``present_value``, ``heating_cost``, ``heating_fuel_saved``, ``total_cost``
    for calibration; its other fields are not set): what calc/house answers by default.
    Raises :class:`InputError` (HTTP 422) naming the field of every problem found.
    """
    house, upgrades, warnings = model_of_document(doc, catalog=catalog)
    by_id = {u.id: u for u in upgrades}
    upgrade_names = {u.id: u.name for u in doc.upgrades}
    package_names = {p.id: p.name for p in doc.packages}
    try:
        options = Options(house, upgrades)
        as_found = options.as_found
        packages = [
            options.option(p.id, [by_id[name] for name in p.upgrades]) for p in doc.packages
        ]
        full_alone = [options.option(u.id, [u]) for u in upgrades] if upgrades_alone is True else []
        summaries = options.summaries() if upgrades_alone == "summary" else []
    except ValueError as exc:  # _check_ids covers these; a last guard against a 500
        raise InputError("upgrades", str(exc)) from None

    def figures_of(option: model.OptionResult, names: Mapping[str, str]) -> OptionFigures:
        """A package or an upgrade alone with every field (its own modified house)."""
        return _option(
            doc, house, by_id, as_found, option, names[option.id], options.house_of(option)
        )

    try:
        result = HouseResult(
            units=doc.units,
            currency=doc.currency,
            as_found=HouseFigures(**_figures(doc, house, as_found)),
            packages=[figures_of(option, package_names) for option in packages],
            upgrades=[figures_of(option, upgrade_names) for option in full_alone],
            fuel=_fuel(doc, house),
            analysis_years=doc.economics.years,
            step_order=STEP_ORDER,
            assumptions=list(ASSUMPTIONS) + _space_assumptions(doc) + systems_svc.assumptions(doc),
            degree_day_basis=gains_svc.degree_day_basis(doc),
            warnings=warnings,
        )
    except ValidationError as exc:  # the result parts refuse inf and NaN (FiniteOut)
        if any(error["type"] == "finite_number" for error in exc.errors()):
            raise InputError("body", TOO_LARGE) from None
        raise
    if summaries:
        result.upgrades = [_summary(upgrade_names[s.id], s) for s in summaries]
    # best first, so that it is calibrated and gets a range as every package does
    attach_optimum(doc, house, upgrades, as_found, result)  # with optimize
    calibrate(doc, result)  # with bills: calibration and each option's calibrated figures
    attach_ranges(doc, house, upgrades, result)  # with uncertainty
    return result


def house_result_json(doc: HouseDocument, *, catalog: Catalog | None = None) -> str:
    """The calc/house response: :func:`compute_house` with what ``doc.detail`` asks of each
    upgrade alone, serialized once."""
    if doc.detail.upgrades_alone == "full":
        return compute_house(doc, catalog=catalog).model_dump_json()
    result = compute_house(doc, catalog=catalog, upgrades_alone="summary")
    shown = set(SUMMARY_FIELDS) | {"calibrated"}
    alone: Any = {"__all__": shown} if result.upgrades else set()
    return result.model_dump_json(
        include={**{k: True for k in HouseResult.model_fields}, "upgrades": alone}
    )  # type: ignore[dict-item]
