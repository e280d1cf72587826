"""The options of a house (each upgrade alone, each package) evaluated once, fast.

The same figures as :func:`server.physics.house_model.compare` (each package one modified house,
steps in the listed order, NIST 135 money figures), computed with less work:

* the yearly economics factors ((1 + e)^t, (1 + d)^-t) once per house
  (:func:`server.physics.economics.yearly_factors`), not once per option;
* a package's steps by applying its upgrades one at a time (each step's house is the last one
  with one more upgrade, not the as-found house re-upgraded from scratch), and, when the array
  core models the house (:func:`server.physics.variants.unsupported` is None), every step's
  figures in one array evaluation (:class:`server.physics.variants.Variants`); a package's own
  figures are always those of its one modified house (:func:`.house_model.evaluate`);
* each upgrade alone, when the caller asks only for its savings and money
  (:data:`SUMMARY_FIELDS`), from the array core in one evaluation of every upgrade.

The steps' selections are built in one pass (:meth:`.Variants.prefix_selections`), each
package's modified house is kept for its figures (:meth:`Options.house_of`), and a summary's
money figures skip the cash flow it does not carry (:class:`SummaryMoney`), for every upgrade
at once; tests/unit/test_variants_rows.py checks these equal the slow paths float for float.
tests/unit/test_variants.py checks the fast path against the package path of
:func:`.house_model.evaluate_option` on random houses.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from server.physics import economics
from server.physics import house_model as model
from server.physics.variants import Figures, Variants, unsupported

#: the fields of each upgrade alone in the default calc/house response (``detail``:
#: ``upgrades_alone`` "summary"); "full" gives every field, as a package has
SUMMARY_FIELDS = frozenset(
    {"id", "name", "upgrades", "annual_savings", "net_cost", "simple_payback_years", "npv",
     "sir", "co2_avoided", "warnings"}
)  # fmt: skip


@dataclass(frozen=True, slots=True)
class SummaryMoney:
    """The money figures of an upgrade alone that a summary carries: those of
    :func:`server.physics.economics.appraise`, without its cash flow and payback crossings."""

    installed_cost: float
    rebates: float
    net_cost: float
    annual_savings: float
    simple_payback_years: float | None
    present_value: float
    npv: float
    sir: float | None


def _finite(value: float, name: str) -> float:
    """The check (and words) of :func:`server.physics.economics.appraise` for one input."""
    if not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number (not NaN or infinity)")
    return value


@dataclass(frozen=True, slots=True)
class Summary:
    """One upgrade alone: what it saves and its money figures (no house figures)."""

    id: str
    upgrade_ids: tuple[str, ...]
    appraisal: SummaryMoney
    co2_avoided_kg: float
    heating_cost: float
    heating_fuel_saved: float
    total_cost: float
    ua_w_per_k: float
    warnings: tuple[str, ...]


class Options:
    """The as-found house and what the evaluation of its options shares (factors, arrays)."""

    def __init__(self, house: model.House, upgrades: Sequence[model.Upgrade]) -> None:
        self.house = house
        self.upgrades = list(upgrades)
        econ = house.economics
        self.factors = economics.yearly_factors(
            econ.discount_rate, econ.escalation_rate, econ.years
        )
        self.as_found = model.evaluate(house)
        #: each evaluated option's house, by the option's identity (for its figures)
        self._houses: dict[int, tuple[model.OptionResult, model.House]] = {}
        self.variants: Variants | None = None
        if unsupported(house, self.upgrades) is None:
            try:
                self.variants = Variants(house, self.upgrades)
            except ValueError:  # the package path reports it in its own words
                self.variants = None

    def appraise(
        self, installed_cost: float, rebates: float, annual_savings: float
    ) -> economics.Appraisal:
        econ = self.house.economics
        return economics.appraise(
            installed_cost=installed_cost,
            rebates=rebates,
            annual_savings=annual_savings,
            discount_rate=econ.discount_rate,
            escalation_rate=econ.escalation_rate,
            years=econ.years,
            loan_apr=econ.loan_apr,
            loan_months=econ.loan_months,
            factors=self.factors,
        )

    def summary_money(
        self, installed_cost: float, rebates: float, annual_savings: float
    ) -> SummaryMoney:
        """:meth:`appraise`'s figures of :class:`SummaryMoney` (the same checks, in the same
        order, and the same arithmetic), without building the cash flow nobody reads."""
        econ = self.house.economics
        net = _finite(installed_cost, "the installed cost") - _finite(rebates, "the rebates")
        _finite(net, "the net cost")
        present = economics.present_value_of_savings(
            annual_savings, econ.discount_rate, econ.escalation_rate, econ.years, self.factors
        )
        if econ.loan_apr is not None and econ.loan_months is not None:
            economics.monthly_loan_payment(net, econ.loan_apr, econ.loan_months)  # its checks
        return SummaryMoney(
            installed_cost=installed_cost,
            rebates=rebates,
            net_cost=net,
            annual_savings=annual_savings,
            simple_payback_years=economics.simple_payback_years(net, annual_savings),
            present_value=present,
            npv=present - net,
            sir=economics.savings_to_investment_ratio(net, present),
        )

    def _summary_moneys(self, savings: np.ndarray) -> list[SummaryMoney] | None:
        """:meth:`summary_money` of every upgrade alone (``savings``: each one's) at once: the
        present values as the same products summed year by year in the same order (so the
        same floats); None when an input is not finite (the caller then takes each in turn,
        which raises with the words of the first)."""
        econ = self.house.economics
        installed = [u.installed_cost for u in self.upgrades]
        rebates = [u.rebate for u in self.upgrades]
        net = [i - r for i, r in zip(installed, rebates, strict=True)]
        if not self.factors or not all(math.isfinite(v) for v in (*installed, *rebates, *net)):
            return None
        present_sum = np.zeros_like(savings)  # sum() starts at 0 too
        for escalation, discount in self.factors:
            present_sum = present_sum + savings * escalation * discount
        if not (np.isfinite(savings).all() and np.isfinite(present_sum).all()):
            return None
        if econ.loan_apr is not None and econ.loan_months is not None:
            economics.monthly_loan_payment(net[0], econ.loan_apr, econ.loan_months)  # checks
        out = []
        for c, r, n, s, p in zip(
            installed, rebates, net, savings.tolist(), present_sum.tolist(), strict=True
        ):
            out.append(
                SummaryMoney(
                    installed_cost=c,
                    rebates=r,
                    net_cost=n,
                    annual_savings=s,
                    simple_payback_years=max(n, 0.0) / s if s > 0 else None,
                    present_value=p,
                    npv=p - n,
                    sir=p / n if n > 0 else None,
                )
            )
        return out

    def _warnings(self, upgrade: model.Upgrade, saved: float) -> list[str]:
        """What :func:`.house_model.evaluate_option` says of one step."""
        notes = []
        if saved < 0:
            notes.append(f"'{upgrade.id}' raises the yearly cost: check its new assembly")
        life = upgrade.life_years
        years = self.house.economics.years
        if life is not None and life < years:
            notes.append(
                f"'{upgrade.id}' is expected to last {life:g} years, less than the "
                f"{years}-year study period; its savings are counted to the end "
                "of the period and no replacement cost is included"
            )
        return notes

    def _step_figures(self, chosen: Sequence[model.Upgrade]) -> Figures | None:
        """The array figures of the houses with the first 1..n-1 upgrades (None: no core)."""
        if self.variants is None or len(chosen) < 2:
            return None
        rows = self.variants.prefix_selections([u.id for u in chosen[:-1]])
        return self.variants.evaluate(rows)

    def option(self, option_id: str, chosen: Sequence[model.Upgrade]) -> model.OptionResult:
        """``chosen`` applied together (one modified house), with its steps: the figures of
        :func:`.house_model.evaluate_option`."""
        if not chosen:
            raise ValueError(f"'{option_id}' has no upgrades")
        modified = model.apply_upgrades(self.house, chosen)
        package_energy = model.evaluate(modified)
        arrays = self._step_figures(chosen)
        totals: list[tuple[float, float, float]] = [
            (self.as_found.total_cost, self.as_found.ua_w_per_k, self.as_found.co2_kg)
        ]
        if arrays is not None:
            totals += zip(
                arrays.total_cost.tolist(), arrays.ua_w_per_k.tolist(), arrays.co2_kg.tolist(),
                strict=True,
            )  # fmt: skip
        else:  # one upgrade more on the last step's house
            current = self.house
            for upgrade in chosen[:-1]:
                current = model.apply_upgrades(current, [upgrade])
                found = model.evaluate(current)
                totals.append((found.total_cost, found.ua_w_per_k, found.co2_kg))
        totals.append((package_energy.total_cost, package_energy.ua_w_per_k, package_energy.co2_kg))
        warnings: list[str] = []
        steps = []
        for k, upgrade in enumerate(chosen):
            (cost0, ua0, co20), (cost1, ua1, co21) = totals[k], totals[k + 1]
            steps.append(model.Step(upgrade.id, cost0 - cost1, ua0 - ua1, co20 - co21))
            warnings += self._warnings(upgrade, cost0 - cost1)
        savings = self.as_found.total_cost - package_energy.total_cost
        appraisal = self.appraise(
            sum(u.installed_cost for u in chosen), sum(u.rebate for u in chosen), savings
        )
        if appraisal.net_cost < 0:
            warnings.append("the rebates are larger than the installed cost")
        result = model.OptionResult(
            id=option_id,
            upgrade_ids=tuple(u.id for u in chosen),
            energy=package_energy,
            appraisal=appraisal,
            co2_avoided_kg=self.as_found.co2_kg - package_energy.co2_kg,
            steps=tuple(steps),
            warnings=tuple(warnings),
        )
        self._houses[id(result)] = (result, modified)
        return result

    def house_of(self, result: model.OptionResult) -> model.House | None:
        """The modified house of an option this object evaluated (None: another's)."""
        found = self._houses.get(id(result))
        return found[1] if found is not None and found[0] is result else None

    def summaries(self) -> list[Summary]:
        """Each upgrade alone, its savings and money figures (in the upgrades' order)."""
        if self.variants is None:
            alone = [self.option(u.id, [u]) for u in self.upgrades]
            return [
                Summary(
                    o.id,
                    o.upgrade_ids,
                    _money_of(o.appraisal),
                    o.co2_avoided_kg,
                    o.energy.heating_cost,
                    self.as_found.heating_fuel_units - o.energy.heating_fuel_units,
                    o.energy.total_cost,
                    o.energy.ua_w_per_k,
                    o.warnings,
                )  # fmt: skip
                for o in alone
            ]
        variants = self.variants
        if not self.upgrades:
            return []
        rows = variants.single_selections([u.id for u in self.upgrades])
        found = variants.evaluate(rows)
        as_found = self.as_found
        money = self._summary_moneys(as_found.total_cost - found.total_cost)
        out = []
        for k, upgrade in enumerate(self.upgrades):
            total = float(found.total_cost[k])
            savings = as_found.total_cost - total
            warnings = self._warnings(upgrade, savings)
            appraisal = (
                money[k]
                if money is not None
                else self.summary_money(upgrade.installed_cost, upgrade.rebate, savings)
            )
            if appraisal.net_cost < 0:
                warnings.append("the rebates are larger than the installed cost")
            out.append(
                Summary(
                    upgrade.id,
                    (upgrade.id,),
                    appraisal,
                    as_found.co2_kg - float(found.co2_kg[k]),
                    float(found.heating_cost[k]),
                    as_found.heating_fuel_units - float(found.heating_fuel_units[k]),
                    total,
                    float(found.ua_w_per_k[k]),
                    tuple(warnings),
                )  # fmt: skip
            )
        return out


def _money_of(appraisal: economics.Appraisal) -> SummaryMoney:
    """The summary's part of a full appraisal."""
    return SummaryMoney(
        installed_cost=appraisal.installed_cost,
        rebates=appraisal.rebates,
        net_cost=appraisal.net_cost,
        annual_savings=appraisal.annual_savings,
        simple_payback_years=appraisal.simple_payback_years,
        present_value=appraisal.present_value,
        npv=appraisal.npv,
        sir=appraisal.sir,
    )
