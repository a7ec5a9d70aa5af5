"""The Python client against a live gunicorn on a free loopback port (no mocks)."""
import json
import time
from pathlib import Path

import pytest
import requests

from api.client import Client, ProblemError, ServiceUnreachable, retry_delay
from serving import free_port, gunicorn

ROOT = Path(__file__).resolve().parents[1]
CHECK = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
TOKEN = "client-test-token"


@pytest.fixture(scope="module")
def server():
    with gunicorn(env={"COOLMARGIN_AUTH_TOKENS": TOKEN}, workers=1) as base:
        yield base


@pytest.mark.slow
def test_client_calls_checks_with_a_token_and_raises_problem_details(server, app):
    local = app.test_client().post("/v1/cooling-check", json=CHECK).json
    with Client(server, token=TOKEN, timeout=(2, 60)) as service:
        _check_calls(service, local)


def _check_calls(service, local):
    answer = service.cooling_check(CHECK)
    assert answer["margin"] == local["margin"] and answer["adequate"] is True  # same numbers over HTTP
    metric = service.cooling_check(CHECK, output_units="metric")
    assert metric["units"]["cooling_capacity"] == "kW"
    assert service.properties("water", "25 degC")["density"] == pytest.approx(997.05, rel=1e-4)  # IAPWS-95, from memory
    assert service.report("cooling-check", CHECK).startswith(b"%PDF")
    batch = service.cooling_check_batch([CHECK, dict(CHECK, safety_factor=0.5)])  # the second case is invalid
    assert [case["status"] for case in batch["cases"]] == [200, 422]
    assert batch["cases"][0]["result"]["margin"] == local["margin"]
    assert batch["cases"][1]["problem"]["errors"][0]["field"] == "cases[1].safety_factor"
    with pytest.raises(ProblemError) as refused, Client(service.base_url, token="wrong") as stranger:
        stranger.cooling_check(CHECK)
    assert refused.value.status == 401 and refused.value.title
    bad = dict(CHECK, vessel=dict(CHECK["vessel"], diameter="-1 m"))
    with pytest.raises(ProblemError) as invalid:
        service.cooling_check(bad)
    assert invalid.value.status == 422 and invalid.value.errors[0]["field"] == "vessel.diameter"


@pytest.mark.slow
def test_client_retries_503_after_retry_after_then_raises():
    """A request budget far too short makes the live server answer 503 with Retry-After: 1 (its floor)."""
    with gunicorn(env={"COOLMARGIN_REQUEST_BUDGET": "0.001"}, workers=1) as base:
        session = requests.Session()
        statuses = []
        session.hooks["response"].append(lambda response, *args, **kwargs: statuses.append(response.status_code))
        started = time.monotonic()
        with pytest.raises(ProblemError) as unavailable, Client(base, retries=2, session=session) as service:
            service.cooling_check(CHECK)
        assert statuses == [503, 503, 503] and unavailable.value.status == 503
        assert time.monotonic() - started >= 2.0  # waited Retry-After (1 s) before each of the two retries


def test_unreachable_server_and_retry_after_forms():
    with pytest.raises(ServiceUnreachable), Client(f"http://127.0.0.1:{free_port()}", timeout=(1, 1),
                                                   retries=0) as nowhere:
        nowhere.health()
    assert retry_delay("Wed, 21 Oct 2015 07:28:00 GMT", 5.0) == 0.0  # an HTTP date in the past: go now
    assert retry_delay("7", 1.0) == 7.0


@pytest.mark.slow
def test_cli_token_from_the_environment_against_the_live_server(server, monkeypatch, capsys):
    from api import cli

    path = str(ROOT / "examples" / "cooling_check_production.json")
    monkeypatch.delenv("COOLMARGIN_TOKEN", raising=False)
    assert cli.main(["check", path, "--url", server]) == cli.EXIT_SERVICE
    assert "401" in capsys.readouterr().err
    monkeypatch.setenv("COOLMARGIN_TOKEN", TOKEN)
    assert cli.main(["check", path, "--url", server]) == cli.EXIT_OK
    assert "ADEQUATE" in capsys.readouterr().out


@pytest.mark.slow
def test_a_client_generated_from_the_contract_calls_a_check(server, tmp_path, monkeypatch):
    """openapi-python-client (a generator on PyPI) builds a client from openapi.yaml; it must keep working."""
    import subprocess
    import sys

    generator = Path(sys.executable).with_name("openapi-python-client")
    subprocess.run([str(generator), "generate", "--path", str(ROOT / "openapi.yaml"), "--meta", "none",
                    "--output-path", str(tmp_path / "generated_client")], check=True, capture_output=True,
                   timeout=300, cwd=tmp_path)
    monkeypatch.syspath_prepend(str(tmp_path))
    import inspect
    import typing

    from generated_client import AuthenticatedClient
    from generated_client.api.cooling_check import post_cooling_check, post_cooling_check_batch
    from generated_client.models import CoolingCheckRequest, CoolingCheckRequestBatch, CoolingCheckResultBatch

    # The check's body is a typed model (a batch has its own route and model), not untyped JSON.
    hints = typing.get_type_hints(post_cooling_check.sync_detailed)
    assert hints["body"] is CoolingCheckRequest, hints["body"]
    assert typing.get_type_hints(post_cooling_check_batch.sync_detailed)["body"] is CoolingCheckRequestBatch
    assert "vessel" in inspect.signature(CoolingCheckRequest).parameters
    body = CoolingCheckRequest.from_dict(CHECK)
    assert body.to_dict() == CHECK  # the typed model carries the demo request unchanged
    with AuthenticatedClient(base_url=server, token=TOKEN, raise_on_unexpected_status=True) as client:
        answer = post_cooling_check.sync_detailed(client=client, body=body)
        batch = post_cooling_check_batch.sync_detailed(
            client=client, body=CoolingCheckRequestBatch.from_dict({"cases": [CHECK, CHECK]}))
    assert answer.status_code == 200 and batch.status_code == 200
    assert isinstance(batch.parsed, CoolingCheckResultBatch)
    assert [case.result.margin for case in batch.parsed.cases] == [answer.parsed.margin] * 2
    with Client(server, token=TOKEN) as direct_client:
        direct = direct_client.cooling_check(CHECK)
    assert answer.parsed.margin == direct["margin"] and answer.parsed.adequate is True
    assert any("calorimetry" in caution for caution in answer.parsed.cautions)
