"""Log records as JSON lines, like the access log: one object a line, a traceback as one field.

Used by the service's own logger ("coolmargin") and by gunicorn's error log (api/gunicorn_settings.py),
so every line a server writes can be read by the same log shipper. Each record carries the request id
when it was logged while serving a request.
"""
from __future__ import annotations

import json
import logging
from datetime import datetime, timezone

from flask import g


def _request_id(record: logging.LogRecord) -> str | None:
    given = getattr(record, "request_id", None)
    if given and given != "-":
        return given
    try:
        return g.get("request_id") if g else None
    except RuntimeError:  # outside a request
        return None


class RequestIdFilter(logging.Filter):
    """Stamps ``request_id`` on every record of the logger it guards, so any handler (and a test's) sees it."""

    def filter(self, record: logging.LogRecord) -> bool:
        record.request_id = _request_id(record) or "-"
        return True


class JsonFormatter(logging.Formatter):
    """``{"time", "level", "logger", "process", "request_id", "message"[, "traceback"][, "stack"]}``."""

    def format(self, record: logging.LogRecord) -> str:
        entry = {
            "time": datetime.fromtimestamp(record.created, timezone.utc).isoformat(timespec="milliseconds"),
            "level": record.levelname,
            "logger": record.name,
            "process": record.process,
            "request_id": _request_id(record),
            "message": record.getMessage(),
        }
        if record.exc_info and not record.exc_text:
            record.exc_text = self.formatException(record.exc_info)
        if record.exc_text:
            entry["traceback"] = record.exc_text
        if record.stack_info:
            entry["stack"] = record.stack_info
        return json.dumps(entry, ensure_ascii=False, default=str)
