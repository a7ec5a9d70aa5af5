"""Stored records named in calculation requests: ``{"ref": "<id or tag>"}`` where an object would stand.

- ``vessel`` (and a scale-up's ``reference`` or a target's ``vessel``) -> the vessel record's ``vessel``;
  when the request level that holds it declares ``coolant`` and gives none, the vessel's own utility is
  used, and a vessel calibration fills a declared ``calibration`` that was not given.
- ``coolant`` -> the utility record's ``coolant``.
- ``step`` -> the step record's members that the request declares (charge, process_temperature,
  heat_release, safety_factor; for a thermal-safety request, its cooling-failure scenario); members given
  beside the step override it.
``{"ref": ..., "revision": n}`` pins a revision, so a past result can be reproduced exactly. Every record
used is listed, with its revision, in the result's ``records``.
"""
from __future__ import annotations

from typing import Any

from flask import g
from marshmallow import Schema, ValidationError

from schemas.records import CONTENT

from .storage import NotFound, RevisionView

SLOTS = {"vessel": "vessel", "reference": "vessel", "coolant": "utility", "step": "step"}
STEP_MEMBERS = ("charge", "process_temperature", "heat_release", "safety_factor")


def _content(kind: str, body: dict) -> dict:
    """The part of a record that stands where a ref named it."""
    if kind == "step":  # a request member that is a whole step (a screening's)
        return {k: body[k] for k in STEP_MEMBERS if k in body}
    return body[CONTENT[kind]]


def _is_ref(value: Any) -> bool:
    return isinstance(value, dict) and "ref" in value and set(value) <= {"ref", "revision"}


def _contains_ref(value: Any, depth: int = 0) -> bool:
    if depth > 4:
        return False
    if isinstance(value, dict):
        return _is_ref(value) or any(_contains_ref(v, depth + 1) for v in value.values())
    if isinstance(value, list):
        return any(_contains_ref(v, depth + 1) for v in value)
    return False


#: The largest revision number a reference may name (a 32-bit column holds it on every database).
MAX_REVISION = 2_147_483_647


def _fetch(kind: str, ref: dict, field: str) -> RevisionView:
    from .records import store

    key, number = ref["ref"], ref.get("revision")
    if not isinstance(key, str) or not key or len(key) > 64:
        raise ValidationError({f"{field}.ref": ["must be the id or tag of a stored record (1-64 characters)"]})
    if number is not None and (isinstance(number, bool) or not isinstance(number, int)
                               or not 1 <= number <= MAX_REVISION):
        raise ValidationError({f"{field}.revision": [f"must be a revision number (1, 2, ... {MAX_REVISION})"]})
    try:
        return store().get(kind, key, number)
    except NotFound as exc:
        raise ValidationError({f"{field}.ref": [str(exc)]}) from None


def _used(revision: RevisionView, used_as: str) -> dict:
    return revision.reference() | {"used_as": used_as}


def _declared(schema: Schema | None) -> set[str]:
    return set(schema.fields) if schema is not None else set()


def _walk(node: dict, schema: Schema | None, path: str, used: list[dict], own_utility: bool = True) -> dict:
    out = dict(node)
    declared = _declared(schema)
    for key, value in node.items():
        field = f"{path}.{key}" if path else key
        if key in SLOTS and _is_ref(value) and key in declared:
            kind = SLOTS[key]
            revision = _fetch(kind, value, field)
            out[key] = _content(kind, revision.body)
            used.append(_used(revision, field))
            if kind == "vessel":
                _defaults(out, node, revision, declared, path, used, own_utility)
        elif isinstance(value, list) and key in declared:
            inner = getattr(schema.fields[key], "inner", None)
            nested = getattr(inner, "schema", None)
            out[key] = [_walk(item, nested, f"{field}[{i}]", used, own_utility) if isinstance(item, dict) else item
                        for i, item in enumerate(value)]
    return out


def _defaults(out: dict, given: dict, vessel: RevisionView, declared: set[str], path: str, used: list,
              own_utility: bool = True) -> None:
    """The vessel record's utility and calibration, where the request declares but does not give them."""
    prefix = f"{path}." if path else ""
    utility = vessel.body.get("utility")
    if own_utility and "coolant" in declared and "coolant" not in given and utility is not None:
        revision = _fetch("utility", {"ref": utility}, f"{prefix}vessel.utility")
        out["coolant"] = revision.body["coolant"]
        used.append(_used(revision, f"{prefix}coolant (the vessel's utility)"))
    calibration = vessel.body.get("calibration")
    if "calibration" in declared and "calibration" not in given and calibration is not None:
        out["calibration"] = calibration["fit"]
        used.append(_used(vessel, f"{prefix}calibration (the vessel's, from {calibration['source']})"))


def _step(data: dict, declared: set[str], used: list[dict]) -> dict:
    value = data["step"]
    if not _is_ref(value):
        raise ValidationError({"step": ['give {"ref": "<id or tag>"} naming a stored step; an inline step is '
                                        "sent as its own fields (charge, process_temperature, heat_release, "
                                        "safety_factor)"]})
    revision = _fetch("step", value, "step")
    content = {k: v for k, v in revision.body.items() if k in declared}
    # a calculation of the cooling-failure scenario (thermal safety) takes more from it than from the step
    failure = {k: v for k, v in (revision.body.get("cooling_failure") or {}).items() if k in declared}
    if len(failure) > len(content):
        content = failure
    if not content:
        raise ValidationError({"step": ["this calculation takes nothing this step describes"]})
    out = {k: v for k, v in data.items() if k != "step"}
    for key, member in content.items():
        out.setdefault(key, member)
    used.append(_used(revision, "step"))
    return out


def resolve(data: dict, schema: Schema, own_utility: bool = True) -> dict:
    """The request with every stored record it names filled in; the records used go to ``g.records_used``.

    ``own_utility=False``: a stored vessel's utility does not fill a missing ``coolant`` (the plant-data fits,
    whose coolant is the logged run's, not the vessel's design utility).
    """
    if not _contains_ref(data):
        if "step" in data and "step" not in _declared(schema):
            _step(data, _declared(schema), [])  # explains the one accepted form
        return data
    from .records import store

    used: list[dict] = []
    with store().reading():
        if "step" in data and "step" not in _declared(schema):
            data = _step(data, _declared(schema), used)
        data = _walk(data, schema, "", used, own_utility)
    g.setdefault("records_used", []).extend(used)
    return data


def records_used() -> list[dict]:
    return list(g.get("records_used", []))
