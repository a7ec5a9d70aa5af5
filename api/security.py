"""Optional bearer-token authentication, a CORS allow-list, security headers and log redaction.

Configured by AUTH_TOKENS (comma-separated), AUTH_TOKENS_FILE (one token a line, '#' comments) and
CORS_ORIGINS (comma-separated exact origins, or "*"). With no token configured the service is open.
The token file is watched: each process re-reads it within TOKEN_RECHECK seconds of a change (its
modification time, inode or size), so tokens rotate without a restart; a changed file that cannot be
used (unreadable, empty, a token with whitespace) is refused with an error in the log, and the tokens
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

from flask import Flask, current_app, g, request

from .errors import problem

log = logging.getLogger("coolmargin")

OPEN_PATHS = frozenset({"/", "/health", "/ready", "/docs", "/openapi.yaml"})
CORS_METHODS = "GET, POST"
CORS_HEADERS = "Content-Type, Authorization, X-Request-ID"
CORS_MAX_AGE = "600"  # s a browser may cache a preflight answer
REALM = 'Bearer realm="coolmargin"'
# /docs uses one inline <style> block and nothing else: no scripts, no external resources.
CSP = ("default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; "
       "base-uri 'none'; form-action 'none'; frame-ancestors 'none'")


class ConfigurationError(RuntimeError):
    """Security settings that cannot be honoured; raised at start-up so the service never runs open by mistake."""


def _split(raw: str) -> list[str]:
    return [item.strip() for item in (raw or "").split(",") if item.strip()]


def load_tokens(inline: str, path: str) -> list[str]:
    """Tokens from the comma-separated setting and the file (one a line, '#' starts a comment)."""
    tokens = _split(inline)
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
        tokens.extend(from_file)
    for token in tokens:
        if any(ch.isspace() for ch in token) or not token.isprintable():
            raise ConfigurationError("an auth token contains whitespace or control characters")
    return tokens


#: Seconds between two looks at the token file's modification time, per process.
TOKEN_RECHECK = 1.0


class AcceptedTokens:
    """The digests of the tokens in force: the inline ones and the file's, re-read when the file changes."""

    def __init__(self, inline: str, path: str):
        self.inline, self.path = inline, path
        self._lock = threading.Lock()
        self._next_check = 0.0
        self._stamp = self._file_stamp()
        tokens = load_tokens(inline, path)  # at start-up an unusable file stops the service
        _SECRETS.update(tokens)
        self._digests = [_digest(token) for token in tokens]

    def _file_stamp(self):
        try:
            status = os.stat(self.path)
        except OSError:
            return None
        return status.st_mtime_ns, status.st_ino, status.st_size

    def digests(self) -> list[bytes]:
        if self.path and time.monotonic() >= self._next_check:
            with self._lock:
                if time.monotonic() >= self._next_check:
                    self._next_check = time.monotonic() + TOKEN_RECHECK
                    self._reload_if_changed()
        return self._digests

    def _reload_if_changed(self) -> None:
        stamp = self._file_stamp()
        if stamp == self._stamp:
            return
        self._stamp = stamp
        try:
            tokens = load_tokens(self.inline, self.path)
        except ConfigurationError as exc:
            log.error("the token file changed but cannot be used (%s); the tokens in force stay", exc)
            return
        _SECRETS.update(tokens)
        self._digests = [_digest(token) for token in tokens]
        log.warning("token file re-read: %d token(s) now accepted", len(tokens))


def accepted_digests() -> list[bytes]:
    """Digests of the tokens this process accepts now (empty: authentication is off)."""
    return current_app.extensions["coolmargin.security"]["tokens"].digests()


def _digest(token: str) -> bytes:
    # Comparing fixed-length digests keeps the comparison time independent of the tokens' lengths.
    return hashlib.sha256(token.encode("utf-8", "surrogateescape")).digest()


def token_matches(supplied: str, digests: list[bytes]) -> bool:
    """Constant-time check against every configured token, with no early exit."""
    candidate = _digest(supplied)
    matched = False
    for digest in digests:
        matched |= hmac.compare_digest(candidate, digest)
    return matched


# ---- log redaction ------------------------------------------------------------------------------
_SECRETS: set[str] = set()  # every token configured in this process, for redaction
_BEARER = re.compile(r"(?i)\b(bearer\s+)[^\s\"',;]+")
_AUTH_HEADER = re.compile(r"(?i)(authorization[\"']?\s*[:=]\s*[\"']?)[^\"'\r\n]+")


def redact(text: str) -> str:
    text = _AUTH_HEADER.sub(r"\1[redacted]", text)
    text = _BEARER.sub(r"\1[redacted]", text)
    for secret in sorted(_SECRETS, key=len, reverse=True):
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


def _authenticate():
    digests = accepted_digests()
    if not digests or request.method == "OPTIONS" or request.path in OPEN_PATHS:
        return None
    scheme, _, supplied = request.headers.get("Authorization", "").partition(" ")
    supplied = supplied.strip()
    if scheme.lower() != "bearer" or not supplied:
        log.warning("request refused: no token (%s %s)", request.method, request.path,
                    extra={"request_id": g.get("request_id", "-")})
        return problem(401, "This service requires a bearer token: send 'Authorization: Bearer <token>'.",
                       headers={"WWW-Authenticate": REALM})
    if not token_matches(supplied, digests):
        log.warning("request refused: token not recognised (%s %s)", request.method, request.path,
                    extra={"request_id": g.get("request_id", "-")})
        return problem(401, "The bearer token was not recognised.",
                       headers={"WWW-Authenticate": REALM + ', error="invalid_token"'})
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
        response.headers["Access-Control-Expose-Headers"] = "X-Request-ID"
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
