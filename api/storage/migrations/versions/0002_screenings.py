"""Stored screenings: the request, the revisions used, the ranked result and, for jobs, progress.

Revision ID: 0002_screenings
Revises: 0001_records
Create Date: 2026-12-03
"""
import sqlalchemy as sa
from alembic import op

revision = "0002_screenings"
down_revision = "0001_records"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "screenings",
        sa.Column("id", sa.String(32), primary_key=True),
        sa.Column("request_key", sa.String(64), nullable=False),
        sa.Column("request", sa.JSON, nullable=False),
        sa.Column("used", sa.JSON, nullable=False),
        sa.Column("result", sa.JSON, nullable=False),
        sa.Column("author", sa.String(120), nullable=False),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("previous_id", sa.String(32)),
        sa.Column("status", sa.String(16), nullable=False, server_default="done"),
        sa.Column("done", sa.Integer, nullable=False, server_default="0"),
        sa.Column("total", sa.Integer, nullable=False, server_default="0"),
    )
    op.create_index("ix_screenings_request_key", "screenings", ["request_key"])
    op.create_index("ix_screenings_created_at", "screenings", ["created_at"])


def downgrade() -> None:
    op.drop_index("ix_screenings_created_at", "screenings")
    op.drop_index("ix_screenings_request_key", "screenings")
    op.drop_table("screenings")
