"""Load the code-target table (``server/data/code_targets.csv``) into validated rows.

The packaged table is read once and cached. A firm's own edited table can be parsed with
:func:`parse_code_targets`; a bad row raises :class:`server.errors.InputError` naming the row
and column, which the API turns into HTTP 422.
"""

from __future__ import annotations

import csv
import io
import math
from functools import lru_cache
from importlib import resources

from server.errors import InputError
from server.physics.code_targets import CodeTarget

COLUMNS = (
    "edition",
    "climate_zone",
    "surface_kind",
    "r_min_ip",
    "u_max_ip",
    "note",
    "source_kind",
)
PACKAGED_NAME = "code_targets.csv"


def _number(text: str, field: str) -> float | None:
    text = text.strip()
    if not text:
        return None
    try:
        value = float(text)
    except ValueError:
        raise InputError(field=field, message=f"'{text}' is not a number") from None
    if not math.isfinite(value):
        raise InputError(field=field, message="must be a finite number")
    return value


def _zone(text: str, field: str) -> int:
    text = text.strip()
    if not text.isdigit() or int(text) > 8:
        raise InputError(field=field, message="must be a climate zone from 0 to 8")
    return int(text)


def parse_code_targets(text: str, *, source_name: str = PACKAGED_NAME) -> tuple[CodeTarget, ...]:
    """Parse CSV text with the columns of :data:`COLUMNS` into CodeTarget rows.

    Every row must name its edition and its source kind, have a zone from 0 to 8, a known
    surface kind and a minimum R or a maximum U-factor (or both); a zone and surface kind may
    appear only once.
    """
    reader = csv.DictReader(io.StringIO(text))
    missing = [name for name in COLUMNS if name not in (reader.fieldnames or [])]
    if missing:
        raise InputError(field=source_name, message=f"missing column(s): {', '.join(missing)}")
    rows: list[CodeTarget] = []
    seen: set[tuple[int, str]] = set()
    for number, raw in enumerate(reader, start=1):
        where = f"{source_name}[{number}]"
        values = {name: (raw.get(name) or "").strip() for name in COLUMNS}
        try:
            row = CodeTarget(
                edition=values["edition"],
                climate_zone=_zone(values["climate_zone"], f"{where}.climate_zone"),
                surface_kind=values["surface_kind"],
                r_min_ip=_number(values["r_min_ip"], f"{where}.r_min_ip"),
                u_max_ip=_number(values["u_max_ip"], f"{where}.u_max_ip"),
                note=values["note"],
                source_kind=values["source_kind"],
            )
        except ValueError as error:
            raise InputError(field=where, message=str(error)) from None
        key = (row.climate_zone, row.surface_kind)
        if key in seen:
            raise InputError(field=where, message="this zone and surface kind appear twice")
        seen.add(key)
        rows.append(row)
    if not rows:
        raise InputError(field=source_name, message="the table has no rows")
    return tuple(rows)


@lru_cache(maxsize=1)
def load_code_targets() -> tuple[CodeTarget, ...]:
    """The packaged table, validated (read once per process)."""
    text = resources.files("server").joinpath("data", PACKAGED_NAME).read_text(encoding="utf-8")
    return parse_code_targets(text)
