"""The plant catalogue in a relational database: vessels, utilities and process steps with full history.

SQLAlchemy 2 over a SQLite file by default, or PostgreSQL (psycopg 3) through ``COOLMARGIN_DATABASE_URL``;
the schema is kept by the Alembic migrations in ``api/storage/migrations``. Every write is one transaction:
a record and its revision are committed together or not at all. Revision numbers are claimed with a
compare-and-set on the record row (``UPDATE ... WHERE revision = expected``), so concurrent writers can
never both win the same number: the loser is told its ETag is stale.
"""
from __future__ import annotations

import contextlib
import contextvars
import hashlib
import json
import os
import uuid
import weakref
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path
from typing import Any, Iterator

from sqlalchemy import bindparam, case, create_engine, event, func, or_, select, text, update
from sqlalchemy.engine import Connection, Engine, make_url
from sqlalchemy.exc import DBAPIError, IntegrityError, OperationalError
from sqlalchemy.orm import Session

from .models import Base, Record, Revision, Screening

KINDS = ("vessel", "utility", "step")
MIGRATIONS = Path(__file__).resolve().parent / "migrations"
EXPORT_FORMAT = "coolmargin-catalogue"
EXPORT_VERSION = 1
_ADVISORY_LOCK = 0x636F6F6C  # one migrator at a time on a shared PostgreSQL ("cool")


def default_url() -> str:
    """A SQLite file in the user's data directory (``$XDG_DATA_HOME/coolmargin/catalogue.sqlite3``)."""
    base = Path(os.environ.get("XDG_DATA_HOME") or Path.home() / ".local" / "share")
    return f"sqlite:///{base / 'coolmargin' / 'catalogue.sqlite3'}"


class StorageError(Exception):
    """Base of the catalogue's own errors; the API turns each into a problem response."""


class Unavailable(StorageError):
    """The database cannot be reached or refused the operation for a reason of its own (503)."""


class NotFound(StorageError):
    pass


class Conflict(StorageError):
    """The write contradicts the catalogue's state (a live tag taken, a retired record changed)."""


class Stale(StorageError):
    """The revision a write was based on is no longer the current one."""

    def __init__(self, message: str, current: "RevisionView"):
        super().__init__(message)
        self.current = current


@dataclass(frozen=True)
class RevisionView:
    record_id: str
    kind: str
    tag: str
    number: int
    body: dict
    author: str
    created_at: datetime
    retired: bool
    current: int  # the record's current revision number

    @property
    def etag(self) -> str:
        return f'"{self.record_id}.{self.number}"'

    def reference(self) -> dict:
        return {"kind": self.kind, "id": self.record_id, "tag": self.tag, "revision": self.number}


def _now() -> datetime:
    return datetime.now(timezone.utc)


def _aware(moment: datetime) -> datetime:
    return moment if moment.tzinfo is not None else moment.replace(tzinfo=timezone.utc)


def request_key(request: dict) -> str:
    """A digest of a request object in canonical form, to find the previous run of the same question."""
    return hashlib.sha256(json.dumps(request, sort_keys=True, separators=(",", ":")).encode()).hexdigest()


def _sqlite_engine(url: str) -> Engine:
    path = make_url(url).database
    if path and path != ":memory:":
        try:
            Path(path).parent.mkdir(parents=True, exist_ok=True)
        except OSError:
            pass  # connecting fails in turn and says so (503 on record routes); calculations still run
    engine = create_engine(url, connect_args={"timeout": 30, "check_same_thread": False})

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_connection, record):
        dbapi_connection.isolation_level = None  # SQLAlchemy issues BEGIN itself (below)
        cursor = dbapi_connection.cursor()
        cursor.execute("PRAGMA journal_mode=WAL")  # readers never wait for the writer
        cursor.execute("PRAGMA foreign_keys=ON")
        cursor.execute("PRAGMA busy_timeout=30000")
        cursor.close()

    @event.listens_for(engine, "begin")
    def _on_begin(connection):
        # A write takes the write lock at BEGIN: a deferred transaction that reads first could not
        # upgrade to writing once another writer has committed (SQLITE_BUSY without waiting).
        immediate = connection.get_execution_options().get("write", False)
        connection.exec_driver_sql("BEGIN IMMEDIATE" if immediate else "BEGIN")

    return engine


def make_engine(url: str) -> Engine:
    if url.startswith("sqlite"):
        return _sqlite_engine(url)
    connect_args = {"connect_timeout": 5} if url.startswith("postgresql") else {}
    return create_engine(url, pool_pre_ping=True, pool_size=5, max_overflow=10, connect_args=connect_args)


def _row_view(record: Record, revision: Revision) -> RevisionView:
    return RevisionView(record.id, record.kind, revision.tag, revision.number, revision.body, revision.author,
                        _aware(revision.created_at), revision.retired, record.revision)


class Catalogue:
    """The catalogue over one database; cheap to keep for the life of the process."""

    def __init__(self, url: str | None = None):
        self.url = url or default_url()
        self.engine = make_engine(self.url)
        self.migrated = False
        self._shared: contextvars.ContextVar[Connection | None] = contextvars.ContextVar(f"catalogue-{id(self)}",
                                                                                         default=None)
        # gunicorn forks its workers from a process that has already connected (migrations on start): a
        # child must never use its parent's connections, or two processes would talk over one socket.
        engine = weakref.ref(self.engine)
        os.register_at_fork(after_in_child=lambda: _forget_connections(engine))

    # ---- plumbing -------------------------------------------------------------------------------
    @contextlib.contextmanager
    def reading(self) -> Iterator[None]:
        """Reads inside share one connection and one transaction (a consistent view, one pool checkout)."""
        if self._shared.get() is not None:
            yield
            return
        with self._connection() as connection:
            token = self._shared.set(connection)
            try:
                yield
            finally:
                self._shared.reset(token)

    @contextlib.contextmanager
    def _connection(self, write: bool = False) -> Iterator[Connection]:
        shared = self._shared.get()
        if shared is not None and not write:
            yield shared
            return
        try:
            engine = self.engine.execution_options(write=True) if write else self.engine
            with engine.begin() as connection:
                yield connection
        except (IntegrityError, StorageError):
            raise
        except (OperationalError, DBAPIError) as exc:
            if isinstance(exc, DBAPIError) and not isinstance(exc, OperationalError) and not exc.connection_invalidated:
                raise
            raise Unavailable(f"the catalogue database is unavailable ({type(exc.orig).__name__})") from exc

    def upgrade(self, revision: str = "head") -> None:
        """Bring the schema to ``revision`` with Alembic (one migrator at a time on PostgreSQL)."""
        from alembic import command
        from alembic.config import Config

        config = Config()
        config.set_main_option("script_location", str(MIGRATIONS))
        try:
            with self.engine.connect() as connection:
                postgres = connection.dialect.name == "postgresql"
                if postgres:
                    connection.execute(text("SELECT pg_advisory_lock(:key)"), {"key": _ADVISORY_LOCK})
                    connection.commit()
                try:
                    config.attributes["connection"] = connection
                    command.upgrade(config, revision)
                    connection.commit()
                finally:
                    if postgres:
                        connection.execute(text("SELECT pg_advisory_unlock(:key)"), {"key": _ADVISORY_LOCK})
                        connection.commit()
        except OperationalError as exc:
            raise Unavailable(f"the catalogue database is unavailable ({type(exc.orig).__name__})") from exc
        self.migrated = revision == "head"

    def schema_revision(self) -> str | None:
        from alembic.runtime.migration import MigrationContext

        with self._connection() as connection:
            return MigrationContext.configure(connection).get_current_revision()

    def ping(self) -> None:
        with self._connection() as connection:
            connection.execute(text("SELECT 1"))

    def dispose(self) -> None:
        self.engine.dispose()

    # ---- reading --------------------------------------------------------------------------------
    def _record(self, connection: Connection, kind: str, key: str) -> Record:
        """The record named by id, else the live record with that tag, else the latest retired one."""
        session = Session(connection)
        found = session.scalars(select(Record).where(Record.kind == kind, Record.id == key)).first()
        if found is None:
            found = session.scalars(
                select(Record).where(Record.kind == kind, Record.tag == key)
                .order_by(Record.retired, Record.updated_at.desc()).limit(1)).first()
        if found is None:
            raise NotFound(f"no {kind} with id or tag {key!r}")
        return found

    def _revision(self, connection: Connection, record: Record, number: int) -> RevisionView:
        found = Session(connection).scalars(select(Revision).where(Revision.record_id == record.id,
                                                                   Revision.number == number)).first()
        if found is None:
            raise NotFound(f"{record.kind} {record.tag!r} has no revision {number}")
        return _row_view(record, found)

    def get(self, kind: str, key: str, number: int | None = None) -> RevisionView:
        """The current (or numbered) revision of the record named by id or tag; one prepared statement."""
        with self._connection() as connection:
            statement = _CURRENT if number is None else _NUMBERED
            row = connection.execute(statement, {"kind": kind, "key": key, "number": number}).first()
        if row is None:
            if number is not None:
                self.get(kind, key)  # says which is missing: the record, or only that revision
                raise NotFound(f"{kind} {key!r} has no revision {number}")
            raise NotFound(f"no {kind} with id or tag {key!r}")
        return RevisionView(row.id, row.kind, row.revision_tag, row.number, row.body, row.author,
                            _aware(row.created_at), row.revision_retired, row.revision)

    def history(self, kind: str, key: str) -> list[RevisionView]:
        with self._connection() as connection:
            record = self._record(connection, kind, key)
            rows = Session(connection).scalars(select(Revision).where(Revision.record_id == record.id)
                                               .order_by(Revision.number)).all()
            return [_row_view(record, row) for row in rows]

    def list(self, kind: str, *, tag: str | None = None, material: str | None = None,
             jacket_type: str | None = None, volume_min: float | None = None, volume_max: float | None = None,
             ids: list[str] | None = None, retired: bool = False, limit: int = 50,
             offset: int = 0) -> tuple[list[RevisionView], int]:
        """Current revisions matching every filter given, ordered by tag; and how many match in all."""
        conditions = [Record.kind == kind]
        if not retired:
            conditions.append(Record.retired == False)  # noqa: E712 (SQL expression)
        if tag is not None:
            if tag.endswith("*"):
                conditions.append(Record.tag.startswith(tag[:-1], autoescape=True))
            else:
                conditions.append(Record.tag == tag)
        if material is not None:
            conditions.append(Record.material == material)
        if jacket_type is not None:
            conditions.append(Record.jacket_type == jacket_type)
        if volume_min is not None:
            conditions.append(Record.volume >= volume_min)
        if volume_max is not None:
            conditions.append(Record.volume <= volume_max)
        if ids is not None:
            conditions.append(or_(Record.id.in_(ids), Record.tag.in_(ids)))
        with self._connection() as connection:
            total = connection.execute(select(func.count()).select_from(Record).where(*conditions)).scalar_one()
            rows = Session(connection).execute(
                select(Record, Revision).join(Revision, (Revision.record_id == Record.id)
                                              & (Revision.number == Record.revision))
                .where(*conditions).order_by(Record.tag, Record.id).limit(limit).offset(offset)).all()
            return [_row_view(record, revision) for record, revision in rows], total

    # ---- writing --------------------------------------------------------------------------------
    def create(self, kind: str, tag: str, body: dict, index: dict, author: str) -> RevisionView:
        now = _now()
        record = {"id": uuid.uuid4().hex, "kind": kind, "tag": tag, "revision": 1, "retired": False,
                  "created_at": now, "updated_at": now, **index}
        try:
            with self._connection(write=True) as connection:
                connection.execute(Record.__table__.insert().values(record))
                connection.execute(Revision.__table__.insert().values(
                    record_id=record["id"], number=1, tag=tag, body=body, author=author, created_at=now,
                    retired=False))
                _before_commit(connection)
        except IntegrityError:
            raise Conflict(f"a live {kind} with tag {tag!r} exists already") from None
        return self.get(kind, record["id"])

    def revise(self, kind: str, key: str, expected: int | None, author: str, *, tag: str | None = None,
               body: dict | None = None, index: dict | None = None, retire: bool = False) -> RevisionView:
        """Add a revision to a live record: new content (``body``), or its retirement (``retire``).

        ``expected`` is the revision the change was based on (from If-Match); None skips the check.
        """
        now = _now()
        try:
            with self._connection(write=True) as connection:
                record = self._record(connection, kind, key)
                current = self._revision(connection, record, record.revision)
                if record.retired:
                    raise Conflict(f"{kind} {record.tag!r} is retired; its history stays readable")
                if expected is not None and expected != record.revision:
                    raise Stale(f"{kind} {record.tag!r} is at revision {record.revision}, not {expected}", current)
                number = record.revision + 1
                values: dict[str, Any] = {"revision": number, "updated_at": now, "retired": retire}
                new_tag = tag if tag is not None else record.tag
                values["tag"] = new_tag
                values.update(index or {})
                claimed = connection.execute(
                    update(Record).where(Record.id == record.id, Record.revision == record.revision,
                                         Record.retired == False)  # noqa: E712
                    .values(values)).rowcount
                if claimed != 1:  # another writer took this number between our read and our write
                    raise Stale(f"{kind} {record.tag!r} changed while this write was prepared", current)
                connection.execute(Revision.__table__.insert().values(
                    record_id=record.id, number=number, tag=new_tag, body=current.body if body is None else body,
                    author=author, created_at=now, retired=retire))
                _before_commit(connection)
                record_id = record.id
        except IntegrityError:
            raise Conflict(f"a live {kind} with tag {tag!r} exists already") from None
        return self.get(kind, record_id)

    # ---- screenings -----------------------------------------------------------------------------
    def save_screening(self, *, request: dict, used: list, result: dict, author: str, status: str = "done",
                       done: int = 0, total: int = 0, previous_id: str | None = None,
                       screening_id: str | None = None) -> dict:
        """Store a screening; with ``screening_id``, fill that row (a queued job's) and keep its creation time."""
        if screening_id is not None:
            self.update_screening(screening_id, used=used, result=result, status=status, done=done, total=total)
            return self.screening(screening_id)
        row = {"id": uuid.uuid4().hex, "request_key": request_key(request), "request": request, "used": used,
               "result": result, "author": author, "created_at": _now(), "previous_id": previous_id,
               "status": status, "done": done, "total": total}
        with self._connection(write=True) as connection:
            connection.execute(Screening.__table__.insert().values(row))
        return row

    def update_screening(self, screening_id: str, **values) -> None:
        with self._connection(write=True) as connection:
            connection.execute(update(Screening).where(Screening.id == screening_id).values(**values))

    def screening(self, screening_id: str) -> dict:
        with self._connection() as connection:
            found = connection.execute(select(Screening.__table__).where(Screening.id == screening_id)).first()
        if found is None:
            raise NotFound(f"no screening {screening_id!r}")
        return _screening_dict(found._mapping)

    def last_screening(self, key: str, before: datetime | None = None) -> dict | None:
        """The latest finished screening of the same request (before ``before``, when given)."""
        table = Screening.__table__
        query = select(table).where(table.c.request_key == key, table.c.status == "done")
        if before is not None:
            query = query.where(table.c.created_at < before)
        with self._connection() as connection:
            found = connection.execute(query.order_by(table.c.created_at.desc()).limit(1)).first()
        return None if found is None else _screening_dict(found._mapping)

    def screenings(self, limit: int = 50, offset: int = 0) -> tuple[list[dict], int]:
        table = Screening.__table__
        with self._connection() as connection:
            total = connection.execute(select(func.count()).select_from(table)).scalar_one()
            rows = connection.execute(select(table).order_by(table.c.created_at.desc(), table.c.id)
                                      .limit(limit).offset(offset)).all()
        return [_screening_dict(row._mapping) for row in rows], total

    # ---- bulk -----------------------------------------------------------------------------------
    def export(self) -> dict:
        """Every record with its whole history, in a form ``import_catalogue`` restores exactly."""
        with self._connection() as connection:
            session = Session(connection)
            records = session.scalars(select(Record).order_by(Record.kind, Record.tag, Record.id)).all()
            revisions = session.scalars(select(Revision).order_by(Revision.record_id, Revision.number)).all()
        by_record: dict[str, list] = {}
        for revision in revisions:
            by_record.setdefault(revision.record_id, []).append({
                "number": revision.number, "tag": revision.tag, "body": revision.body, "author": revision.author,
                "created_at": _aware(revision.created_at).isoformat(), "retired": revision.retired})
        return {"format": EXPORT_FORMAT, "version": EXPORT_VERSION, "exported_at": _now().isoformat(),
                "records": [{"kind": r.kind, "id": r.id, "tag": r.tag, "retired": r.retired,
                             "index": {"name": r.name, "material": r.material, "jacket_type": r.jacket_type,
                                       "volume": r.volume},
                             "revisions": by_record.get(r.id, [])} for r in records]}

    def restore(self, record: dict) -> bool:
        """Insert an exported record with its history unchanged; False when its id is already present."""
        revisions = record["revisions"]
        last = revisions[-1]
        with self._connection(write=True) as connection:
            exists = connection.execute(select(Record.id).where(Record.id == record["id"])).first()
            if exists is not None:
                return False
            try:
                connection.execute(Record.__table__.insert().values(
                    id=record["id"], kind=record["kind"], tag=record["tag"], revision=last["number"],
                    retired=bool(record["retired"]), created_at=datetime.fromisoformat(revisions[0]["created_at"]),
                    updated_at=datetime.fromisoformat(last["created_at"]), **record["index"]))
                for revision in revisions:
                    connection.execute(Revision.__table__.insert().values(
                        record_id=record["id"], number=revision["number"], tag=revision["tag"], body=revision["body"],
                        author=revision["author"], created_at=datetime.fromisoformat(revision["created_at"]),
                        retired=bool(revision["retired"])))
            except IntegrityError:
                raise Conflict(f"a live {record['kind']} with tag {record['tag']!r} exists already") from None
        return True

    def counts(self) -> dict[str, int]:
        with self._connection() as connection:
            rows = connection.execute(select(Record.kind, func.count()).group_by(Record.kind)).all()
        return {kind: count for kind, count in rows}


def _lookup(numbered: bool):
    """SELECT of one record's revision by id or tag (an id wins; then a live record; then the latest retired)."""
    records, revisions = Record.__table__, Revision.__table__
    key = bindparam("key")
    number = bindparam("number") if numbered else records.c.revision
    return (select(records.c.id, records.c.kind, records.c.revision, revisions.c.number,
                   revisions.c.tag.label("revision_tag"), revisions.c.body, revisions.c.author, revisions.c.created_at,
                   revisions.c.retired.label("revision_retired"))
            .join(revisions, (revisions.c.record_id == records.c.id) & (revisions.c.number == number))
            .where(records.c.kind == bindparam("kind"), or_(records.c.id == key, records.c.tag == key))
            .order_by(case((records.c.id == key, 0), else_=1), records.c.retired, records.c.updated_at.desc())
            .limit(1))


_CURRENT, _NUMBERED = _lookup(False), _lookup(True)


def _forget_connections(reference) -> None:
    engine = reference()
    if engine is not None:
        engine.dispose(close=False)  # drop the inherited pool without closing the parent's sockets


def _screening_dict(row) -> dict:
    out = dict(row)
    out["created_at"] = _aware(out["created_at"])
    return out


def _before_commit(connection: Connection) -> None:
    """Called inside every write transaction just before it commits (a seam for the crash test)."""


__all__ = ["Base", "Catalogue", "Conflict", "KINDS", "NotFound", "RevisionView", "Stale", "StorageError",
           "Unavailable", "default_url", "request_key"]
