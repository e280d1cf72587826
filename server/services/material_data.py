"""The built-in material library: ``server/data/materials.csv``, read and checked.

Every row names its source (``source_kind`` and ``source``). Two kinds of row:

* ``conductivity``: a homogeneous material with a thermal conductivity k [W/(m·K)]; its
  resistance depends on the thickness (Fourier's law, R = L / k). ``r_per_inch_ip`` repeats
  k as the handbook's R per inch [h·ft²·°F/(Btu·in)] and must agree with it to 0.5 %.
  ``thickness_mm`` is a typical thickness (optional).
* ``fixed_r``: an item whose published resistance ``r_si`` [m²·K/W] is for the stated
  ``thickness_mm`` and does not scale with it (siding, air spaces, membranes, hollow block).

Vapour data (for the dew-point check): ``vapour_mu`` is the dimensionless vapour resistance
factor of a conductivity material (ISO 10456 style); ``vapour_sd_m`` [m] is the equivalent
still-air layer thickness of a sheet or fixed item, or of the facers of a faced board. The
total is ``vapour_mu × thickness + vapour_sd_m`` (see :func:`material_vapour_sd_m`).

References
----------
[1] ASHRAE Handbook—Fundamentals (2013), ch. 26 "Heat, Air, and Moisture Control in Building
    Assemblies—Material Properties", Table 1.
[2] ISO 10456:2007, Building materials and products—Hygrothermal properties, Tables 3 and 4.
[3] ISO 6946:2007, Building components and building elements—Thermal resistance and thermal
    transmittance—Calculation method, section 5 (R = d / λ) and Table 2 (air layers).
"""

from __future__ import annotations

import csv
import io
import math
import re
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from server.physics.units import K_IP_IN_SI

#: The header line of materials.csv, in this order.
CSV_HEADER: tuple[str, ...] = tuple(
    "slug,name,category,kind,conductivity_w_mk,r_si,r_per_inch_ip,thickness_mm,"
    "density_kg_m3,vapour_mu,vapour_sd_m,source_kind,source".split(",")
)
CATEGORIES: frozenset[str] = frozenset(
    "board insulation framing masonry cladding membrane air-space finish metal other".split()
)
KINDS: frozenset[str] = frozenset({"conductivity", "fixed_r"})
SOURCE_KINDS: frozenset[str] = frozenset({"handbook", "standard", "common practice", "from memory"})
#: Largest allowed relative gap between r_per_inch_ip and 1 / (k in Btu·in/(h·ft²·°F)).
R_PER_INCH_TOLERANCE = 0.005

_SLUG = re.compile(r"^[a-z0-9]+(?:-[a-z0-9]+)*$")
_NUMBER_FIELDS = (
    "conductivity_w_mk",
    "r_si",
    "r_per_inch_ip",
    "thickness_mm",
    "density_kg_m3",
    "vapour_mu",
    "vapour_sd_m",
)


@dataclass(frozen=True, slots=True)
class MaterialRow:
    """One material of the built-in library (SI, except ``r_per_inch_ip``).

    Attributes
    ----------
    slug : str
        Lowercase-hyphen id, unique in the library (``gypsum-board``).
    name : str
        Plain-words name, no brand or trade names.
    category : str
        One of :data:`CATEGORIES`.
    kind : str
        ``"conductivity"`` or ``"fixed_r"``.
    conductivity_w_mk : float or None
        Thermal conductivity k [W/(m·K)]; set only for ``conductivity`` rows.
    r_si : float or None
        Thermal resistance [m²·K/W] at ``thickness_mm``; set only for ``fixed_r`` rows.
    r_per_inch_ip : float or None
        R per inch [h·ft²·°F/(Btu·in)] = 1 / k_ip; set only for ``conductivity`` rows.
    thickness_mm : float or None
        Thickness [mm]: the one ``r_si`` applies to (``fixed_r``), or a typical one.
    density_kg_m3 : float or None
        Density [kg/m³].
    vapour_mu : float or None
        Water-vapour resistance factor μ [-] (ISO 10456), at least 1 (still air).
    vapour_sd_m : float or None
        Equivalent air-layer thickness sd [m] of a sheet, a fixed item, or a board's facers.
    source_kind : str
        One of :data:`SOURCE_KINDS`.
    source : str
        The named publication and table the values come from.
    """

    slug: str
    name: str
    category: str
    kind: str
    conductivity_w_mk: float | None
    r_si: float | None
    r_per_inch_ip: float | None
    thickness_mm: float | None
    density_kg_m3: float | None
    vapour_mu: float | None
    vapour_sd_m: float | None
    source_kind: str
    source: str


def _number(text: str, field: str, where: str) -> float | None:
    text = text.strip()
    if not text:
        return None
    try:
        value = float(text)
    except ValueError:
        raise ValueError(f"{where}: {field} '{text}' is not a number") from None
    if not math.isfinite(value) or value <= 0.0:
        raise ValueError(f"{where}: {field} must be a finite number greater than zero")
    return value


def _row(cells: dict[str, str], where: str) -> MaterialRow:
    text = {name: (cells.get(name) or "").strip() for name in CSV_HEADER}
    numbers = {name: _number(text[name], name, where) for name in _NUMBER_FIELDS}
    if not text["name"]:
        raise ValueError(f"{where}: the name is missing")
    if text["category"] not in CATEGORIES:
        raise ValueError(f"{where}: unknown category '{text['category']}'")
    if text["kind"] not in KINDS:
        raise ValueError(f"{where}: unknown kind '{text['kind']}' (conductivity or fixed_r)")
    if text["source_kind"] not in SOURCE_KINDS:
        raise ValueError(f"{where}: unknown source_kind '{text['source_kind']}'")
    if not text["source"]:
        raise ValueError(f"{where}: the source is missing; name the publication and table")
    mu = numbers["vapour_mu"]
    if mu is not None and mu < 1.0:
        raise ValueError(f"{where}: vapour_mu must be at least 1 (still air)")
    k = numbers["conductivity_w_mk"]
    if text["kind"] == "conductivity":
        if k is None:
            raise ValueError(f"{where}: a conductivity material needs conductivity_w_mk")
        if numbers["r_si"] is not None:
            raise ValueError(f"{where}: a conductivity material must leave r_si empty")
        r_per_inch = numbers["r_per_inch_ip"]
        if r_per_inch is None:
            raise ValueError(f"{where}: a conductivity material needs r_per_inch_ip")
        expected = K_IP_IN_SI / k  # R per inch = 1 / k_ip, k_ip = k / K_IP_IN_SI
        if abs(r_per_inch / expected - 1.0) > R_PER_INCH_TOLERANCE:
            raise ValueError(
                f"{where}: r_per_inch_ip {r_per_inch:g} does not match conductivity "
                f"{k:g} W/(m·K), which is R-{expected:.4g} per inch"
            )
    else:
        if numbers["r_si"] is None:
            raise ValueError(f"{where}: a fixed_r item needs r_si greater than zero")
        if k is not None or numbers["r_per_inch_ip"] is not None:
            raise ValueError(
                f"{where}: a fixed_r item must leave conductivity_w_mk and r_per_inch_ip empty"
            )
        if numbers["thickness_mm"] is None:
            raise ValueError(f"{where}: a fixed_r item needs the thickness_mm its r_si is for")
    return MaterialRow(
        slug=text["slug"],
        name=text["name"],
        category=text["category"],
        kind=text["kind"],
        conductivity_w_mk=k,
        r_si=numbers["r_si"],
        r_per_inch_ip=numbers["r_per_inch_ip"],
        thickness_mm=numbers["thickness_mm"],
        density_kg_m3=numbers["density_kg_m3"],
        vapour_mu=mu,
        vapour_sd_m=numbers["vapour_sd_m"],
        source_kind=text["source_kind"],
        source=text["source"],
    )


def parse_materials_csv(text: str) -> list[MaterialRow]:
    """Parse and check the text of a materials CSV.

    Parameters
    ----------
    text : str
        CSV text whose first line is exactly :data:`CSV_HEADER`.

    Returns
    -------
    list of MaterialRow
        The rows in file order.

    Raises
    ------
    ValueError
        On a wrong header, a wrong number of cells, a duplicate or malformed slug, a missing
        name or source, an unknown category, kind or source_kind, a number that is not finite
        and positive, a conductivity row without k or with an R per inch that disagrees with
        k by more than 0.5 %, or a fixed_r row without a positive r_si. The message names the
        data row (1 = first row under the header) and its slug.
    """
    reader = csv.reader(io.StringIO(text.lstrip("\ufeff")))
    header = next(reader, None)
    if header is None or tuple(cell.strip() for cell in header) != CSV_HEADER:
        raise ValueError("materials CSV: the header must be " + ",".join(CSV_HEADER))
    rows: list[MaterialRow] = []
    seen: set[str] = set()
    for number, cells in enumerate(reader, start=1):
        if not any(cell.strip() for cell in cells):
            continue
        slug = cells[0].strip() if cells else ""
        where = f"materials CSV row {number} (slug '{slug}')"
        if len(cells) != len(CSV_HEADER):
            raise ValueError(f"{where}: {len(cells)} cells, expected {len(CSV_HEADER)}")
        if not _SLUG.match(slug):
            raise ValueError(f"{where}: a slug is lowercase words joined by hyphens")
        if slug in seen:
            raise ValueError(f"{where}: duplicate slug")
        seen.add(slug)
        rows.append(_row(dict(zip(CSV_HEADER, cells, strict=True)), where))
    return rows


@lru_cache(maxsize=1)
def _builtin_rows() -> tuple[MaterialRow, ...]:
    text = resources.files("server").joinpath("data/materials.csv").read_text(encoding="utf-8")
    return tuple(parse_materials_csv(text))


def load_builtin_materials() -> list[MaterialRow]:
    """The built-in library from ``server/data/materials.csv`` (parsed once per process)."""
    return list(_builtin_rows())


def material_r_si(row: MaterialRow, thickness_m: float | None) -> float:
    """Thermal resistance of one layer of a library material.

    Parameters
    ----------
    row : MaterialRow
        The material.
    thickness_m : float or None
        Layer thickness [m]; needed for ``conductivity`` rows, ignored for ``fixed_r`` rows.

    Returns
    -------
    float
        Thermal resistance [m²·K/W]: R = thickness_m / k for a conductivity material
        (Fourier's law; ISO 6946:2007 section 5.1 [3]); the published ``r_si`` for a fixed
        item, whatever thickness is given.

    Raises
    ------
    ValueError
        When a conductivity material gets a thickness that is missing, not finite or not
        greater than zero.
    """
    if row.kind == "fixed_r":
        assert row.r_si is not None  # guaranteed by the parser
        return row.r_si
    if thickness_m is None or not math.isfinite(thickness_m) or thickness_m <= 0.0:
        raise ValueError(f"{row.name} needs a thickness greater than zero")
    assert row.conductivity_w_mk is not None  # guaranteed by the parser
    return thickness_m / row.conductivity_w_mk


def material_vapour_sd_m(row: MaterialRow, thickness_m: float | None) -> float | None:
    """Water-vapour diffusion-equivalent air-layer thickness of one layer.

    Parameters
    ----------
    row : MaterialRow
        The material.
    thickness_m : float or None
        Layer thickness [m]; used only with ``vapour_mu``.

    Returns
    -------
    float or None
        sd [m] = vapour_mu × thickness_m + vapour_sd_m (ISO 13788:2012 section 3, sd = μ d),
        with a missing term taken as zero; None when the row has no vapour data.

    Raises
    ------
    ValueError
        When the row has ``vapour_mu`` and the thickness is missing, not finite or not
        greater than zero.
    """
    if row.vapour_mu is None and row.vapour_sd_m is None:
        return None
    total = row.vapour_sd_m or 0.0
    if row.vapour_mu is not None:
        if thickness_m is None or not math.isfinite(thickness_m) or thickness_m <= 0.0:
            raise ValueError(f"{row.name} needs a thickness greater than zero")
        total += row.vapour_mu * thickness_m
    return total
