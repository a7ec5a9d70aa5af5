"""The cooling-check resource end to end: verdict, batch, CSV and the command-line client's exit codes."""
import json
import logging
import subprocess
import sys

import pytest

from serving import ROOT

EXAMPLE = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())


def test_dosing_load_is_enthalpy_times_feed_rate(client):
    # Definition: a dosing-controlled step releases -dH * n / t_dose while the feed reacts as it is added.
    body = client.post("/v1/cooling-check", json=EXAMPLE).json
    assert body["heat_load"]["reaction"] == pytest.approx(165e3 * 2900 / 7200, rel=1e-9)
    load = body["heat_load"]
    assert load["total"] == pytest.approx(load["reaction"] + load["agitator"] - load["feed_sensible"], rel=1e-12)
    assert body["margin"] == pytest.approx(body["cooling_capacity"] / load["total"], rel=1e-12)
    assert body["units"]["limits.minimum_dosing_time"] == "s" and body["cautions"]


def test_minimum_dosing_time_fed_back_gives_the_safety_factor(client):
    # The solved limit, fed back in, must give margin == safety factor (definition of the limit).
    limit = client.post("/v1/cooling-check", json=EXAMPLE).json["limits"]["minimum_dosing_time"]
    again = dict(EXAMPLE, heat_release=dict(EXAMPLE["heat_release"], dosing_time=limit))
    assert client.post("/v1/cooling-check", json=again).json["margin"] == pytest.approx(1.3, rel=1e-6)


def test_csv_and_single_value(client):
    csv = client.post("/v1/cooling-check?format=csv", json=EXAMPLE).get_data(as_text=True)
    assert "cooling_capacity [W]" in csv.splitlines()[0]
    # Booleans as a spreadsheet reads them (documented in README and the contract).
    assert client.post("/v1/cooling-check?field=adequate", json=EXAMPLE).get_data(as_text=True) == "TRUE\n"


def _cli(tmp_path, body):
    path = tmp_path / "case.json"
    path.write_text(json.dumps(body))
    return subprocess.run([sys.executable, "-m", "api.cli", "check", str(path)], cwd=ROOT,
                          capture_output=True, text=True, timeout=120)


def test_cli_exit_codes(tmp_path):
    assert _cli(tmp_path, EXAMPLE).returncode == 0
    crowded = dict(EXAMPLE, heat_release=dict(EXAMPLE["heat_release"], dosing_time="15 min"))
    inadequate = _cli(tmp_path, crowded)
    assert inadequate.returncode == 1 and "NOT ADEQUATE" in inadequate.stdout
    invalid = _cli(tmp_path, dict(EXAMPLE, process_temperature="3 kg"))
    assert invalid.returncode == 2 and "process_temperature" in invalid.stderr


DEMO = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())
PATH = json.loads((ROOT / "examples" / "scale_up_path.json").read_text())


def test_scale_up_area_per_volume_follows_similarity(client):
    # Geometrically similar vessels at the same fill fraction: A/V proportional to V^(-1/3)
    # (exact for similar shapes; common practice, no source).
    scales = client.post("/v1/scale-up", json=PATH).json["scales"]
    generated = [s for s in scales if s["generated"]]
    first = generated[0]
    for scale in generated[1:]:
        expected = first["area_per_volume"] * (scale["charge_volume"] / first["charge_volume"]) ** (-1 / 3)
        assert scale["area_per_volume"] == pytest.approx(expected, rel=1e-6)


def test_scale_up_largest_adequate_volume_is_where_margin_meets_the_factor(client):
    body = client.post("/v1/scale-up", json=DEMO).json
    largest = body["largest_adequate_volume"]
    assert largest is not None and not body["adequate_beyond_search"]
    probe = dict(DEMO, targets=[{"volume": largest}])
    margin = client.post("/v1/scale-up", json=probe).json["scales"][1]["margin"]
    assert margin == pytest.approx(DEMO["safety_factor"], rel=1e-5)  # definition of the solved limit


def test_scale_up_csv_one_row_per_scale_and_charts(client):
    csv = client.post("/v1/scale-up?format=csv", json=DEMO).get_data(as_text=True).splitlines()
    assert len(csv) == 1 + 3 and "cooling_capacity [W]" in csv[0]
    assert csv[0].startswith("name,volume [m^3],")  # the columns that say which scale a row is come first
    svg = client.post("/v1/scale-up?format=svg", json=DEMO)
    assert svg.mimetype == "image/svg+xml" and svg.data.lstrip().startswith((b"<?xml", b"<svg"))
    png = client.post("/v1/scale-up", json=DEMO, headers={"Accept": "image/png"})
    assert png.mimetype == "image/png" and png.data.startswith(b"\x89PNG")


def test_scale_up_batch_isolates_a_bad_case(client):
    body = {"cases": [DEMO, dict(DEMO, rule="constant_froude")]}
    response = client.post("/v1/scale-up/batch", json=body)
    cases = response.json["cases"]
    assert [c["status"] for c in cases] == [200, 422]
    assert cases[1]["problem"]["errors"][0]["field"] == "cases[1].rule"
    assert "Deprecation" not in response.headers
    # the older form on the calculation's own path answers the same for one release, marked deprecated
    # (RFC 9745: Deprecation "@" epoch seconds; RFC 8288 Link to the successor)
    old = client.post("/v1/scale-up", json=body)
    assert old.json["cases"][0] == cases[0] and old.json["cases"][1]["status"] == 422
    assert old.headers["Deprecation"].startswith("@") and int(old.headers["Deprecation"][1:]) > 0
    assert old.headers["Link"] == '</v1/scale-up/batch>; rel="successor-version"'
    # the batch route takes only a batch
    single = client.post("/v1/scale-up/batch", json=DEMO)
    assert single.status_code == 422 and single.json["errors"][0]["field"] == "cases"


def test_cli_scale_up_exit_code(tmp_path):
    path = tmp_path / "demo.json"
    path.write_text(json.dumps(DEMO))
    run = subprocess.run([sys.executable, "-m", "api.cli", "scale-up", str(path)], cwd=ROOT,
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 1 and "NOT ADEQUATE" in run.stdout  # the demo's production vessel falls short


def test_spreadsheet_url_in_the_demo_guide_answers_one_number(client):
    # The GET form must give the same answer as the JSON body it flattens (one schema serves both).
    guide = (ROOT / "examples" / "README.md").read_text()
    url = next(line.strip() for line in guide.splitlines() if line.strip().startswith("http://127.0.0.1:8000/v1/cooling-check?"))
    text = client.get(url.split("8000", 1)[1]).get_data(as_text=True)
    posted = client.post("/v1/cooling-check", json=EXAMPLE).json["margin"]
    assert float(text) == pytest.approx(posted, rel=1e-11)  # text answers carry 12 significant figures


def test_internal_error_in_one_batch_case_is_that_case_only(client, monkeypatch, caplog):
    # A fault inside one case (here an injected bug) answers that case with a 500 problem carrying the
    # request id and is logged; the other cases are computed as usual.
    from calc.checks import cooling_check

    real = cooling_check.cooling_check

    def flaky(vessel, *args, **kwargs):
        if vessel.name == "broken":
            raise RuntimeError("injected fault")
        return real(vessel, *args, **kwargs)

    monkeypatch.setattr(cooling_check, "cooling_check", flaky)
    logger = logging.getLogger("coolmargin")  # the service logger does not propagate to caplog's root
    logger.addHandler(caplog.handler)
    broken = dict(EXAMPLE, vessel=dict(EXAMPLE["vessel"], name="broken"))
    response = client.post("/v1/cooling-check", json={"cases": [broken, EXAMPLE]},
                           headers={"X-Request-ID": "batch-fault-1"})
    assert response.status_code == 200
    first, second = response.json["cases"]
    assert first["status"] == 500 and first["problem"]["instance"] == "urn:request:batch-fault-1"
    assert "injected fault" not in json.dumps(first)  # no internals leak to the caller
    assert second["status"] == 200 and second["result"]["adequate"] is True
    logger.removeHandler(caplog.handler)
    assert any("batch case 0 failed" in record.getMessage() and record.request_id == "batch-fault-1"
               for record in caplog.records)


def test_explicit_target_without_agitator_is_422_naming_it(client):
    # Found by contract fuzzing once the demo became an example in the contract: it was a 500.
    target = {"vessel": {k: v for k, v in DEMO["targets"][1]["vessel"].items() if k != "agitator"}}
    body = client.post("/v1/scale-up", json=dict(DEMO, targets=[target])).json
    assert body["status"] == 422 and body["errors"][0]["field"] == "targets[0].vessel.agitator"


def test_scale_up_target_cap_is_the_setting_and_answers_413():
    # The contract in README.md (COOLMARGIN_MAX_SCALES, default 20, "413 above"): 21 targets are a 413
    # naming the field, and raising the setting lets the same request through.
    from api import create_app

    body = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())
    body["targets"] = [{"volume": 0.01 * (i + 1)} for i in range(21)]
    refused = create_app({"TESTING": True}).test_client().post("/v1/scale-up", json=body)
    assert refused.status_code == 413 and refused.mimetype == "application/problem+json"
    assert refused.json["errors"] == [{"field": "targets", "message": "at most 20 targets per scale-up, got 21"}]
    raised = create_app({"TESTING": True, "MAX_SCALES": 21}).test_client().post("/v1/scale-up", json=body)
    assert raised.status_code == 200 and len(raised.json["scales"]) == 22  # the reference and 21 targets
