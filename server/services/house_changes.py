"""A change to a surface, upgrade or package is a change to its house.

The services call :func:`server.services.houses.touch` on every save, which bumps the house's
``version`` and ``updated_at``. Whatever keeps figures per state of a house (the compare page
and the homeowner's view keep theirs by ``id``, ``version`` and ``updated_at``) relies on that,
so the hook below does it too for a change to a child row that forgot to: any flush that adds,
changes or deletes a :class:`~server.models.Surface`, :class:`~server.models.Upgrade` or
:class:`~server.models.Package` marks its house changed in the same flush. It listens on every
SQLAlchemy session; :mod:`server.services.houses` imports this module, so it is in place in
every process that stores houses.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import event
from sqlalchemy.orm import Session
from sqlalchemy.orm.util import identity_key

from server.models import House, Package, Surface, Upgrade, utcnow


@event.listens_for(Session, "before_flush")
def touch_changed_houses(session: Session, _context: Any, _instances: Any) -> None:
    """Set ``updated_at`` of each house whose surfaces, upgrades or packages this flush
    changes, unless the house itself is already among the changes (then its own save bumps
    it); the house's new ``version`` follows from the same UPDATE."""
    pending = (*session.new, *session.dirty, *session.deleted)
    changed = [item for item in pending if isinstance(item, (Surface, Upgrade, Package))]
    if not changed:
        return
    skip = {id(h) for h in pending if isinstance(h, House)}
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
