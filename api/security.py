"""Optional bearer-token authentication, a CORS allow-list, security headers and log redaction.

Configured by AUTH_TOKENS (comma-separated entries), AUTH_TOKENS_FILE (one entry a line, '#' comments) and
CORS_ORIGINS (comma-separated exact origins, or "*"). With no token configured the service is open.
An entry is ``TOKEN`` or ``TOKEN NAME`` or ``TOKEN NAME ROLE`` (whitespace-separated): NAME is what the
catalogue records as the author of a change (default ``token-`` and 8 hex digits of the token's SHA-256),
ROLE is ``write`` (the default: may change the catalogue) or ``read`` (calculations and reading only).
The token file is watched: each process re-reads it within TOKEN_RECHECK seconds of a change (its
modification time, inode or size), so tokens rotate without a restart; a changed file that cannot be
used (unreadable, empty, a malformed entry) is refused with an error in the log, and the tokens
in force stay.
The liveness/readiness probes and the published contract (/docs, /openapi.yaml) stay open: the contract
holds no plant data, and probes must work for the orchestrator without a secret.
"""
from __future__ import annotations

import hashlib
import hmac
import logging
import os
import re
import threading
import time
import weakref
from dataclasses import dataclass

from flask import Flask, current_app, g, request

from .errors import problem

log = logging.getLogger("coolmargin")

OPEN_PATHS = frozenset({"/", "/health", "/ready", "/docs", "/openapi.yaml"})
CORS_METHODS = "GET, POST, PUT, PATCH, DELETE"
CORS_HEADERS = "Content-Type, Authorization, X-Request-ID, If-Match"
CORS_MAX_AGE = "600"  # s a browser may cache a preflight answer
REALM = 'Bearer realm="coolmargin"'
# /docs uses one inline <style> block and nothing else: no scripts, no external resources.
CSP = ("default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; "
       "base-uri 'none'; form-action 'none'; frame-ancestors 'none'")


class ConfigurationError(RuntimeError):
    """Security settings that cannot be honoured; raised at start-up so the service never runs open by mistake."""


def _split(raw: str) -> list[str]:
    return [item.strip() for item in (raw or "").split(",") if item.strip()]


ROLES = ("write", "read")
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._@-]{0,63}$")


@dataclass(frozen=True)
class Token:
    secret: str
    name: str
    write: bool


def parse_token(entry: str) -> Token:
    """``TOKEN [NAME [ROLE]]`` -> Token; a bare token may write and gets a name derived from its digest."""
    parts = entry.split()
    if not parts or len(parts) > 3:
        raise ConfigurationError("an auth token entry is 'TOKEN', 'TOKEN NAME' or 'TOKEN NAME ROLE'")
    secret = parts[0]
    name = parts[1] if len(parts) > 1 else "token-" + hashlib.sha256(secret.encode("utf-8", "surrogateescape")).hexdigest()[:8]
    role = parts[2] if len(parts) > 2 else "write"
    if not _NAME.match(name):
        raise ConfigurationError("an auth token's name is 1-64 letters, digits or . _ @ -")
    if role not in ROLES:
        raise ConfigurationError(f"an auth token's role is one of {', '.join(ROLES)}")
    if not secret.isprintable():
        raise ConfigurationError("an auth token contains whitespace or control characters")
    return Token(secret, name, role == "write")


def load_token_entries(inline: str, path: str) -> list[Token]:
    """Tokens with their names and roles from the setting and the file."""
    entries = _split(inline)
    if path:
        try:
            with open(path, encoding="utf-8") as handle:
                lines = handle.read().splitlines()
        except OSError as exc:
            raise ConfigurationError(f"AUTH_TOKENS_FILE cannot be read: {type(exc).__name__}") from None
        from_file = [line.split("#", 1)[0].strip() for line in lines]
        from_file = [token for token in from_file if token]
        if not from_file:
            raise ConfigurationError("AUTH_TOKENS_FILE is set but holds no token")
        entries.extend(from_file)
    tokens = [parse_token(entry) for entry in entries]
    names = [token.name for token in tokens]
    if len(set(names)) != len(names):
        raise ConfigurationError("two auth tokens share a name; the catalogue could not tell their changes apart")
    return tokens


def load_tokens(inline: str, path: str) -> list[str]:
    """The secrets alone (see ``load_token_entries`` for names and roles)."""
    return [token.secret for token in load_token_entries(inline, path)]


#: Seconds between two looks at the token file's modification time, per process.
TOKEN_RECHECK = 1.0


class AcceptedTokens:
    """The tokens in force (names, roles, digests): the inline ones and the file's, re-read when the file changes."""

    def __init__(self, inline: str, path: str):
        self.inline, self.path = inline, path
        self._lock = threading.Lock()
        self._next_check = 0.0
        self._stamp = self._file_stamp()
        self.secrets: set[str] = set()  # every token this app has accepted, for redaction
        self._use(load_token_entries(inline, path))  # at start-up an unusable file stops the service

    def _use(self, tokens: list[Token]) -> None:
        self.secrets.update(token.secret for token in tokens)
        # one assignment, so a request never sees the digests of one file with the names of another
        self._in_force = (tuple(tokens), [_digest(token.secret) for token in tokens])

    def _file_stamp(self):
        try:
            status = os.stat(self.path)
        except OSError:
            return None
        return status.st_mtime_ns, status.st_ino, status.st_size

    def in_force(self) -> tuple[tuple[Token, ...], list[bytes]]:
        if self.path and time.monotonic() >= self._next_check:
            with self._lock:
                if time.monotonic() >= self._next_check:
                    self._next_check = time.monotonic() + TOKEN_RECHECK
                    self._reload_if_changed()
        return self._in_force

    def digests(self) -> list[bytes]:
        return self.in_force()[1]

    def _reload_if_changed(self) -> None:
        stamp = self._file_stamp()
        if stamp == self._stamp:
            return
        self._stamp = stamp
        try:
            tokens = load_token_entries(self.inline, self.path)
        except ConfigurationError as exc:
            log.error("the token file changed but cannot be used (%s); the tokens in force stay", exc)
            return
        self._use(tokens)
        log.warning("token file re-read: %d token(s) now accepted", len(tokens))


def accepted_digests() -> list[bytes]:
    """Digests of the tokens this process accepts now (empty: authentication is off)."""
    return current_app.extensions["coolmargin.security"]["tokens"].digests()


def _digest(token: str) -> bytes:
    # Comparing fixed-length digests keeps the comparison time independent of the tokens' lengths.
    return hashlib.sha256(token.encode("utf-8", "surrogateescape")).digest()


def token_index(supplied: str, digests: list[bytes]) -> int | None:
    """Which configured token matches, compared in constant time against every one, with no early exit."""
    candidate = _digest(supplied)
    found = -1
    for index, digest in enumerate(digests):
        hit = hmac.compare_digest(candidate, digest)
        found = index if hit else found
    return None if found < 0 else found


def token_matches(supplied: str, digests: list[bytes]) -> bool:
    return token_index(supplied, digests) is not None


# ---- log redaction ------------------------------------------------------------------------------
# The tokens of every live app, for redaction; an app's entry goes with the app (nothing accumulates).
_LIVE_TOKENS: "weakref.WeakKeyDictionary[Flask, AcceptedTokens]" = weakref.WeakKeyDictionary()
_BEARER = re.compile(r"(?i)\b(bearer\s+)[^\s\"',;]+")
_AUTH_HEADER = re.compile(r"(?i)(authorization[\"']?\s*[:=]\s*[\"']?)[^\"'\r\n]+")


def _secrets() -> set[str]:
    return set().union(*(tokens.secrets for tokens in list(_LIVE_TOKENS.values())))


def redact(text: str) -> str:
    """``text`` without bearer tokens, Authorization values or any token a live app has accepted."""
    text = _AUTH_HEADER.sub(r"\1[redacted]", text)
    text = _BEARER.sub(r"\1[redacted]", text)
    for secret in sorted(_secrets(), key=len, reverse=True):
        text = text.replace(secret, "[redacted]")
    return text


class RedactingFilter(logging.Filter):
    """Removes bearer tokens and Authorization values from a record's message, traceback and stack."""

    def filter(self, record: logging.LogRecord) -> bool:
        message = record.getMessage()
        cleaned = redact(message)
        if cleaned != message:
            record.msg, record.args = cleaned, ()
        if record.exc_info and not record.exc_text:
            record.exc_text = logging.Formatter().formatException(record.exc_info)
        if record.exc_text:
            record.exc_text = redact(record.exc_text)
        if record.stack_info:
            record.stack_info = redact(record.stack_info)
        return True


def _install_redaction() -> None:
    for name in ("coolmargin", "werkzeug", "gunicorn.error", "gunicorn.access"):
        logger = logging.getLogger(name)
        if not any(isinstance(f, RedactingFilter) for f in logger.filters):
            logger.addFilter(RedactingFilter())


# ---- request hooks ------------------------------------------------------------------------------
def _allowed_origin(origin: str | None, allowed: frozenset[str]) -> bool:
    return bool(origin) and ("*" in allowed or origin in allowed)


def can_write() -> bool:
    """May this request change the catalogue? (Always, with authentication off.)"""
    return g.get("token_write", True)


def author() -> str:
    """The name recorded with a change: the token's name, or ``anonymous`` with authentication off."""
    return g.get("token_name", "anonymous")


def _authenticate():
    tokens, digests = current_app.extensions["coolmargin.security"]["tokens"].in_force()
    if not digests or request.method == "OPTIONS" or request.path in OPEN_PATHS:
        return None
    scheme, _, supplied = request.headers.get("Authorization", "").partition(" ")
    supplied = supplied.strip()
    if scheme.lower() != "bearer" or not supplied:
        log.warning("request refused: no token (%s %s)", request.method, request.path,
                    extra={"request_id": g.get("request_id", "-")})
        return problem(401, "This service requires a bearer token: send 'Authorization: Bearer <token>'.",
                       headers={"WWW-Authenticate": REALM})
    index = token_index(supplied, digests)
    if index is None:
        log.warning("request refused: token not recognised (%s %s)", request.method, request.path,
                    extra={"request_id": g.get("request_id", "-")})
        return problem(401, "The bearer token was not recognised.",
                       headers={"WWW-Authenticate": REALM + ', error="invalid_token"'})
    token = tokens[index]
    g.token_name, g.token_write = token.name, token.write
    return None


def _preflight():
    """Answer a CORS preflight from an allowed origin for an existing route; others fall through."""
    if request.method != "OPTIONS" or "Access-Control-Request-Method" not in request.headers:
        return None
    origins = current_app.extensions["coolmargin.security"]["origins"]
    if not _allowed_origin(request.headers.get("Origin"), origins) or request.routing_exception is not None:
        return None  # Flask's own OPTIONS (or 404) without CORS headers: the browser blocks the call
    response = current_app.response_class(status=204)
    response.headers["Access-Control-Allow-Methods"] = CORS_METHODS
    response.headers["Access-Control-Allow-Headers"] = CORS_HEADERS
    response.headers["Access-Control-Max-Age"] = CORS_MAX_AGE
    return response


def _headers(response):
    origins = current_app.extensions["coolmargin.security"]["origins"]
    origin = request.headers.get("Origin")
    if origins:
        response.vary.add("Origin")
    if _allowed_origin(origin, origins):
        response.headers["Access-Control-Allow-Origin"] = origin
        response.headers["Access-Control-Expose-Headers"] = "X-Request-ID, ETag, Location"
    response.headers.setdefault("X-Content-Type-Options", "nosniff")
    response.headers.setdefault("X-Frame-Options", "DENY")
    response.headers.setdefault("Referrer-Policy", "no-referrer")
    response.headers.setdefault("Content-Security-Policy", CSP)
    if request.path.startswith("/v1/") or response.status_code == 401:
        response.headers["Cache-Control"] = "no-store"
    return response


def register(app: Flask) -> None:
    """Read the settings (failing at start-up on unusable ones) and install the hooks.

    Call after the request-id hook is registered, so refusals carry the request id.
    """
    tokens = AcceptedTokens(app.config.get("AUTH_TOKENS", ""), app.config.get("AUTH_TOKENS_FILE", ""))
    _LIVE_TOKENS[app] = tokens
    _install_redaction()
    app.extensions["coolmargin.security"] = {
        "tokens": tokens,
        "origins": frozenset(_split(app.config.get("CORS_ORIGINS", ""))),
    }
    app.before_request(_preflight)
    app.before_request(_authenticate)
    app.after_request(_headers)
    log.info("authentication %s; %d CORS origin(s) allowed",
             "required" if tokens.digests() else "off (no token configured)",
             len(app.extensions["coolmargin.security"]["origins"]))
