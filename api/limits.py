"""Per-client rate limits (flask-limiter): one bucket per bearer token, else per address.

Configured by RATE_LIMIT (flask-limiter's notation, ``;`` between several: "600 per minute;10000 per
day"; empty turns limiting off), RATE_LIMIT_STORAGE (``memory://``, the default, counts per process;
a ``redis://`` URL shares the counts between processes and replicas) and RATE_LIMIT_PREFIX (the key
prefix in that storage). A client is its bearer token when the token is one the service accepts (keys
hold a digest, never the token), else its address; behind TRUSTED_PROXIES proxies the address is the
one they put in X-Forwarded-For. The probes /health and /ready are never limited. A client over its
limit gets a 429 problem+json with ``Retry-After``; if the storage is unreachable, counting falls back
to memory rather than refusing service.
"""
from __future__ import annotations

import math
import time

from flask import Flask, request
from flask_limiter import Limiter, RequestLimit
from werkzeug.middleware.proxy_fix import ProxyFix

from .errors import problem
from .security import _digest, accepted_digests, token_matches

EXEMPT_PATHS = frozenset({"/health", "/ready"})


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
    limiter = Limiter(
        client_key,
        app=app,
        default_limits=[limits] if limits else [],
        default_limits_exempt_when=lambda: request.path in EXEMPT_PATHS,
        storage_uri=app.config["RATE_LIMIT_STORAGE"] or "memory://",
        key_prefix=app.config["RATE_LIMIT_PREFIX"],
        strategy="moving-window",
        headers_enabled=False,  # Retry-After on the 429 only (set below), none on answers that passed
        in_memory_fallback_enabled=True,
        on_breach=_too_many,
        enabled=bool(limits),
    )
    app.extensions["coolmargin.limiter"] = limiter
    return limiter
