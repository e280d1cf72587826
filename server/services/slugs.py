"""Slugs: the lower-case-hyphen ids that surfaces, upgrades, packages, spaces, price-book items
and materials are linked by (``Attic floor`` -> ``attic-floor``, then ``attic-floor-2``...).

A stored slug never changes, so the rule here must not either: every run of characters other
than ``a-z`` and ``0-9`` becomes one hyphen, hyphens at the ends are dropped, the result is cut
to ``max_length`` characters (60; materials keep their 70), and an empty result is the
``fallback`` word.
"""

from __future__ import annotations

import re
from collections.abc import Container

_NOT_SLUG = re.compile(r"[^a-z0-9]+")


def slugify(text: str, *, fallback: str, max_length: int = 60) -> str:
    """``text`` as a slug of at most ``max_length`` characters, ``fallback`` when it has none.

    Examples
    --------
    >>> slugify("Attic floor (R-38)", fallback="surface")
    'attic-floor-r-38'
    >>> slugify("—", fallback="upgrade")
    'upgrade'
    """
    return _NOT_SLUG.sub("-", text.lower()).strip("-")[:max_length] or fallback


def unique_slug(text: str, taken: Container[str], *, fallback: str, max_length: int = 60) -> str:
    """The slug of ``text`` that is not in ``taken``: ``name``, else ``name-2``, ``name-3``...

    Examples
    --------
    >>> unique_slug("Attic", {"attic", "attic-2"}, fallback="surface")
    'attic-3'
    """
    base = slugify(text, fallback=fallback, max_length=max_length)
    slug, n = base, 2
    while slug in taken:
        slug, n = f"{base}-{n}", n + 1
    return slug
