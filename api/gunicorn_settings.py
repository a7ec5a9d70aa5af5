"""gunicorn settings for coolmargin, each overridable by an environment variable.

Shipped in the wheel. The container and ``make run`` load it through docker/gunicorn.conf.py, ``coolmargin serve``
as ``python:api.gunicorn_settings``; the tests that start a real server use the same settings.
"""
import json
import multiprocessing
import os
import re
import tempfile
import time

from gunicorn import glogging, util
from gunicorn.workers.gthread import ThreadWorker

from api.logs import JsonFormatter
from api.runtime import SERVING


def _int(name: str, default: int) -> int:
    return int(os.environ.get(name, default))


bind = os.environ.get("COOLMARGIN_BIND", "0.0.0.0:8000")
# gunicorn's control socket (for `gunicornc -s PATH -c "show workers"`, "reload", ...). Its default path is
# one per user, and a second instance removes the first one's socket: each instance gets its own, named
# after its bind address, unless COOLMARGIN_CONTROL_SOCKET names one.
control_socket = os.environ.get("COOLMARGIN_CONTROL_SOCKET") or os.path.join(
    os.environ.get("XDG_RUNTIME_DIR") or tempfile.gettempdir(),
    f"coolmargin-{os.getuid()}", "gunicorn-" + re.sub(r"[^A-Za-z0-9.]+", "_", bind) + ".ctl")
# The work is CPU-bound (property look-ups, root finding, ODE integration): one worker process per core.
workers = _int("COOLMARGIN_WORKERS", multiprocessing.cpu_count())
# Each worker serves its connections from a pool of threads. A sync worker reads a request body in the
# process that computes, so two clients sending a body slowly held both workers and /health stopped
# answering; with threads, a slow upload holds one thread while the others keep answering (measured in
# tests/test_serving.py: /health within 2 s with 8 slow uploads open). The GIL makes the threads of one
# worker share a core, so threads add waiting room, not CPU; workers add CPU. Calculations take one of
# COOLMARGIN_CALCULATION_SLOTS per worker, first come, first served (api/runtime.py).
threads = _int("COOLMARGIN_THREADS", 16)
# After SIGTERM a worker keeps serving for this many seconds while /ready answers 503 (draining), so a
# load balancer stops sending before the listener closes; then in-flight requests finish (graceful_timeout).
drain_seconds = float(os.environ.get("COOLMARGIN_DRAIN_SECONDS", 5))


def _write_problem(sock, status_int, reason, mesg):
    """gunicorn's own refusals (malformed request, 414, 431, ...) as RFC 9457 problem+json, not HTML."""
    body = json.dumps({"type": "about:blank", "title": reason, "status": status_int,
                       "detail": mesg or reason, "errors": []}).encode()
    head = (f"HTTP/1.1 {status_int} {reason}\r\nConnection: close\r\nContent-Type: application/problem+json\r\n"
            f"X-Content-Type-Options: nosniff\r\nContent-Length: {len(body)}\r\n\r\n")
    util.write_nonblock(sock, head.encode("latin-1") + body)


# gunicorn writes these answers through this one function (gunicorn.workers.base.Worker.handle_error)
util.write_error = _write_problem


class DrainingThreadWorker(ThreadWorker):
    """gunicorn's threaded worker that tells /ready its thread count and drains before it stops."""

    _stop_at = None

    def init_process(self):
        SERVING.threads = self.cfg.threads
        super().init_process()

    def handle_exit(self, sig, frame):
        SERVING.draining.set()
        if drain_seconds <= 0 or not self.alive:
            return super().handle_exit(sig, frame)
        self._stop_at = time.monotonic() + drain_seconds
        return None

    def notify(self):  # called by the worker's loop at least once a second
        super().notify()
        if self._stop_at is not None and time.monotonic() >= self._stop_at:
            self._stop_at = None
            super().handle_exit(None, None)


# COOLMARGIN_WORKER_CLASS=sync brings back the old one-request-at-a-time workers (tests show what that costs;
# gunicorn would quietly turn a sync worker with threads into a threaded one, so it gets one thread).
if os.environ.get("COOLMARGIN_WORKER_CLASS", "gthread") == "gthread":
    worker_class = DrainingThreadWorker
else:
    worker_class, threads = os.environ["COOLMARGIN_WORKER_CLASS"], 1
# Connections one worker holds open at once (in a thread or kept alive between requests); more wait in the
# listen backlog.
worker_connections = _int("COOLMARGIN_WORKER_CONNECTIONS", 64)
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
    """Access log lines in access_log_format; gunicorn's error log as JSON lines too (api/logs.py)."""

    atoms_wrapper_class = _JsonAtoms

    def setup(self, cfg):
        super().setup(cfg)
        for handler in self.error_log.handlers:
            handler.setFormatter(JsonFormatter())


logger_class = _JsonAccessLogger
access_log_format = (
    '{"time":"%(t)s","remote":"%(h)s","method":"%(m)s","path":"%(U)s","status":%(s)s,'
    '"bytes":"%(B)s","duration_us":%(D)s,"request_id":"%({x-request-id}o)s"}'
)
