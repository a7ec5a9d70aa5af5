"""Margin band: the margin over the published alternatives of each resistance."""
import json
from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from calc.checks.cooling_check import cooling_check
from schemas.cooling import CoolingCheckRequestSchema

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def _load(name, **changes):
    body = json.loads((EXAMPLES / name).read_text())
    body.update(changes)
    return CoolingCheckRequestSchema().load(body)


def _check(args, vessel=None, **options):
    return cooling_check(vessel or args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                         args["heat_release"], args["safety_factor"], limits=False, **options)


def _lab_annular():
    """An annular-jacketed turbine vessel with a coil: every kind of member (invented demo geometry)."""
    body = json.loads((EXAMPLES / "cooling_check_production.json").read_text())
    body["vessel"]["jacket"] = {"type": "annular", "gap": "40 mm", "inlet_diameter": "50 mm"}
    body["vessel"]["agitator"]["impeller"] = "rushton_turbine"
    body["vessel"]["coils"] = [{"tube_outer_diameter": "48 mm", "tube_wall": "3 mm", "helix_diameter": "1.4 m",
                                "turns": 6, "pitch": "100 mm", "elevation": "0.3 m"}]
    return CoolingCheckRequestSchema().load(body)


@pytest.mark.parametrize("args", [_load("cooling_check_production.json"), _lab_annular()])
def test_band_contains_nominal_and_reproduces_each_alternative_chosen_alone(args):
    # Definition (issue 12): every single-resistance member's margin is what the check gives when that
    # alternative is chosen in the request's correlations; the band spans them and the nominal margin.
    check = _check(args)
    band = check.margin_band
    assert band.low <= check.margin <= band.high
    singles = [m for m in band.members if m.resistance != "joint"]
    assert {m.resistance for m in singles} >= {"process_wall"}
    for member in singles:
        alone = _check(args, vessel=replace(args["vessel"], correlations=member.choice), band=False)
        # members are solved by the vectorised network, which agrees with the scalar one to 1e-9
        assert alone.margin == pytest.approx(member.margin, rel=1e-8), member
    margins = [m.margin for m in band.members] + [check.margin]
    assert band.low == min(margins) and band.high == max(margins)


def test_annular_band_spans_lehrer_and_stein_schmidt():
    # Stein & Schmidt (1993) vs Lehrer (1970) on one annular jacket (VDI Heat Atlas example: 5695 vs 2922 W/m2K):
    # both must be members, and the coil-side members appear when the vessel has a coil.
    band = _check(_lab_annular()).margin_band
    kinds = {(m.resistance, m.alternative) for m in band.members}
    assert ("annular_jacket", "stein_schmidt_1993") in kinds
    # the disc turbine's coil has a published alternative (Oldshue & Gretton's own form), so no +-25 % members
    assert ("process_coil", "oldshue_gretton_1954_original") in kinds and ("coil_tube", "mori_nakayama_1967") in kinds
    assert not any(m.resistance == "process_coil" and m.alternative.startswith("constant_x") for m in band.members)
    assert any(m.resistance == "joint" for m in band.members)


def test_statement_when_the_verdict_holds_only_at_nominal():
    # Choose the safety factor just below the nominal margin: adequate, yet the low end falls short.
    args = _lab_annular()
    nominal = _check(args, band=False).margin
    check = cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                          args["heat_release"], nominal * 0.999, limits=False)
    band = check.margin_band
    assert check.adequate and band.low < check.safety_factor and not band.holds_across_band
    assert "NOT across the band" in band.statement and band.low_set_by in band.statement
    assert "verdict_not_robust" in {w.code for w in check.warnings}


def test_band_over_http_and_in_csv(client):
    body = json.loads((EXAMPLES / "scale_up_demo.json").read_text())
    payload = client.post("/v1/scale-up", json=body).get_json()
    for scale in payload["scales"]:
        band = scale["margin_band"]
        assert band["low"] <= scale["margin"] <= band["high"] and band["basis"] == "published_alternatives"
        assert scale["calibrated"] is False
    header = client.post("/v1/scale-up?format=csv", json=body).data.decode().split("\r\n")[0].split(",")
    assert header[7:9] == ["margin_band.low", "margin_band.high"]


@settings(max_examples=8, deadline=None)
@given(st.floats(0.3, 3.0), st.floats(20.0, 200.0))
def test_band_always_contains_the_nominal_margin(flow_factor, rpm):
    # Invariant of the construction, over flows and speeds of the annular test vessel.
    args = _lab_annular()
    vessel = args["vessel"]
    vessel = replace(vessel, agitator=replace(vessel.agitator, speed=rpm / 60.0))
    coolant = args["coolant"].with_mass_flow(args["coolant"].mass_flow() * flow_factor)
    check = cooling_check(vessel, args["charge"], coolant, args["process_temperature"], args["heat_release"],
                          args["safety_factor"], limits=False)
    assert check.margin_band.low <= check.margin <= check.margin_band.high


def _calibrated_body(interval_a=(0.40, 0.60), interval_r=(0.8e-3, 1.2e-3)):
    from tests.test_correlation_choice import _body

    body = _body("rushton_turbine", 120.0, 2.5, heat_release={"model": "total_power", "power": 2.0e5})
    body["calibration"] = {"process_constant": 0.5, "process_constant_interval": list(interval_a),
                           "remaining_resistance": 1.0e-3, "remaining_resistance_interval": list(interval_r)}
    return body


def test_calibrated_film_and_u_rederived_by_hand(client):
    # Calibration: Nu = a Re^(2/3) Pr^(1/3) (mu/mu_w)^0.14 with the vessel's own a (constant viscosity, so the
    # wall factor is 1), and 1/U = 1/h + R_remaining on the jacket (Wilson 1915 decomposition).
    result = client.post("/v1/cooling-check", json=_calibrated_body()).get_json()
    assert result["calibrated"] is True and result["margin_band"]["basis"] == "calibration"
    heat = result["heat_transfer"]
    Re, Pr = heat["agitation"]["reynolds"], 1800.0 * 0.05 / 0.15
    h = 0.5 * Re ** (2 / 3) * Pr ** (1 / 3) * 0.15 / 1.5
    assert heat["film_coefficients"]["process_jacket"] == pytest.approx(h, rel=1e-9)
    shell = heat["resistances"]
    beyond = ("process_fouling", "lining", "wall", "service_fouling", "service_film")
    assert sum(shell[k] for k in beyond) == pytest.approx(1e-3, rel=1e-9)
    assert shell["surface_efficiency"] == 1.0  # an annular jacket wets the whole wall


def test_calibrated_band_is_the_fit_interval_and_shrinks_with_it(client):
    # The band comes from the fit's intervals (issue 12): its ends are the interval ends' margins; a zero-width
    # interval collapses the band onto the nominal margin.
    wide = client.post("/v1/cooling-check", json=_calibrated_body()).get_json()
    band = wide["margin_band"]
    names = {m["resistance"] for m in band["members"]}
    assert names <= {"calibrated_process_constant", "calibrated_remaining_resistance", "joint"}
    assert band["low"] < wide["margin"] < band["high"]
    narrow = client.post("/v1/cooling-check", json=_calibrated_body((0.5, 0.5), (1e-3, 1e-3))).get_json()
    assert narrow["margin_band"]["low"] == pytest.approx(narrow["margin"], rel=1e-9)
    assert narrow["margin_band"]["high"] == pytest.approx(narrow["margin"], rel=1e-9)
    published = client.post("/v1/cooling-check", json={k: v for k, v in _calibrated_body().items()
                                                        if k != "calibration"}).get_json()
    assert published["calibrated"] is False and published["margin_band"]["basis"] == "published_alternatives"


def test_scale_up_carries_the_calibrated_constant_and_says_so(client):

    body = _calibrated_body()
    scale = {"reference": body["vessel"], "targets": [{"volume": 10.0}], "rule": "constant_power_per_volume",
             "charge": body["charge"], "coolant": body["coolant"], "process_temperature": 60.0,
             "heat_release": {"model": "specific_power", "power_per_mass": 20.0}, "calibration": body["calibration"]}
    result = client.post("/v1/scale-up", json=scale).get_json()
    assert all(s["calibrated"] for s in result["scales"])
    assert "calibration_carried" in {w["code"] for w in result["warnings"]}
    target = result["scales"][1]["heat_transfer"]
    Re = target["agitation"]["reynolds"]
    D = result["scales"][1]["diameter"]
    h = 0.5 * Re ** (2 / 3) * (1800.0 * 0.05 / 0.15) ** (1 / 3) * 0.15 / D  # the reference's a, at the new scale
    assert target["film_coefficients"]["process_jacket"] == pytest.approx(h, rel=1e-9)
    # the measured remaining resistance stays with the measured vessel
    others = sum(target["resistances"][k] for k in ("process_fouling", "lining", "wall", "service_fouling",
                                                   "service_film"))
    assert others != pytest.approx(1e-3, rel=1e-3)


def test_simulation_with_a_calibration_says_so_and_uses_it(client):
    # The run's UA comes from the network with the calibrated constant: a lower a gives a hotter run.
    body = json.loads((EXAMPLES / "simulation_production_failure.json").read_text())
    plain = client.post("/v1/simulations", json=body).get_json()
    body["vessel"]["calibration"] = {"process_constant": 0.2}
    calibrated = client.post("/v1/simulations", json=body).get_json()
    assert "calibrated" in {w["code"] for w in calibrated["warnings"]}
    assert "calibrated" not in {w["code"] for w in plain["warnings"]}
    assert calibrated["summary"]["maximum_temperature"] > plain["summary"]["maximum_temperature"]


def test_fouling_members_are_the_check_with_the_stated_fouling_doubled_and_clean():
    # Issue 12: the band reflects the process-side fouling uncertainty. Each labelled member equals the plain check
    # of the same vessel with its stated process fouling doubled, or zero (a clean wall), set on the vessel itself.
    args = _lab_annular()
    vessel = replace(args["vessel"], fouling=replace(args["vessel"].fouling, process=4e-4))
    band = _check(args, vessel=vessel).margin_band
    members = {m.alternative: m.margin for m in band.members if m.resistance == "process_fouling"}
    assert set(members) == {"doubled", "clean"}
    for label, resistance in (("doubled", 8e-4), ("clean", 0.0)):
        plain = _check(args, vessel=replace(vessel, fouling=replace(vessel.fouling, process=resistance)), band=False)
        assert members[label] == pytest.approx(plain.margin, rel=1e-8)
    assert members["doubled"] < _check(args, vessel=vessel, band=False).margin < members["clean"]
    # a clean wall stated has nothing to vary; a calibration's measurement includes the fouling of its day
    clean = replace(vessel, fouling=replace(vessel.fouling, process=0.0))
    assert not any(m.resistance == "process_fouling" for m in _check(args, vessel=clean).margin_band.members)
