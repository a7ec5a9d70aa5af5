"""The plant catalogue over HTTP: ``/v1/vessels``, ``/v1/utilities`` and ``/v1/steps``.

Each record keeps every revision. POST creates (201, ``Location``, ``ETag``); PUT replaces and PATCH
merges (RFC 7396) and both need ``If-Match`` with the current ETag (missing: 428, stale: 412; RFC 9110
§13.1.1 strong comparison); DELETE retires the record and keeps its history. With tokens configured,
changes need a token whose role is ``write``.
"""
from __future__ import annotations

import json
import logging
from typing import Any

from flask import Blueprint, Flask, Response, current_app, request
from marshmallow import ValidationError

from schemas.base import clean, unit_map
from schemas.records import IF_MATCH_MAX_LENGTH, RECORD_SCHEMAS, RecordListSchema, RecordQuerySchema, RecordSchema

from . import bulk, security
from .errors import ProblemError
from .http import request_object, requested_format, to_csv
from .references import MAX_REVISION
from .storage import Catalogue, RevisionView, Stale, Unavailable

log = logging.getLogger("coolmargin")
bp = Blueprint("records", __name__, url_prefix="/v1")
COLLECTIONS = {"vessel": "vessels", "utility": "utilities", "step": "steps"}
_UNITS = {kind: {f"content.{k}": v for k, v in unit_map(schema()).items()} for kind, schema in RECORD_SCHEMAS.items()}
_QUERY = RecordQuerySchema()


def attach(app: Flask) -> None:
    """Open the catalogue named by DATABASE_URL and migrate it; a database that is down is retried on use."""
    catalogue = Catalogue(app.config.get("DATABASE_URL") or None)
    app.extensions["coolmargin.catalogue"] = catalogue
    if app.config.get("MIGRATE_ON_START", 1):
        try:
            catalogue.upgrade()
        except Unavailable as exc:
            log.warning("catalogue not migrated at start-up: %s; record routes answer 503 until it is", exc)


def store() -> Catalogue:
    catalogue: Catalogue = current_app.extensions["coolmargin.catalogue"]
    if not catalogue.migrated:
        catalogue.upgrade()
    return catalogue


def require_write() -> None:
    if not security.can_write():
        raise ProblemError(403, f"the token {security.author()!r} may read but not change the catalogue; "
                                "use a token whose role is write")


def view(revision: RevisionView) -> dict:
    return {"id": revision.record_id, "kind": revision.kind, "tag": revision.tag, "revision": revision.number,
            "current_revision": revision.current, "retired": revision.retired, "author": revision.author,
            "created_at": revision.created_at.isoformat(), "etag": revision.etag, "content": revision.body}


def location(revision: RevisionView) -> str:
    return f"/v1/{COLLECTIONS[revision.kind]}/{revision.record_id}"


def _answer(revision: RevisionView, status: int = 200) -> Response:
    body = clean(view(revision)) | {"units": _UNITS[revision.kind]}
    response = Response(json.dumps(body, allow_nan=False), status=status, mimetype="application/json")
    if revision.number == revision.current:
        response.headers["ETag"] = revision.etag
    if status == 201:
        response.headers["Location"] = location(revision)
    return response


def validated(kind: str, content: Any) -> tuple[dict, dict]:
    """Check a record's content with the calculation schemas; return it as sent and its index fields."""
    return content, bulk.check_content(store(), kind, content)


def _if_match(current: RevisionView) -> int:
    """The revision number the change is based on, from If-Match (428 when missing, 412 when stale)."""
    header = request.headers.get("If-Match")
    if header is not None and len(header) > IF_MATCH_MAX_LENGTH:
        raise ProblemError(422, f"If-Match is longer than {IF_MATCH_MAX_LENGTH} characters; send the ETag of the "
                                f"revision you changed (the current one is {current.etag})",
                           [{"field": "If-Match", "message": f"at most {IF_MATCH_MAX_LENGTH} characters"}])
    if header is None:
        raise ProblemError(428, f"send If-Match with the ETag of the revision you changed "
                                f"(the current one is {current.etag})",
                           [{"field": "If-Match", "message": "required for PUT and PATCH"}])
    if request.if_match.star_tag:
        return current.number
    if request.if_match.contains(current.etag.strip('"')):  # strong comparison: W/ tags never match
        return current.number
    raise Stale(f"{current.kind} {current.tag!r} is at revision {current.number} ({current.etag}); "
                "read it again and apply your change to it", current)


def _merge_patch(target: Any, patch: Any) -> Any:
    """JSON Merge Patch (RFC 7396 §2): objects merge member by member, null removes, the rest replaces."""
    if not isinstance(patch, dict):
        return patch
    result = dict(target) if isinstance(target, dict) else {}
    for key, value in patch.items():
        if value is None:
            result.pop(key, None)
        else:
            result[key] = _merge_patch(result.get(key), value)
    return result


def _create(kind: str):
    require_write()
    content, index = validated(kind, request_object())
    revision = store().create(kind, content["tag"], content, index, security.author())
    return _answer(revision, 201)


def _list(kind: str):
    query = _QUERY.load({k: v for k, v in request.args.items() if k != "format"})
    if kind != "vessel":
        for name in ("material", "jacket_type", "volume_min", "volume_max"):
            if query[name] is not None:
                raise ValidationError({name: [f"filters vessels only, not {COLLECTIONS[kind]}"]})
    items, total = store().list(kind, **query)
    return _listing(kind, items, total, query["limit"], query["offset"], ("tag", "id", "revision"))


def _listing(kind: str, items: list[RevisionView], total: int, limit: int, offset: int, lead: tuple) -> Response:
    """Revisions as ``{"items", "total", "limit", "offset", "units"}``, or CSV one row per revision."""
    payload = {"items": [view(item) for item in items], "total": total, "limit": limit, "offset": offset}
    if requested_format() == "csv":
        return Response(to_csv(payload["items"], _UNITS[kind], lead=lead), mimetype="text/csv")
    payload = clean(RecordListSchema().dump(payload)) | {"units": {f"items.{k}": v for k, v in _UNITS[kind].items()}}
    return Response(json.dumps(payload, allow_nan=False), mimetype="application/json")


def _read(kind: str, key: str):
    return _answer(store().get(kind, key))


def _change(kind: str, key: str, new_content) -> Response:
    """A new revision with the content ``new_content(current content)`` gives, based on the If-Match revision."""
    require_write()
    catalogue = store()
    current = catalogue.get(kind, key)
    # the content is checked first: an invalid body is a 422 whatever its precondition says
    content, index = validated(kind, new_content(current.body))
    expected = _if_match(current)
    revision = catalogue.revise(kind, current.record_id, expected, security.author(), tag=content["tag"],
                                body=content, index=index)
    return _answer(revision)


def _replace(kind: str, key: str):
    return _change(kind, key, lambda current: request_object())


def _update(kind: str, key: str):
    return _change(kind, key, lambda current: _merge_patch(current, request_object()))


def _retire(kind: str, key: str):
    require_write()
    catalogue = store()
    current = catalogue.get(kind, key)
    expected = _if_match(current) if "If-Match" in request.headers else None
    return _answer(catalogue.revise(kind, current.record_id, expected, security.author(), retire=True))


@bp.post("/vessels/import")
def import_vessels():
    """A vessel list from a spreadsheet (CSV, see api/bulk.py); ``replace=true`` revises existing tags."""
    require_write()
    if request.mimetype != "text/csv":
        raise ProblemError(415, f"send the vessel list as text/csv, not {request.mimetype or 'no content type'}")
    replace = request.args.get("replace", "false")
    if replace not in ("true", "false"):
        raise ValidationError({"replace": ["must be true or false"]})
    try:
        text = request.get_data(as_text=False).decode("utf-8")
    except UnicodeDecodeError:
        raise ProblemError(400, "the CSV is not UTF-8 text") from None
    summary = bulk.import_vessels(store(), bulk.vessels_from_csv(text), security.author(), replace == "true")
    status = 201 if summary["created"] or summary["revised"] else 200
    return Response(json.dumps(summary), status=status, mimetype="application/json")


def _revisions(kind: str, key: str):
    history = store().history(kind, key)
    return _listing(kind, history, len(history), len(history), 0, ("revision", "author", "created_at"))


def _revision(kind: str, key: str, number: int):
    if number > MAX_REVISION:  # no such revision, and more than a database integer holds
        raise ProblemError(404, f"{kind} {key!r} has no revision {number}")
    return _answer(store().get(kind, key, number))


def _route(kind: str, suffix: str, handler, methods: list[str]) -> None:
    collection = COLLECTIONS[kind]
    endpoint = f"{collection}_{handler.__name__.strip('_')}"
    bp.add_url_rule(f"/{collection}{suffix}", endpoint, lambda **kw: handler(kind, **kw), methods=methods)


for _kind in COLLECTIONS:
    _route(_kind, "", _create, ["POST"])
    _route(_kind, "", _list, ["GET"])
    _route(_kind, "/<key>", _read, ["GET"])
    _route(_kind, "/<key>", _replace, ["PUT"])
    _route(_kind, "/<key>", _update, ["PATCH"])
    _route(_kind, "/<key>", _retire, ["DELETE"])
    _route(_kind, "/<key>/revisions", _revisions, ["GET"])
    _route(_kind, "/<key>/revisions/<int:number>", _revision, ["GET"])

__all__ = ["RecordSchema", "attach", "bp", "store", "validated", "view"]
