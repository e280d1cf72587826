"""The whole house as plain data: apply upgrades, evaluate energy and money, compare options.

Everything is SI (m², W/(m²·K), W/K, m³/s, K·day, J); money is a plain number in the caller's
currency. A package is evaluated as ONE modified house: every upgrade of the package is applied
to a copy of the house and the copy is evaluated; savings are never added up from single
upgrades. Each package also reports the incremental savings of its upgrades in the package's
listed order: step i is what upgrade i saves on the house that already has upgrades 1..i-1,
so the steps add up to the package's savings exactly.

What the physics says about interaction: with the degree-day method at a fixed balance base
and fixed system efficiencies, the annual cost is linear in the whole-house UA (envelope +
infiltration) plus the pipe losses, and each upgrade changes one separate term. So savings of
upgrades on different surfaces (and air sealing, and pipe runs) are exactly additive here:
package savings = sum of single savings. The package is still computed as one house so that a
method with interaction (a balance point that moves with UA, a system resized) changes nothing
in the callers.

The house itself is plain data in :mod:`.house_data`, its upgrades in :mod:`.house_changes`
and its year in :mod:`.house_energy`; this module compares options and re-exports those names
(importers use ``house_model.<name>``).

References
----------
[1] ASHRAE Handbook—Fundamentals (2021), ch. 19, degree-day method (see :mod:`.energy`).
[2] NIST Handbook 135 (1995), life-cycle costing (see :mod:`.economics`).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

from server.physics import economics as money
from server.physics.house_changes import (
    AirSealingUpgrade,
    AssemblyUpgrade,
    Package,
    PipeInsulationUpgrade,
    Upgrade,
    apply_upgrades,
    upgrade_target,
)
from server.physics.house_data import (
    AirLeakage,
    Climate,
    Cooling,
    Economics,
    Heating,
    House,
    PipeRunLoss,
    Surface,
    VariableBase,
)
from server.physics.house_energy import HouseEnergy, evaluate, heating_co2_per_unit, solar_terms

__all__ = [
    "AirLeakage",
    "AirSealingUpgrade",
    "AssemblyUpgrade",
    "Climate",
    "Comparison",
    "Cooling",
    "Economics",
    "Heating",
    "House",
    "HouseEnergy",
    "OptionResult",
    "Package",
    "PipeInsulationUpgrade",
    "PipeRunLoss",
    "Step",
    "Surface",
    "Upgrade",
    "VariableBase",
    "apply_upgrades",
    "compare",
    "evaluate",
    "evaluate_option",
    "heating_co2_per_unit",
    "solar_terms",
    "upgrade_target",
]


@dataclass(frozen=True, slots=True)
class Step:
    """One upgrade's share of a package: what it saves on the house with the ones before it."""

    upgrade_id: str
    annual_savings: float
    ua_reduction_w_per_k: float
    co2_avoided_kg: float


@dataclass(frozen=True, slots=True)
class OptionResult:
    """A package (or one upgrade alone) evaluated as one modified house."""

    id: str
    upgrade_ids: tuple[str, ...]
    energy: HouseEnergy
    appraisal: money.Appraisal
    co2_avoided_kg: float
    steps: tuple[Step, ...]
    warnings: tuple[str, ...] = field(default=())


@dataclass(frozen=True, slots=True)
class Comparison:
    """As-found house, each upgrade alone (in the given order) and each package."""

    as_found: HouseEnergy
    upgrades_alone: tuple[OptionResult, ...]
    packages: tuple[OptionResult, ...]


def evaluate_option(
    house: House, as_found: HouseEnergy, option_id: str, chosen: Sequence[Upgrade]
) -> OptionResult:
    """Evaluate ``chosen`` applied together to ``house`` (one modified house), with steps.

    Step i is the saving of upgrade i on the house that already has upgrades 1..i-1 (the
    listed order); the last step's house is the package's house.
    """
    if not chosen:
        raise ValueError(f"'{option_id}' has no upgrades")
    warnings: list[str] = []
    steps: list[Step] = []
    before = as_found
    for count, upgrade in enumerate(chosen, start=1):
        after = evaluate(apply_upgrades(house, chosen[:count]))
        steps.append(
            Step(
                upgrade_id=upgrade.id,
                annual_savings=before.total_cost - after.total_cost,
                ua_reduction_w_per_k=before.ua_w_per_k - after.ua_w_per_k,
                co2_avoided_kg=before.co2_kg - after.co2_kg,
            )
        )
        if before.total_cost - after.total_cost < 0:
            warnings.append(f"'{upgrade.id}' raises the yearly cost: check its new assembly")
        life = upgrade.life_years
        if life is not None and life < house.economics.years:
            warnings.append(
                f"'{upgrade.id}' is expected to last {life:g} years, less than the "
                f"{house.economics.years}-year study period; its savings are counted to the end "
                "of the period and no replacement cost is included"
            )
        before = after
    package_energy = before
    savings = as_found.total_cost - package_energy.total_cost
    econ = house.economics
    appraisal = money.appraise(
        installed_cost=sum(u.installed_cost for u in chosen),
        rebates=sum(u.rebate for u in chosen),
        annual_savings=savings,
        discount_rate=econ.discount_rate,
        escalation_rate=econ.escalation_rate,
        years=econ.years,
        loan_apr=econ.loan_apr,
        loan_months=econ.loan_months,
    )
    if appraisal.net_cost < 0:
        warnings.append("the rebates are larger than the installed cost")
    return OptionResult(
        id=option_id,
        upgrade_ids=tuple(u.id for u in chosen),
        energy=package_energy,
        appraisal=appraisal,
        co2_avoided_kg=as_found.co2_kg - package_energy.co2_kg,
        steps=tuple(steps),
        warnings=tuple(warnings),
    )


def compare(
    house: House,
    upgrades: Sequence[Upgrade],
    packages: Sequence[Package],
    *,
    upgrades_alone: bool = True,
) -> Comparison:
    """The as-found house, every upgrade alone and every package as one modified house.

    With ``upgrades_alone=False`` the single-upgrade houses are skipped (an empty
    ``upgrades_alone``): a page that shows only the packages saves most of the work.

    Raises
    ------
    ValueError
        Duplicate upgrade ids, a package naming an unknown upgrade, or any error of
        :func:`apply_upgrades`.
    """
    by_id: dict[str, Upgrade] = {}
    for upgrade in upgrades:
        if upgrade.id in by_id:
            raise ValueError(f"two upgrades are called '{upgrade.id}'")
        by_id[upgrade.id] = upgrade
    as_found = evaluate(house)
    alone = (
        tuple(evaluate_option(house, as_found, u.id, [u]) for u in upgrades)
        if upgrades_alone
        else ()
    )
    results = []
    for package in packages:
        missing = [name for name in package.upgrade_ids if name not in by_id]
        if missing:
            raise ValueError(f"package '{package.id}' names unknown upgrades: {', '.join(missing)}")
        chosen = [by_id[name] for name in package.upgrade_ids]
        results.append(evaluate_option(house, as_found, package.id, chosen))
    return Comparison(as_found=as_found, upgrades_alone=alone, packages=tuple(results))
