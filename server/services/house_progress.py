"""What remains to be entered on the House page, section by section (the section bar's badges).

:func:`section_todo` is pure: it takes the few facts :func:`house_facts` reads off a saved house
and its envelope rows, and says per section a short count or word, or nothing when the section
has what the calculation needs. The words are for the badge beside the section's name; the
section itself says in full what is missing.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

from server.models import House


@dataclass(frozen=True, slots=True)
class HouseFacts:
    """What the badges depend on (counts of what is stored, and what is not)."""

    surfaces: int  # envelope surfaces (pipe runs not counted)
    surfaces_to_finish: int  # of those: no area, or an assembly that cannot compute
    has_climate: bool  # a weather file read, or heating degree-days typed
    has_heating: bool  # the heating system's fuel given
    has_air_leakage: bool  # a blower-door figure (CFM50 or ACH50) given
    bill_periods: int
    upgrades: int
    packages: int


def section_todo(facts: HouseFacts) -> dict[str, str]:
    """Per section key (``house``, ``envelope``, ``air``, ``bills``, ``upgrades``) what is
    still to enter, as a badge's text; a section with nothing left is not in the dict.

    * house: ``climate`` with neither a weather file nor typed degree-days (nothing computes
      without them), else ``heating`` with no heating fuel;
    * envelope: ``add`` with no surface, else the count of surfaces that have no area or
      cannot compute;
    * air: ``none`` with no blower-door figure;
    * bills: ``none`` with no bills;
    * upgrades: ``0`` with no upgrade, ``no package`` with upgrades but no package.
    """
    todo: dict[str, str] = {}
    if not facts.has_climate:
        todo["house"] = "climate"
    elif not facts.has_heating:
        todo["house"] = "heating"
    if facts.surfaces == 0:
        todo["envelope"] = "add"
    elif facts.surfaces_to_finish:
        todo["envelope"] = str(facts.surfaces_to_finish)
    if not facts.has_air_leakage:
        todo["air"] = "none"
    if facts.bill_periods == 0:
        todo["bills"] = "none"
    if facts.upgrades == 0:
        todo["upgrades"] = "0"
    elif facts.packages == 0:
        todo["upgrades"] = "no package"
    return todo


def _to_finish(row: Any) -> bool:
    """An envelope row with no area, or whose assembly cannot compute."""
    area = getattr(row.surface, "area", None)
    return row.result is None or bool(row.error) or not area or area <= 0


def house_facts(house: House, rows: Iterable[Any]) -> HouseFacts:
    """The facts of a saved house; ``rows`` are its envelope rows
    (:func:`server.services.envelope.envelope_rows`), surface with result and error."""
    rows = list(rows)
    climate = house.climate or {}
    leakage = house.air_leakage or {}
    bills = house.bills or {}
    return HouseFacts(
        surfaces=len(rows),
        surfaces_to_finish=sum(1 for r in rows if _to_finish(r)),
        has_climate=bool(climate.get("weather")) or climate.get("hdd") is not None,
        has_heating=bool((house.heating or {}).get("fuel")),
        has_air_leakage=leakage.get("cfm50") is not None or leakage.get("n50") is not None,
        bill_periods=len(bills.get("periods") or []),
        upgrades=len(house.upgrades),
        packages=len(house.packages),
    )
