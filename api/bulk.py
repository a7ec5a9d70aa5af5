"""Bulk movement of the catalogue: a vessel list from a spreadsheet (CSV) and the whole catalogue as JSON.

CSV: one vessel a row; the header names each column by its dotted path in a vessel record (``tag``,
``utility``, ``notes``, and the vessel's own fields with or without the ``vessel.`` prefix:
``diameter``, ``wall.thickness``, ``agitator.speed``, ``coils[0].turns``). A column's unit is given either
in its header (``diameter [m]``, ``speed (rpm)``) or in a unit row right under the header (a row whose
``tag`` cell is empty or reads ``unit``/``units``); a cell that carries its own unit keeps it; a bare number
in a column without a unit is in the field's default unit. Every row is checked before anything is
written: one bad cell refuses the whole file with every problem named by row and field.

JSON: ``{"format": "coolmargin-catalogue", "version": 1, "records": [...]}``. An export holds every record
with its whole history (``revisions``) and is restored exactly; a hand-written file may give each record's
``content`` alone, which is created as revision 1.
"""
from __future__ import annotations

import csv
import io
import re
from typing import Any

from marshmallow import ValidationError

from schemas.base import unflatten
from schemas.records import RECORD_SCHEMAS, index_of

from .storage import EXPORT_FORMAT, EXPORT_VERSION, Catalogue, Conflict, NotFound

_HEADER_UNIT = re.compile(r"^\s*([^\[\(]+?)\s*(?:\[([^\]]*)\]|\(([^\)]*)\))?\s*$")
_RECORD_MEMBERS = {"tag", "utility", "notes", "calibration"}
_NUMBER = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$")
KIND_ORDER = {"utility": 0, "vessel": 1, "step": 2}  # a vessel names its utility, so utilities come first


def check_content(catalogue: Catalogue, kind: str, content: Any, pending_utilities: set[str] = frozenset()) -> dict:
    """Validate a record's content with the calculation schemas; return its index fields.

    A vessel's ``utility`` must name a stored utility (or one about to be imported, ``pending_utilities``).
    """
    if not isinstance(content, dict):
        raise ValidationError({"(body)": ["must be an object"]})
    loaded = RECORD_SCHEMAS[kind]().load(content)
    utility = loaded.get("utility") if kind == "vessel" else None
    if utility is not None and utility not in pending_utilities:
        try:
            catalogue.get("utility", utility)
        except NotFound:
            raise ValidationError({"utility": [f"no utility with id or tag {utility!r}"]}) from None
    return index_of(kind, loaded)


def _columns(header: list[str]) -> list[tuple[str, str | None]]:
    out = []
    for cell in header:
        match = _HEADER_UNIT.match(cell or "")
        if match is None:
            raise ValidationError({"(header)": [f"cannot read the column name {cell!r}"]})
        name, unit = match.group(1).strip(), (match.group(2) or match.group(3) or "").strip() or None
        if name.startswith("vessel."):
            path = name
        elif name.split(".")[0].split("[")[0] in _RECORD_MEMBERS:
            path = name
        else:
            path = f"vessel.{name}"
        out.append((path, unit))
    paths = [path for path, _ in out]
    duplicates = sorted({p for p in paths if paths.count(p) > 1})
    if duplicates:
        raise ValidationError({"(header)": [f"column {duplicates[0]!r} appears twice"]})
    if "tag" not in paths:
        raise ValidationError({"(header)": ["a 'tag' column is required"]})
    return out


def vessels_from_csv(text: str) -> list[dict]:
    """Vessel records from a spreadsheet's CSV (see the module's description); ValidationError names row and field."""
    reader = csv.reader(io.StringIO(text.lstrip("\ufeff")))
    rows, lines = [], []
    for row in reader:
        if any(cell.strip() for cell in row):
            rows.append(row)
            lines.append(reader.line_num)
    if not rows:
        raise ValidationError({"(body)": ["the CSV holds no header row"]})
    columns = _columns(rows[0])
    tag_index = [path for path, _ in columns].index("tag")
    data, lines = rows[1:], lines[1:]
    if data and (len(data[0]) <= tag_index or data[0][tag_index].strip().lower() in ("", "unit", "units")):
        unit_row = data.pop(0)
        lines.pop(0)
        columns = [(path, unit or (unit_row[i].strip() if i < len(unit_row) and i != tag_index else "") or None)
                   for i, (path, unit) in enumerate(columns)]
    if not data:
        raise ValidationError({"(body)": ["the CSV holds no vessel rows"]})
    records, errors = [], {}
    for number, row in zip(lines, data):
        if len(row) > len(columns):
            errors[f"row {number}"] = [f"{len(row)} cells but {len(columns)} columns"]
            continue
        flat = {}
        for (path, unit), cell in zip(columns, row):
            cell = cell.strip()
            if cell == "":
                continue
            flat[path] = f"{cell} {unit}" if unit and _NUMBER.match(cell) else cell
        try:
            records.append((number, unflatten(flat)))
        except ValidationError as error:
            errors[f"row {number}"] = error.messages
    if errors:
        raise ValidationError(errors)
    return records


def import_vessels(catalogue: Catalogue, records: list[tuple[int, dict]], author: str, replace: bool = False) -> dict:
    """Create each vessel of (line, record) pairs (or, with ``replace``, revise an existing tag whose content
    differs). Every row is validated first; nothing is written unless all are valid.
    """
    errors: dict = {}
    checked = []
    tags = [record.get("tag") for _, record in records]
    for number, record in records:
        try:
            checked.append((record, check_content(catalogue, "vessel", record)))
        except ValidationError as error:
            errors[f"row {number}"] = error.messages
    duplicates = sorted({t for t in tags if t is not None and tags.count(t) > 1})
    if duplicates:
        errors["tag"] = [f"tag {duplicates[0]!r} appears in more than one row"]
    if errors:
        raise ValidationError(errors)
    summary: dict[str, list] = {"created": [], "revised": [], "unchanged": [], "existing": []}
    for record, index in checked:
        try:
            current = catalogue.get("vessel", record["tag"])
            if current.retired:
                raise NotFound(record["tag"])
        except NotFound:
            created = catalogue.create("vessel", record["tag"], record, index, author)
            summary["created"].append(created.reference())
            continue
        if current.body == record:
            summary["unchanged"].append(current.reference())
        elif replace:
            revised = catalogue.revise("vessel", current.record_id, current.number, author, tag=record["tag"],
                                       body=record, index=index)
            summary["revised"].append(revised.reference())
        else:
            summary["existing"].append(current.reference())
    return summary


def import_catalogue(catalogue: Catalogue, document: Any, author: str) -> dict:
    """Restore an export (whole histories) or create hand-written records; returns what was done."""
    if not isinstance(document, dict) or document.get("format") != EXPORT_FORMAT:
        raise ValidationError({"format": [f"expected {EXPORT_FORMAT!r}"]})
    if document.get("version") != EXPORT_VERSION:
        raise ValidationError({"version": [f"this release reads version {EXPORT_VERSION}"]})
    records = document.get("records")
    if not isinstance(records, list):
        raise ValidationError({"records": ["must be a list"]})
    pending = {r["content"]["tag"] for r in records if isinstance(r, dict) and r.get("kind") == "utility"
               and isinstance(r.get("content"), dict) and "tag" in r["content"]}
    pending |= {r["tag"] for r in records if isinstance(r, dict) and r.get("kind") == "utility" and "revisions" in r}
    errors: dict = {}
    for number, item in enumerate(records):
        if not isinstance(item, dict) or item.get("kind") not in RECORD_SCHEMAS:
            errors[number] = {"kind": ["must be vessel, utility or step"]}
            continue
        # history is restored as it was; the current content must still be valid
        body = item["revisions"][-1].get("body") if item.get("revisions") else item.get("content")
        try:
            check_content(catalogue, item["kind"], body, pending)
        except ValidationError as error:
            errors[number] = error.messages
    if errors:
        raise ValidationError({"records": errors})
    summary: dict[str, list] = {"restored": [], "created": [], "skipped": []}
    for item in sorted(records, key=lambda r: KIND_ORDER[r["kind"]]):
        if "revisions" in item:
            restored = catalogue.restore(item)
            summary["restored" if restored else "skipped"].append({"kind": item["kind"], "id": item["id"],
                                                                   "tag": item["tag"]})
            continue
        content = item["content"]
        try:
            created = catalogue.create(item["kind"], content["tag"], content,
                                       check_content(catalogue, item["kind"], content), author)
            summary["created"].append(created.reference())
        except Conflict:
            summary["skipped"].append({"kind": item["kind"], "tag": content["tag"]})
    return summary
