"""The Quote page for one package (templates/pages/quote.html): scope, quantities, price,
rebates, payback, financing, the savings range, the design load, cautions.

Every figure is the package's (or each upgrade alone's) entry of the same
:func:`server.services.comparison.compute_house` result the compare page and the API show, with
the compare page's ranges (:data:`server.web.pages.compare.PAGE_UNCERTAINTY`). With bills the
quote leads with the calibrated figures, the modelled ones beside; the sentences about them
come from :mod:`server.services.plain_words`.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import date
from typing import Any

from sqlalchemy.orm import Session

from server.documents.house import HouseDocument, HouseResult, OptionFigures
from server.errors import InputError
from server.models import House, Organization, PriceBookItem
from server.services import houses as svc
from server.services import plain_words as words
from server.services import price_book as book
from server.services.cautions import GENERAL, cautions_for
from server.services.comparison import compute_house
from server.services.house_document import house_document
from server.services.library import catalog_for
from server.services.photos import quote_photos
from server.web.formatting import UNIT_LABELS, money
from server.web.pages.compare import PAGE_UNCERTAINTY
from server.web.pages.systems import OVERSIZED_WORDS


def quote_reference(house: House, package_slug: str) -> str:
    """Q-<house>-<version>-<package>: a new reference whenever the house changes."""
    return f"Q-{house.id}-{house.version}-{package_slug}".upper()


def _layers(assembly: Any) -> str:
    names = [layer.name for layer in (assembly.layers if assembly else []) if layer.name]
    return ", ".join(names)


def _price_words(row_document: dict, items: dict, units: str) -> tuple[str, bool]:
    """Where the line's price comes from, and whether it is still an example price."""
    label = UNIT_LABELS[units]
    slug = row_document.get("price_item")
    if slug and slug in items:
        item = items[slug]
        if item.basis == "fixed":
            words = f"Priced from the price book: {item.name}, {money(item.fixed_cost)} fixed"
        else:
            per = label["area"] if item.basis == "per_area" else label["length"]
            unit = book.unit_cost_in(item, units)
            words = (f"Priced from the price book: {item.name}, ${unit:,.2f} per {per} + "
                     f"{money(item.fixed_cost)} fixed")  # fmt: skip
        return words, book.is_example(item)
    cost = row_document.get("cost") or {}
    parts = [money(cost.get("fixed", 0.0)) + " fixed"]
    if cost.get("per_area"):
        parts.append(f"${cost['per_area']:,.2f} per {label['area']}")
    if cost.get("per_length"):
        parts.append(f"${cost['per_length']:,.2f} per {label['length']}")
    return "Priced as entered on the upgrade: " + " + ".join(parts), False


def _scope_line(slug: str, doc: HouseDocument, house: House, result: HouseResult,
                items: dict[str, PriceBookItem]) -> dict[str, Any]:  # fmt: skip
    """One upgrade of the package: what is installed, how much of it, and its price."""
    up = next(u for u in doc.upgrades if u.id == slug)
    row = next(u for u in house.upgrades if u.slug == slug)
    alone = next(o for o in result.upgrades if o.id == slug)
    label = UNIT_LABELS[house.units]
    line: dict[str, Any] = {"id": slug, "row_id": row.id, "name": up.name or slug,
                            "kind": up.kind, "surface": None, "quantity": None, "unit": "",
                            "installed": alone.installed_cost, "rebate": alone.rebates,
                            "net": alone.net_cost, "price_item": row.document.get("price_item", "")}  # fmt: skip
    line["price_words"], line["example_price"] = _price_words(row.document, items, house.units)
    if up.kind == "air_sealing":
        before = result.as_found.cfm50 or 0.0
        after = up.cfm50_after if up.cfm50_after is not None else alone.cfm50 or 0.0
        line["what"] = (f"Seal air leaks through the house: blower-door result from about "
                        f"{before:,.0f} to {after:,.0f} CFM50 (tested after the work).")  # fmt: skip
        line["quantity_words"] = "whole house"
        return line
    surface = next(s for s in doc.surfaces if s.id == up.surface)
    line["surface"], line["surface_kind"] = surface.name or surface.id, surface.kind
    if up.kind == "pipe_insulation":
        line["quantity"], line["unit"] = surface.length, label["length"]
        layers = ", ".join(
            f"{layer.thickness:g} {label['thickness']}" for layer in up.pipe_layers or []
        )
        line["what"] = f"Insulate the pipe run '{line['surface']}' ({layers} of insulation)."
    else:
        line["quantity"], line["unit"] = surface.area, label["area"]
        r_before = next(s.r for s in result.as_found.surfaces if s.id == surface.id)
        r_after = next(s.r for s in alone.surfaces if s.id == surface.id)
        layers = _layers(up.assembly)
        unit = "R-" if house.units == "ip" else "RSI "
        digits = 1 if house.units == "ip" else 2
        line["what"] = (f"{line['surface']}: {layers or 'new assembly'}. Whole-assembly "
                        f"{unit}{r_before:.{digits}f} as found, {unit}{r_after:.{digits}f} after.")  # fmt: skip
    line["quantity_words"] = f"{line['quantity']:,.0f} {line['unit']}"
    return line


def _design(
    doc: HouseDocument, result: HouseResult, package: OptionFigures, oversized: str
) -> dict[str, Any] | None:
    """Design heat loss as found and after the package against the equipment's output (None
    without a design temperature); ``oversized``: the House page's sentence, when it applies."""
    if result.as_found.design_heat_loss is None:
        return None
    return {"as_found": result.as_found.design_heat_loss, "after": package.design_heat_loss,
            "capacity": doc.heating.output_capacity, "ratio_before": result.as_found.capacity_ratio,
            "ratio_after": package.capacity_ratio, "unit": "Btu/h" if doc.units == "ip" else "W",
            "oversized": words.sentence_case(oversized)}  # fmt: skip


def quote_context(
    *,
    session: Session,
    organization: Organization,
    house: House,
    package_slug: str,
    fill_error: Mapping[str, str] | None = None,
) -> dict[str, Any]:
    """Everything the quote page shows; ``fill_error`` is a price-book link that was refused
    (``{"upgrade": slug, "message": ...}``). Raises NotFound for an unknown package."""
    org = organization
    if package_slug not in {p.slug for p in house.packages}:
        raise svc.NotFound
    base = {"house": house, "org": org, "today": date.today().strftime("%d %B %Y"),
            "reference": quote_reference(house, package_slug), "general_caution": GENERAL,
            "fill_error": fill_error or None}  # fmt: skip
    base["quote_photos"] = quote_photos(session=session, house=house)  # include_in_quote ones
    catalog = catalog_for(session=session, organization_id=org.id)
    try:
        doc = house_document(house, uncertainty=PAGE_UNCERTAINTY)
        result = compute_house(doc, catalog=catalog)
    except InputError as exc:
        return {**base, "error": f"{exc.field}: {exc.message}", "result": None}
    package = next((p for p in result.packages if p.id == package_slug), None)
    if package is None:  # a package whose upgrades were all removed
        raise svc.NotFound
    items = {i.slug: i for i in book.list_items(session=session, organization_id=org.id)}
    lines = [_scope_line(slug, doc, house, result, items) for slug in package.upgrades]
    kinds = sorted({line["surface_kind"] for line in lines if line.get("surface_kind")})
    topics = tuple(t for t, k in (("air_sealing", "air_sealing"), ("pipes", "pipe_insulation"))
                   if any(line["kind"] == k for line in lines))  # fmt: skip
    econ = doc.economics
    oversized = next((w for w in package.warnings if w.startswith(OVERSIZED_WORDS)), "")
    return {
        **base,
        "error": None,
        "result": result,
        "package": package,
        "lines": lines,
        "example_prices": any(line["example_price"] for line in lines),
        "econ": econ,
        "lead": words.lead_figures(result, package),
        "basis_sentence": words.calibration_sentence(result),
        "range_sentence": words.range_sentence(package),
        "pays_back_sentence": words.pays_back_sentence(package, years=econ.years),
        "no_range_sentence": words.no_range_sentence(result),
        "design": _design(doc, result, package, oversized),
        "notes": [w for w in package.warnings if w != oversized] + list(result.warnings),
        "climate": doc.climate,
        "heating": doc.heating,
        "cautions": cautions_for(kinds, extra_topics=topics),
        "price_items": list(items.values()),
        "bases_for_kind": book.BASES_FOR_KIND,
    }
