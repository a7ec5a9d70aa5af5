import os
import tempfile
import uuid

import pytest

# No test touches a real catalogue: apps built without an explicit DATABASE_URL (and servers the tests start)
# get a throw-away SQLite file.
_SCRATCH = tempfile.mkdtemp(prefix="coolmargin-tests-")
os.environ["COOLMARGIN_DATABASE_URL"] = f"sqlite:///{_SCRATCH}/catalogue.sqlite3"
# The PostgreSQL every storage test also runs against (.ci/run sets it; the machines run one there).
POSTGRES_URL = os.environ.get("COOLMARGIN_TEST_POSTGRES_URL", "postgresql+psycopg://postgres@127.0.0.1:5432/test")

from api import create_app  # noqa: E402  (after the environment above)

# The suite sends thousands of requests from one address; rate limits are tested on their own
# (tests/test_limits.py). This reaches every app and every server the tests start.
os.environ.setdefault("COOLMARGIN_RATE_LIMIT", "1000000 per minute")


@pytest.fixture(scope="session")
def app():
    return create_app({"TESTING": True})


@pytest.fixture()
def client(app):
    return app.test_client()


def _postgres_schema_url(schema: str) -> str:
    separator = "&" if "?" in POSTGRES_URL else "?"
    return f"{POSTGRES_URL}{separator}options=-csearch_path%3D{schema}"


@pytest.fixture(params=["sqlite", "postgresql"])
def database_url(request, tmp_path):
    """An empty catalogue database: a SQLite file, or a schema of its own on the real PostgreSQL (dropped after).

    Each PostgreSQL run gets a uniquely named schema, so parallel runs on the shared server never collide.
    """
    if request.param == "sqlite":
        yield f"sqlite:///{tmp_path}/catalogue.sqlite3"
        return
    from sqlalchemy import create_engine, text

    schema = f"cm_test_{uuid.uuid4().hex[:12]}"
    admin = create_engine(POSTGRES_URL)
    with admin.begin() as connection:
        connection.execute(text(f'CREATE SCHEMA "{schema}"'))
    try:
        yield _postgres_schema_url(schema)
    finally:
        with admin.begin() as connection:
            connection.execute(text(f'DROP SCHEMA "{schema}" CASCADE'))
        admin.dispose()


@pytest.fixture()
def store_app(database_url):
    """The app over an empty catalogue on each backend; its connections are closed after the test."""
    application = create_app({"TESTING": True, "DATABASE_URL": database_url})
    yield application
    application.extensions["coolmargin.catalogue"].dispose()


@pytest.fixture()
def store_client(store_app):
    return store_app.test_client()
