"""A fit attached to a stored vessel, end to end, on SQLite and PostgreSQL: Wilson plot -> new vessel revision
carrying the calibration -> a check by reference is calibrated by default and names that revision -> the
margin band spans the fit's 95 % intervals -> a request can opt out.

Oracles: the Wilson plot decomposition 1/U = 1/h + R (Wilson 1915) as /v1/wilson-plot computes it (tested
against synthetic runs in tests/test_fits.py); the band ends must equal the margins of the same check sent
inline with the interval ends as the process constant (the band is the fit's intervals, issue 12); a
check by reference must equal the check with the same content sent inline (a reference only fills in).
"""
from __future__ import annotations

import json

import pytest

from plant import load_plant, record
from serving import ROOT

WILSON = json.loads((ROOT / "examples" / "wilson_plot_runs.json").read_text())  # runs logged on Puffin
CHECK = {"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}}


@pytest.fixture()
def calibrated(store_client):
    """The demo plant with Puffin's Wilson plot attached as its revision 2; returns (client, fit answer)."""
    load_plant(store_client)
    fit = store_client.post("/v1/wilson-plot", json=WILSON | {"vessel": {"ref": "Puffin"}})
    assert fit.status_code == 200, fit.json
    etag = store_client.get("/v1/vessels/Puffin").headers["ETag"]
    attached = store_client.patch("/v1/vessels/Puffin", headers={"If-Match": etag}, json={"calibration": {
        "source": "wilson-plot", "fit": fit.json["calibration"], "measured_on": "2026-11-20",
        "notes": "four speeds, water batch"}})
    assert attached.status_code == 200 and attached.json["revision"] == 2, attached.json
    return store_client, fit.json


def _inline(calibration: dict | None) -> dict:
    vessel, step = record("vessel", "Puffin"), record("step", "AC-7-PROD")
    body = {"vessel": vessel["vessel"], "coolant": record("utility", vessel["utility"])["coolant"],
            **{k: step[k] for k in ("charge", "process_temperature", "heat_release", "safety_factor")}}
    return body | ({"calibration": calibration} if calibration is not None else {})


def test_the_wilson_plot_of_the_stored_vessel_equals_the_inline_one(store_client):
    load_plant(store_client)
    by_ref = store_client.post("/v1/wilson-plot", json=WILSON | {"vessel": {"ref": "Puffin"}}).json
    inline = store_client.post("/v1/wilson-plot", json=WILSON).json
    assert by_ref["process_constant"] == inline["process_constant"]
    assert by_ref["remaining_resistance"] == inline["remaining_resistance"]


def test_a_check_by_reference_uses_the_attached_fit_and_names_its_revision(calibrated):
    client, fit = calibrated
    answer = client.post("/v1/cooling-check", json=CHECK)
    assert answer.status_code == 200, answer.json
    result = answer.json
    assert result["calibrated"] is True and result["margin_band"]["basis"] == "calibration"
    used = [r for r in result["records"] if r["used_as"].startswith("calibration")]
    assert used == [{"kind": "vessel", "id": used[0]["id"], "tag": "Puffin", "revision": 2,
                     "used_as": "calibration (the vessel's, from wilson-plot)"}]
    assert {"tag": "Puffin", "revision": 2, "used_as": "vessel"}.items() <= next(
        r for r in result["records"] if r["used_as"] == "vessel").items()
    assert "calibrated" in {w["code"] for w in result["warnings"]}
    # the same check with the fit pasted inline: a reference only fills in
    inline = client.post("/v1/cooling-check", json=_inline(fit["calibration"])).json
    assert result["margin"] == inline["margin"] and result["margin_band"] == inline["margin_band"]
    assert any("licensed engineer" in caution for caution in result["cautions"])


def test_the_band_spans_the_fits_interval(calibrated):
    client, fit = calibrated
    result = client.post("/v1/cooling-check", json=CHECK).json
    band = result["margin_band"]
    assert band["low"] < result["margin"] < band["high"]
    nominal = fit["calibration"]
    ends = []
    for a in nominal["process_constant_interval"]:  # each end of the 95 % interval of a, R at its fitted value
        end = nominal | {"process_constant": a, "process_constant_interval": None,
                         "remaining_resistance_interval": None}
        ends.append(client.post("/v1/cooling-check", json=_inline(end)).json["margin"])
    member_margins = [m["margin"] for m in band["members"] if m["resistance"] == "calibrated_process_constant"]
    assert sorted(member_margins) == pytest.approx(sorted(ends), rel=1e-9)
    assert band["low"] <= min(ends) and max(ends) <= band["high"]


def test_a_request_can_opt_out_and_an_older_revision_has_no_fit(calibrated):
    client, _ = calibrated
    published = client.post("/v1/cooling-check", json=CHECK | {"calibration": None}).json
    assert published["calibrated"] is False and published["margin_band"]["basis"] == "published_alternatives"
    assert not [r for r in published["records"] if r["used_as"].startswith("calibration")]
    before = client.post("/v1/cooling-check", json=CHECK | {"vessel": {"ref": "Puffin", "revision": 1}}).json
    assert before["calibrated"] is False and before["margin"] == published["margin"]
    assert client.post("/v1/cooling-check", json=_inline(None)).json["margin"] == published["margin"]


def test_an_attached_fit_is_checked_when_it_is_attached(store_client):
    load_plant(store_client)
    etag = store_client.get("/v1/vessels/Puffin").headers["ETag"]
    bad = store_client.patch("/v1/vessels/Puffin", headers={"If-Match": etag}, json={"calibration": {
        "source": "wilson-plot", "fit": {"process_constant": -1.0, "r_squared": 0.99}}})
    assert bad.status_code == 422
    fields = {e["field"] for e in bad.json["errors"]}
    assert {"calibration.fit.process_constant", "calibration.fit.r_squared"} <= fields, fields


def test_a_screening_uses_the_attached_fit_as_a_check_by_reference_does(calibrated):
    # Oracle: the row of a vessel is the cooling check naming it (issue 14), calibration included.
    client, _ = calibrated
    check = client.post("/v1/cooling-check", json=CHECK).json
    rows = client.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}, "vessels": ["Puffin"]}).json["rows"]
    assert rows[0]["margin"] == pytest.approx(check["margin"], rel=1e-9)
    assert rows[0]["margin_band"]["low"] == pytest.approx(check["margin_band"]["low"], rel=1e-9)
    assert "calibrated" in {w["code"] for w in rows[0]["warnings"]}
