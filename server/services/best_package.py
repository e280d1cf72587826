"""The best package for a budget, computed and kept as one of the house's packages.

The set is found again on the server (``optimize`` in the house document, the one code path
of calc/house), never taken from the form, so what is stored is the true best set of the
house as it is now; the form's ``version`` makes a page loaded before another save a conflict
(nothing stored). A set already saved as a package is not saved twice: that package is
returned.
"""

from __future__ import annotations

from typing import Literal

from sqlalchemy.orm import Session

from server.documents.house import HouseResult
from server.errors import InputError
from server.models import House, Package
from server.services.catalog import Catalog
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.services.houses import check_version
from server.services.optimize import OBJECTIVE_WORDS
from server.services.upgrades import add_package

Objective = Literal["npv", "annual_savings", "co2"]
#: short words for a package name
OBJECTIVE_NAMES = {"npv": "NPV", "annual_savings": "first-year savings", "co2": "CO₂"}


def best_result(
    house: House, *, catalog: Catalog, budget: float | None, objective: Objective
) -> HouseResult:
    """The house's packages and the best set for ``budget`` (net cost) and ``objective``."""
    doc = house_document(house, optimize={"budget": budget, "objective": objective})
    return compute_house(doc, catalog=catalog, upgrades_alone=False)


def package_name(*, budget: float | None, objective: Objective, currency: str = "$") -> str:
    """E.g. ``Best NPV within $9,000`` or ``Best CO₂ (no budget)``."""
    what = OBJECTIVE_NAMES[objective]
    if budget is None:
        return f"Best {what} (no budget)"
    return f"Best {what} within {currency}{budget:,.0f}"


def save_best_package(
    *,
    session: Session,
    house: House,
    catalog: Catalog,
    budget: float | None,
    objective: Objective,
    expected_version: int | None,
) -> Package:
    """Store the best set for ``budget`` and ``objective`` as a package (or return the saved
    package that already holds exactly that set).

    Raises
    ------
    Conflict
        ``expected_version`` is not the house's version (someone saved since).
    InputError
        ``budget`` when no set within it beats leaving the house as it is.
    """
    check_version(house, expected_version)
    result = best_result(house, catalog=catalog, budget=budget, objective=objective)
    if result.best is None:
        raise InputError(
            "budget",
            "no set of upgrades within this budget beats leaving the house as it is "
            f"({OBJECTIVE_WORDS[objective]}); nothing was saved",
        )
    chosen = list(result.best.upgrades)
    for package in house.packages:
        if sorted(package.upgrade_slugs) == sorted(chosen):
            return package
    return add_package(
        session=session,
        house=house,
        name=package_name(budget=budget, objective=objective),
        upgrade_slugs=chosen,
        expected_version=expected_version,
    )
