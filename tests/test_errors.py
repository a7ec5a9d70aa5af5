"""Every error is one RFC 9457 problem+json envelope with the exact messages clients see."""
import pytest

from api import create_app

PROBLEM_KEYS = {"type", "title", "status", "detail", "errors"}


def _request(client, case):
    method, url, kwargs = case
    return getattr(client, method)(url, **kwargs)


CASES = {
    400: ("post", "/v1/properties", {"data": "{not json", "content_type": "application/json"}),
    404: ("get", "/v1/no-such-resource", {}),
    405: ("delete", "/v1/properties", {}),
    415: ("post", "/v1/properties", {"data": "fluid=water", "content_type": "text/plain"}),
    422: ("get", "/v1/properties?fluid=water&temperature=3%20kg", {}),
}


@pytest.mark.parametrize("status", sorted(CASES))
def test_problem_envelope(client, status):
    response = _request(client, CASES[status])
    assert response.status_code == status
    assert response.mimetype == "application/problem+json"
    body = response.json
    assert PROBLEM_KEYS <= set(body) and body["status"] == status
    assert "Traceback" not in response.get_data(as_text=True)


def test_body_over_the_limit_is_413():
    client = create_app({"MAX_CONTENT_LENGTH": 1000}).test_client()
    response = client.post("/v1/properties", data="{" + " " * 2000 + "}", content_type="application/json")
    assert response.status_code == 413 and response.mimetype == "application/problem+json"


def test_wrong_dimension_names_field_and_both_units(client):
    body = client.get("/v1/properties?fluid=water&temperature=3%20kg").json
    assert body["errors"] == [{"field": "temperature", "message": "expected a temperature, got 'kg'"}]


def test_unknown_fluid_lists_choices(client):
    body = client.get("/v1/properties?fluid=mercury&temperature=20").json
    assert body["errors"][0]["field"] == "fluid" and "water" in body["errors"][0]["message"]


def test_state_outside_liquid_range_names_range(client):
    body = client.get("/v1/properties?fluid=water&temperature=120").json
    assert body["errors"] == [{"field": "temperature", "message":
                               "120.00 degC is outside the liquid range of Water at 1.013 bar: 0.01 to 99.97 degC"}]
    body = client.get("/v1/properties?fluid=ethylene_glycol&temperature=20&mass_fraction=0.8").json
    assert body["errors"][0]["field"] == "mass_fraction"
    body = client.get("/v1/properties?fluid=ethylene_glycol&temperature=-30&mass_fraction=0.3").json
    assert body["errors"][0]["field"] == "temperature" and "-14.58" in body["errors"][0]["message"]


def test_unknown_query_parameter_is_refused(client):
    body = client.get("/v1/properties?fluid=water&temperature=20&colour=blue").json
    assert body["errors"][0]["field"] == "colour"


def test_nan_and_infinity_refused(client):
    for text in ["nan", "inf", "1e999"]:
        response = client.get(f"/v1/properties?fluid=water&temperature={text}")
        assert response.status_code == 422, text


def test_unknown_format_and_field(client):
    assert client.get("/v1/properties?fluid=water&temperature=20&format=xml").json["errors"][0]["field"] == "format"
    assert client.get("/v1/properties?fluid=water&temperature=20&field=colour").json["errors"][0]["field"] == "field"
