"""A sign slip in a reaction enthalpy must never read as "adequate" or "safe".

Reference for the convention: the thermodynamic sign of a reaction enthalpy, negative when the reaction
releases heat (common practice, no source). Engineers also quote heats of reaction as positive numbers,
so every place that reads a molar reaction enthalpy refuses a positive one with a 422 that explains the
convention, unless the request declares a heat-absorbing step explicitly.
"""
import copy
import json
import subprocess
import sys

import pytest

from serving import ROOT


def _example(name: str) -> dict:
    return json.loads((ROOT / "examples" / name).read_text())


CHECK = _example("cooling_check_production.json")
SCALE = _example("scale_up_demo.json")
SIMULATION = _example("simulation_production_failure.json")
CSTR = _example("cstr_steady_states.json")
SAFETY = _example("thermal_safety_production.json")


def _flipped(body: dict) -> dict:
    """The same request with the exothermic enthalpy entered as a positive number."""
    body = copy.deepcopy(body)
    body["heat_release"]["reaction_enthalpy"] = "165 kJ/mol"
    return body


def _assert_sign_problem(response, field: str):
    assert response.status_code == 422, response.get_data(as_text=True)
    assert response.mimetype == "application/problem+json"
    errors = response.json["errors"]
    assert [e["field"] for e in errors] == [field]
    assert "negative" in errors[0]["message"] and "exothermic" in errors[0]["message"]


@pytest.mark.parametrize("query", ["", "?field=adequate", "?format=csv"])
def test_positive_enthalpy_in_a_cooling_check_is_a_422(client, query):
    assert CHECK["heat_release"]["reaction_enthalpy"].startswith("-")  # the example itself is exothermic
    _assert_sign_problem(client.post(f"/v1/cooling-check{query}", json=_flipped(CHECK)),
                         "heat_release.reaction_enthalpy")


def test_positive_enthalpy_in_a_scale_up_and_a_batch_case_is_a_422(client):
    _assert_sign_problem(client.post("/v1/scale-up", json=_flipped(SCALE)), "heat_release.reaction_enthalpy")
    batch = client.post("/v1/cooling-check", json={"cases": [CHECK, _flipped(CHECK)]}).json["cases"]
    assert [case["status"] for case in batch] == [200, 422]
    assert batch[1]["problem"]["errors"][0]["field"] == "cases[1].heat_release.reaction_enthalpy"


def test_declared_endothermic_step_is_answered_honestly(client):
    body = _flipped(CHECK)
    body["heat_release"]["endothermic"] = True
    answer = client.post("/v1/cooling-check", json=body).json
    # definition: -dH n / t_dose with dH = +165 kJ/mol is a heat uptake
    assert answer["heat_load"]["reaction"] == pytest.approx(-165e3 * 2900 / 7200, rel=1e-9)
    assert "endothermic_step" in [w["code"] for w in answer["warnings"]]
    assert any("heat-absorbing" in c for c in answer["cautions"])
    # and the declaration must agree with the sign
    wrong = copy.deepcopy(CHECK)
    wrong["heat_release"]["endothermic"] = True
    response = client.post("/v1/cooling-check", json=wrong)
    assert response.status_code == 422 and response.json["errors"][0]["field"] == "heat_release.endothermic"


def test_cli_refuses_a_positive_enthalpy_with_exit_status_2(tmp_path):
    path = tmp_path / "flipped.json"
    path.write_text(json.dumps(_flipped(CHECK)))
    run = subprocess.run([sys.executable, "-m", "api.cli", "check", str(path)], cwd=ROOT,
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 2 and "ADEQUATE" not in run.stdout
    assert "heat_release.reaction_enthalpy" in run.stderr


def test_thermal_safety_refuses_a_positive_enthalpy(client):
    body = {k: v for k, v in SAFETY.items() if k != "reaction_energy"}
    body.update(reaction_enthalpy="165 kJ/mol", concentration="660 mol/m^3", density=870)
    _assert_sign_problem(client.post("/v1/thermal-safety", json=body), "reaction_enthalpy")
    body["reaction_enthalpy"] = "-165 kJ/mol"
    assert client.post("/v1/thermal-safety", json=body).status_code == 200


def test_simulation_and_cstr_refuse_a_positive_enthalpy_unless_declared(client):
    simulation = copy.deepcopy(SIMULATION)
    simulation["reactions"][0]["enthalpy"] = "165 kJ/mol"
    _assert_sign_problem(client.post("/v1/simulations", json=simulation), "reactions[0].enthalpy")
    cstr = dict(CSTR, reaction_enthalpy="120 kJ/mol")
    _assert_sign_problem(client.post("/v1/cstr-steady-states", json=cstr), "reaction_enthalpy")
    declared = client.post("/v1/cstr-steady-states", json=dict(cstr, endothermic=True))
    assert declared.status_code == 200
    # a heat-absorbing reaction has a falling heat-generation curve, so the CSTR has one stable state, below the
    # feed and coolant temperature (30 degC) (common practice, no source: van Heerden's slope argument)
    states = declared.json["states"]
    assert len(states) == 1 and states[0]["stable"] and states[0]["temperature"] < 30.0
