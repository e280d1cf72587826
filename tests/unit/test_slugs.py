"""One slug rule for surfaces, upgrades, packages, spaces, price-book items and materials.

The expected slugs are the ones the four former helpers (houses.unique_slug, price_book._slug,
upgrades._slug, library._slugify) gave, worked by hand from their rule: runs of other than
a-z0-9 -> one hyphen, ends stripped, cut to 60 (materials 70), empty -> the fallback word.
"""

from __future__ import annotations

import pytest

from server.services.slugs import slugify, unique_slug


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("Attic floor", "attic-floor"),
        ("Attic: blown cellulose", "attic-blown-cellulose"),  # tests/web/test_price_book.py
        ("Attic R-49", "attic-r-49"),
        ('  Walls -- 2x4 @ 16" o.c.  ', "walls-2x4-16-o-c"),
        ("Crawlspace (vented)", "crawlspace-vented"),
        ("Éléments", "l-ments"),  # accented letters are not a-z: they become hyphens
        ("---", "surface"),
        ("", "surface"),
    ],
)
def test_slug_of_a_name(text: str, expected: str) -> None:
    assert slugify(text, fallback="surface") == expected


def test_cut_to_60_and_a_trailing_hyphen_is_kept_when_the_cut_falls_on_it() -> None:
    # 59 letters then " x": the slug is 59 a, "-", "x" (61 chars), cut to 60: ends in "-",
    # as the former helpers did (the strip comes before the cut)
    text = "a" * 59 + " x"
    assert slugify(text, fallback="item") == "a" * 59 + "-"
    assert len(slugify("b" * 80, fallback="item")) == 60


def test_materials_keep_their_70_characters() -> None:
    assert slugify("c" * 80, fallback="material", max_length=70) == "c" * 70


def test_the_next_free_number_is_appended() -> None:
    taken = {"attic", "attic-2", "walls"}
    assert unique_slug("Attic", taken, fallback="surface") == "attic-3"
    assert unique_slug("Walls", taken, fallback="surface") == "walls-2"
    assert unique_slug("Floor", taken, fallback="surface") == "floor"
    assert unique_slug("!!", {"upgrade"}, fallback="upgrade") == "upgrade-2"


@pytest.mark.parametrize("fallback", ["surface", "upgrade", "item", "space", "material"])
def test_same_as_the_former_helpers(fallback: str) -> None:
    import re

    def former(text: str, taken: set[str], limit: int) -> str:  # the four helpers' one body
        base = re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-")[:limit] or fallback
        slug, n = base, 2
        while slug in taken:
            slug, n = f"{base}-{n}", n + 1
        return slug

    names = ["Attic", "attic", "ATTIC!", "", "é", "Rim joist, north", "x" * 75, "a b" * 30]
    taken: set[str] = set()
    limit = 70 if fallback == "material" else 60
    for name in names:
        expected = former(name, taken, limit)
        assert unique_slug(name, taken, fallback=fallback, max_length=limit) == expected
        taken.add(expected)
