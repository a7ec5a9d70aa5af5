"""Shared schema machinery: strict schemas, query-string objects, error paths and unit maps."""
from __future__ import annotations

import math
import re
from typing import Any

from marshmallow import RAISE, Schema, ValidationError, fields

from .units import Quantity

MAX_QUERY_INDEX = 100
MAX_QUERY_DEPTH = 12  # levels of a dotted query name; the deepest request field is 5 levels down


class StrictSchema(Schema):
    """Unknown fields are errors; floats reject NaN and infinity."""

    class Meta:
        unknown = RAISE


def finite_float(**kwargs) -> fields.Float:
    return fields.Float(allow_nan=False, **kwargs)


class WholeNumber(fields.Integer):
    """An integer field that refuses fractions (marshmallow's Integer would truncate 2.5 to 2)."""

    def _validated(self, value):
        if isinstance(value, float) and not value.is_integer():
            raise ValidationError("must be a whole number, not a fraction")
        return super()._validated(value)


def whole_number(**kwargs) -> fields.Integer:
    return WholeNumber(strict=False, **kwargs)


_SEGMENT = re.compile(r"^([A-Za-z_][A-Za-z0-9_]*)((?:\[[0-9]+\])*)$")


def unflatten(pairs: dict[str, str]) -> dict[str, Any]:
    """Turn flat query parameters into the nested object the JSON form would send.

    ``vessel.diameter=2.2`` -> ``{"vessel": {"diameter": "2.2"}}``; list items are addressed as
    ``vessel.coils[0].turns`` or ``vessel.coils.0.turns``. A path that conflicts with another
    (a value and an object at the same place) is a ValidationError naming it.
    """
    root: dict[str, Any] = {}
    for key, value in pairs.items():
        if key.count(".") + key.count("[") >= MAX_QUERY_DEPTH:
            shown = key if len(key) <= 60 else key[:60] + "..."
            raise ValidationError({shown: [f"is nested deeper than {MAX_QUERY_DEPTH} levels"]})
        parts: list[str | int] = []
        for segment in key.split("."):
            if segment.isascii() and segment.isdigit():  # '³' is a digit to str.isdigit, not to int()
                parts.append(int(segment))
                continue
            match = _SEGMENT.match(segment)
            if match is None:
                raise ValidationError({key: ["is not a valid parameter name"]})
            parts.append(match.group(1))
            parts.extend(int(i) for i in re.findall(r"\[([0-9]+)\]", match.group(2)))
        if any(isinstance(p, int) and p >= MAX_QUERY_INDEX for p in parts):
            raise ValidationError({key: [f"list index must be below {MAX_QUERY_INDEX}"]})
        node: Any = root
        for part, following in zip(parts, parts[1:] + [None]):
            container = [] if isinstance(following, int) else {}
            if following is None:
                container = value
            if isinstance(part, int):
                if not isinstance(node, list):
                    raise ValidationError({key: ["conflicts with another parameter"]})
                while len(node) <= part:
                    node.append(None)
                if node[part] is None:
                    node[part] = container
                elif following is None or not isinstance(node[part], (dict, list)):
                    raise ValidationError({key: ["conflicts with another parameter"]})
                node = node[part]
            else:
                if not isinstance(node, dict):
                    raise ValidationError({key: ["conflicts with another parameter"]})
                if part not in node:
                    node[part] = container
                elif following is None or not isinstance(node[part], (dict, list)):
                    raise ValidationError({key: ["conflicts with another parameter"]})
                node = node[part]
    _fill_gaps(root)
    return root


def _fill_gaps(node: Any) -> None:
    if isinstance(node, dict):
        for child in node.values():
            _fill_gaps(child)
    elif isinstance(node, list):
        for i, child in enumerate(node):
            if child is None:
                node[i] = {}
            _fill_gaps(child)


def error_list(messages: Any, prefix: str = "") -> list[dict[str, str]]:
    """Flatten marshmallow's nested error messages into [{field, message}] with dotted paths.

    >>> error_list({"vessel": {"coils": {0: {"turns": ["Must be positive."]}}}})
    [{'field': 'vessel.coils[0].turns', 'message': 'Must be positive.'}]
    """
    out: list[dict[str, str]] = []
    if isinstance(messages, dict):
        for key, value in messages.items():
            if isinstance(key, int):
                path = f"{prefix}[{key}]"
            elif key == "_schema":
                path = prefix
            else:
                path = f"{prefix}.{key}" if prefix else str(key)
            out.extend(error_list(value, path))
    elif isinstance(messages, (list, tuple)):
        for item in messages:
            if isinstance(item, (dict, list)):
                out.extend(error_list(item, prefix))
            else:
                out.append({"field": prefix or "(body)", "message": str(item)})
    else:
        out.append({"field": prefix or "(body)", "message": str(messages)})
    return out


_LEADING_NUMBER = re.compile(r"^ *([-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)")


def numeric_leaves(value: Any, prefix: str = "") -> dict[str, float]:
    """Every number in a request object (a quantity text's number too), by the request's dotted path.

    >>> numeric_leaves({"vessel": {"coils": [{"turns": 12}]}, "process_temperature": "45 degC"})
    {'vessel.coils[0].turns': 12.0, 'process_temperature': 45.0}
    """
    out: dict[str, float] = {}
    if isinstance(value, dict):
        for key, item in value.items():
            out.update(numeric_leaves(item, f"{prefix}.{key}" if prefix else str(key)))
    elif isinstance(value, list):
        for i, item in enumerate(value):
            out.update(numeric_leaves(item, f"{prefix}[{i}]"))
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        try:
            out[prefix] = float(value)
        except OverflowError:
            out[prefix] = math.inf
    elif isinstance(value, str):
        match = _LEADING_NUMBER.match(value)
        if match:
            out[prefix] = float(match.group(1))
    return out


def _quantities(schema: Schema, prefix: str = ""):
    """(dotted name, Quantity field) of every quantity of a (response) schema; ``name.*`` for dict values."""
    for name, field in schema.fields.items():
        key = field.data_key or name
        path = f"{prefix}.{key}" if prefix else key
        inner = field
        if isinstance(field, fields.List):
            inner = field.inner
        if isinstance(inner, fields.Nested):
            yield from _quantities(inner.schema, path)
        elif isinstance(inner, Quantity):
            yield path, inner
        elif isinstance(inner, fields.Dict) and isinstance(inner.value_field, Quantity):
            yield f"{path}.*", inner.value_field


def unit_map(schema: Schema) -> dict[str, str]:
    """The default unit of every quantity field of a (response) schema, by dotted name."""
    return {path: field.metadata["unit"] for path, field in _quantities(schema)}


def kind_map(schema: Schema) -> dict[str, str]:
    """The quantity kind of every quantity field of a (response) schema, by dotted name."""
    return {path: field.kind for path, field in _quantities(schema)}


def clean(value: Any) -> Any:
    """Replace any non-finite float left in a response by None (JSON has no NaN)."""
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {k: clean(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [clean(v) for v in value]
    return value
