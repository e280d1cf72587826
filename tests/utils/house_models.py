"""The pure house and upgrades of a house document, as ``compute_house`` builds them (for the
core's tests, which compare the array core and the optimiser with the house's own method)."""

from __future__ import annotations

from server.documents.house import HouseDocument
from server.physics import house_model as model
from server.services.catalog import Catalog
from server.services.comparison import model_of_document as build


def model_of_document(
    doc: HouseDocument, *, catalog: Catalog | None = None
) -> tuple[model.House, list[model.Upgrade]]:
    """The house (windows' sun included) and its upgrades, without the build's warnings."""
    house, upgrades, _warnings = build(doc, catalog=catalog)
    return house, upgrades
