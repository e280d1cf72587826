"""Headless chromium prints the quote to PDF (Letter and A4): 1-3 pages with the key figures.

The PDFs and their pages as PNGs (pdftoppm) are kept in test-artifacts/ for a person to look at.
"""

from __future__ import annotations

import shutil
import subprocess

import pytest
from sqlalchemy import select

from server.db import make_engine, make_session_factory, session_scope
from server.models import House
from server.services.comparison import compute_house
from server.services.demo import DEMO_LABEL
from server.services.house_document import house_document
from server.services.library import catalog_for

pytestmark = pytest.mark.browser


def _expected(live_db_url: str) -> tuple[int, float, float]:
    engine = make_engine(live_db_url)
    with session_scope(make_session_factory(engine)) as s:
        house = s.scalars(select(House).where(House.label == DEMO_LABEL)).one()
        catalog = catalog_for(session=s, organization_id=house.organization_id)
        result = compute_house(house_document(house), catalog=catalog)
        package = next(p for p in result.packages if p.id == "attic-and-air")
        house_id = house.id
    engine.dispose()
    assert package.simple_payback_years is not None
    return house_id, package.net_cost, package.simple_payback_years


@pytest.mark.parametrize("paper", ["Letter", "A4"])
def test_quote_pdf(
    browser, live_server: str, live_db_url: str, signed_in, shot_dir, paper: str
) -> None:  # type: ignore[no-untyped-def]
    if not (shutil.which("pdfinfo") and shutil.which("pdftotext") and shutil.which("pdftoppm")):
        pytest.skip("poppler-utils (pdfinfo, pdftotext, pdftoppm) is not installed")
    house_id, net_cost, payback = _expected(live_db_url)
    page = browser.new_page(storage_state=signed_in)
    response = page.goto(f"{live_server}/houses/{house_id}/quote/attic-and-air")
    assert response is not None and response.status == 200
    pdf = shot_dir / f"quote-{paper.lower()}.pdf"
    pdf.write_bytes(page.pdf(format=paper))
    page.close()
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
    pages = int(next(line for line in info.splitlines() if line.startswith("Pages:")).split()[1])
    assert 1 <= pages <= 3
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True,
                          check=True).stdout  # fmt: skip
    assert f"${net_cost:,.0f}" in text
    assert f"{payback:,.1f} years" in text
    assert "Sign out" not in text and "Fill cost from price book" not in text  # screen only
    for old in shot_dir.glob(f"quote-{paper.lower()}-*.png"):
        old.unlink()
    subprocess.run(["pdftoppm", "-png", "-r", "60", str(pdf), str(shot_dir / f"quote-{paper.lower()}")],
                   check=True)  # fmt: skip
    assert len(list(shot_dir.glob(f"quote-{paper.lower()}-*.png"))) == pages
