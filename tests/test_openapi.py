"""openapi.yaml is a valid OpenAPI 3.1 document, matches the routes both ways, and real responses conform."""
import json
import re
from pathlib import Path

import pytest
import yaml
from openapi_core import Config, OpenAPI
from openapi_core.contrib.werkzeug import WerkzeugOpenAPIRequest, WerkzeugOpenAPIResponse
from openapi_spec_validator import validate

SPEC_PATH = Path(__file__).resolve().parents[1] / "openapi.yaml"
SPEC = yaml.safe_load(SPEC_PATH.read_text())
METHODS = {"get", "post", "put", "delete", "patch"}


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
    contract.validate_response(WerkzeugOpenAPIRequest(response.request), WerkzeugOpenAPIResponse(response))


def test_schema_units_match_spec_units():
    from schemas.base import unit_map
    from schemas.properties import PropertiesResultSchema

    spec_props = SPEC["components"]["schemas"]["PropertiesResult"]["properties"]
    for field, unit in unit_map(PropertiesResultSchema()).items():
        assert spec_props[field].get("x-unit") == unit, field
