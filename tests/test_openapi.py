"""openapi.yaml is a valid OpenAPI 3.1 document, matches the routes both ways, and real responses conform."""
import json
import re
from pathlib import Path

import pytest
import yaml
from openapi_core import Config, OpenAPI
from openapi_core.testing import MockRequest, MockResponse
from openapi_spec_validator import validate

SPEC_PATH = Path(__file__).resolve().parents[1] / "openapi.yaml"
SPEC = yaml.safe_load(SPEC_PATH.read_text())
METHODS = {"get", "post", "put", "delete", "patch"}


def check_contract(contract, response, body=None):
    """Validate a Flask test response (and its request) against the contract with openapi-core."""
    request = response.request
    mock_request = MockRequest("http://localhost", request.method.lower(), request.path,
                               args=request.args, data=None if body is None else json.dumps(body).encode(),
                               content_type="application/json")
    mock_response = MockResponse(response.get_data(), status_code=response.status_code,
                                 content_type=response.mimetype)
    contract.validate_response(mock_request, mock_response)


def test_spec_is_valid_openapi_31():
    validate(SPEC)  # openapi-spec-validator is the reference
    assert SPEC["openapi"].startswith("3.1")


def _app_operations(app):
    operations = set()
    for rule in app.url_map.iter_rules():
        if rule.endpoint == "static":
            continue
        path = re.sub(r"<(?:[^:>]+:)?([^>]+)>", r"{\1}", rule.rule)
        operations |= {(path, m.lower()) for m in rule.methods if m.lower() in METHODS}
    return operations


def test_routes_and_spec_paths_match_both_ways(app):
    spec_operations = {(path, m) for path, item in SPEC["paths"].items() for m in item if m in METHODS}
    assert _app_operations(app) == spec_operations


def test_every_operation_documents_its_problem_responses():
    for path, item in SPEC["paths"].items():
        for method, op in item.items():
            if method in METHODS and path.startswith("/v1/"):
                assert "422" in op["responses"], (method, path)


@pytest.fixture(scope="module")
def contract():
    # openapi-core knows application/json only; problem+json is JSON and CSV is text.
    config = Config(extra_media_type_deserializers={
        "application/problem+json": json.loads,
        "text/csv": lambda raw: raw.decode() if isinstance(raw, bytes) else raw,
    })
    return OpenAPI.from_file_path(str(SPEC_PATH), config=config)


SAMPLES = [
    ("get", "/health", {}),
    ("get", "/ready", {}),
    ("get", "/v1/fluids", {}),
    ("get", "/v1/properties?fluid=water&temperature=25", {}),
    ("get", "/v1/properties?fluid=ethylene_glycol&temperature=-5&mass_fraction=0.3", {}),
    ("get", "/v1/properties?fluid=water&temperature=120", {}),
    ("get", "/v1/properties?fluid=water&temperature=25&format=csv", {}),
]


@pytest.mark.parametrize("method, url, kwargs", SAMPLES)
def test_real_responses_conform_to_the_contract(client, contract, method, url, kwargs):
    response = getattr(client, method)(url, **kwargs)
    check_contract(contract, response)


def test_schema_units_match_spec_units():
    from schemas.base import unit_map
    from schemas.properties import PropertiesResultSchema

    spec_props = SPEC["components"]["schemas"]["PropertiesResult"]["properties"]
    for field, unit in unit_map(PropertiesResultSchema()).items():
        assert spec_props[field].get("x-unit") == unit, field


def test_generated_parts_of_the_spec_are_in_step_with_the_schemas():
    # `python -m schemas.openapi` rewrites these parts; a stale openapi.yaml fails here.
    from schemas.openapi import components, paths, roots

    for name, schema in components(*roots()).items():
        assert SPEC["components"]["schemas"][name] == schema, name
    for path, item in paths().items():
        assert SPEC["paths"][path] == item, path



def test_response_quantities_keep_their_descriptions():
    # A response field's description, given as marshmallow metadata, reaches the contract (it was dropped
    # for quantities): every described Quantity of every result schema is described in openapi.yaml.
    from schemas.openapi import roots
    from schemas.units import Quantity

    for schema_cls in roots()[1]:
        name = schema_cls.__name__.removesuffix("Schema")
        for field_name, field in schema_cls().fields.items():
            if isinstance(field, Quantity) and field.metadata.get("description"):
                spec_field = SPEC["components"]["schemas"][name]["properties"][field.data_key or field_name]
                assert spec_field.get("description", "").startswith(field.metadata["description"]), (name, field_name)
    window = SPEC["components"]["schemas"]["WindowPoint"]["properties"]
    assert window["dosing_time"]["description"] == "axis value, when an axis varies it"

EXAMPLE = json.loads((SPEC_PATH.parent / "examples" / "heat_transfer_request.json").read_text())
CALCULATION_SAMPLES = [
    ("/v1/heat-transfer", EXAMPLE),
    ("/v1/agitation", {k: EXAMPLE[k] for k in ("vessel", "charge", "process_temperature")}),
    ("/v1/geometry", {"vessel": EXAMPLE["vessel"], "fill": {"level": "1.5 m"}}),
    ("/v1/coolant-balance", {"process_temperature": 60, "coolant": EXAMPLE["coolant"], "ua": "4 kW/K"}),
    ("/v1/heat-transfer", dict(EXAMPLE, process_temperature=10)),  # coolant warmer than contents: 422
    ("/v1/simulations", json.loads((SPEC_PATH.parent / "examples" / "simulation_production_failure.json").read_text())),
]


@pytest.mark.parametrize("path, body", CALCULATION_SAMPLES)
def test_calculation_responses_conform(client, contract, path, body):
    response = client.post(path, json=body)
    assert response.status_code in (200, 422)
    check_contract(contract, response, body)


@pytest.mark.parametrize("path", ["/v1/impellers", "/v1/materials"])
def test_library_responses_conform(client, contract, path):
    response = client.get(path)
    assert response.status_code == 200 and all(item["source"] for item in response.json["items"])
    check_contract(contract, response)


def test_cooling_check_and_batch_conform(client, contract):
    body = json.loads((SPEC_PATH.parent / "examples" / "cooling_check_production.json").read_text())
    check_contract(contract, client.post("/v1/cooling-check", json=body), body)
    batch = {"cases": [body, dict(body, safety_factor=0.2)]}
    response = client.post("/v1/cooling-check", json=batch)
    assert [case["status"] for case in response.json["cases"]] == [200, 422]
    assert response.json["cases"][1]["problem"]["errors"][0]["field"] == "cases[1].safety_factor"
    check_contract(contract, response, batch)
