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


class Surface(Base):
    """One piece of the envelope and its as-found assembly (an AssemblyInput document)."""

    __tablename__ = "surfaces"

    id: Mapped[int] = mapped_column(primary_key=True)
    house_id: Mapped[int] = mapped_column(ForeignKey("houses.id", ondelete="CASCADE"), index=True)
    position: Mapped[int] = mapped_column(Integer, default=0)
    slug: Mapped[str] = mapped_column(String(80))
    name: Mapped[str] = mapped_column(String(200))
    kind: Mapped[str] = mapped_column(String(40))
    area: Mapped[float] = mapped_column(
        Float
    )  # in the house's units (ft² or m²; ft or m for pipe runs)
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
