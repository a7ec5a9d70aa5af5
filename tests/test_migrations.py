"""Alembic migrations of the catalogue, on SQLite and the real PostgreSQL: from empty to head, from the
previous revision to head with records in it (none lost), and head equal to the models the code uses.
Reference: Alembic's autogenerate comparison (``compare_metadata``) as the oracle for schema drift.
"""
from __future__ import annotations

from datetime import datetime, timezone

from alembic.autogenerate import compare_metadata
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory
from alembic.config import Config
from sqlalchemy import text

from api.storage import MIGRATIONS, Catalogue
from api.storage.models import Base
from plant import record


def _heads() -> list[str]:
    config = Config()
    config.set_main_option("script_location", str(MIGRATIONS))
    return list(ScriptDirectory.from_config(config).get_heads())


def test_one_head_and_empty_database_upgrades_to_it(database_url):
    catalogue = Catalogue(database_url)
    try:
        assert catalogue.schema_revision() is None
        catalogue.upgrade()
        assert [catalogue.schema_revision()] == _heads() == ["0002_screenings"]
        catalogue.upgrade()  # idempotent: a second start changes nothing
        with catalogue.engine.connect() as connection:
            drift = compare_metadata(MigrationContext.configure(connection), Base.metadata)
        assert drift == []
    finally:
        catalogue.dispose()


def test_upgrade_from_the_previous_revision_keeps_every_record(database_url):
    catalogue = Catalogue(database_url)
    try:
        catalogue.upgrade("0001_records")
        now = datetime(2026, 11, 2, 8, 30, tzinfo=timezone.utc)
        body = record("vessel", "Puffin")
        with catalogue.engine.begin() as connection:  # rows as the previous release wrote them
            connection.execute(text(
                "INSERT INTO records (id, kind, tag, revision, retired, created_at, updated_at, name, material, "
                "jacket_type, volume) VALUES ('a1', 'vessel', 'Puffin', 2, false, :now, :now, 'Puffin', "
                "'stainless_316l', 'half_pipe', 6.07)"), {"now": now})
            for number, notes in ((1, None), (2, "seal")):
                connection.execute(text(
                    "INSERT INTO revisions (record_id, number, tag, body, author, created_at, retired) "
                    "VALUES ('a1', :number, 'Puffin', :body, 'alice', :now, false)"),
                    {"number": number, "now": now, "body": __import__("json").dumps(body | {"notes": notes})})
        catalogue.upgrade()
        assert catalogue.schema_revision() == "0002_screenings"
        history = catalogue.history("vessel", "Puffin")
        assert [(h.number, h.body.get("notes"), h.author) for h in history] == [(1, None, "alice"), (2, "seal", "alice")]
        assert catalogue.list("vessel", material="stainless_316l")[1] == 1
    finally:
        catalogue.dispose()
