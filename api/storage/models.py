"""Tables of the plant catalogue: records, their revisions, and stored screenings.

A record (a vessel, a utility or a process step) is an identity with a tag; its content lives in
revisions, never overwritten. The record row keeps the number of its current revision and copies of the
few fields the list filters on, so filtering needs no JSON functions (SQLite and PostgreSQL alike).
"""
from __future__ import annotations

from datetime import datetime

from sqlalchemy import JSON, Boolean, DateTime, Float, ForeignKey, Index, Integer, String, UniqueConstraint, false
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column


class Base(DeclarativeBase):
    pass


class Record(Base):
    __tablename__ = "records"

    id: Mapped[str] = mapped_column(String(32), primary_key=True)
    kind: Mapped[str] = mapped_column(String(16), nullable=False)
    tag: Mapped[str] = mapped_column(String(64), nullable=False)
    revision: Mapped[int] = mapped_column(Integer, nullable=False)
    retired: Mapped[bool] = mapped_column(Boolean, nullable=False, server_default=false())
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), nullable=False)
    updated_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), nullable=False)
    # copies of the current revision's filterable fields
    name: Mapped[str | None] = mapped_column(String(120))
    material: Mapped[str | None] = mapped_column(String(64))
    jacket_type: Mapped[str | None] = mapped_column(String(32))
    volume: Mapped[float | None] = mapped_column(Float)

    __table_args__ = (
        # a tag names one live record of a kind; retired records keep theirs for history
        Index("uq_records_live_tag", "kind", "tag", unique=True,
              sqlite_where=retired == false(), postgresql_where=retired == false()),
        Index("ix_records_kind_tag", "kind", "tag"),
    )


class Revision(Base):
    __tablename__ = "revisions"

    id: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=True)
    record_id: Mapped[str] = mapped_column(String(32), ForeignKey("records.id", ondelete="RESTRICT"), nullable=False)
    number: Mapped[int] = mapped_column(Integer, nullable=False)
    tag: Mapped[str] = mapped_column(String(64), nullable=False)
    body: Mapped[dict] = mapped_column(JSON, nullable=False)
    author: Mapped[str] = mapped_column(String(120), nullable=False)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), nullable=False)
    retired: Mapped[bool] = mapped_column(Boolean, nullable=False, server_default=false())

    __table_args__ = (UniqueConstraint("record_id", "number", name="uq_revisions_record_number"),)


class Screening(Base):
    __tablename__ = "screenings"

    id: Mapped[str] = mapped_column(String(32), primary_key=True)
    request_key: Mapped[str] = mapped_column(String(64), nullable=False, index=True)
    request: Mapped[dict] = mapped_column(JSON, nullable=False)
    used: Mapped[list] = mapped_column(JSON, nullable=False)
    result: Mapped[dict] = mapped_column(JSON, nullable=False)
    author: Mapped[str] = mapped_column(String(120), nullable=False)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True), nullable=False, index=True)
    previous_id: Mapped[str | None] = mapped_column(String(32))
    status: Mapped[str] = mapped_column(String(16), nullable=False, server_default="done")
    done: Mapped[int] = mapped_column(Integer, nullable=False, server_default="0")
    total: Mapped[int] = mapped_column(Integer, nullable=False, server_default="0")
