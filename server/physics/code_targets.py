"""Prescriptive code targets (minimum R / maximum U by climate zone) and the check against them.

The table itself lives in ``server/data/code_targets.csv`` (loaded by
``server.services.code_target_data``); this module only holds the row type, the look-up and
the comparison, so it stays pure.

How a surface is compared:

* When the row has a maximum U-factor and the assembly's U-factor is known (or its total R,
  from which U = 1 / R_total), the U-factors are compared. This is the like-for-like check:
  the U-factor table [1] (R402.1.2) is for whole assemblies, films and framing included.
* Otherwise the row's minimum R [1] (R402.1.3) is compared with the R given. That table lists
  the nominal R of the insulation alone, so comparing it with an assembly total is only
  approximate, and the verdict says so.

References
----------
[1] International Energy Conservation Code (2021), residential provisions, Table R402.1.3
    (insulation minimum R-values) and Table R402.1.2 (maximum assembly U-factors); values in
    the packaged table are from memory — always verify with the locally adopted code.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, replace
from typing import Literal

#: Surface kinds the table has rows for.
SURFACE_KINDS = (
    "ceiling",
    "wood_frame_wall",
    "mass_wall",
    "floor",
    "basement_wall",
    "crawlspace_wall",
    "slab",
    "fenestration",
)
#: Other names for the same rows (common practice: rim joists and kneewalls are treated as
#: frame walls, cathedral roofs and attic floors as ceilings, windows as fenestration).
SURFACE_KIND_ALIASES = {
    "attic": "ceiling",
    "ceiling_attic": "ceiling",
    "cathedral_roof": "ceiling",
    "wall": "wood_frame_wall",
    "rim_joist": "wood_frame_wall",
    "kneewall": "wood_frame_wall",
    "window": "fenestration",
}
SOURCE_KINDS = ("from memory", "packaged dataset", "published table", "firm's own")
VERIFY = "verify with the locally adopted code"

Status = Literal["meets", "below target", "no target"]


@dataclass(frozen=True, slots=True)
class CodeTarget:
    """One row of the code-target table (IP units, as the code tables are printed).

    ``r_min_ip`` [h·ft²·°F/Btu] is the simplest insulation R the row allows (None when the
    row has no single-number option); ``u_max_ip`` [Btu/(h·ft²·°F)] the maximum assembly
    U-factor. ``note`` keeps the table's own wording (e.g. "20 or 13+5ci or 0+15ci").
    """

    edition: str
    climate_zone: int
    surface_kind: str
    r_min_ip: float | None
    u_max_ip: float | None
    note: str
    source_kind: str

    def __post_init__(self) -> None:
        if not self.edition.strip():
            raise ValueError("every code target needs its edition (which code and table)")
        if isinstance(self.climate_zone, bool) or self.climate_zone not in range(9):
            raise ValueError("the climate zone must be a whole number from 0 to 8")
        if self.surface_kind not in SURFACE_KINDS:
            raise ValueError(f"unknown surface kind; use one of {', '.join(SURFACE_KINDS)}")
        if self.r_min_ip is None and self.u_max_ip is None:
            raise ValueError("a code target needs a minimum R, a maximum U-factor, or both")
        if self.r_min_ip is not None and not (
            math.isfinite(self.r_min_ip) and self.r_min_ip >= 0.0
        ):
            raise ValueError("a minimum R must be a number of 0 or more")
        if self.u_max_ip is not None and not (math.isfinite(self.u_max_ip) and self.u_max_ip > 0.0):
            raise ValueError("a maximum U-factor must be a number greater than 0")
        if self.source_kind not in SOURCE_KINDS:
            raise ValueError(f"the source must be one of: {', '.join(SOURCE_KINDS)}")


@dataclass(frozen=True, slots=True)
class CodeVerdict:
    """Outcome of :func:`check`: status, what was compared, the two numbers, plain words."""

    status: Status
    compared: Literal["u_factor", "r_value"] | None
    target_value: float | None
    actual_value: float | None
    words: str


def _zone_number(climate_zone: int | str) -> tuple[int, bool]:
    """(zone number, is marine zone 4) from 5, "5", "5A", "4C" or "Zone 4C"."""
    text = str(climate_zone).strip().upper().removeprefix("ZONE").strip()
    digits = text[:1]
    if digits not in "012345678" or not digits or text[1:] not in ("", "A", "B", "C"):
        raise ValueError("a climate zone looks like 5, 5A or 4C (0 to 8, then A, B or C)")
    return int(digits), text == "4C"


def target_for(
    rows: Iterable[CodeTarget], climate_zone: int | str, surface_kind: str
) -> CodeTarget | None:
    """The row for a climate zone and surface kind, or None when the table has none.

    Parameters
    ----------
    rows : iterable of CodeTarget
        The table (see ``server.services.code_target_data.load_code_targets``).
    climate_zone : int or str
        0 to 8, optionally with its moisture letter ("4C"). Marine zone 4 (4C) uses the zone 5
        row, as the table [1] groups them.
    surface_kind : str
        One of :data:`SURFACE_KINDS` or an alias in :data:`SURFACE_KIND_ALIASES`.
    """
    zone, marine_four = _zone_number(climate_zone)
    kind = SURFACE_KIND_ALIASES.get(surface_kind, surface_kind)
    wanted = 5 if marine_four else zone
    for row in rows:
        if row.climate_zone == wanted and row.surface_kind == kind:
            if marine_four:
                return replace(row, note=f"Marine zone 4 uses the zone 5 row. {row.note}")
            return row
    return None


def _positive(value: float | None, what: str) -> float | None:
    if value is None:
        return None
    if not math.isfinite(value) or value <= 0.0:
        raise ValueError(f"the {what} must be a number greater than zero")
    return float(value)


def check(
    target: CodeTarget | None,
    r_total_ip: float | None = None,
    u_factor_ip: float | None = None,
) -> CodeVerdict:
    """Compare an assembly with its code target.

    Parameters
    ----------
    target : CodeTarget or None
        The row from :func:`target_for` (None gives "no target").
    r_total_ip : float, optional
        The assembly's total R [h·ft²·°F/Btu] (films and framing included).
    u_factor_ip : float, optional
        The assembly's U-factor [Btu/(h·ft²·°F)]; if absent, U = 1 / r_total_ip.

    Returns
    -------
    CodeVerdict
        "meets" when U <= U_max (or R >= R_min when only R can be compared), "below target"
        otherwise, "no target" when there is no row or nothing comparable was given.
    """
    r_total = _positive(r_total_ip, "total R")
    u_factor = _positive(u_factor_ip, "U-factor")
    if u_factor is None and r_total is not None:
        u_factor = 1.0 / r_total
    if target is None:
        return CodeVerdict("no target", None, None, None, "The table has no target for this.")
    label = f"{target.edition}, climate zone {target.climate_zone}"
    verify = "" if "verify" in target.edition.lower() else f"; {VERIFY}"
    if target.u_max_ip is not None and u_factor is not None:
        ok = u_factor <= target.u_max_ip * (1.0 + 1e-9)
        status: Status = "meets" if ok else "below target"
        relation = "at or under" if ok else "above"
        words = (
            f"U-factor {u_factor:.3f} is {relation} the maximum of {target.u_max_ip:.3f} "
            f"({label}){verify}."
        )
        return CodeVerdict(status, "u_factor", target.u_max_ip, u_factor, words)
    if target.r_min_ip is not None and r_total is not None:
        ok = r_total >= target.r_min_ip * (1.0 - 1e-9)
        status = "meets" if ok else "below target"
        relation = "at or over" if ok else "under"
        words = (
            f"R-{r_total:.1f} is {relation} the minimum of R-{target.r_min_ip:g} ({label}; the "
            f"table counts the insulation alone, so this comparison is approximate){verify}."
        )
        return CodeVerdict(status, "r_value", target.r_min_ip, r_total, words)
    return CodeVerdict(
        "no target",
        None,
        None,
        None,
        f"Nothing to compare: the row ({label}) and the values given do not match up.",
    )
