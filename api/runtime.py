"""How a serving process spends its time: each request's deadline, the calculation slots, and readiness.

* Every request runs on a clock (``REQUEST_BUDGET`` seconds, counted from the moment its headers are
  parsed): :func:`deadline` is the :class:`calc.deadline.Deadline` the calculations check. Under
  gunicorn the deadline also notices a client that hung up (its socket reads end-of-file), so the
  work stops where it can instead of computing an answer nobody reads.
* Calculations take one of ``CALCULATION_SLOTS`` slots per process, after their body has been read,
  first come, first served. A request that cannot get a slot within its budget is a 503 with
  ``Retry-After``. The default (16, one per gunicorn thread) lets the threads share the core: measured
  with tests/benchmarks/load.py (32 clients, 2 workers), 1, 2 or 4 slots per worker gave 10-60 % more
  requests per second than sync workers but a longer p99 (short requests queue behind long ones),
  16 slots gave 2-3 times the throughput, a 4-6 times shorter median and a p99 within 0-26 % of the
  sync workers'. Fewer slots bound the memory of concurrent calculations.
* :data:`SERVING` counts the requests in flight and knows the worker's thread count and whether the
  worker is draining after SIGTERM (set by the gunicorn worker class in docker/gunicorn.conf.py);
  ``/ready`` reads it.
"""
from __future__ import annotations

import math
import select
import socket
import threading
from collections import deque
from typing import Callable

from flask import Flask, current_app, g, request

from calc.deadline import NEVER, Deadline

from .errors import ProblemError

#: Paths whose work takes a calculation slot.
CALCULATION_PREFIX = "/v1/"


class ServingState:
    """Per process: requests in flight, worker threads (None outside gunicorn), draining flag."""

    def __init__(self):
        self.threads: int | None = None
        self.draining = threading.Event()
        self._lock = threading.Lock()
        self._active = 0

    @property
    def active(self) -> int:
        return self._active

    def enter(self) -> None:
        with self._lock:
            self._active += 1

    def leave(self) -> None:
        with self._lock:
            self._active -= 1

    def saturated(self) -> bool:
        """Every worker thread is busy (the one asking included): a new request would wait in the queue."""
        return self.threads is not None and self._active >= self.threads


SERVING = ServingState()


class CountingMiddleware:
    """WSGI wrapper counting the requests in flight in this process (body reading included)."""

    def __init__(self, wsgi_app):
        self.wsgi_app = wsgi_app

    def __call__(self, environ, start_response):
        SERVING.enter()
        try:
            return self.wsgi_app(environ, start_response)
        finally:
            SERVING.leave()


class Slots:
    """A counting semaphore that serves waiters first come, first served.

    ``threading.Semaphore`` lets a newly arriving thread take a freed slot before one that has waited,
    which under load starves some requests (measured: p99 latency several times the sync worker's).
    Here a released slot is handed to the longest waiter.
    """

    def __init__(self, count: int):
        self._free = count
        self._waiters: deque[threading.Event] = deque()
        self._lock = threading.Lock()

    def acquire(self, timeout: float) -> bool:
        with self._lock:
            if self._free > 0 and not self._waiters:
                self._free -= 1
                return True
            turn = threading.Event()
            self._waiters.append(turn)
        if turn.wait(timeout):
            return True
        with self._lock:
            if turn.is_set():  # handed over just as the wait timed out
                return True
            self._waiters.remove(turn)
            return False

    def release(self) -> None:
        with self._lock:
            if self._waiters:
                self._waiters.popleft().set()
            else:
                self._free += 1


def hangup_probe(environ: dict) -> Callable[[], bool] | None:
    """A function saying whether the client of this request has closed its connection (gunicorn only).

    After the body is read, a socket that polls readable and peeks zero bytes has reached end-of-file:
    the client hung up (a pipelined next request would peek as data, not as the end).
    """
    sock = environ.get("gunicorn.socket")
    if not isinstance(sock, socket.socket):
        return None

    def gone() -> bool:
        try:
            readable, _, _ = select.select([sock], [], [], 0)
            return bool(readable) and sock.recv(1, socket.MSG_PEEK | socket.MSG_DONTWAIT) == b""
        except (BlockingIOError, InterruptedError):
            return False
        except (OSError, ValueError):  # reset or closed: the client is gone
            return True

    return gone


def deadline() -> Deadline:
    """The current request's deadline (no deadline outside a request)."""
    return g.get("deadline", NEVER) if g else NEVER


def retry_after() -> str:
    """Seconds a client is asked to wait before retrying work that ran out of time or found no slot."""
    return str(max(1, math.ceil(current_app.config["REQUEST_BUDGET"])))


def register(app: Flask) -> None:
    app.wsgi_app = CountingMiddleware(app.wsgi_app)
    slots = Slots(max(1, int(app.config["CALCULATION_SLOTS"])))

    @app.before_request
    def _clock():
        g.deadline = Deadline.after(float(app.config["REQUEST_BUDGET"]), hangup_probe(request.environ))

    @app.before_request
    def _slot():
        if not request.path.startswith(CALCULATION_PREFIX) or request.method == "OPTIONS":
            return None
        request.get_data(cache=True)  # a slow upload waits here, holding a thread but no slot
        if not slots.acquire(timeout=max(0.0, g.deadline.remaining())):
            raise ProblemError(503, "every calculation slot stayed busy for the whole time budget; retry later",
                               title="Busy")
        g.slot = True
        return None

    @app.teardown_request
    def _free(_exc):
        if g.pop("slot", False):
            slots.release()
