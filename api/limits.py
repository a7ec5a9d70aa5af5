"""Per-client rate limits (flask-limiter): one bucket per bearer token, else per address.

Configured by RATE_LIMIT (flask-limiter's notation, ``;`` between several: "600 per minute;10000 per
day"; empty turns limiting off), RATE_LIMIT_STORAGE (``memory://``, the default, counts per process;
a ``redis://`` URL shares the counts between processes and replicas) and RATE_LIMIT_PREFIX (the key
prefix in that storage). A client is its bearer token when the token is one the service accepts (keys
hold a digest, never the token), else its address; behind TRUSTED_PROXIES proxies the address is the
one they put in X-Forwarded-For. The probes /health and /ready are never limited. A client over its
limit gets a 429 problem+json with ``Retry-After``; if the storage is unreachable, counting falls back
to memory rather than refusing service.

``memory://`` counts in :class:`InlineMemory`: the library's memory storage starts a timer thread to sweep
expired entries after a hit whenever the previous timer has finished (at a steady 100 requests/s, one
thread per request); this one sweeps on the request itself, at most once per ``SWEEP_SECONDS``. The counts
are the same: a moving window reads only the entries inside it, and a counter past its expiry reads as zero.
"""
from __future__ import annotations

import math
import time

from flask import Flask, request
from flask_limiter import Limiter, RequestLimit
from limits.storage import MemoryStorage
from werkzeug.middleware.proxy_fix import ProxyFix

from .errors import problem
from .security import _digest, accepted_digests, token_matches

EXEMPT_PATHS = frozenset({"/health", "/ready"})
#: How often the in-memory counts drop their expired entries, s.
SWEEP_SECONDS = 1.0


class InlineMemory(MemoryStorage):
    """The library's memory storage, its expired entries swept by the requests instead of a timer thread."""

    STORAGE_SCHEME = ["coolmargin-memory"]

    def __init__(self, uri: str | None = None, wrap_exceptions: bool = False, **options: str):
        super().__init__(uri, wrap_exceptions=wrap_exceptions, **options)
        self.next_sweep = 0.0

    def _MemoryStorage__schedule_expiry(self) -> None:  # replaces the timer the library starts after each hit
        now = time.monotonic()
        if now >= self.next_sweep:
            self.next_sweep = now + SWEEP_SECONDS
            self._MemoryStorage__expire_events()  # type: ignore[attr-defined]  # the library's sweep, run here


def client_key() -> str:
    scheme, _, supplied = request.headers.get("Authorization", "").partition(" ")
    supplied = supplied.strip()
    if scheme.lower() == "bearer" and supplied:
        digests = accepted_digests()
        if digests and token_matches(supplied, digests):
            return "token:" + _digest(supplied).hex()[:32]
    return "address:" + (request.remote_addr or "unknown")


def _too_many(limit: RequestLimit):
    retry = max(1, math.ceil(limit.reset_at - time.time()))
    who = "token" if "token:" in limit.key else "address"
    return problem(429, f"more than {limit.limit} from this client ({who}); retry in {retry} s",
                   headers={"Retry-After": str(retry)})


def register(app: Flask) -> Limiter:
    """Install the limiter (before authentication's hook runs, so floods of bad tokens count per address)."""
    proxies = int(app.config["TRUSTED_PROXIES"])
    if proxies > 0:
        app.wsgi_app = ProxyFix(app.wsgi_app, x_for=proxies, x_proto=proxies)
    limits = app.config["RATE_LIMIT"].strip()
    storage = app.config["RATE_LIMIT_STORAGE"] or "memory://"
    limiter = Limiter(
        client_key,
        app=app,
        default_limits=[limits] if limits else [],
        default_limits_exempt_when=lambda: request.path in EXEMPT_PATHS,
        storage_uri=storage if storage != "memory://" else "coolmargin-memory://",
        key_prefix=app.config["RATE_LIMIT_PREFIX"],
        strategy="moving-window",
        headers_enabled=False,  # Retry-After on the 429 only (set below), none on answers that passed
        in_memory_fallback_enabled=True,
        on_breach=_too_many,
        enabled=bool(limits),
    )
    app.extensions["coolmargin.limiter"] = limiter
    return limiter
