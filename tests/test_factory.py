"""The app factory, service endpoints and request ids."""
from api import create_app


def test_config_overrides_defaults_and_environment(monkeypatch):
    monkeypatch.setenv("COOLMARGIN_MAX_BATCH_CASES", "7")
    assert create_app().config["MAX_BATCH_CASES"] == 7
    assert create_app({"MAX_BATCH_CASES": 3}).config["MAX_BATCH_CASES"] == 3


def test_health_and_ready(client):
    health = client.get("/health")
    assert health.status_code == 200 and health.json["status"] == "ok" and health.json["version"]
    ready = client.get("/ready")
    assert ready.status_code == 200 and ready.json["status"] == "ready"


def test_request_id_is_echoed_or_generated(client):
    assert client.get("/health", headers={"X-Request-ID": "abc-123"}).headers["X-Request-ID"] == "abc-123"
    generated = client.get("/health", headers={"X-Request-ID": "bad id with spaces"}).headers["X-Request-ID"]
    assert len(generated) == 32 and " " not in generated


def test_docs_page_lists_every_operation(client):
    page = client.get("/docs").get_data(as_text=True)
    spec = client.get("/openapi.yaml").get_data(as_text=True)
    import yaml

    for path in yaml.safe_load(spec)["paths"]:
        assert path in page
    assert "licensed engineer" in page
    # Units come from the contract's x-unit beside each $ref: the vessel diameter is in metres.
    assert '<code>vessel.diameter</code> *</td><td>number, or text with a unit</td><td class="unit">m</td>' in page


def test_docs_page_shows_optional_units_examples_authentication_and_limits(client):
    page = client.get("/docs").get_data(as_text=True)
    # An optional quantity is oneOf [quantity, null] in the contract; its unit used to be lost.
    assert ('<code>heat_release.power_per_mass</code></td><td>number, or text with a unit (or null)</td>'
            '<td class="unit">W/kg</td>') in page
    assert "Example request: the demo scenario" in page and "R-630" in page  # the contract's examples
    assert "Authorization: Bearer" in page and "not configured: the service is open" in page
    assert "1,048,576 bytes (413 above)" in page  # MAX_CONTENT_LENGTH of this server


def test_root_points_to_docs(client):
    response = client.get("/")
    assert response.status_code == 302 and response.headers["Location"] == "/docs"
