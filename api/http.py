"""Request parsing and response negotiation shared by every calculation resource.

POST takes a JSON object; GET takes the same object flattened to dotted query parameters.
Responses are JSON (with ``units``) by default, CSV with ``?format=csv`` or ``Accept: text/csv``,
a single value as text/plain with ``?field=a.b``, and a chart where the resource draws one.
Every format follows the presentation the query asks for: ``output_units`` (si, metric, us) and
``unit.<field>`` overrides, ``digits`` (significant figures) and ``decimal=comma`` (CSV with ``;``).
"""
from __future__ import annotations

import csv
import io
import json
import math
import re
from dataclasses import dataclass, field as dataclass_field
from typing import Any, Callable

from flask import Response, current_app, g, request
from marshmallow import Schema, ValidationError

from calc.validity import finite_or_input_error
from schemas import output_units
from schemas.base import clean, kind_map, numeric_leaves, unflatten, unit_map

from calc.deadline import OutOfTime

from .errors import ProblemError
from .references import records_used, resolve
from .runtime import deadline

RESERVED_PARAMETERS = {"format", "field", "output_units", "digits", "decimal"}
FORMATS = {"json": "application/json", "csv": "text/csv", "svg": "image/svg+xml", "png": "image/png",
           "html": "text/html", "pdf": "application/pdf"}
_UNIT_CACHE: dict[type, dict[str, str]] = {}
_KIND_CACHE: dict[type, dict[str, str]] = {}
TEXT_DIGITS = 12  # significant figures of numbers written as text: no float noise (24.99999999999909 -> 25)
MAX_DIGITS = 15


def reserved(name: str) -> bool:
    """Query parameters that shape the answer rather than feed the calculation."""
    return name in RESERVED_PARAMETERS or name.startswith(output_units.OVERRIDE_PREFIX)


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
        params = {k: v for k, v in request.args.items() if not reserved(k)}
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


def units_of(schema: Schema) -> dict[str, str]:
    key = type(schema)
    if key not in _UNIT_CACHE:
        _UNIT_CACHE[key] = unit_map(schema)
    return _UNIT_CACHE[key]


def kinds_of(schema: Schema) -> dict[str, str]:
    key = type(schema)
    if key not in _KIND_CACHE:
        _KIND_CACHE[key] = kind_map(schema)
    return _KIND_CACHE[key]


@dataclass(frozen=True)
class Presentation:
    """How the numbers of an answer are written: units, significant figures, decimal mark."""

    conversions: dict = dataclass_field(default_factory=dict)
    digits: int | None = None
    decimal_comma: bool = False

    def convert(self, payload: Any, units: dict[str, str]) -> tuple[Any, dict[str, str]]:
        payload = output_units.apply(payload, self.conversions)
        if self.digits is not None:
            payload = _rounded(payload, self.digits)
        return payload, output_units.units_after(units, self.conversions)

    def text(self, value: float) -> str:
        """A number as text: rounded to the significant figures asked for (12 by default)."""
        written = f"{value:.{self.digits or TEXT_DIGITS}g}"
        return written.replace(".", ",") if self.decimal_comma else written


def _rounded(value: Any, digits: int) -> Any:
    if isinstance(value, float):
        return float(f"{value:.{digits}g}") if math.isfinite(value) else value
    if isinstance(value, dict):
        return {k: _rounded(v, digits) for k, v in value.items()}
    if isinstance(value, list):
        return [_rounded(v, digits) for v in value]
    return value


def presentation(schema: Schema) -> Presentation:
    """The presentation the query asks for; a bad option is a 422 naming the parameter."""
    args = request.args
    overrides = {k[len(output_units.OVERRIDE_PREFIX):]: v for k, v in args.items()
                 if k.startswith(output_units.OVERRIDE_PREFIX)}
    conversions = output_units.plan(kinds_of(schema), args.get("output_units"), overrides)
    digits = args.get("digits")
    if digits is not None:
        if not digits.isdigit() or not 1 <= int(digits) <= MAX_DIGITS:
            raise ProblemError(422, f"digits must be a whole number from 1 to {MAX_DIGITS}",
                               [{"field": "digits", "message": f"must be a whole number from 1 to {MAX_DIGITS}"}])
    decimal = args.get("decimal", "point")
    if decimal not in ("point", "comma"):
        raise ProblemError(422, "decimal must be point or comma",
                           [{"field": "decimal", "message": "must be one of point, comma"}])
    return Presentation(conversions, None if digits is None else int(digits), decimal == "comma")


def requested_format() -> str:
    fmt = request.args.get("format")
    if fmt is not None:
        if fmt not in FORMATS:
            raise ProblemError(422, f"unknown format {fmt!r}",
                               [{"field": "format", "message": f"must be one of {', '.join(FORMATS)}"}])
        return fmt
    # text/html only when asked with format=html: a browser's Accept header must not turn JSON into a report.
    best = request.accept_mimetypes.best_match(["application/json", "text/csv", "image/svg+xml", "image/png",
                                                "application/pdf"], default="application/json")
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


def to_csv(rows: list[dict], units: dict[str, str], lead: tuple[str, ...] = (),
           view: Presentation | None = None) -> str:
    """CSV with one row per item and the unit of each column in the header: ``density [kg/m^3]``.

    Columns named in ``lead`` (those that say which row is which) come first. With a decimal comma
    the separator is ``;``, as spreadsheets set up for a decimal comma expect.
    """
    view = view or Presentation()
    flat_rows = []
    for row in rows:
        flat: dict = {}
        _flatten(row, "", flat)
        flat_rows.append(flat)
    columns: list[str] = []
    for flat in flat_rows:
        columns.extend(c for c in flat if c not in columns)
    # an object that is null in some rows (``margin_band`` of a row without a verdict) keeps only its own
    # columns (``margin_band.low``), empty in those rows
    columns = [c for c in columns if not (any(other.startswith(c + ".") for other in columns)
                                          and all(flat.get(c) is None for flat in flat_rows))]
    columns = [c for c in lead if c in columns] + [c for c in columns if c not in lead]
    header = []
    for column in columns:
        unit = _unit_for(column, units)
        header.append(f"{column} [{unit}]" if unit else column)
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n", delimiter=";" if view.decimal_comma else ",")
    writer.writerow(header)
    for flat in flat_rows:
        writer.writerow([text_value(flat.get(c), view) for c in columns])
    return buffer.getvalue()


#: A spreadsheet reads a cell starting with one of these as a formula (OWASP, "CSV Injection").
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def text_value(value: Any, view: Presentation) -> str:
    """One value as a spreadsheet reads it: TRUE/FALSE, numbers without float noise, empty for none;
    text that a spreadsheet would run as a formula is neutralised with a leading quote.

    >>> view = Presentation()
    >>> print(text_value("=1+2", view), text_value("@SUM(A1)", view), text_value(-5.0, view), text_value("Puffin", view),
    ...       text_value(True, view))
    '=1+2 '@SUM(A1) -5 Puffin TRUE
    """
    if value is None:
        return ""
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, (int, float)):
        return view.text(float(value)) if math.isfinite(value) else ""
    text = str(value)
    return "'" + text if text.startswith(FORMULA_STARTS) else text


def shaped(result: Any, schema: Schema) -> tuple[Any, dict[str, str], Presentation]:
    """Dump ``result`` with ``schema`` in the units and figures the query asks for: (payload, units, view)."""
    return presented(clean(schema.dump(result)), schema)


def presented(payload: Any, schema: Schema) -> tuple[Any, dict[str, str], Presentation]:
    """An answer already dumped by ``schema`` (in the default API units, e.g. one stored earlier) in the units
    and figures the query asks for: (payload, units, view)."""
    view = presentation(schema)
    payload, units = view.convert(payload, units_of(schema))
    return payload, units, view


Table = Callable[[dict], tuple[list[dict], dict[str, str]]]
Chart = Callable[[dict, str, dict], bytes]
Report = Callable[[dict, dict, dict, Presentation], Any]


def respond(result: Any, schema: Schema, *, rows: str | None = None, lead: tuple[str, ...] = (),
            table: Table | None = None, chart: Chart | None = None, report: Report | None = None,
            status: int = 200) -> Response:
    """Dump ``result`` (a calc result) with ``schema`` and answer in the negotiated format.

    ``rows`` names the list that becomes one CSV row per item (e.g. ``"scales"``), with the ``lead``
    columns first; ``table`` instead turns the dumped payload into CSV rows and their units;
    ``chart`` draws the dumped payload (with its units) as SVG or PNG; ``report`` builds an
    :class:`api.reports.Report` from (request as given, payload, units, presentation).
    """
    return answer(*shaped(result, schema), rows=rows, lead=lead, table=table, chart=chart, report=report,
                  status=status)


def answer(payload: Any, units: dict[str, str], view: Presentation, *, rows: str | None = None,
           lead: tuple[str, ...] = (), table: Table | None = None, chart: Chart | None = None,
           report: Report | None = None, status: int = 200, records: bool = True) -> Response:
    """Answer a presented payload (:func:`shaped`, :func:`presented`) in the negotiated format; see :func:`respond`.

    ``records=False`` keeps the payload's own ``records`` (a stored answer names what it used).
    """
    field = request.args.get("field")
    if field:
        value = pick(payload, field)
        text = json.dumps(value) if isinstance(value, (dict, list)) else text_value(value, view)
        return Response(text + "\n", status=status, mimetype="text/plain")
    fmt = requested_format()
    if fmt == "csv" and table is not None:
        table_rows, table_units = table(payload)
        # the columns follow the requested output units where the result schema declares them
        table_units.update({k.split(".", 1)[1]: v for k, v in units.items()
                            if "." in k and k.split(".", 1)[1] in table_units})
        return Response(to_csv(table_rows, table_units, view=view), status=status, mimetype="text/csv")
    if fmt == "csv":
        items = payload.get(rows, []) if rows else [payload]
        row_units = {k[len(rows) + 1:]: v for k, v in units.items() if rows and k.startswith(rows + ".")} if rows else units
        return Response(to_csv(items, row_units, lead, view), status=status, mimetype="text/csv")
    if fmt in ("svg", "png"):
        if chart is None:
            raise ProblemError(422, "this resource has no chart; use format json or csv",
                               [{"field": "format", "message": "no chart for this resource"}])
        return Response(chart(payload, fmt, units), status=status, mimetype=FORMATS[fmt])
    if fmt in ("html", "pdf"):
        if report is None:
            raise ProblemError(422, "this resource has no report; use format json or csv",
                               [{"field": "format", "message": "no report for this resource"}])
        from . import reports

        document = report(request_object(), payload, units, view)
        return reports.response(document, fmt, request.path.rsplit("/", 1)[-1], status)
    body = dict(payload)
    used = records_used() if records else []
    if used:
        body["records"] = used
    body["units"] = units
    return Response(json.dumps(body, allow_nan=False), status=status, mimetype="application/json")


def list_response(items: list[dict], schema: Schema) -> Response:
    """A library listing: ``{"items": [...]}`` as JSON, or CSV one row per item."""
    view = presentation(schema)
    dumped, units = view.convert(clean(schema.dump(items, many=True)), units_of(schema))
    if requested_format() == "csv":
        return Response(to_csv(dumped, units, view=view), mimetype="text/csv")
    return Response(json.dumps({"items": dumped, "units": units}), mimetype="application/json")


def batch_response(cases: list, schema: Schema, compute: Callable[[Any], Any], result_schema: Schema) -> Response:
    """Answer ``{"cases": [...]}``: each case its result or its own problem; one bad case fails no other."""
    from .errors import log, problem_body, problem_for

    limit = current_app.config["MAX_BATCH_CASES"]
    if not isinstance(cases, list) or not cases:
        raise ProblemError(422, "cases must be a non-empty list", [{"field": "cases", "message": "must be a non-empty list"}])
    if len(cases) > limit:
        raise ProblemError(413, f"at most {limit} cases per call", [{"field": "cases", "message": f"at most {limit} cases"}])
    view = presentation(result_schema)
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
            g.records_used = []
            resolved = resolve(case, schema)
            result, _ = view.convert(clean(result_schema.dump(_run(compute, schema.load(resolved), resolved))), {})
            if g.records_used:
                result["records"] = records_used()
            results.append({"status": 200, "result": result})
        except Exception as exc:  # each case reports its own problem
            status, detail, errors, title = problem_for(exc)
            if status >= 500 and not isinstance(exc, OutOfTime):
                log.exception("batch case %d failed", index, extra={"request_id": g.get("request_id", "-")})
            for error in errors:
                error["field"] = f"cases[{index}].{error['field']}"
            results.append({"status": status, "problem": problem_body(status, detail, errors, title)})
    return _batch_answer(results, view.convert({}, units_of(result_schema))[1], view)


def _batch_answer(results: list[dict], units: dict[str, str], view: Presentation) -> Response:
    """A batch in the negotiated format: JSON, CSV a row per case, or one value per line for ``field``."""
    field = request.args.get("field")
    if field:
        lines = []
        for case in results:
            if case["status"] != 200:
                lines.append(f"error {case['status']}: {case['problem']['detail']}".replace("\n", " "))
                continue
            value = pick(case["result"], field)
            lines.append(json.dumps(value) if isinstance(value, (dict, list)) else text_value(value, view))
        return Response("".join(line + "\n" for line in lines), mimetype="text/plain")
    fmt = requested_format()
    if fmt == "csv":
        rows = [{"case": i, "status": case["status"], **(case.get("result") or {}),
                 **({"problem": case["problem"]["detail"]} if "problem" in case else {})}
                for i, case in enumerate(results)]
        return Response(to_csv(rows, units, ("case", "status", "problem"), view), mimetype="text/csv")
    if fmt != "json":
        raise ProblemError(422, "a batch has no chart; use format json or csv",
                           [{"field": "format", "message": "no chart for a batch"}])
    body = {"cases": results, "units": units}
    return Response(json.dumps(body, allow_nan=False), mimetype="application/json")


def _not_computed(index: int, total: int) -> dict:
    from .errors import OUT_OF_TIME, problem_body

    detail = f"case {index} of {total} was not computed: {OUT_OF_TIME}"
    return {"status": 503, "problem": problem_body(503, detail, [], "Time budget used up")}


#: The ``{"cases": [...]}`` body on a calculation's own path is deprecated since this date (RFC 9745's
#: Deprecation header: ``@`` and seconds since the epoch, 2026-12-03T00:00Z); ``<path>/batch`` replaces it
#: and the old form goes one release after.
BATCH_FORM_DEPRECATED = "@1796256000"


def batch_cases(schema: Schema, compute: Callable[[Any], Any], result_schema: Schema) -> Response:
    """``POST <path>/batch``: ``{"cases": [...]}``, each case its result or its own problem."""
    data = request_object()
    if "cases" not in data:
        raise ProblemError(422, "a batch body holds 'cases': a list of requests",
                           [{"field": "cases", "message": "required"}])
    if set(data) != {"cases"}:
        raise ProblemError(422, "a batch body holds only 'cases'",
                           [{"field": sorted(set(data) - {"cases"})[0], "message": "not allowed beside cases"}])
    return batch_response(data["cases"], schema, compute, result_schema)


def calculate(schema: Schema, compute: Callable[[Any], Any], result_schema: Schema, *, batch: bool = False,
              read: Callable[[], dict] = request_object, own_utility: bool = True,
              **respond_options: Any) -> Response:
    """The whole life of a calculation request: load, compute (calc), dump and negotiate the format.

    Every calculation resource answers through here. ``compute`` takes what ``schema`` loads and
    returns a calc result that ``result_schema`` dumps. With ``batch``, a POST of
    ``{"cases": [...]}`` still answers each case on its own (deprecated: ``<path>/batch`` is the typed
    form); the answer says so in its Deprecation and Link headers. ``read`` gives the request's input object
    (JSON body or query by default; a resource that also takes another body, such as a CSV log,
    passes its own). ``own_utility=False``: a stored vessel's utility does not stand in for a missing
    coolant (:func:`api.references.resolve`; the plant-data fits, whose coolant is the logged run's).
    """
    data = read()
    if batch and request.method == "POST" and "cases" in data:
        response = batch_cases(schema, compute, result_schema)
        response.headers["Deprecation"] = BATCH_FORM_DEPRECATED
        response.headers["Link"] = f'<{request.path.rstrip("/")}/batch>; rel="successor-version"'
        return response
    resolved = resolve(data, schema, own_utility)
    return respond(_run(compute, schema.load(resolved), resolved), result_schema, **respond_options)


def _run(compute: Callable[[Any], Any], args: Any, raw: dict | None = None) -> Any:
    """Compute under calc's numerical guard, which names the request field most likely at fault."""
    return finite_or_input_error(compute, args, numeric_leaves(request_object() if raw is None else raw))


guarded = _run
