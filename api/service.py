"""Service endpoints: liveness, readiness, the OpenAPI contract and its HTML reference."""
from __future__ import annotations

from functools import lru_cache

import yaml
import json

from flask import Blueprint, Response, current_app, jsonify, redirect, render_template

from calc import properties

from . import VERSION
from .errors import problem
from .runtime import SERVING

bp = Blueprint("service", __name__)


@lru_cache(maxsize=4)
def _spec_text(path: str) -> str:
    with open(path, encoding="utf-8") as handle:
        return handle.read()


def spec_text() -> str:
    return _spec_text(current_app.config["OPENAPI_PATH"])


@lru_cache(maxsize=4)
def _spec(path: str) -> dict:
    return yaml.safe_load(_spec_text(path))


def spec() -> dict:
    return _spec(current_app.config["OPENAPI_PATH"])


@bp.get("/health")
def health():
    return jsonify(status="ok", version=VERSION)


@bp.get("/ready")
def ready():
    """Ready to take a calculation now: not draining, a worker thread free, the contract and properties load.

    Each worker process answers for itself (the kernel hands a probe to one of them).
    """
    if SERVING.draining.is_set():
        return problem(503, "not ready: draining after a stop signal; send new requests elsewhere")
    if SERVING.saturated():
        return problem(503, f"not ready: all {SERVING.threads} worker threads of this process are busy",
                       headers={"Retry-After": "1"})
    try:
        spec()
        properties.liquid_properties("water", 293.15)
    except Exception as exc:  # readiness reports, it never raises
        return problem(503, f"not ready: {type(exc).__name__}")
    return jsonify(status="ready", version=VERSION)


@bp.get("/openapi.yaml")
def openapi():
    return Response(spec_text(), mimetype="application/yaml")


def _resolve(node, document: dict):
    """Follow a local ``$ref``; keywords beside it (``x-unit``, ``description``) override the target's."""
    if isinstance(node, dict) and "$ref" in node:
        target = document
        for part in node["$ref"].lstrip("#/").split("/"):
            target = target[part]
        return {**target, **{key: value for key, value in node.items() if key != "$ref"}}
    return node


def _rows(schema, document: dict, prefix: str = "", depth: int = 0) -> list[dict]:
    """Flatten a JSON schema into table rows: dotted name, type, unit, description."""
    schema = _resolve(schema or {}, document)
    rows: list[dict] = []
    if depth > 6:
        return rows
    for variant in schema.get("oneOf", []) + schema.get("anyOf", []):
        rows.extend(_rows(variant, document, prefix, depth + 1))
    required = set(schema.get("required", []))
    for name, sub in (schema.get("properties") or {}).items():
        sub = _resolve(sub, document)
        path = f"{prefix}.{name}" if prefix else name
        kind = sub.get("type", "object" if "properties" in sub else "")
        # An optional quantity is oneOf [quantity, null]: its unit sits on the quantity variant.
        variants = [_resolve(v, document) for v in sub.get("oneOf", []) + sub.get("anyOf", [])]
        unit = sub.get("x-unit") or next((v["x-unit"] for v in variants if "x-unit" in v), "")
        nullable = any(v.get("type") == "null" for v in variants)
        if unit and (not kind or (nullable and len(variants) == 2)):
            kind = "number, or text with a unit" + (" (or null)" if nullable else "")
        if isinstance(kind, list):
            kind = " | ".join(kind)
        if "enum" in sub:
            kind = "one of: " + ", ".join(str(v) for v in sub["enum"])
        rows.append({"name": path, "type": kind, "unit": unit,
                     "required": name in required, "description": sub.get("description", "")})
        if "properties" in sub or ("oneOf" in sub and not unit):
            rows.extend(_rows(sub, document, path, depth + 1))
        elif sub.get("type") == "array" and isinstance(sub.get("items"), dict):
            rows.extend(_rows(sub["items"], document, path + "[]", depth + 1))
    return rows


@bp.get("/docs")
def docs():
    document = spec()
    operations = []
    for path, item in document.get("paths", {}).items():
        for method, op in item.items():
            if method not in {"get", "post", "put", "delete", "patch"}:
                continue
            json_body = op.get("requestBody", {}).get("content", {}).get("application/json", {})
            body = json_body.get("schema")
            examples = [{"name": name, "summary": example.get("summary", ""),
                         "text": json.dumps(example.get("value"), indent=2)}
                        for name, example in (json_body.get("examples") or {}).items()]
            ok = (op.get("responses", {}).get("200", {}).get("content", {})
                  .get("application/json", {}).get("schema"))
            parameters = [_resolve(p, document) for p in op.get("parameters", [])]
            operations.append({
                "method": method.upper(), "path": path, "summary": op.get("summary", ""),
                "description": op.get("description", ""), "tag": (op.get("tags") or ["service"])[0],
                "parameters": [{"name": p.get("name"), "where": p.get("in"),
                                "unit": _resolve(p.get("schema", {}), document).get("x-unit", ""),
                                "description": p.get("description", "")} for p in parameters],
                "body": _rows(body, document), "result": _rows(ok, document), "examples": examples,
                "anchor": f"{method}-{path.strip('/').replace('/', '-').replace('{', '').replace('}', '')}",
            })
    config = current_app.config
    limits = [
        ("request body", f"{config['MAX_CONTENT_LENGTH']:,} bytes (413 above)"),
        ("JSON nesting", f"{config['MAX_NESTING_DEPTH']} levels (413 above)"),
        ("cases in one batch call", f"{config['MAX_BATCH_CASES']} (413 above)"),
        ("targets in one scale-up", f"{config['MAX_SCALES']} (413 above)"),
        ("points in a simulation series", f"{config['MAX_SERIES_POINTS']} (422 above)"),
        ("simulated time", f"{config['MAX_SIMULATION_HORIZON']:g} s (422 above)"),
        ("computing time per simulation", f"{config['SIMULATION_WALL_TIME']:g} s (then a partial result)"),
    ]
    schemes = document.get("components", {}).get("securitySchemes", {})
    return render_template("docs.html", info=document.get("info", {}), operations=operations, version=VERSION,
                           authentication=[scheme.get("description", "") for scheme in schemes.values()],
                           tokens_required=bool(config.get("AUTH_TOKENS") or config.get("AUTH_TOKENS_FILE")),
                           limits=limits)


@bp.get("/")
def index():
    """The service root points a person (or a client following redirects) to the reference."""
    return redirect("/docs", code=302)
