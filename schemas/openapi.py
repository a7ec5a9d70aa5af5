"""JSON Schema (OpenAPI 3.1 dialect) of the marshmallow schemas, so openapi.yaml and the code agree.

``python -m schemas.openapi`` prints the components block; tests compare it with openapi.yaml.
"""
from __future__ import annotations

import json
import sys
from pathlib import Path

import yaml
from marshmallow import Schema, fields, validate

from .records import IF_MATCH_MAX_LENGTH
from .units import MAX_EXPONENT, MAX_NESTING, MAX_TEXT, QUANTITY_PATTERN, Quantity


_RECORD_REF = {"$ref": "#/components/schemas/RecordRef"}


def quantity_schema(unit: str, minimum: float, maximum: float, exclusive_minimum: bool, reason: str) -> dict:
    """A request quantity: a number in ``unit`` within its bounds, or text "number unit" (checked by the server)."""
    number: dict = {"type": "number", "exclusiveMinimum" if exclusive_minimum else "minimum": minimum,
                    "maximum": maximum}
    shown = f"{minimum:g}" if not exclusive_minimum else f"above {minimum:g}"
    return {"anyOf": [number, {"$ref": "#/components/schemas/QuantityText"}], "x-unit": unit,
            "x-range": f"{shown} to {maximum:g} {unit}".rstrip() + f" ({reason})"}


def _field(field: fields.Field, refs: dict[str, type], response: bool = False, referable: bool = False) -> dict:
    """JSON Schema of one field; with ``referable``, a vessel or coolant may also be a stored record's ref."""
    metadata = field.metadata or {}
    if isinstance(field, Quantity) and not response:
        out: dict = quantity_schema(metadata["unit"], field.minimum, field.maximum, field.exclusive_minimum,
                                    metadata["bounds_reason"])
    elif isinstance(field, Quantity) or field.__class__.__name__ == "Flow" and response:
        out = {"type": "number", "x-unit": metadata["unit"]}
    elif field.__class__.__name__ == "Flow":
        out = quantity_schema(metadata["unit"], field.minimum, field.maximum, False, metadata["bounds_reason"])
    elif field.__class__.__name__ == "VesselSelection":
        from .screening import MAX_LISTED_VESSELS, VesselFilterSchema

        refs["VesselFilter"] = VesselFilterSchema
        out = {"anyOf": [{"type": "array", "minItems": 1, "maxItems": MAX_LISTED_VESSELS,
                          "items": {"type": "string", "minLength": 1, "maxLength": 64}},
                         {"$ref": "#/components/schemas/VesselFilter"}]}
    elif isinstance(field, fields.Nested):
        nested = field.nested if isinstance(field.nested, type) else type(field.schema)
        name = nested.__name__.removesuffix("Schema")
        refs[name] = nested
        out = {"$ref": f"#/components/schemas/{name}"}
        if referable and getattr(nested, "record_kind", None):
            out = {"anyOf": [out, _RECORD_REF]}
    elif isinstance(field, fields.List):
        out = {"type": "array", "items": _field(field.inner, refs, response, referable)}
    elif isinstance(field, fields.Dict):
        out = {"type": "object",
               "additionalProperties": _field(field.value_field, refs, response) if field.value_field else {}}
    elif isinstance(field, fields.Boolean):
        out = {"type": "boolean"}
    elif isinstance(field, fields.Integer):
        out = {"type": "integer"}
    elif isinstance(field, (fields.Float, fields.Number)):
        out = {"type": "number"}
    elif type(field) is fields.Raw:  # any JSON value
        out = {}
    else:
        out = {"type": "string"}
    for validator in getattr(field, "validators", []):
        if isinstance(validator, validate.OneOf):
            out["enum"] = list(validator.choices)
        elif isinstance(validator, validate.Range) and "type" in out:
            if validator.min is not None:
                out["exclusiveMinimum" if not validator.min_inclusive else "minimum"] = validator.min
            if validator.max is not None:
                out["exclusiveMaximum" if not validator.max_inclusive else "maximum"] = validator.max
        elif isinstance(validator, validate.Length):
            key = "maxItems" if out.get("type") == "array" else "maxLength"
            if validator.max is not None:
                out[key] = validator.max
    if field.allow_none and "$ref" not in out and "type" in out:
        out["type"] = [out["type"], "null"]
    elif field.allow_none:
        out = {"oneOf": [out, {"type": "null"}]}
    description = metadata.get("description") or ""
    if "x-range" in out:
        description = (description + "; " if description else "") + "range " + out.pop("x-range")
    if description:
        out["description"] = description
    return out


def json_schema(schema_cls: type[Schema], refs: dict[str, type] | None = None, *, response: bool = False,
                root: bool = False) -> dict:
    """The JSON Schema of one marshmallow schema class; nested classes are collected in ``refs``.

    A calculation request (``root``) may name a stored step, and its vessel and coolant objects may be
    stored records' refs: the members those supply are then not required (see api/references.py).
    """
    from .records import STEP_SUPPLIES

    refs = {} if refs is None else refs
    schema = schema_cls()
    referable = not response and getattr(schema_cls, "accepts_refs", True)
    properties = {}
    required = []
    for name, field in schema.fields.items():
        key = field.data_key or name
        properties[key] = _field(field, refs, response, referable)
        if field.required:
            required.append(key)
    out: dict = {"type": "object", "properties": properties}
    if not response:
        out["additionalProperties"] = False
    if referable and "vessel" in properties and "coolant" in required:
        required.remove("coolant")
        properties["coolant"]["description"] = ("required unless `vessel` names a stored vessel with a utility, "
                                                "whose coolant is then used")
    supplied = [key for key in required if key in STEP_SUPPLIES]
    if referable and root and set(properties) & STEP_SUPPLIES:
        properties["step"] = dict(_RECORD_REF, description="a stored process step: supplies the members of this "
                                  "request it describes; members given beside it override it")
        if supplied:
            required = [key for key in required if key not in supplied]
            # "these members, or a step that supplies them", as a condition rather than a top-level anyOf:
            # a top-level anyOf makes client generators give up on the body's type (it reads as a union)
            out["if"] = {"not": {"required": ["step"]}}
            out["then"] = {"required": supplied}
    if required:
        out["required"] = required
    return out


def components(request_roots: list[type], response_roots: list[type]) -> dict:
    """Every schema reachable from the roots, keyed by class name without 'Schema'."""
    from .records import RecordRefSchema

    done: dict[str, dict] = {}
    for roots, response in ((request_roots, False), (response_roots, True)):
        root_names = {cls.__name__.removesuffix("Schema") for cls in roots}
        pending = {cls.__name__.removesuffix("Schema"): cls for cls in roots}
        while pending:
            name, cls = pending.popitem()
            if name in done:
                continue
            refs: dict[str, type] = {}
            done[name] = json_schema(cls, refs, response=response, root=name in root_names and not response)
            pending.update({k: v for k, v in refs.items() if k not in done})
    done["RecordRef"] = json_schema(RecordRefSchema)
    listed = {"type": "array", "items": {"$ref": "#/components/schemas/Reference"}}
    done["ImportSummary"] = {"type": "object", "description": "what an import did, record by record",
                             "properties": {name: listed for name in ("created", "revised", "unchanged", "existing")}}
    for cls in response_roots:
        done[_name(cls)]["properties"]["units"] = {"$ref": "#/components/schemas/Units"}
    from . import registry
    from .records import ReferenceSchema

    done["Reference"] = json_schema(ReferenceSchema, response=True)
    for calc in registry.CALCULATIONS:
        done[_name(calc.response)]["properties"]["records"] = {
            "type": "array", "items": {"$ref": "#/components/schemas/Reference"},
            "description": "the stored records (and revisions) the request named, present when it named any"}

    for calc in registry.CALCULATIONS:
        if calc.batch:
            done[f"{_name(calc.request)}Batch"] = {
                "type": "object", "additionalProperties": False, "required": ["cases"],
                "description": "Several independent cases in one call; each gets its result or its own problem.",
                "properties": {"cases": {"type": "array", "minItems": 1,
                                         "items": {"$ref": f"#/components/schemas/{_name(calc.request)}"}}}}
            done[f"{_name(calc.response)}Batch"] = {
                "type": "object", "required": ["cases"],
                "description": "One entry per case, in order: its HTTP status and its result, or its own problem.",
                "properties": {
                    "cases": {"type": "array", "items": {"type": "object", "required": ["status"], "properties": {
                        "status": {"type": "integer", "description": "200, or the status of the case's problem"},
                        "result": {"$ref": f"#/components/schemas/{_name(calc.response)}"},
                        "problem": {"$ref": "#/components/schemas/Problem"}}}},
                    "units": {"$ref": "#/components/schemas/Units"}}}
    done["QuantityText"] = {
        "type": "string", "maxLength": MAX_TEXT, "pattern": QUANTITY_PATTERN,
        "description": "A number and a unit, ASCII only, e.g. '150 rpm', '25 degC', '20 m^3/h', 'W/(m^2*K)'. Unit "
                       f"exponents are single (no chained ** or ^), at most {MAX_EXPONENT} in magnitude; parentheses "
                       f"nest at most {MAX_NESTING} deep. The server converts and checks the field's range."}
    return dict(sorted(done.items()))


def roots() -> tuple[list[type], list[type]]:
    from . import registry

    return registry.REQUEST_SCHEMAS, registry.RESPONSE_SCHEMAS


_PROBLEM = {"$ref": "#/components/responses/Problem"}
# Query parameters that shape an answer (hand-written under components/parameters).
PRESENTATION_PARAMETERS = ("format", "field", "output_units", "digits", "decimal")
#: Answers any operation can give besides its own: too large (body, batch or scale list), URI too long,
#: rate limited, internal error, over its time budget or not ready.
COMMON_PROBLEMS = ("413", "414", "429", "500", "503")


def with_common_problems(responses: dict) -> dict:
    """``responses`` plus the problem answers every operation can give."""
    return responses | {status: _PROBLEM for status in COMMON_PROBLEMS if status not in responses}


def required_query(schema_cls: type[Schema], prefix: str = "") -> list[dict]:
    """The GET form's required dotted parameters: every required field reached through required objects."""
    out: list[dict] = []
    for name, field in schema_cls().fields.items():
        if not field.required:
            continue
        path = f"{prefix}.{name}" if prefix else name
        if isinstance(field, fields.Nested) and not field.many:
            nested = field.nested if isinstance(field.nested, type) else type(field.schema)
            out.extend(required_query(nested, path))
        elif isinstance(field, (fields.Nested, fields.List, fields.Dict)):
            continue  # lists and maps have no fixed dotted names
        else:
            schema = _field(field, {})
            description = schema.pop("description", "")
            if "anyOf" in schema:  # a query value is always text
                schema = {"$ref": "#/components/schemas/QuantityText", "x-unit": schema["x-unit"]}
            out.append({"name": path, "in": "query", "required": True, "schema": schema,
                        "description": description or f"required field {path}"})
    return out
EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
_QUERY_OBJECT = {
    "name": "query", "in": "query", "style": "form", "explode": True,
    "description": "The request object's fields as dotted query parameters, e.g. vessel.diameter=2.2",
    "schema": {"type": "object", "additionalProperties": {"type": "string"}},
}


def _name(cls: type) -> str:
    return cls.__name__.removesuffix("Schema")


def _ok(response: type, media: tuple) -> dict:
    content = {"application/json": {"schema": {"$ref": f"#/components/schemas/{_name(response)}"}}}
    for kind in media:
        content[kind] = {"schema": {"type": "string"}}
    return {"description": "The result, with the unit of each quantity in `units`.", "content": content}


BATCH_NOTE = (" Several cases in one call: POST {path}/batch. Deprecated: POST {path} with a body of "
              "{{\"cases\": [...]}} still answers as a batch for one release, with Deprecation and Link headers "
              "naming {path}/batch.")


def paths() -> dict:
    """Path items of every calculation and library resource in the registry."""
    from . import registry

    out: dict = {}
    for calc in registry.CALCULATIONS:
        operation_id = "".join(part.capitalize() for part in calc.path.split("/")[-1].split("-"))
        common = {"tags": [calc.tag], "summary": calc.summary, "description": calc.description}
        params = [{"$ref": f"#/components/parameters/{name}"} for name in PRESENTATION_PARAMETERS]
        body_schema: dict = {"$ref": f"#/components/schemas/{_name(calc.request)}"}
        ok = _ok(calc.response, calc.media)
        if calc.batch:  # a typed batch of its own; the {"cases": [...]} body here is deprecated
            common["description"] += BATCH_NOTE.format(path=calc.path)
            out[f"{calc.path}/batch"] = {"post": {
                "tags": [calc.tag], "summary": f"A batch of independent cases: {calc.summary[0].lower()}"
                                              f"{calc.summary[1:]}",
                "description": "Each case is answered on its own: its result, or its own problem (its fields named "
                               "cases[i].field); one bad case fails no other. JSON, CSV a row per case, or "
                               "field= one value per line.",
                "operationId": "post" + operation_id + "Batch",
                "parameters": [{"$ref": f"#/components/parameters/{name}"} for name in PRESENTATION_PARAMETERS],
                "requestBody": {"required": True, "content": {"application/json": {
                    "schema": {"$ref": f"#/components/schemas/{_name(calc.request)}Batch"}}}},
                "responses": with_common_problems({"200": {
                    "description": "Each case's result or problem, in order.", "content": {
                        "application/json": {"schema": {"$ref": f"#/components/schemas/{_name(calc.response)}Batch"}},
                        "text/csv": {"schema": {"type": "string"}}, "text/plain": {"schema": {"type": "string"}}}},
                    "400": _PROBLEM, "401": _PROBLEM, "415": _PROBLEM, "422": _PROBLEM})}}
        body_media: dict = {"schema": body_schema}
        if calc.example is not None:
            body_media["examples"] = {"demo": {"summary": "the demo scenario (examples/)",
                                               "value": json.loads((EXAMPLES / calc.example).read_text())}}
        body_content = {"application/json": body_media}
        if calc.csv_upload:
            body_content["text/csv"] = {"schema": {"type": "string", "description": (
                "the series as CSV: a header naming each column and its unit in brackets, other fields as "
                "query parameters")}}
        out[calc.path] = {
            "get": common | {"operationId": "get" + operation_id,
                             "parameters": params + required_query(calc.request) + [_QUERY_OBJECT],
                             "responses": with_common_problems({"200": _ok(calc.response, calc.media),
                                                                "401": _PROBLEM, "422": _PROBLEM})},
            "post": common | {"operationId": "post" + operation_id, "parameters": params,
                              "requestBody": {"required": True, "content": body_content},
                              "responses": with_common_problems({"200": ok, "400": _PROBLEM, "401": _PROBLEM,
                                                                 "413": _PROBLEM, "415": _PROBLEM,
                                                                 "422": _PROBLEM})},
        }
    for path, item in {**record_paths(), **screening_paths()}.items():
        out[path] = {method: dict(operation, responses=with_common_problems(operation["responses"]))
                     for method, operation in item.items()}
    for library in registry.LIBRARIES:
        item = {"$ref": f"#/components/schemas/{_name(library.item)}"}
        out[library.path] = {"get": {
            "tags": [library.tag], "summary": library.summary,
            "operationId": "list" + library.path.split("/")[-1].capitalize(),
            "parameters": [{"$ref": f"#/components/parameters/{name}"} for name in PRESENTATION_PARAMETERS
                           if name != "field"],
            "responses": {"200": {"description": "Library entries; the id is what requests use.", "content": {
                "application/json": {"schema": {"type": "object", "required": ["items"], "properties": {
                    "items": {"type": "array", "items": item}, "units": {"$ref": "#/components/schemas/Units"}}}},
                "text/csv": {"schema": {"type": "string"}}}},
                "401": _PROBLEM, "422": _PROBLEM} | {s: _PROBLEM for s in COMMON_PROBLEMS}}}
    return out


_RECORD_PROBLEMS = {"401": _PROBLEM, "404": _PROBLEM, "422": _PROBLEM, "503": _PROBLEM}
_KEY = {"name": "key", "in": "path", "required": True, "description": "the record's id, or the tag of a live record "
        "(of the latest retired one when none is live)", "schema": {"type": "string", "minLength": 1, "maxLength": 64}}
_IF_MATCH = {"name": "If-Match", "in": "header", "required": True,
             "description": "ETag of the revision the change is based on (RFC 9110 §13.1.1); missing: 428, "
                            "stale: 412 with the current ETag",
             "schema": {"type": "string", "maxLength": IF_MATCH_MAX_LENGTH}}
_ETAG = {"ETag": {"description": "entity tag of the record's current revision", "schema": {"type": "string"}}}


def _record_ok(description: str, status_headers: dict | None = None) -> dict:
    out = {"description": description,
           "content": {"application/json": {"schema": {"$ref": "#/components/schemas/Record"}}}}
    if status_headers:
        out["headers"] = status_headers
    return out


def _list_ok(description: str) -> dict:
    return {"description": description, "content": {
        "application/json": {"schema": {"$ref": "#/components/schemas/RecordList"}},
        "text/csv": {"schema": {"type": "string"}}}}


def _query_parameters(schema_cls: type[Schema], names: list[str]) -> list[dict]:
    refs: dict[str, type] = {}
    schema = schema_cls()
    out = []
    for name in names:
        field = schema.fields[name]
        item = _field(field, refs)
        description = item.pop("description", "")
        if "$ref" in item:  # a quantity: text with a unit, or a number in the default unit
            item = {"type": "string", "maxLength": 80, "x-unit": item["x-unit"]}
        out.append({"name": name, "in": "query", "description": description, "schema": item})
    return out


def record_paths() -> dict:
    """Path items of the catalogue collections: the records, their revisions, and the changes to them."""
    from . import registry
    from .records import RecordQuerySchema

    plant = json.loads((EXAMPLES / "plant.json").read_text())
    out: dict = {}
    for collection in registry.COLLECTIONS:
        plural = collection.path.split("/")[-1]
        name = plural.capitalize()
        single = collection.kind.capitalize()
        content = {"$ref": f"#/components/schemas/{_name(collection.content)}"}
        example = next(item["content"] for item in plant["records"] if item["kind"] == collection.kind)
        body = {"required": True, "content": {"application/json": {
            "schema": content, "examples": {"demo": {"summary": "from the demo plant (examples/plant.json)",
                                                     "value": example}}}}}
        filters = ["tag", "retired", "limit", "offset"]
        if collection.vessel_filters:
            filters[1:1] = ["material", "jacket_type", "volume_min", "volume_max"]
        tags = ["catalogue"]
        key = dict(_KEY, example=example["tag"])  # the demo plant's record: fuzzing starts from a real one
        out[collection.path] = {
            "get": {"tags": tags, "summary": f"List {plural}: {collection.summary}", "operationId": f"list{name}",
                    "parameters": [{"$ref": "#/components/parameters/format"}] + _query_parameters(RecordQuerySchema,
                                                                                                filters),
                    "responses": {"200": _list_ok(f"Current revisions of the live {plural} matching every filter, "
                                                  "ordered by tag."), "401": _PROBLEM, "422": _PROBLEM,
                                  "503": _PROBLEM}},
            "post": {"tags": tags, "summary": f"Create a {collection.kind} record (revision 1)",
                     "description": "The content is validated by the same schemas as the calculations. A token "
                                    "with the write role is needed when tokens are configured.",
                     "operationId": f"create{single}", "requestBody": body,
                     "responses": {"201": _record_ok("Created; Location names the record, ETag its revision.",
                                                     {**_ETAG, "Location": {"description": "the record's URL",
                                                                            "schema": {"type": "string"}}}),
                                   "400": _PROBLEM, "401": _PROBLEM, "403": _PROBLEM, "409": _PROBLEM,
                                   "413": _PROBLEM, "415": _PROBLEM, "422": _PROBLEM, "503": _PROBLEM}},
        }
        item_path = f"{collection.path}/{{key}}"
        change = {"400": _PROBLEM, "401": _PROBLEM, "403": _PROBLEM, "404": _PROBLEM, "409": _PROBLEM,
                  "412": _PROBLEM, "413": _PROBLEM, "415": _PROBLEM, "422": _PROBLEM, "428": _PROBLEM,
                  "503": _PROBLEM}
        out[item_path] = {
            "get": {"tags": tags, "summary": f"The current revision of a {collection.kind}",
                    "operationId": f"read{single}", "parameters": [key],
                    "responses": {"200": _record_ok("The current revision, with its ETag.", _ETAG),
                                  **_RECORD_PROBLEMS}},
            "put": {"tags": tags, "summary": f"Replace a {collection.kind}'s content (a new revision)",
                    "operationId": f"replace{single}", "parameters": [key, dict(_IF_MATCH, example="*")],
                    "requestBody": body,
                    "responses": {"200": _record_ok("The new revision.", _ETAG), **change}},
            "patch": {"tags": tags, "summary": f"Change part of a {collection.kind} (JSON Merge Patch, RFC 7396; "
                                               "a new revision)",
                      "operationId": f"update{single}", "parameters": [key, dict(_IF_MATCH, example="*")],
                      "requestBody": {"required": True, "content": {
                          "application/merge-patch+json": {"schema": {"type": "object"}},
                          "application/json": {"schema": {"type": "object"}}}},
                      "responses": {"200": _record_ok("The new revision.", _ETAG), **change}},
            "delete": {"tags": tags, "summary": f"Retire a {collection.kind}: a last revision marks it retired; "
                                                "its history stays readable",
                       "operationId": f"retire{single}",
                       "parameters": [key, dict(_IF_MATCH, required=False,
                                                 description="optional; when sent, a stale ETag is refused with 412")],
                       "responses": {"200": _record_ok("The retiring revision."), **change}},
        }
        if collection.kind == "vessel":
            out[f"{collection.path}/import"] = {"post": {
                "tags": tags, "summary": "Import a vessel list from a spreadsheet (CSV)",
                "description": "One vessel a row; columns named by their dotted path in a vessel record (tag, "
                               "utility, notes, diameter, wall.thickness, agitator.speed, coils[0].turns, ...); "
                               "units in the header (`diameter [m]`) or in a unit row under it (tag cell empty or "
                               "`units`); a cell with its own unit keeps it. Every row is validated first: one bad "
                               "cell refuses the file, naming row and field. Existing tags are left alone unless "
                               "replace=true, which revises those whose content differs.",
                "operationId": "importVessels",
                "parameters": [{"name": "replace", "in": "query", "schema": {"type": "string",
                                                                             "enum": ["true", "false"]}}],
                "requestBody": {"required": True, "content": {"text/csv": {"schema": {"type": "string"}}}},
                "responses": {
                    "201": {"description": "Some vessels created or revised.", "content": {"application/json": {
                        "schema": {"$ref": "#/components/schemas/ImportSummary"}}}},
                    "200": {"description": "Nothing needed writing.", "content": {"application/json": {
                        "schema": {"$ref": "#/components/schemas/ImportSummary"}}}},
                    "400": _PROBLEM, "401": _PROBLEM, "403": _PROBLEM, "409": _PROBLEM, "413": _PROBLEM,
                    "415": _PROBLEM, "422": _PROBLEM, "503": _PROBLEM}}}
        out[f"{item_path}/revisions"] = {"get": {
            "tags": tags, "summary": f"Every revision of a {collection.kind}, oldest first, with author and time",
            "operationId": f"history{single}", "parameters": [{"$ref": "#/components/parameters/format"}, key],
            "responses": {"200": _list_ok("All revisions."), **_RECORD_PROBLEMS}}}
        out[f"{item_path}/revisions/{{number}}"] = {"get": {
            "tags": tags, "summary": f"One revision of a {collection.kind}", "operationId": f"revision{single}",
            "parameters": [key, {"name": "number", "in": "path", "required": True, "example": 1,
                                 "schema": {"type": "integer", "minimum": 1}}],
            "responses": {"200": _record_ok("That revision as it was written."), **_RECORD_PROBLEMS}}}
    return out


def screening_paths() -> dict:
    """Path items of /v1/screenings (create, list, read, re-run)."""
    ok = {"description": "The ranked screening: a row per vessel; CSV one row per vessel; SVG/PNG the margins "
                         "with the safety-factor line; HTML/PDF a printable report (ranked table, records and "
                         "revisions used, chart, cautions, request hash).",
          "content": {"application/json": {"schema": {"$ref": "#/components/schemas/ScreeningResult"}},
                      "text/csv": {"schema": {"type": "string"}}, "image/svg+xml": {"schema": {"type": "string"}},
                      "image/png": {"schema": {"type": "string"}}, "text/html": {"schema": {"type": "string"}},
                      "application/pdf": {"schema": {"type": "string"}}}}
    created = dict(ok, description="Screened and stored; Location names the stored screening. " + ok["description"],
                   headers={"Location": {"description": "the stored screening", "schema": {"type": "string"}}})
    accepted = {"description": "Accepted as a job (only with a job queue, COOLMARGIN_QUEUE_URL): the selection holds "
                               "more vessels than COOLMARGIN_SCREENING_SYNC_VESSELS, the client sent Prefer: "
                               "respond-async, or the request's budget ran out. The body is the screening's state "
                               "(status queued, progress done/total); read Location until the status is complete, "
                               "partial or failed.",
                "headers": {"Location": {"description": "the screening resource; it answers the finished screening "
                                                        "once the job is done", "schema": {"type": "string"}},
                            "Retry-After": {"description": "seconds before reading it again",
                                            "schema": {"type": "integer"}},
                            "Preference-Applied": {"description": "respond-async when the Prefer header asked for it "
                                                                  "(RFC 7240)", "schema": {"type": "string"}}},
                "content": {"application/json": {"schema": {"$ref": "#/components/schemas/ScreeningResult"}}}}
    prefer = {"name": "Prefer", "in": "header", "required": False,
              "description": "respond-async (RFC 7240): run the screening as a job and answer 202 at once; ignored "
                             "without a job queue (the answer then carries the warning no_job_queue)",
              "schema": {"type": "string", "maxLength": 200}}
    problems = {"400": _PROBLEM, "401": _PROBLEM, "404": _PROBLEM, "413": _PROBLEM, "415": _PROBLEM,
                "422": _PROBLEM, "503": _PROBLEM}
    screening_id = {"name": "screening_id", "in": "path", "required": True,
                    "schema": {"type": "string", "minLength": 1, "maxLength": 64}}
    description = ("One process step (stored, {\"ref\": ...}, or inline) against many stored vessels (all live "
                   "vessels, a filter, or a list of ids or tags), each with its own utility unless a coolant is "
                   "given. Rows are ranked: adequate first, then by margin. Each row gives margin, verdict, "
                   "minimum dosing time, warmest coolant inlet, controlling resistance and warnings, or why there "
                   "is no verdict (the charge does not fit). The screening is stored with the revisions it used; "
                   "`changes` says what differs from the previous run of the same request. With a job queue "
                   "(COOLMARGIN_QUEUE_URL, `coolmargin worker`) a large screening, one sent with Prefer: "
                   "respond-async, or one that ran out of the request's budget runs as a job: 202 with Location "
                   "of the screening, whose status goes queued -> running (progress done/total) -> complete, "
                   "partial or failed. Without a queue, past the computing budget the remaining rows are 'not "
                   "evaluated' and the status is partial. A screening "
                   "estimate: confirm with reaction calorimetry and plant data; local codes and a licensed "
                   "engineer's review govern.")
    plant = json.loads((EXAMPLES / "plant.json").read_text())
    step = next(item["content"]["tag"] for item in plant["records"] if item["kind"] == "step")
    return {
        "/v1/screenings": {
            "post": {"tags": ["screening"], "summary": "Which vessels can run this step, and at what dosing time?",
                     "description": description, "operationId": "createScreening",
                     "parameters": [{"$ref": "#/components/parameters/format"}, prefer],
                     "requestBody": {"required": True, "content": {"application/json": {
                         "schema": {"$ref": "#/components/schemas/ScreeningRequest"},
                         "examples": {"demo": {"summary": "the demo plant's step against every vessel",
                                               "value": {"step": {"ref": step}}}}}}},
                     "responses": {"201": created, "202": accepted, **problems}},
            "get": {"tags": ["screening"], "summary": "Stored screenings, newest first", "operationId": "listScreenings",
                    "parameters": [{"name": "limit", "in": "query", "schema": {"type": "integer", "minimum": 1,
                                                                                "maximum": 500}},
                                   {"name": "offset", "in": "query", "schema": {"type": "integer", "minimum": 0}}],
                    "responses": {"200": {"description": "Summaries.", "content": {"application/json": {
                        "schema": {"$ref": "#/components/schemas/ScreeningList"}}}},
                        "401": _PROBLEM, "422": _PROBLEM, "503": _PROBLEM}},
        },
        "/v1/screenings/{screening_id}": {"get": {
            "tags": ["screening"], "summary": "A stored screening, as it was answered, or a job's state",
            "description": "A finished screening (status complete or partial) in any format. A job not yet "
                           "finished answers its state as JSON: status queued or running with progress "
                           "{done, total} and Retry-After, or failed with `failure` (a job the queue lost, a "
                           "worker stopped mid-way, is failed too); asked for CSV or a chart it is a 409.",
            "operationId": "readScreening",
            "parameters": [{"$ref": "#/components/parameters/format"}, screening_id],
            "responses": {"200": ok, "401": _PROBLEM, "404": _PROBLEM, "409": _PROBLEM, "422": _PROBLEM,
                          "503": _PROBLEM}}},
        "/v1/screenings/{screening_id}/rerun": {"post": {
            "tags": ["screening"], "summary": "Run a stored screening's request again on the current revisions",
            "description": "A new stored screening; its `changes` list what differs from the previous run. Like a "
                           "new screening it may run as a job (202).",
            "operationId": "rerunScreening",
            "parameters": [{"$ref": "#/components/parameters/format"}, prefer, screening_id],
            "responses": {"201": created, "202": accepted, **problems}}},
    }


class _PlainDumper(yaml.SafeDumper):
    """Writes repeated parts in full instead of as YAML anchors, so the file reads (and merges) as plain text."""

    def ignore_aliases(self, data) -> bool:
        return True


def write(path: str) -> None:
    """Replace the generated component schemas in the OpenAPI document at ``path``."""
    with open(path, encoding="utf-8") as handle:
        document = yaml.safe_load(handle)
    requests, responses = roots()
    document["components"]["schemas"].update(components(requests, responses))
    document["paths"].update(paths())
    for item in document["paths"].values():  # hand-written operations get the common answers too
        for method, operation in item.items():
            if method in {"get", "post", "put", "patch", "delete"}:
                operation["responses"] = with_common_problems(operation.get("responses", {}))
    with open(path, "w", encoding="utf-8") as handle:
        yaml.dump(document, handle, Dumper=_PlainDumper, sort_keys=False, width=110, allow_unicode=True)


if __name__ == "__main__":  # pragma: no cover
    write(sys.argv[1] if len(sys.argv) > 1 else "openapi.yaml")
