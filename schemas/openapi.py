"""JSON Schema (OpenAPI 3.1 dialect) of the marshmallow schemas, so openapi.yaml and the code agree.

``python -m schemas.openapi`` prints the components block; tests compare it with openapi.yaml.
"""
from __future__ import annotations

import json
import sys
from pathlib import Path

import yaml
from marshmallow import Schema, fields, validate

from .units import MAX_EXPONENT, MAX_NESTING, MAX_TEXT, QUANTITY_PATTERN, Quantity


def quantity_schema(unit: str, minimum: float, maximum: float, exclusive_minimum: bool, reason: str) -> dict:
    """A request quantity: a number in ``unit`` within its bounds, or text "number unit" (checked by the server)."""
    number: dict = {"type": "number", "exclusiveMinimum" if exclusive_minimum else "minimum": minimum,
                    "maximum": maximum}
    shown = f"{minimum:g}" if not exclusive_minimum else f"above {minimum:g}"
    return {"anyOf": [number, {"$ref": "#/components/schemas/QuantityText"}], "x-unit": unit,
            "x-range": f"{shown} to {maximum:g} {unit}".rstrip() + f" ({reason})"}


def _field(field: fields.Field, refs: dict[str, type], response: bool = False) -> dict:
    metadata = field.metadata or {}
    if isinstance(field, Quantity) and not response:
        out: dict = quantity_schema(metadata["unit"], field.minimum, field.maximum, field.exclusive_minimum,
                                    metadata["bounds_reason"])
    elif isinstance(field, Quantity) or field.__class__.__name__ == "Flow" and response:
        out = {"type": "number", "x-unit": metadata["unit"]}
    elif field.__class__.__name__ == "Flow":
        out = quantity_schema(metadata["unit"], field.minimum, field.maximum, False, metadata["bounds_reason"])
    elif isinstance(field, fields.Nested):
        nested = field.nested if isinstance(field.nested, type) else type(field.schema)
        name = nested.__name__.removesuffix("Schema")
        refs[name] = nested
        out = {"$ref": f"#/components/schemas/{name}"}
    elif isinstance(field, fields.List):
        out = {"type": "array", "items": _field(field.inner, refs, response)}
    elif isinstance(field, fields.Dict):
        out = {"type": "object",
               "additionalProperties": _field(field.value_field, refs, response) if field.value_field else {}}
    elif isinstance(field, fields.Boolean):
        out = {"type": "boolean"}
    elif isinstance(field, fields.Integer):
        out = {"type": "integer"}
    elif isinstance(field, (fields.Float, fields.Number)):
        out = {"type": "number"}
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


def json_schema(schema_cls: type[Schema], refs: dict[str, type] | None = None, *, response: bool = False) -> dict:
    """The JSON Schema of one marshmallow schema class; nested classes are collected in ``refs``."""
    refs = {} if refs is None else refs
    schema = schema_cls()
    properties = {}
    required = []
    for name, field in schema.fields.items():
        key = field.data_key or name
        properties[key] = _field(field, refs, response)
        if field.required:
            required.append(key)
    out: dict = {"type": "object", "properties": properties}
    if not response:
        out["additionalProperties"] = False
    if required:
        out["required"] = required
    return out


def components(request_roots: list[type], response_roots: list[type]) -> dict:
    """Every schema reachable from the roots, keyed by class name without 'Schema'."""
    done: dict[str, dict] = {}
    for roots, response in ((request_roots, False), (response_roots, True)):
        pending = {cls.__name__.removesuffix("Schema"): cls for cls in roots}
        while pending:
            name, cls = pending.popitem()
            if name in done:
                continue
            refs: dict[str, type] = {}
            done[name] = json_schema(cls, refs, response=response)
            pending.update({k: v for k, v in refs.items() if k not in done})
    for cls in response_roots:
        done[_name(cls)]["properties"]["units"] = {"$ref": "#/components/schemas/Units"}
    from . import registry

    for calc in registry.CALCULATIONS:
        if calc.batch:
            done[f"{_name(calc.request)}Batch"] = {
                "type": "object", "additionalProperties": False, "required": ["cases"],
                "description": "Several independent cases in one call; each gets its result or its own problem.",
                "properties": {"cases": {"type": "array", "minItems": 1,
                                         "items": {"$ref": f"#/components/schemas/{_name(calc.request)}"}}}}
    if any(calc.batch for calc in registry.CALCULATIONS):
        done["BatchResult"] = {"type": "object", "required": ["cases"], "properties": {
            "cases": {"type": "array", "items": {"type": "object", "required": ["status"], "properties": {
                "status": {"type": "integer"}, "result": {"type": "object"},
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
        if calc.batch:
            body_schema = {"anyOf": [body_schema, {"$ref": f"#/components/schemas/{_name(calc.request)}Batch"}]}
            ok["content"]["application/json"]["schema"] = {"anyOf": [
                ok["content"]["application/json"]["schema"], {"$ref": "#/components/schemas/BatchResult"}]}
        body_media: dict = {"schema": body_schema}
        if calc.example is not None:
            body_media["examples"] = {"demo": {"summary": "the demo scenario (examples/)",
                                               "value": json.loads((EXAMPLES / calc.example).read_text())}}
        out[calc.path] = {
            "get": common | {"operationId": "get" + operation_id,
                             "parameters": params + required_query(calc.request) + [_QUERY_OBJECT],
                             "responses": with_common_problems({"200": _ok(calc.response, calc.media),
                                                                "401": _PROBLEM, "422": _PROBLEM})},
            "post": common | {"operationId": "post" + operation_id, "parameters": params,
                              "requestBody": {"required": True, "content": {"application/json": body_media}},
                              "responses": with_common_problems({"200": ok, "400": _PROBLEM, "401": _PROBLEM,
                                                                 "413": _PROBLEM, "415": _PROBLEM,
                                                                 "422": _PROBLEM})},
        }
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
