"""Computed compare pages, kept in this process's memory per state of the house.

Computing the large test house (40 surfaces, 200 upgrades, 6 packages) takes tens to hundreds
of milliseconds of CPU and rendering its body a few more, while looking up that nothing changed
takes one statement. So the compare page and the homeowner's view keep the computed context
(``compare_context`` without the house row) and the rendered compare body, keyed on everything
they depend on, read fresh from the database on every request:

* the house row's ``id``, ``version`` and ``updated_at``: every change to the house, its
  surfaces, upgrades or packages bumps them (the services call ``touch(house)``; the flush
  hook of :mod:`server.services.house_changes` does it for a change that forgot to);
* the chosen upgrades (``pick``), in order;
* the firm's material catalog (its content);
* a stamp of the firm's price book (count, newest id, latest update), read in the same
  statement as the house row.

Anything else a compare figure comes to depend on (say, the firm's own code-target table) must
join the key in :func:`cached_compare_context`, or the page shows the old figure.

The body fragment is shared by every viewer of that state, so it is rendered without the
request (:class:`SharedRender` fails loudly if the template reaches for one); the page around
it, with the viewer's name and CSRF token, is rendered for each request. (Keeping the whole
page too, with the viewer's values swapped in, measured within the noise of this in
``make bench``, while rendering the body on every request cost half the throughput.)

Several app processes on one database stay right: each keeps its own entries and the key comes
from the shared database. Memory is bounded by an estimate of the bytes kept (MAX_WEIGHT_KB),
not just a count of entries.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from collections.abc import Callable, Hashable
from dataclasses import dataclass
from typing import Any, Protocol

from markupsafe import Markup
from sqlalchemy import bindparam, func, inspect, select
from sqlalchemy.orm import Session, load_only, object_session

from server.errors import NotFound
from server.models import House, PriceBookItem, Upgrade
from server.services.catalog import Catalog, builtin_catalog
from server.services.houses import MAX_ID

#: memory kept per process [kB], estimated per entry by :func:`_weight_kb` (measured with
#: tracemalloc: 0.8 MB for the 40-surface house with 6 packages and a selection)
MAX_WEIGHT_KB = 64_000
MAX_ENTRIES = 256
#: contexts computed at once per process (more only share the CPU and multiply the memory)
_BUILDS = threading.BoundedSemaphore(2)


class Builder(Protocol):
    """What computes a compare context (see :mod:`server.web.pages.compare`)."""

    def __call__(self, *, house: House, catalog: Catalog, chosen: list[str]) -> dict[str, Any]: ...


class _Cache:
    def __init__(self) -> None:
        self._lock = threading.Lock()
        self._entries: OrderedDict[Hashable, tuple[dict[str, Any], int]] = OrderedDict()
        self._weight = 0
        self._building: dict[Hashable, threading.Event] = {}
        self.hits = 0
        self.misses = 0

    def clear(self) -> None:
        with self._lock:
            self._entries.clear()
            self._weight = 0

    def get_or_build(self, key: Hashable, build: Callable[[], dict[str, Any]]) -> dict[str, Any]:
        while True:
            with self._lock:
                found = self._entries.get(key)
                if found is not None:
                    self._entries.move_to_end(key)
                    self.hits += 1
                    return found[0]
                waiting = self._building.get(key)
                if waiting is None:  # this thread builds it; others asking meanwhile wait
                    self._building[key] = threading.Event()
                    self.misses += 1
                    break
            waiting.wait(timeout=60)
        try:
            with _BUILDS:  # a few at a time: same throughput under the GIL, far less memory
                value = build()
            self._put(key, value)
            return value
        finally:
            with self._lock:
                self._building.pop(key).set()

    def _put(self, key: Hashable, value: dict[str, Any]) -> None:
        weight = _weight_kb(value)
        if weight > MAX_WEIGHT_KB:
            return
        with self._lock:
            self._entries[key] = (value, weight)
            self._weight += weight
            while self._weight > MAX_WEIGHT_KB or len(self._entries) > MAX_ENTRIES:
                _old, (_value, old_weight) = self._entries.popitem(last=False)
                self._weight -= old_weight


CACHE = _Cache()


def _weight_kb(context: dict[str, Any]) -> int:
    """About 1.4 kB per surface row of each option kept, plus 300 kB for the rendered bodies
    kept with it (plain and for htmx: 60-75 kB each for the largest houses) and its charts."""
    result = context.get("result")
    if result is None:
        return 1
    options = 1 + len(result.packages) + len(result.upgrades)
    return int(1.4 * options * (len(result.as_found.surfaces) + 1)) + 300


def _catalog_key(catalog: Catalog) -> Hashable:
    if catalog is builtin_catalog():
        return "built-in"
    return frozenset(catalog.items())


def _stamp_columns(organization_id: Any) -> list[Any]:
    """(count, newest id, latest update) of the firm's price book: any edit changes it."""
    where = PriceBookItem.organization_id == organization_id
    return [
        select(func.count(PriceBookItem.id)).where(where).scalar_subquery(),
        select(func.max(PriceBookItem.id)).where(where).scalar_subquery(),
        select(func.max(PriceBookItem.updated_at)).where(where).scalar_subquery(),
    ]


_STAMP_KEY = "warmstead.price_book_stamp"
_PRICE_BOOK_STAMP = select(*_stamp_columns(bindparam("organization_id")))


def _price_book_stamp(session: Session | None, organization_id: int) -> Hashable:
    if session is None:
        return None
    known = session.info.get(_STAMP_KEY, {})
    if organization_id in known:
        return known[organization_id]  # read with the house row, in this same request
    return tuple(session.execute(_PRICE_BOOK_STAMP, {"organization_id": organization_id}).one())


#: what a kept page needs of the house row (the key, the page title); the rest, such as the
#: JSON of its climate and systems, loads only to compute (decoding it on every view cost
#: ~2 % of a request under load)
_KEPT_PAGE_COLUMNS = (House.id, House.organization_id, House.label, House.units, House.version,
                      House.updated_at)  # fmt: skip
#: built once (every compare page runs it)
_HOUSE_ROW = (
    select(House, *_stamp_columns(House.organization_id))
    .options(load_only(*_KEPT_PAGE_COLUMNS))
    .where(House.id == bindparam("house_id"), House.organization_id == bindparam("organization_id"))
)
_COLUMN_KEYS = frozenset(attr.key for attr in inspect(House).column_attrs)


def load_all_columns(house: House) -> None:
    """Load the columns :func:`house_row` left out, in one statement (only to compute)."""
    missing = [key for key in inspect(house).unloaded if key in _COLUMN_KEYS]
    session = object_session(house)
    if missing and session is not None:
        session.refresh(house, attribute_names=missing)


def house_row(*, session: Session, organization_id: int, house_id: int) -> House:
    """The firm's house without its children (they load lazily, only on a miss), read in one
    statement with the firm's price-book stamp."""
    if not 0 < house_id <= MAX_ID:
        raise NotFound
    row = session.execute(
        _HOUSE_ROW, {"house_id": house_id, "organization_id": organization_id}
    ).first()
    if row is None:
        raise NotFound
    house, *stamp = row
    session.info.setdefault(_STAMP_KEY, {})[organization_id] = tuple(stamp)
    return house


@dataclass(frozen=True, slots=True)
class UpgradeView:
    """The columns of an upgrade row a kept page may show (never its session or house)."""

    id: int
    slug: str
    name: str
    kind: str
    surface_id: int | None
    position: int

    @classmethod
    def of(cls, upgrade: Upgrade) -> UpgradeView:
        return cls(upgrade.id, upgrade.slug, upgrade.name, upgrade.kind, upgrade.surface_id,
                   upgrade.position)  # fmt: skip


class SharedRender:
    """Stands in for ``request`` while a fragment kept for every viewer is rendered: any use
    of it fails loudly instead of baking one viewer's CSRF token or name into the copy."""

    def __getattr__(self, name: str) -> Any:
        raise RuntimeError(
            f"{FRAGMENT} is rendered once per state of the house and shown to every viewer: "
            f"it must not read the request (request.{name}); put per-viewer parts such as CSRF "
            "fields or the user's name in pages/compare.html instead"
        )

    def __bool__(self) -> bool:
        raise RuntimeError(f"{FRAGMENT} must not test the request (it is shared by viewers)")


FRAGMENT = "partials/compare_body.html"


def fragment_html(context: dict[str, Any], environment: Any, *, is_htmx: bool) -> Markup:
    """The compare body rendered from a kept context, once per state and kept with it
    (at most ``MAX_ENTRIES`` x 2 copies of ~60 kB for the largest houses)."""
    kept: dict[str, Any] = context["_kept"]
    html = kept.setdefault("_fragments", {}).get(is_htmx)
    if html is None:
        values = {k: v for k, v in context.items() if not k.startswith("_")}
        template = environment.get_template(FRAGMENT)
        html = Markup(template.render(values, request=SharedRender(), is_htmx=is_htmx))
        kept["_fragments"][is_htmx] = html  # kept: the next viewer of this state gets it too
    return html  # type: ignore[no-any-return]


def cached_compare_context(
    *, house: House, catalog: Catalog, chosen: list[str], build: Builder
) -> dict[str, Any]:
    """``build(house=, catalog=, chosen=)``, or the copy kept for this very state of the house.

    The copy shares one dict with the cache (key ``"_kept"``) so that :func:`fragment_html`
    can keep the rendered body with it."""
    session = object_session(house)
    key = (
        house.id,
        house.version,
        house.updated_at,
        tuple(chosen),
        _catalog_key(catalog),
        _price_book_stamp(session, house.organization_id),
    )

    def compute() -> dict[str, Any]:
        load_all_columns(house)
        built = build(house=house, catalog=catalog, chosen=chosen)
        kept = {k: v for k, v in built.items() if k != "house"}
        if "upgrades" in kept:  # not the ORM rows: they hold their whole session's objects
            kept["upgrades"] = [UpgradeView.of(u) for u in kept["upgrades"]]
        return kept

    kept = CACHE.get_or_build(key, compute)
    return {**kept, "house": house, "_kept": kept}
