"""coolmargin HTTP API: ``create_app`` builds the Flask application; nothing happens at import time."""
from __future__ import annotations

import logging
import os
import re
import uuid
from importlib import metadata, resources

from flask import Flask, g, request

from calc.checks import scaleup

from . import errors, limits, runtime, security
from .logs import JsonFormatter, RequestIdFilter

try:
    VERSION = metadata.version("coolmargin")
except metadata.PackageNotFoundError:  # running from a source tree that was never installed
    VERSION = "0.0.0"

DEFAULTS = {
    "MAX_CONTENT_LENGTH": 1024 * 1024,  # bytes; a larger body is a 413
    "MAX_NESTING_DEPTH": 32,  # levels of JSON objects/arrays
    "MAX_BATCH_CASES": 50,  # cases in one {"cases": [...]} call
    "MAX_SCALES": scaleup.MAX_TARGETS,  # targets in one scale-up
    "MAX_WINDOW_POINTS": 2500,  # grid points in one operating window
    "LOG_LEVEL": "INFO",  # of the service logger "coolmargin"
    "MAX_SERIES_POINTS": 2000,  # points in a returned time series
    "MAX_SIMULATION_HORIZON": 7 * 24 * 3600.0,  # s of simulated time
    "SIMULATION_WALL_TIME": 10.0,  # s of computing per simulation request
    "REQUEST_BUDGET": 20.0,  # s a request (or a whole batch) may take; then what is done, or a 503
    "CALCULATION_SLOTS": 16,  # calculations computing at once in one process (16: one per gunicorn thread)
    "AUTH_TOKENS": "",  # comma-separated bearer tokens; empty means open
    "AUTH_TOKENS_FILE": "",
    "CORS_ORIGINS": "",  # comma-separated allow-list
    "DATABASE_URL": "",  # SQLAlchemy URL of the plant catalogue; empty: a SQLite file in the user's data dir
    "MIGRATE_ON_START": 1,  # bring the catalogue's schema up to date when the app is built
    "MAX_SCREENING_VESSELS": 200,  # vessels in one screening (413 above)
    "SCREENING_WALL_TIME": 20.0,  # s of computing per screening request; past it the answer is partial (or a job)
    "QUEUE_URL": "",  # redis:// URL of the job queue for large screenings (api/jobs.py); empty: no jobs
    "QUEUE_NAME": "coolmargin-screenings",  # the rq queue's name on that Redis
    "SCREENING_SYNC_VESSELS": 100,  # with a queue, screenings of more vessels than this run as jobs
    "SCREENING_JOB_WALL_TIME": 1800.0,  # s of computing per screening job; past it the job's answer is partial
    "RATE_LIMIT": "600 per minute",  # per client (token, else address); ';' between limits; empty: off
    "RATE_LIMIT_STORAGE": "memory://",  # or a redis:// URL shared by every process and replica
    "RATE_LIMIT_PREFIX": "coolmargin",  # key prefix in that storage
    "TRUSTED_PROXIES": 0,  # proxies in front whose X-Forwarded-For names the client (1 behind docker/nginx.conf)
    # The contract ships inside the package (api/openapi.yaml links to the top-level file in a checkout).
    "OPENAPI_PATH": str(resources.files("api").joinpath("openapi.yaml")),
}
_ENV_PREFIX = "COOLMARGIN_"
_REQUEST_ID = re.compile(r"^[A-Za-z0-9._-]{1,64}$")


def _from_environment() -> dict:
    """Settings from COOLMARGIN_* environment variables, typed like the defaults."""
    settings = {}
    for key, default in DEFAULTS.items():
        raw = os.environ.get(_ENV_PREFIX + key)
        if raw is None:
            continue
        settings[key] = type(default)(raw) if not isinstance(default, str) else raw
    return settings


def _configure_logging(level: str) -> None:
    """The service logger: one handler (added once per process) and the level the app is configured with."""
    logger = logging.getLogger("coolmargin")
    if not logger.handlers:
        handler = logging.StreamHandler()
        handler.setFormatter(JsonFormatter())  # JSON lines, like the access log, with the request id
        logger.addHandler(handler)
        logger.addFilter(RequestIdFilter())
        logger.propagate = False
    logger.setLevel(level.upper())


def create_app(config: dict | None = None) -> Flask:
    """Build the application. ``config`` overrides defaults and COOLMARGIN_* environment variables."""
    app = Flask(__name__)
    app.config.update(DEFAULTS)
    app.config.update(_from_environment())
    app.config.update(config or {})
    app.json.sort_keys = False
    _configure_logging(app.config["LOG_LEVEL"])
    errors.register(app)

    @app.before_request
    def _start():
        incoming = request.headers.get("X-Request-ID", "")
        g.request_id = incoming if _REQUEST_ID.match(incoming) else uuid.uuid4().hex

    @app.after_request
    def _finish(response):
        response.headers["X-Request-ID"] = g.get("request_id", "-")
        response.headers.setdefault("X-Content-Type-Options", "nosniff")
        return response

    limits.register(app)  # before authentication: floods of bad tokens are counted per address
    security.register(app)  # after the request-id hook: refusals carry the request id
    runtime.register(app)  # after authentication: a refused request reads no body and takes no slot

    from . import (agitation, cooling, fits, geometry, heat_transfer, probes, properties, records, safety,
                   screenings, sizing, window)

    records.attach(app)
    for module in (probes, properties, geometry, agitation, heat_transfer, cooling, window, sizing, safety, fits,
                   records, screenings):
        app.register_blueprint(module.bp)
    return app
