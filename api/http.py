"""Request parsing and response negotiation shared by every calculation resource.

POST takes a JSON object; GET takes the same object flattened to dotted query parameters.
Responses are JSON (with ``units``) by default, CSV with ``?format=csv`` or ``Accept: text/csv``,
a single value as text/plain with ``?field=a.b``, and a chart where the resource draws one.
"""
from __future__ import annotations

import csv
import io
import json
import math
import re
from typing import Any, Callable

from flask import Response, current_app, request
from marshmallow import Schema, ValidationError

from calc.validity import finite_or_input_error
from schemas.base import clean, numeric_leaves, unflatten, unit_map

from calc.deadline import OutOfTime

from .errors import ProblemError
from .runtime import deadline

RESERVED_PARAMETERS = {"format", "field"}
FORMATS = {"json": "application/json", "csv": "text/csv", "svg": "image/svg+xml", "png": "image/png"}
_UNIT_CACHE: dict[type, dict[str, str]] = {}


def _reject_constant(name: str):
    raise ValueError(f"{name} is not valid JSON")


def _depth(value: Any, limit: int, level: int = 0) -> int:
    if level > limit:
        return level
    if isinstance(value, dict):
        return max([_depth(v, limit, level + 1) for v in value.values()] or [level + 1])
    if isinstance(value, list):
        return max([_depth(v, limit, level + 1) for v in value] or [level + 1])
    return level


def request_object() -> dict:
    """The request's input object: the JSON body (POST) or the unflattened query (GET)."""
    if request.method == "GET":
        params = {k: v for k, v in request.args.items() if k not in RESERVED_PARAMETERS}
        return unflatten(params)
    mimetype = request.mimetype or ""
    if not (mimetype == "application/json" or mimetype.endswith("+json")):
        raise ProblemError(415, f"send the body as application/json, not {mimetype or 'no content type'}")
    raw = request.get_data(cache=True)
    if not raw.strip():
        raise ProblemError(400, "the request body is empty; send a JSON object")
    try:
        data = json.loads(raw, parse_constant=_reject_constant)
    except (ValueError, RecursionError) as exc:
        raise ProblemError(400, f"the body is not valid JSON: {exc}") from None
    if not isinstance(data, dict):
        raise ProblemError(422, "the body must be a JSON object", [{"field": "(body)", "message": "must be an object"}])
    limit = current_app.config["MAX_NESTING_DEPTH"]
    if _depth(data, limit) > limit:
        raise ProblemError(413, f"the body is nested deeper than {limit} levels")
    return data


def load(schema: Schema) -> dict:
    """Validate and convert the request object with ``schema`` (ValidationError -> 422)."""
    return schema.load(request_object())


def units_of(schema: Schema) -> dict[str, str]:
    key = type(schema)
    if key not in _UNIT_CACHE:
        _UNIT_CACHE[key] = unit_map(schema)
    return _UNIT_CACHE[key]


def requested_format() -> str:
    fmt = request.args.get("format")
    if fmt is not None:
        if fmt not in FORMATS:
            raise ProblemError(422, f"unknown format {fmt!r}",
                               [{"field": "format", "message": f"must be one of {', '.join(FORMATS)}"}])
        return fmt
    best = request.accept_mimetypes.best_match(["application/json", "text/csv", "image/svg+xml", "image/png"],
                                               default="application/json")
    return {v: k for k, v in FORMATS.items()}.get(best, "json")


def pick(payload: Any, path: str) -> Any:
    """The value at dotted ``path`` (``scales[1].margin`` or ``scales.1.margin``) of a response."""
    node = payload
    for segment in path.replace("]", "").replace("[", ".").split("."):
        if segment == "":
            continue
        if isinstance(node, list) and segment.isdigit() and int(segment) < len(node):
            node = node[int(segment)]
        elif isinstance(node, dict) and segment in node:
            node = node[segment]
        else:
            raise ProblemError(422, f"the response has no field {path!r}",
                               [{"field": "field", "message": f"no field {path!r} in this response"}])
    return node


def _flatten(value: Any, prefix: str, row: dict) -> None:
    if isinstance(value, dict):
        for key, item in value.items():
            _flatten(item, f"{prefix}.{key}" if prefix else key, row)
    elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
        if all(set(v) <= {"code", "message"} for v in value):
            row[prefix] = " | ".join(v.get("message", "") for v in value)
        else:
            for i, item in enumerate(value):
                _flatten(item, f"{prefix}[{i}]", row)
    elif isinstance(value, list):
        row[prefix] = " | ".join("" if v is None else str(v) for v in value)
    else:
        row[prefix] = value


def _unit_for(column: str, units: dict[str, str]) -> str | None:
    """The unit of a CSV column; list items (``streams[0].duty``) take their list's unit (``streams.duty``).

    >>> _unit_for("heat_transfer.streams[1].duty", {"heat_transfer.streams.duty": "W"})
    'W'
    >>> _unit_for("concentrations.amine", {"concentrations.*": "mol/m^3"})
    'mol/m^3'
    """
    if column in units:
        return units[column]
    unindexed = re.sub(r"\[\d+\]", "", column)
    if unindexed in units:
        return units[unindexed]
    for key, unit in units.items():
        if key.endswith(".*") and unindexed.startswith(key[:-1]):
            return unit
    return None


def to_csv(rows: list[dict], units: dict[str, str], lead: tuple[str, ...] = ()) -> str:
    """CSV with one row per item and the unit of each column in the header: ``density [kg/m^3]``.

    Columns named in ``lead`` (those that say which row is which) come first.
    """
    flat_rows = []
    for row in rows:
        flat: dict = {}
        _flatten(row, "", flat)
        flat_rows.append(flat)
    columns: list[str] = []
    for flat in flat_rows:
        columns.extend(c for c in flat if c not in columns)
    columns = [c for c in lead if c in columns] + [c for c in columns if c not in lead]
    header = []
    for column in columns:
        unit = _unit_for(column, units)
        header.append(f"{column} [{unit}]" if unit else column)
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(header)
    for flat in flat_rows:
        writer.writerow([_csv_cell(flat.get(c)) for c in columns])
    return buffer.getvalue()


#: A spreadsheet reads a cell starting with one of these as a formula (OWASP, "CSV Injection").
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def _csv_cell(value: Any) -> Any:
    """One CSV cell; text that a spreadsheet would run as a formula is neutralised with a leading quote.

    >>> print(_csv_cell("=1+2"), _csv_cell("@SUM(A1)"), _csv_cell(-5.0), _csv_cell("R-630"))
    '=1+2 '@SUM(A1) -5.0 R-630
    """
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value) if math.isfinite(value) else ""
    if isinstance(value, str) and value.startswith(FORMULA_STARTS):
        return "'" + value
    return value


def respond(result: Any, schema: Schema, *, rows: str | None = None, lead: tuple[str, ...] = (),
            chart: Callable[[dict, str], bytes] | None = None, status: int = 200) -> Response:
    """Dump ``result`` with ``schema`` and answer in the negotiated format.

    ``rows`` names the list that becomes one CSV row per item (e.g. ``"scales"``), with the ``lead``
    columns first; ``chart`` draws the dumped payload as SVG or PNG.
    """
    payload = clean(schema.dump(result))
    units = units_of(schema)
    field = request.args.get("field")
    if field:
        value = pick(payload, field)
        text = json.dumps(value) if isinstance(value, (dict, list)) else _text_value(value)
        return Response(text + "\n", status=status, mimetype="text/plain")
    fmt = requested_format()
    if fmt == "csv":
        items = payload.get(rows, []) if rows else [payload]
        row_units = {k[len(rows) + 1:]: v for k, v in units.items() if rows and k.startswith(rows + ".")} if rows else units
        return Response(to_csv(items, row_units, lead), status=status, mimetype="text/csv")
    if fmt in ("svg", "png"):
        if chart is None:
            raise ProblemError(422, "this resource has no chart; use format json or csv",
                               [{"field": "format", "message": "no chart for this resource"}])
        return Response(chart(payload, fmt), status=status, mimetype=FORMATS[fmt])
    body = dict(payload)
    body["units"] = units
    return Response(json.dumps(body, allow_nan=False), status=status, mimetype="application/json")


def list_response(items: list[dict], schema: Schema) -> Response:
    """A library listing: ``{"items": [...]}`` as JSON, or CSV one row per item."""
    dumped = clean(schema.dump(items, many=True))
    if requested_format() == "csv":
        return Response(to_csv(dumped, units_of(schema)), mimetype="text/csv")
    return Response(json.dumps({"items": dumped, "units": units_of(schema)}), mimetype="application/json")


def batch_response(cases: list, schema: Schema, compute: Callable[[dict], dict], result_schema: Schema) -> Response:
    """Answer ``{"cases": [...]}``: each case its result or its own problem; one bad case fails no other."""
    from .errors import log, problem_body, problem_for

    limit = current_app.config["MAX_BATCH_CASES"]
    if not isinstance(cases, list) or not cases:
        raise ProblemError(422, "cases must be a non-empty list", [{"field": "cases", "message": "must be a non-empty list"}])
    if len(cases) > limit:
        raise ProblemError(413, f"at most {limit} cases per call", [{"field": "cases", "message": f"at most {limit} cases"}])
    clock = deadline()
    results = []
    for index, case in enumerate(cases):
        if clock.expired():  # what is done stays done; the rest is answered as not computed
            log.info("request stopped after %d of %d cases: %s", index, len(cases), OutOfTime(clock.gone()))
            results.extend(_not_computed(i, len(cases)) for i in range(index, len(cases)))
            break
        try:
            if not isinstance(case, dict):
                raise ValidationError(["must be an object"])
            results.append({"status": 200, "result": clean(result_schema.dump(_run(compute, schema.load(case), case)))})
        except Exception as exc:  # each case reports its own problem
            status, detail, errors, title = problem_for(exc)
            if status >= 500 and not isinstance(exc, OutOfTime):
                log.exception("batch case %d failed", index)  # the request id rides on the log record
            for error in errors:
                error["field"] = f"cases[{index}].{error['field']}"
            results.append({"status": status, "problem": problem_body(status, detail, errors, title)})
    return _batch_answer(results, units_of(result_schema))


def _batch_answer(results: list[dict], units: dict[str, str]) -> Response:
    """A batch in the negotiated format: JSON, CSV a row per case, or one value per line for ``field``."""
    field = request.args.get("field")
    if field:
        lines = []
        for case in results:
            if case["status"] != 200:
                lines.append(f"error {case['status']}: {case['problem']['detail']}".replace("\n", " "))
                continue
            value = pick(case["result"], field)
            lines.append(json.dumps(value) if isinstance(value, (dict, list)) else _text_value(value))
        return Response("".join(line + "\n" for line in lines), mimetype="text/plain")
    fmt = requested_format()
    if fmt == "csv":
        rows = [{"case": i, "status": case["status"], **(case.get("result") or {}),
                 **({"problem": case["problem"]["detail"]} if "problem" in case else {})}
                for i, case in enumerate(results)]
        return Response(to_csv(rows, units, ("case", "status", "problem")), mimetype="text/csv")
    if fmt != "json":
        raise ProblemError(422, "a batch has no chart; use format json or csv",
                           [{"field": "format", "message": "no chart for a batch"}])
    body = {"cases": results, "units": units}
    return Response(json.dumps(body, allow_nan=False), mimetype="application/json")


def _text_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    return "" if value is None else str(value)


def _not_computed(index: int, total: int) -> dict:
    from .errors import OUT_OF_TIME, problem_body

    detail = f"case {index} of {total} was not computed: {OUT_OF_TIME}"
    return {"status": 503, "problem": problem_body(503, detail, [], "Time budget used up")}


def calculate(schema: Schema, compute: Callable[[dict], dict], result_schema: Schema, **respond_options) -> Response:
    """The whole life of a calculation request: single object or batch of cases, then the response."""
    data = request_object()
    if request.method == "POST" and "cases" in data:
        if set(data) != {"cases"}:
            raise ProblemError(422, "a batch body holds only 'cases'",
                               [{"field": sorted(set(data) - {"cases"})[0], "message": "not allowed beside cases"}])
        return batch_response(data["cases"], schema, compute, result_schema)
    return respond(_run(compute, schema.load(data), data), result_schema, **respond_options)


def _run(compute: Callable[[Any], Any], args: Any, raw: dict | None = None) -> Any:
    """Compute under calc's numerical guard, which names the request field most likely at fault."""
    return finite_or_input_error(compute, args, numeric_leaves(request_object() if raw is None else raw))


guarded = _run
