"""ORM entities (SQLAlchemy 2, typed). Tables are created only by Alembic migrations.

Every firm-owned row carries ``organization_id``; services always filter on it. Built-in
materials have ``organization_id`` NULL and are read-only. Assemblies, climate, systems and
economics are stored as JSON documents validated by :mod:`server.documents`, so the saved house,
the API and the pages share one shape.
"""

from __future__ import annotations

from datetime import UTC, datetime
from typing import Any

from sqlalchemy import (
    JSON,
    Boolean,
    CheckConstraint,
    DateTime,
    Float,
    ForeignKey,
    Integer,
    String,
    Text,
    UniqueConstraint,
)
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship


def utcnow() -> datetime:
    return datetime.now(UTC)


class Base(DeclarativeBase):
    type_annotation_map = {dict[str, Any]: JSON, list[Any]: JSON}


class Organization(Base):
    __tablename__ = "organizations"

    id: Mapped[int] = mapped_column(primary_key=True)
    name: Mapped[str] = mapped_column(String(200))
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)

    houses: Mapped[list[House]] = relationship(back_populates="organization")


class Material(Base):
    """A library material: built-in (organization NULL) or the firm's own."""

    __tablename__ = "materials"
    __table_args__ = (UniqueConstraint("organization_id", "slug", name="uq_materials_org_slug"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int | None] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    slug: Mapped[str] = mapped_column(String(80), index=True)
    name: Mapped[str] = mapped_column(String(200))
    category: Mapped[str] = mapped_column(String(40))
    kind: Mapped[str] = mapped_column(String(20))  # conductivity | fixed_r
    conductivity_w_mk: Mapped[float | None] = mapped_column(Float)
    r_si: Mapped[float | None] = mapped_column(Float)
    thickness_mm: Mapped[float | None] = mapped_column(Float)
    density_kg_m3: Mapped[float | None] = mapped_column(Float)
    vapour_mu: Mapped[float | None] = mapped_column(Float)
    vapour_sd_m: Mapped[float | None] = mapped_column(Float)
    source_kind: Mapped[str] = mapped_column(String(40))
    source: Mapped[str] = mapped_column(Text)


class House(Base):
    """A saved project: one house as found, its candidate upgrades and packages."""

    __tablename__ = "houses"

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    label: Mapped[str] = mapped_column(String(200))
    address: Mapped[str] = mapped_column(String(300), default="")
    notes: Mapped[str] = mapped_column(Text, default="")
    units: Mapped[str] = mapped_column(String(2), default="ip")
    floor_area: Mapped[float | None] = mapped_column(Float)
    volume: Mapped[float | None] = mapped_column(Float)
    climate: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    heating: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    cooling: Mapped[dict[str, Any] | None] = mapped_column(JSON, nullable=True)
    air_leakage: Mapped[dict[str, Any] | None] = mapped_column(JSON, nullable=True)
    economics: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    #: unconditioned (buffer) spaces, ISO 13789: the house document's ``spaces`` as stored;
    #: what each surface faces is its ``details["adjacent"]``
    spaces: Mapped[list[Any] | None] = mapped_column(JSON, nullable=True)
    #: the heating fuel's bills with the weather of their dates: the house document's ``bills``
    #: as stored, in the house's units (:mod:`server.services.house_bills`)
    bills: Mapped[dict[str, Any] | None] = mapped_column(JSON, nullable=True)
    version: Mapped[int] = mapped_column(Integer, default=1)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
    updated_at: Mapped[datetime] = mapped_column(
        DateTime(timezone=True), default=utcnow, onupdate=utcnow
    )

    __mapper_args__ = {"version_id_col": version}

    organization: Mapped[Organization] = relationship(back_populates="houses")
    surfaces: Mapped[list[Surface]] = relationship(
        back_populates="house", cascade="all, delete-orphan", order_by="Surface.position"
    )
    upgrades: Mapped[list[Upgrade]] = relationship(
        back_populates="house", cascade="all, delete-orphan", order_by="Upgrade.position"
    )
    packages: Mapped[list[Package]] = relationship(
        back_populates="house", cascade="all, delete-orphan", order_by="Package.position"
    )


#: the CHECK on ``surfaces`` (also written by migration 0008)
SURFACE_MEASURE_CHECK = (
    "(kind = 'pipe_run' AND length IS NOT NULL AND area IS NULL)"
    " OR (kind <> 'pipe_run' AND area IS NOT NULL AND length IS NULL)"
)


class Surface(Base):
    """One piece of the envelope and its as-found assembly (an AssemblyInput document)."""

    __tablename__ = "surfaces"
    #: a pipe run has a length and no area; every other surface an area and no length
    __table_args__ = (CheckConstraint(SURFACE_MEASURE_CHECK, name="ck_surfaces_area_or_length"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    position: Mapped[int] = mapped_column(Integer, default=0)
    slug: Mapped[str] = mapped_column(String(80))
    name: Mapped[str] = mapped_column(String(200))
    kind: Mapped[str] = mapped_column(String(40))
    area: Mapped[float | None] = mapped_column(Float)  # ft² or m²; NULL for a pipe run
    length: Mapped[float | None] = mapped_column(Float)  # a pipe run's (ft or m); NULL otherwise
    orientation: Mapped[str] = mapped_column(String(20), default="")
    assembly: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    details: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)  # e.g. a pipe run's pipe
    notes: Mapped[str] = mapped_column(Text, default="")

    house: Mapped[House] = relationship(back_populates="surfaces")


class Upgrade(Base):
    """A candidate change: a new assembly for a surface, air sealing, or pipe insulation."""

    __tablename__ = "upgrades"

    id: Mapped[int] = mapped_column(primary_key=True)
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    surface_id: Mapped[int | None] = mapped_column(
        ForeignKey("surfaces.id", ondelete="CASCADE"), index=True
    )
    position: Mapped[int] = mapped_column(Integer, default=0)
    slug: Mapped[str] = mapped_column(String(80))
    name: Mapped[str] = mapped_column(String(200))
    kind: Mapped[str] = mapped_column(String(40), default="assembly")
    document: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)  # the upgrade as in API.md
    house: Mapped[House] = relationship(back_populates="upgrades")


class Package(Base):
    """A named set of upgrades, evaluated as one modified house."""

    __tablename__ = "packages"

    id: Mapped[int] = mapped_column(primary_key=True)
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    position: Mapped[int] = mapped_column(Integer, default=0)
    slug: Mapped[str] = mapped_column(String(80))
    name: Mapped[str] = mapped_column(String(200))
    upgrade_slugs: Mapped[list[Any]] = mapped_column(JSON, default=list)
    chosen: Mapped[bool] = mapped_column(Boolean, default=False)

    house: Mapped[House] = relationship(back_populates="packages")


class User(Base):
    """A person at a firm. ``session_version`` bumps on logout-everywhere and password reset."""

    __tablename__ = "users"

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    email: Mapped[str] = mapped_column(String(254), unique=True)  # stored lower-case
    name: Mapped[str] = mapped_column(String(200), default="")
    password_hash: Mapped[str] = mapped_column(String(200))  # argon2id
    role: Mapped[str] = mapped_column(String(20), default="staff")  # admin | staff
    is_active: Mapped[bool] = mapped_column(Boolean, default=True)
    session_version: Mapped[int] = mapped_column(Integer, default=1)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
    last_login_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))


class RevokedSession(Base):
    """A signed-out session: its cookie (any copy of it) is refused from now on.

    Sign-out writes the cookie's per-sign-in nonce here; every signed-in request's user lookup
    joins this table on that nonce (the same one query). Rows are kept until the session would
    have ended anyway (7 days after its sign-in), then pruned.
    """

    __tablename__ = "revoked_sessions"

    nonce: Mapped[str] = mapped_column(String(64), primary_key=True)
    user_id: Mapped[int] = mapped_column(ForeignKey("users.id", ondelete="CASCADE"), index=True)
    revoked_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
    expires_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), index=True)


class LoginAttempt(Base):
    """One login try, kept to rate-limit by e-mail and by client address across processes."""

    __tablename__ = "login_attempts"

    id: Mapped[int] = mapped_column(primary_key=True)
    email: Mapped[str] = mapped_column(String(254), index=True)
    client: Mapped[str] = mapped_column(String(64), index=True)
    succeeded: Mapped[bool] = mapped_column(Boolean, default=False)
    created_at: Mapped[datetime] = mapped_column(
        DateTime(timezone=True), default=utcnow, index=True
    )


class ShareLink(Base):
    """A read-only homeowner link. Only the SHA-256 of the random token is stored."""

    __tablename__ = "share_links"

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    token_hash: Mapped[str] = mapped_column(String(64), unique=True)
    label: Mapped[str] = mapped_column(String(200), default="")
    created_by_id: Mapped[int | None] = mapped_column(ForeignKey("users.id", ondelete="SET NULL"))
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
    expires_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
    revoked_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))
    view_count: Mapped[int] = mapped_column(Integer, default=0)
    last_viewed_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))


class PriceBookItem(Base):
    """A firm's unit cost for one upgrade type: fixed + per area or per length."""

    __tablename__ = "price_book_items"
    __table_args__ = (UniqueConstraint("organization_id", "slug", name="uq_price_book_org_slug"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    slug: Mapped[str] = mapped_column(String(80))
    name: Mapped[str] = mapped_column(String(200))
    upgrade_type: Mapped[str] = mapped_column(String(40))  # attic_fill, wall_fill, air_sealing, ...
    basis: Mapped[str] = mapped_column(String(20))  # per_area | per_length | fixed
    units: Mapped[str] = mapped_column(String(2), default="ip")  # unit of per_area / per_length
    unit_cost: Mapped[float] = mapped_column(Float, default=0.0)
    fixed_cost: Mapped[float] = mapped_column(Float, default=0.0)
    notes: Mapped[str] = mapped_column(Text, default="")
    updated_at: Mapped[datetime] = mapped_column(
        DateTime(timezone=True), default=utcnow, onupdate=utcnow
    )


class CodeTargetRow(Base):
    """A firm's own row of the code-target table; it replaces the packaged row of its zone/kind."""

    __tablename__ = "code_targets"
    __table_args__ = (
        UniqueConstraint(
            "organization_id", "climate_zone", "surface_kind", name="uq_code_targets_org_zone_kind"
        ),
    )

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    climate_zone: Mapped[int] = mapped_column(Integer)
    surface_kind: Mapped[str] = mapped_column(String(40))
    r_min_ip: Mapped[float | None] = mapped_column(Float)
    u_max_ip: Mapped[float | None] = mapped_column(Float)
    note: Mapped[str] = mapped_column(Text, default="")
    edition: Mapped[str] = mapped_column(String(300))
    updated_at: Mapped[datetime] = mapped_column(
        DateTime(timezone=True), default=utcnow, onupdate=utcnow
    )


class IdempotencyKey(Base):
    """A create form's one-time key, honoured once: a repeat of the same post (a retry after a
    lost answer, a double tap) gets the first answer's redirect instead of a second row.

    The key is random, put into the form when it is rendered; the unique constraint makes two
    concurrent posts of one key store one row (the second insert fails and reads the first).
    Rows are kept for :data:`server.services.idempotency.KEEP` and then pruned.
    """

    __tablename__ = "idempotency_keys"
    __table_args__ = (
        UniqueConstraint(
            "organization_id", "user_id", "key", name="uq_idempotency_keys_org_user_key"
        ),
    )

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    user_id: Mapped[int] = mapped_column(ForeignKey("users.id", ondelete="CASCADE"), index=True)
    key: Mapped[str] = mapped_column(String(64))
    purpose: Mapped[str] = mapped_column(String(40))
    location: Mapped[str] = mapped_column(String(500))
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
    expires_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), index=True)


class Photo(Base):
    """A photo of what the auditor found, of the house or one of its surfaces.

    The image is a file in the photo directory (:mod:`server.services.photo_store`), named by
    ``storage_key`` (random, never the uploaded file's name), re-encoded from its pixels so it
    carries no EXIF, GPS or other metadata. A deleted surface's photos stay with the house.
    """

    __tablename__ = "photos"

    id: Mapped[int] = mapped_column(primary_key=True)
    organization_id: Mapped[int] = mapped_column(
        ForeignKey("organizations.id", ondelete="CASCADE"), index=True
    )
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    surface_id: Mapped[int | None] = mapped_column(
        ForeignKey("surfaces.id", ondelete="SET NULL"), index=True
    )
    caption: Mapped[str] = mapped_column(String(200), default="")
    storage_key: Mapped[str] = mapped_column(String(64), unique=True)
    content_type: Mapped[str] = mapped_column(String(40))  # image/jpeg | image/png
    width: Mapped[int] = mapped_column(Integer)
    height: Mapped[int] = mapped_column(Integer)
    bytes: Mapped[int] = mapped_column(Integer)
    show_on_share: Mapped[bool] = mapped_column(Boolean, default=False)
    include_in_quote: Mapped[bool] = mapped_column(Boolean, default=False)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), default=utcnow)
