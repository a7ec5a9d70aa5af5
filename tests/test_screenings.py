"""Fleet screening over the stored demo plant, on SQLite and the real PostgreSQL.

Oracle: each row must equal /v1/cooling-check of the same vessel, utility and step, named by reference
and sent inline, to 1e-9 (the screening batches the checks on the vectorised network, it does not compute
differently); the ranking rule (adequate first, then by margin)
and the verdict rule (adequate when margin >= safety factor) are the contract's own, common practice, no
source. RFC 9110 §15.3.2 for 201 + Location.
"""
from __future__ import annotations

import pytest

from plant import load_plant, record


@pytest.fixture()
def plant(store_client):
    load_plant(store_client)
    return store_client


def _inline_check(client, vessel_tag: str, step_tag: str) -> dict:
    vessel = record("vessel", vessel_tag)
    step = record("step", step_tag)
    body = {"vessel": vessel["vessel"], "coolant": record("utility", vessel["utility"])["coolant"],
            **{k: step[k] for k in ("charge", "process_temperature", "heat_release", "safety_factor")}}
    return client.post("/v1/cooling-check", json=body)


def _same(row_value, check_value) -> bool:
    """Equal to 1e-9 (relative), or both absent."""
    if row_value is None or check_value is None:
        return row_value is None and check_value is None
    return row_value == pytest.approx(check_value, rel=1e-9, abs=1e-12)


def test_rows_equal_the_checks_by_reference_and_are_ranked(plant):
    response = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"}})
    assert response.status_code == 201 and response.headers["Location"] == f"/v1/screenings/{response.json['id']}"
    answer = response.get_json()
    rows = answer["rows"]
    assert [row["rank"] for row in rows] == list(range(1, 9))
    assert answer["counts"]["screened"] == 8 == sum(v for k, v in answer["counts"].items() if k != "screened")
    for row in rows:  # every row is the cooling check of its vessel, named by reference, to 1e-9
        by_ref = plant.post("/v1/cooling-check", json={"vessel": {"ref": row["tag"]}, "step": {"ref": "AC-7-FAST"}})
        if row["verdict"] == "no verdict":
            assert by_ref.status_code == 422 and row["problem"]["field"] == by_ref.json["errors"][0]["field"]
            assert row["margin_band"] is None and row["verdict_not_robust"] is None
            continue
        check = by_ref.get_json()
        assert row["adequate"] == check["adequate"] and row["controlling"] == check["heat_transfer"]["resistances"][
            "controlling"]
        pairs = {"margin": check["margin"], "heat_load": check["heat_load"]["total"],
                 "cooling_capacity": check["cooling_capacity"],
                 "coolant_outlet_temperature": check["coolant_outlet_temperature"],
                 "overall_coefficient": check["heat_transfer"]["overall_coefficient"],
                 **{name: check["limits"][name] for name in ("minimum_dosing_time", "maximum_coolant_inlet_temperature",
                                                             "required_coolant_flow")}}
        assert all(_same(row[name], value) for name, value in pairs.items()), (row["tag"], pairs)
        band = check["margin_band"]
        assert _same(row["margin_band"]["low"], band["low"]) and _same(row["margin_band"]["high"], band["high"])
        assert row["margin_band"]["low_set_by"] == band["low_set_by"] and "members" not in row["margin_band"]
        assert row["verdict_not_robust"] is (not band["holds_across_band"])
        assert [w["code"] for w in row["warnings"]] == [w["code"] for w in check["warnings"]]
        assert row["verdict"] == ("adequate" if check["margin"] >= answer["safety_factor"] else "not adequate")
        assert row["utility"]["tag"] == next(r["tag"] for r in check["records"] if r["kind"] == "utility")
    # and the same as the check sent inline (the records as the demo plant gives them)
    inline = _inline_check(plant, rows[0]["tag"], "AC-7-FAST").get_json()
    assert _same(rows[0]["margin"], inline["margin"])
    verdicts = [row["verdict"] for row in rows]
    assert verdicts == sorted(verdicts, key=["adequate", "not adequate", "no verdict"].index)
    margins = [row["margin"] for row in rows if row["verdict"] == "not adequate"]
    assert margins == sorted(margins, reverse=True)
    # the 4.6 m^3 batch does not fit the laboratory, pilot, 1.6 m^3 or 4 m^3 vessels
    assert {row["tag"] for row in rows if row["verdict"] == "no verdict"} == {"Lark", "Pelican", "Heron", "Egret"}
    assert any("licensed engineer" in caution for caution in answer["cautions"])
    assert {r["tag"] for r in answer["records"] if r["kind"] == "utility"} == {"GLY-5", "CW-24", "GLY-LAB", "GLY-M5"}


def test_a_band_across_the_safety_factor_flags_the_row(plant):
    """Where the band crosses the safety factor the row says the verdict is not robust (the check's own rule:
    adequate rows need low >= factor, inadequate ones high < factor; common practice, no source)."""
    step = record("step", "AC-7-FAST")

    def screened(factor: float) -> dict:
        body = {"step": {**{k: step[k] for k in ("charge", "process_temperature", "heat_release")},
                         "safety_factor": factor}, "vessels": ["Cormorant", "Puffin"]}
        return {row["tag"]: row for row in plant.post("/v1/screenings", json=body).json["rows"]}

    first = screened(1.0)["Cormorant"]["margin_band"]  # the band does not depend on the factor asked for
    factor = round((first["low"] + first["high"]) / 2.0, 3)  # a factor inside Cormorant's band (about 1.2-1.6)
    rows = screened(factor)
    for row in rows.values():
        band = row["margin_band"]
        crosses = band["low"] < factor <= band["high"]
        assert row["verdict_not_robust"] is crosses
        assert ("verdict_not_robust" in [w["code"] for w in row["warnings"]]) is crosses
    assert rows["Cormorant"]["verdict_not_robust"] is True and rows["Puffin"]["verdict_not_robust"] is False


def test_selection_by_list_and_filter_and_a_common_coolant(plant):
    listed = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}, "vessels": ["Gannet", "Puffin"],
                                                "coolant": {"ref": "GLY-5"}}).get_json()
    assert {row["tag"] for row in listed["rows"]} == {"Puffin", "Gannet"}
    # the same vessel geometry with the same coolant: the same margin
    assert listed["rows"][0]["margin"] == listed["rows"][1]["margin"]
    assert all(row["utility"] is None for row in listed["rows"])
    filtered = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"},
                                                  "vessels": {"jacket_type": "half_pipe", "volume_min": "7 m^3"}})
    assert {row["tag"] for row in filtered.json["rows"]} == {"Cormorant", "Albatross"}
    unknown = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}, "vessels": ["Puffin", "R-999"]})
    assert unknown.status_code == 422 and unknown.json["errors"][0]["field"] == "vessels[1]"
    empty = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}, "vessels": {"tag": "X-*"}})
    assert empty.status_code == 422 and empty.json["errors"][0]["field"] == "vessels"


def test_an_inline_step_works_without_a_stored_one(plant):
    step = record("step", "AC-7-PROD")
    inline = {k: step[k] for k in ("charge", "process_temperature", "heat_release", "safety_factor")}
    by_ref = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}, "vessels": ["Puffin"]}).json
    given = plant.post("/v1/screenings", json={"step": inline, "vessels": ["Puffin"]}).json
    assert given["step"] is None and given["rows"][0]["margin"] == by_ref["rows"][0]["margin"]


def test_stored_rerun_says_what_changed(plant):
    first = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"}}).get_json()
    assert first["changes"] is None
    again = plant.post(f"/v1/screenings/{first['id']}/rerun").get_json()
    assert again["changes"]["previous_id"] == first["id"] and again["changes"]["items"] == []
    assert plant.get(f"/v1/screenings/{first['id']}").get_json() == first  # stored as answered
    etag = plant.get("/v1/vessels/Cormorant").headers["ETag"]
    plant.patch("/v1/vessels/Cormorant", json={"vessel": {"agitator": {"speed": "60 rpm"}}}, headers={"If-Match": etag})
    plant.delete("/v1/vessels/Albatross")
    third = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"}}).get_json()
    changes = {item["tag"]: item for item in third["changes"]["items"]}
    assert set(changes) == {"Cormorant", "Albatross"}
    assert changes["Albatross"]["change"] == "removed"
    r800 = changes["Cormorant"]
    assert r800["change"] == "changed" and "vessel Cormorant revision 1 -> Cormorant revision 2" in r800["details"]
    assert r800["margin_after"] < r800["margin_before"]  # slower agitator, thinner process film
    listing = plant.get("/v1/screenings").json
    assert listing["total"] == 3 and listing["items"][0]["id"] == third["id"]


def test_csv_and_chart(plant):
    created = plant.post("/v1/screenings?format=csv", json={"step": {"ref": "AC-7-FAST"}})
    assert created.status_code == 201 and created.mimetype == "text/csv"
    lines = created.get_data(as_text=True).splitlines()
    assert lines[0].startswith("rank,tag,verdict,margin,minimum_dosing_time [s],maximum_coolant_inlet_temperature "
                               "[degC],controlling,margin_band.low,margin_band.high,verdict_not_robust") and len(lines) == 9
    assert ",margin_band," not in lines[0] + "," and ",problem," not in lines[0] + ","  # only their own columns
    answer = plant.get(created.headers["Location"]).json
    first = dict(zip(lines[0].split(","), lines[1].split(",")))
    assert float(first["margin_band.low"]) == pytest.approx(answer["rows"][0]["margin_band"]["low"], rel=1e-11)
    svg = plant.get(created.headers["Location"] + "?format=svg")
    assert svg.mimetype == "image/svg+xml" and b"safety factor 1.3" in svg.data and b"Cormorant" in svg.data
    # the house palette and markers (api.charts): filled teal circles adequate, open amber triangles NOT adequate
    # labelled so, the band as error bars
    assert b"fill: #3a9a8f" in svg.data and b"stroke: #d98b2b" in svg.data and b"NOT adequate" in svg.data
    assert b"margin band" in svg.data


def test_answers_follow_the_requested_presentation(plant):
    """output_units, unit.<field>, digits, decimal=comma and field= as on every calculation (issue 15); a
    minute is 60 s and degF = degC x 9/5 + 32 (SI brochure, NIST SP 811)."""
    created = plant.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"}})
    location, si = created.headers["Location"], created.json
    metric = plant.get(location + "?output_units=metric").json
    assert metric["units"]["rows.minimum_dosing_time"] == "min" and metric["units"]["rows.heat_load"] == "kW"
    assert metric["rows"][0]["minimum_dosing_time"] == pytest.approx(si["rows"][0]["minimum_dosing_time"] / 60.0,
                                                                     rel=1e-12)
    us = plant.post("/v1/screenings?output_units=us&unit.rows.minimum_dosing_time=h",
                    json={"step": {"ref": "AC-7-FAST"}}).json
    assert us["units"]["rows.maximum_coolant_inlet_temperature"] == "degF"
    assert us["rows"][0]["maximum_coolant_inlet_temperature"] == pytest.approx(
        si["rows"][0]["maximum_coolant_inlet_temperature"] * 9 / 5 + 32, rel=1e-12)
    assert us["rows"][0]["minimum_dosing_time"] == pytest.approx(si["rows"][0]["minimum_dosing_time"] / 3600.0)
    stored = plant.get(location).json  # stored in the default units, whatever the request asked
    assert stored["rows"][0]["minimum_dosing_time"] == si["rows"][0]["minimum_dosing_time"]
    assert plant.get(location + "?digits=3").json["rows"][0]["margin"] == float(f"{si['rows'][0]['margin']:.3g}")
    comma = plant.get(location + "?format=csv&decimal=comma&output_units=metric").get_data(as_text=True).splitlines()
    header = comma[0].split(";")
    assert "minimum_dosing_time [min]" in header
    value = comma[1].split(";")[header.index("margin")]
    assert "," in value and float(value.replace(",", ".")) == pytest.approx(si["rows"][0]["margin"], rel=1e-11)
    assert plant.get(location + "?field=rows[0].adequate").get_data(as_text=True) == "TRUE\n"
    assert plant.get(location + "?field=rows[7].adequate").get_data(as_text=True) == "\n"  # no verdict: empty
    wrong = plant.post("/v1/screenings?output_units=imperial", json={"step": {"ref": "AC-7-FAST"}})
    assert wrong.status_code == 422 and wrong.json["errors"][0]["field"] == "output_units"
    assert plant.get("/v1/screenings").json["total"] == 2  # the refused request ran no screening


def test_size_limit_and_time_budget(database_url):
    from api import create_app

    app = create_app({"TESTING": True, "DATABASE_URL": database_url, "MAX_SCREENING_VESSELS": 3,
                      "SCREENING_WALL_TIME": 0.0})
    client = app.test_client()
    try:
        load_plant(client)
        too_many = client.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"}})
        assert too_many.status_code == 413 and too_many.json["errors"][0]["field"] == "vessels"
        partial = client.post("/v1/screenings", json={"step": {"ref": "AC-7-FAST"},
                                                      "vessels": ["Puffin", "Cormorant", "Albatross"]}).get_json()
        assert partial["status"] == "partial" and partial["warnings"][0]["code"] == "screening_budget"
        assert partial["counts"]["not_evaluated"] >= 2
    finally:
        app.extensions["coolmargin.catalogue"].dispose()



def test_catalogue_and_screening_answers_conform_to_the_contract(plant):
    from test_openapi import SPEC_PATH, check_contract
    import json

    from openapi_core import Config, OpenAPI

    contract = OpenAPI.from_file_path(str(SPEC_PATH), config=Config(extra_media_type_deserializers={
        "application/problem+json": json.loads}))
    body = {"step": {"ref": "AC-7-FAST"}}
    created = plant.post("/v1/screenings", json=body)
    check_contract(contract, created, body)
    check_contract(contract, plant.get(created.headers["Location"]))
    check_contract(contract, plant.get("/v1/screenings"))
    check_contract(contract, plant.get("/v1/vessels?volume_min=1"))
    check_contract(contract, plant.get("/v1/vessels/Puffin"))
    check_contract(contract, plant.get("/v1/steps/AC-7-FAST/revisions"))
    check_contract(contract, plant.get("/v1/utilities/GLY-5/revisions/1"))
    check = {"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}}
    check_contract(contract, plant.post("/v1/cooling-check", json=check), check)
