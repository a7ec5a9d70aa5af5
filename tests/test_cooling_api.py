"""The cooling-check resource end to end: verdict, batch, CSV and the command-line client's exit codes."""
import json
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
    assert client.post("/v1/cooling-check?field=adequate", json=EXAMPLE).get_data(as_text=True) == "true\n"


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
