"""Alembic environment: migrations run on the connection the catalogue hands over (online mode only)."""
from alembic import context

from api.storage.models import Base

connection = context.config.attributes["connection"]
context.configure(connection=connection, target_metadata=Base.metadata, render_as_batch=True,
                  transaction_per_migration=True)
with context.begin_transaction():
    context.run_migrations()
