"""Calculations that name stored records with {"ref": ...}, on SQLite and the real PostgreSQL.

Oracle: the same calculation sent inline with the stored content must give the identical result (the
reference form only fills the request in); the result must name the records and revisions it used, and a
pinned revision must reproduce an earlier result exactly (common practice for engineering records: a result
is reproducible from what it names, no source).
"""
from __future__ import annotations

import pytest

from plant import load_plant, record

CHECK = "/v1/cooling-check"


@pytest.fixture()
def plant(store_client):
    load_plant(store_client)
    return store_client


def _inline(vessel_tag: str, step_tag: str, utility_tag: str) -> dict:
    step = record("step", step_tag)
    return {"vessel": record("vessel", vessel_tag)["vessel"], "coolant": record("utility", utility_tag)["coolant"],
            **{k: step[k] for k in ("charge", "process_temperature", "heat_release", "safety_factor")}}


def test_a_check_by_reference_equals_the_same_check_inline(plant):
    by_ref = plant.post(CHECK, json={"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}})
    inline = plant.post(CHECK, json=_inline("Puffin", "AC-7-PROD", "GLY-5"))
    assert by_ref.status_code == inline.status_code == 200
    by_ref, inline = by_ref.get_json(), inline.get_json()
    used = by_ref.pop("records")
    assert by_ref == inline
    assert {(u["kind"], u["tag"], u["revision"], u["used_as"]) for u in used} == {
        ("vessel", "Puffin", 1, "vessel"), ("step", "AC-7-PROD", 1, "step"),
        ("utility", "GLY-5", 1, "coolant (the vessel's utility)")}
    assert "records" not in inline


def test_results_follow_the_current_revision_and_a_pinned_revision_reproduces_the_old_one(plant):
    first = plant.post(CHECK, json={"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}}).json
    etag = plant.get("/v1/vessels/Puffin").headers["ETag"]
    slower = plant.patch("/v1/vessels/Puffin", json={"vessel": {"agitator": {"speed": "60 rpm"}}},
                         headers={"If-Match": etag})
    assert slower.status_code == 200
    second = plant.post(CHECK, json={"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}}).json
    # a slower agitator lowers the process film coefficient (h ~ N^(2/3), Chilton-Drew-Jebens form), so capacity
    assert second["cooling_capacity"] < first["cooling_capacity"]
    assert [u["revision"] for u in second["records"] if u["kind"] == "vessel"] == [2]
    pinned = plant.post(CHECK, json={"vessel": {"ref": "Puffin", "revision": 1}, "step": {"ref": "AC-7-PROD"}}).json
    assert pinned["margin"] == first["margin"] and pinned["cooling_capacity"] == first["cooling_capacity"]


def test_fields_beside_a_step_and_an_explicit_coolant_override_the_stored_ones(plant):
    body = {"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}, "coolant": {"ref": "CW-24"},
            "safety_factor": 2.5}
    answer = plant.post(CHECK, json=body).json
    inline = plant.post(CHECK, json=_inline("Puffin", "AC-7-PROD", "CW-24") | {"safety_factor": 2.5}).json
    assert answer["safety_factor"] == 2.5 and answer["margin"] == inline["margin"]
    assert ("utility", "CW-24", "coolant") in {(u["kind"], u["tag"], u["used_as"]) for u in answer["records"]}


def test_spreadsheet_get_names_records_too(plant):
    inline = plant.post(CHECK, json=_inline("Cormorant", "AC-7-FAST", "GLY-5")).json
    text = plant.get(f"{CHECK}?vessel.ref=Cormorant&step.ref=AC-7-FAST&field=margin").get_data(as_text=True)
    # Text answers carry 12 significant figures (README, "Spreadsheets"), JSON the full double.
    assert float(text) == pytest.approx(inline["margin"], rel=1e-11)
    assert text.strip() == f"{inline['margin']:.12g}"


def test_the_cooling_failure_scenario_of_a_step_feeds_thermal_safety(plant):
    by_ref = plant.post("/v1/thermal-safety", json={"step": {"ref": "AC-7-PROD"}}).json
    inline = plant.post("/v1/thermal-safety", json=record("step", "AC-7-PROD")["cooling_failure"]).json
    assert by_ref.pop("records")[0]["tag"] == "AC-7-PROD" and by_ref == inline


def test_batch_cases_resolve_their_own_records(plant):
    batch = {"cases": [{"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}},
                       {"vessel": {"ref": "R-404"}, "step": {"ref": "AC-7-PROD"}}]}
    cases = plant.post(CHECK, json=batch).json["cases"]
    assert cases[0]["status"] == 200 and cases[0]["result"]["records"][0]["kind"] in {"vessel", "step", "utility"}
    assert cases[1]["status"] == 422 and cases[1]["problem"]["errors"][0]["field"] == "cases[1].vessel.ref"


@pytest.mark.parametrize("body, field", [
    ({"vessel": {"ref": "R-999"}, "step": {"ref": "AC-7-PROD"}}, "vessel.ref"),
    ({"vessel": {"ref": "Puffin", "revision": 9}, "step": {"ref": "AC-7-PROD"}}, "vessel.ref"),
    ({"vessel": {"ref": "Puffin", "revision": 0}, "step": {"ref": "AC-7-PROD"}}, "vessel.revision"),
    ({"vessel": {"ref": "Puffin"}, "step": {"charge": {}}}, "step"),
    ({"vessel": {"ref": "GLY-5"}, "step": {"ref": "AC-7-PROD"}}, "vessel.ref"),  # a utility is not a vessel
    ({"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}, "coolant": {"ref": 5}}, "coolant.ref"),
])
def test_bad_references_are_422_naming_the_field(plant, body, field):
    response = plant.post(CHECK, json=body)
    assert response.status_code == 422 and response.mimetype == "application/problem+json"
    assert response.json["errors"][0]["field"] == field
