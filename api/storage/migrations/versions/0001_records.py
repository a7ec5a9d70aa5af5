"""Records (vessels, utilities, steps) and their revisions.

Revision ID: 0001_records
Revises:
Create Date: 2026-12-03
"""
import sqlalchemy as sa
from alembic import op

revision = "0001_records"
down_revision = None
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "records",
        sa.Column("id", sa.String(32), primary_key=True),
        sa.Column("kind", sa.String(16), nullable=False),
        sa.Column("tag", sa.String(64), nullable=False),
        sa.Column("revision", sa.Integer, nullable=False),
        sa.Column("retired", sa.Boolean, nullable=False, server_default=sa.false()),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("updated_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("name", sa.String(120)),
        sa.Column("material", sa.String(64)),
        sa.Column("jacket_type", sa.String(32)),
        sa.Column("volume", sa.Float),
    )
    retired = sa.column("retired")
    op.create_index("uq_records_live_tag", "records", ["kind", "tag"], unique=True,
                    sqlite_where=retired == sa.false(), postgresql_where=retired == sa.false())
    op.create_index("ix_records_kind_tag", "records", ["kind", "tag"])
    op.create_table(
        "revisions",
        sa.Column("id", sa.Integer, primary_key=True, autoincrement=True),
        sa.Column("record_id", sa.String(32), sa.ForeignKey("records.id", ondelete="RESTRICT"), nullable=False),
        sa.Column("number", sa.Integer, nullable=False),
        sa.Column("tag", sa.String(64), nullable=False),
        sa.Column("body", sa.JSON, nullable=False),
        sa.Column("author", sa.String(120), nullable=False),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("retired", sa.Boolean, nullable=False, server_default=sa.false()),
        sa.UniqueConstraint("record_id", "number", name="uq_revisions_record_number"),
    )


def downgrade() -> None:
    op.drop_table("revisions")
    op.drop_index("ix_records_kind_tag", "records")
    op.drop_index("uq_records_live_tag", "records")
    op.drop_table("records")
