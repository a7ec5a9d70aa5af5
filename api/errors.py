"""One problem+json envelope (RFC 9457) for every error the service returns."""
from __future__ import annotations

import logging

from flask import Flask, Response, g, json
from marshmallow import ValidationError
from werkzeug.exceptions import HTTPException

from calc.deadline import OutOfTime
from calc.validity import CalculationError, InputError
from schemas.base import error_list

log = logging.getLogger("coolmargin")
PROBLEM_TYPE = "about:blank"


class ProblemError(Exception):
    """An error raised by the API layer itself with a status and optional field list."""

    def __init__(self, status: int, detail: str, errors: list[dict] | None = None, title: str | None = None):
        super().__init__(detail)
        self.status, self.detail, self.errors, self.title = status, detail, errors or [], title


TITLES = {
    400: "Malformed request", 401: "Authentication required", 404: "Not found",
    405: "Method not allowed", 406: "Not acceptable", 413: "Request too large",
    415: "Unsupported media type", 422: "Invalid input", 429: "Too many requests",
    500: "Internal error", 503: "Not ready",
}
OUT_OF_TIME = ("the calculation did not finish within the request's time budget "
               "(COOLMARGIN_REQUEST_BUDGET); retry later, or split the work into smaller requests")


def problem_body(status: int, detail: str, errors: list[dict] | None = None, title: str | None = None) -> dict:
    body = {
        "type": PROBLEM_TYPE,
        "title": title or TITLES.get(status, "Error"),
        "status": status,
        "detail": detail,
        "errors": errors or [],
    }
    request_id = g.get("request_id") if g else None
    if request_id:
        body["instance"] = f"urn:request:{request_id}"
    return body


def problem(status: int, detail: str, errors: list[dict] | None = None, title: str | None = None,
            headers: dict | None = None) -> Response:
    body = problem_body(status, detail, errors, title)
    response = Response(json.dumps(body), status=status, mimetype="application/problem+json")
    for key, value in (headers or {}).items():
        response.headers[key] = value
    return response


def problem_for(exc: Exception) -> tuple[int, str, list[dict], str | None]:
    """Map an exception to (status, detail, errors, title); shared by requests and batch cases."""
    if isinstance(exc, ValidationError):
        errors = error_list(exc.messages)
        return 422, "; ".join(f"{e['field']}: {e['message']}" for e in errors[:5]), errors, None
    if isinstance(exc, InputError):
        return 422, f"{exc.field}: {exc.message}", [{"field": exc.field, "message": exc.message}], None
    if isinstance(exc, CalculationError):
        return 422, str(exc), [], "Calculation did not converge"
    if isinstance(exc, ProblemError):
        return exc.status, exc.detail, exc.errors, exc.title
    if isinstance(exc, OutOfTime):
        return 503, OUT_OF_TIME, [], "Time budget used up"
    if isinstance(exc, HTTPException):
        return exc.code or 500, exc.description or exc.name, [], None
    return 500, "The server could not complete the calculation; the error was logged with the request id.", [], None


def register(app: Flask) -> None:
    @app.errorhandler(Exception)
    def _any(exc: Exception):
        if isinstance(exc, HTTPException) and exc.response is not None:
            return exc.response  # already a full answer (the rate limiter's 429 problem)
        status, detail, errors, title = problem_for(exc)
        if status >= 500:
            log.exception("internal error", extra={"request_id": g.get("request_id", "-")})
        headers = {}
        if isinstance(exc, HTTPException) and status == 405 and exc.valid_methods:
            headers["Allow"] = ", ".join(exc.valid_methods)
        if isinstance(exc, OutOfTime):
            log.info("request stopped: %s", exc, extra={"request_id": g.get("request_id", "-")})
        if status == 503:
            from .runtime import retry_after

            headers["Retry-After"] = retry_after()
        return problem(status, detail, errors, title, headers)
