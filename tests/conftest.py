import os

import pytest

from api import create_app

# The suite sends thousands of requests from one address; rate limits are tested on their own
# (tests/test_limits.py). This reaches every app and every server the tests start.
os.environ.setdefault("COOLMARGIN_RATE_LIMIT", "1000000 per minute")


@pytest.fixture(scope="session")
def app():
    return create_app({"TESTING": True})


@pytest.fixture()
def client(app):
    return app.test_client()
