"""Computed compare-page contexts, kept in this process's memory per version of the house.

Computing a large house (40 surfaces, 200 upgrades, 6 packages) takes of the order of 100 ms of
CPU, while showing it again takes a few: so the compare page and the homeowner's view keep the
computed context (``compare_context`` minus the house row itself) keyed on everything the
figures depend on, read fresh from the database on every request:

* the house row's ``id``, ``version`` and ``updated_at`` (every change to the house, its
  surfaces, upgrades or packages bumps them: the services call ``touch(house)``, and the
  flush hook below does it for any change that forgot to);
* the chosen upgrades (``pick``), in order;
* the firm's material catalog (its content);
* a stamp of the firm's price book (count, newest id, latest update), one small query.

Several app processes on one database stay right: each keeps its own entries, and the key comes
from the shared database. Memory is bounded by a weight (result rows kept), not just a count.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from collections.abc import Callable, Hashable
from typing import Any

from sqlalchemy import bindparam, event, func, select
from sqlalchemy.orm import Session, object_session
from sqlalchemy.orm.util import identity_key

from server.models import House, Package, PriceBookItem, Surface, Upgrade, utcnow
from server.services.catalog import Catalog, builtin_catalog
from server.services.houses import MAX_ID, NotFound

#: total weight kept: one unit is one surface row of one option (about 1.4 kB measured for
#: the large house: 12 MB for 207 options x 41 rows), so about 60 MB per process at most
MAX_WEIGHT = 40_000
MAX_ENTRIES = 256

Builder = Callable[[Any, Catalog, list[str]], dict[str, Any]]


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
            value = build()
            self._put(key, value)
            return value
        finally:
            with self._lock:
                self._building.pop(key).set()

    def _put(self, key: Hashable, value: dict[str, Any]) -> None:
        weight = _weight(value)
        if weight > MAX_WEIGHT:
            return
        with self._lock:
            self._entries[key] = (value, weight)
            self._weight += weight
            while self._weight > MAX_WEIGHT or len(self._entries) > MAX_ENTRIES:
                _old, (_value, old_weight) = self._entries.popitem(last=False)
                self._weight -= old_weight


CACHE = _Cache()


def _weight(context: dict[str, Any]) -> int:
    result = context.get("result")
    if result is None:
        return 1
    options = 1 + len(result.packages) + len(result.upgrades)
    return options * (len(result.as_found.surfaces) + 1)


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


def house_row(*, session: Session, organization_id: int, house_id: int) -> House:
    """The firm's house without its children (they load lazily, only on a miss), read in one
    statement with the firm's price-book stamp."""
    if not 0 < house_id <= MAX_ID:
        raise NotFound
    row = session.execute(
        select(House, *_stamp_columns(House.organization_id)).where(
            House.id == house_id, House.organization_id == organization_id
        )
    ).first()
    if row is None:
        raise NotFound
    house, *stamp = row
    session.info.setdefault(_STAMP_KEY, {})[organization_id] = tuple(stamp)
    return house


def cached_compare_context(
    house: House, catalog: Catalog, chosen: list[str], build: Builder
) -> dict[str, Any]:
    """``build(house, catalog, chosen)``, or the copy kept for this very state of the house."""
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
        return {k: v for k, v in build(house, catalog, chosen).items() if k != "house"}

    return {**CACHE.get_or_build(key, compute), "house": house}


@event.listens_for(Session, "before_flush")
def _touch_changed_houses(session: Session, _context: Any, _instances: Any) -> None:
    """A change to a surface, upgrade or package is a change to its house (new version)."""
    changed = [
        item
        for item in (*session.new, *session.dirty, *session.deleted)
        if isinstance(item, (Surface, Upgrade, Package))
    ]
    if not changed:
        return
    skip = {id(h) for h in (*session.new, *session.dirty, *session.deleted) if isinstance(h, House)}
    for item in changed:
        house = item.__dict__.get("house")  # loaded already, or in the session, or one lookup
        if house is None and item.house_id is not None:
            house = session.identity_map.get(identity_key(House, item.house_id))
            if house is None:
                with session.no_autoflush:
                    house = session.get(House, item.house_id)
        if house is not None and id(house) not in skip:
            house.updated_at = utcnow()
            skip.add(id(house))
