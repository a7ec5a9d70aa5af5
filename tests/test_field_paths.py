"""Every field path that calc's input errors name is a path of the request that reaches it.

Found by reading calc's source (an AST scan of every InputError and its checking helpers), so a new
error with a made-up path fails here. The request paths come from the request schemas themselves
(list items as ``[*]``, map entries as ``.*``). Reference: the contract (openapi.yaml is generated from
the same schemas) and RFC 9457's advice that a problem points at the member at fault.
"""
import ast
import pathlib
import re

from marshmallow import fields

from schemas import registry
from serving import ROOT

CHECKERS = {"InputError", "require_positive", "require_sign", "_positive", "_finite", "_nonnegative",
            "_non_negative", "_require_finite"}

# Paths that name no request field, each for a reason a request cannot reach it with that name.
NOT_FROM_A_REQUEST = {
    # calc options with a built-in default that the API does not expose
    "vessel.coils.correlation", "vessel.coils.parallel_tubes", "vessel.jacket.correlation",
    "vessel.jacket.pipe_section_angle", "vessel.jacket.roughness", "rtol",
    # the server's own configuration (COOLMARGIN_SIMULATION_WALL_TIME), checked at start-up too
    "budget.wall_time",
    # arguments of library functions that calc derives from validated inputs, never a request's number
    "process_film", "service_film", "process_side", "surface", "agitator_power", "dT2", "heat_generation",
    "adiabatic_temperature_rise", "mass", "final_mass", "scale_factor",
}
# Helpers that put a prefix in front of the name they are given.
PREFIXED = {("calc/films/jacket_side.py", "_positive"): "vessel.jacket."}
# The heat-transfer network renames coil errors to the coil's index (calc.validity.fields_renamed).
RENAMED = {"vessel.coils.": "vessel.coils[*]."}


def _request_paths() -> set[str]:
    out: set[str] = set()

    def walk(cls, prefix, depth=0):
        for name, field in cls().fields.items():
            path = f"{prefix}.{field.data_key or name}" if prefix else (field.data_key or name)
            out.add(path)
            inner = field.inner if isinstance(field, fields.List) else field
            if isinstance(field, fields.List):
                path += "[*]"
                out.add(path)
            if isinstance(inner, fields.Nested) and depth < 6:
                nested = inner.nested if isinstance(inner.nested, type) else type(inner.schema)
                walk(nested, path + ("[*]" if inner.many else ""), depth + 1)
            elif isinstance(inner, fields.Dict):
                out.add(path + ".*")

    for schema in registry.REQUEST_SCHEMAS:
        walk(schema, "")
    return out


def _raised_paths():
    """(file, line, path template) of every literal or f-string field an input check in calc names."""
    for path in sorted((ROOT / "calc").rglob("*.py")):
        relative = path.relative_to(ROOT).as_posix()
        for node in ast.walk(ast.parse(path.read_text())):
            if not (isinstance(node, ast.Call) and node.args):
                continue
            name = node.func.id if isinstance(node.func, ast.Name) else getattr(node.func, "attr", None)
            if name not in CHECKERS:
                continue
            first = node.args[0]
            if isinstance(first, ast.Constant) and isinstance(first.value, str):
                text = first.value
            elif isinstance(first, ast.JoinedStr):
                text = "".join(v.value if isinstance(v, ast.Constant) else "{}" for v in first.values)
            else:
                continue  # a variable: its literal origin is scanned where it is written
            yield relative, node.lineno, PREFIXED.get((relative, name), "") + text


def _matches(template: str, paths: set[str]) -> bool:
    for old, new in RENAMED.items():
        if template.startswith(old):
            template = new + template[len(old):]
    generic = re.sub(r"\[(\{\}|\d+)\]", "[*]", template)
    pattern = re.escape(generic).replace(r"\{\}", ".*")
    return any(re.fullmatch(pattern, p) for p in paths)


def test_every_input_error_names_a_request_field():
    paths = _request_paths()
    raised = list(_raised_paths())
    assert len(raised) > 150  # the scan sees calc's checks (about 200 today)
    wrong = [f"{file}:{line} {template}" for file, line, template in raised
             if template not in NOT_FROM_A_REQUEST and not _matches(template, paths)]
    assert wrong == []


def test_the_scan_can_fail():
    paths = _request_paths()
    assert _matches("vessel.jacket.gap", paths) and _matches("reactions[{}].enthalpy", paths)
    assert not _matches("failure.time", paths)  # the simulation's field is cooling_failure.time
    assert not _matches("vessel.jaket.gap", paths)


def test_overfilled_charge_and_failure_time_name_the_request_fields(client):
    import copy
    import json

    check = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
    overfilled = copy.deepcopy(check)
    overfilled["charge"]["volume"] = "60 m^3"
    response = client.post("/v1/cooling-check", json=overfilled)
    assert response.status_code == 422 and response.json["errors"][0]["field"] == "charge.volume"
    assert "m3" in response.json["errors"][0]["message"]  # the limit comes with its unit
    simulation = json.loads((ROOT / "examples" / "simulation_production_failure.json").read_text())
    simulation["cooling_failure"]["time"] = "1000 h"
    response = client.post("/v1/simulations", json=simulation)
    assert response.status_code == 422 and response.json["errors"][0]["field"] == "cooling_failure.time"
    assert " s)" in response.json["errors"][0]["message"]
