"""gunicorn settings for coolmargin, each overridable by an environment variable.

Shipped in the wheel. The container and ``make run`` load it through docker/gunicorn.conf.py, ``coolmargin serve``
as ``python:api.gunicorn_settings``; the tests that start a real server use the same settings.
"""
import json
import multiprocessing
import os

from gunicorn import glogging


def _int(name: str, default: int) -> int:
    return int(os.environ.get(name, default))


bind = os.environ.get("COOLMARGIN_BIND", "0.0.0.0:8000")
# The work is CPU-bound (property look-ups, root finding, ODE integration): one worker per core.
workers = _int("COOLMARGIN_WORKERS", multiprocessing.cpu_count())
worker_class = "sync"
# A calculation has its own wall-time budget well below this; the timeout only catches a stuck worker.
timeout = _int("COOLMARGIN_TIMEOUT", 60)
graceful_timeout = _int("COOLMARGIN_GRACEFUL_TIMEOUT", 30)
keepalive = _int("COOLMARGIN_KEEPALIVE", 5)
max_requests = _int("COOLMARGIN_MAX_REQUESTS", 5000)
max_requests_jitter = _int("COOLMARGIN_MAX_REQUESTS_JITTER", 500)
# Spreadsheet GET calls carry whole objects in the query string: allow long request lines, but bound them.
limit_request_line = _int("COOLMARGIN_LIMIT_REQUEST_LINE", 8190)
limit_request_fields = _int("COOLMARGIN_LIMIT_REQUEST_FIELDS", 100)
limit_request_field_size = _int("COOLMARGIN_LIMIT_REQUEST_FIELD_SIZE", 8190)
preload_app = True
accesslog = os.environ.get("COOLMARGIN_ACCESS_LOG", "-")
errorlog = "-"
loglevel = os.environ.get("COOLMARGIN_LOG_LEVEL", "info")
# Structured access log: one JSON object per request; no bodies, no query strings, no Authorization header.
# Every atom is JSON-string escaped (gunicorn's own wrapper escapes only '"'), so a path holding a backslash or
# a %0A-encoded newline can neither break the JSON nor forge a second log line.


class _JsonAtoms(glogging.SafeAtoms):
    def __init__(self, atoms):
        dict.__init__(self, {key: json.dumps(value)[1:-1] if isinstance(value, str) else value
                             for key, value in atoms.items()})


class _JsonAccessLogger(glogging.Logger):
    atoms_wrapper_class = _JsonAtoms


logger_class = _JsonAccessLogger
access_log_format = (
    '{"time":"%(t)s","remote":"%(h)s","method":"%(m)s","path":"%(U)s","status":%(s)s,'
    '"bytes":"%(B)s","duration_us":%(D)s,"request_id":"%({x-request-id}o)s"}'
)
