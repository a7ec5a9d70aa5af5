"""API checks of /v1/thermal-safety, /v1/simulations and /v1/cstr-steady-states against closed forms."""
import math

import pytest

R = 8.314462618  # J/(mol K), CODATA 2018 molar gas constant

# Demo step (invented): an 80 degC semi-batch with 30 % accumulation.
SAFETY = {"process_temperature": 80, "heat_capacity": 1800, "reaction_energy": 180e3, "accumulation": 0.3,
          "maximum_technical_temperature": 150,
          "decomposition": {"onset_power": 10, "onset_temperature": 200, "activation_energy": 100e3}}


def test_tmr_at_mtsr_is_townsend_tou_closed_form(client):
    body = client.post("/v1/thermal-safety", json=SAFETY).get_json()
    # Definitions (Stoessel 2008, ch. 2): dT_ad = Q'/cp = 100 K, MTSR = Tp + X dT_ad = 110 degC.
    assert body["adiabatic_temperature_rise"] == pytest.approx(100.0, rel=1e-12)
    assert body["mtsr"] == pytest.approx(110.0, rel=1e-12)
    # Townsend & Tou (1980): TMR_ad = cp R T^2 / (q'(T) E), q' Arrhenius from the onset measurement.
    T, T0, E = 383.15, 473.15, 100e3
    q = 10.0 * math.exp(E / R * (1 / T0 - 1 / T))
    assert body["time_to_maximum_rate"] == pytest.approx(1800.0 * R * T ** 2 / (q * E), rel=1e-9)
    assert body["units"]["time_to_maximum_rate"] == "s"
    assert any("calorimetry" in c for c in body["cautions"])


def test_class_3_when_mtsr_passes_the_boiling_point_below_td24(client):
    # Stoessel (1993): class 3 is Tp < MTT < MTSR < T_D24. Here MTSR = 60 + 100 = 160 degC.
    case = {"process_temperature": 60, "heat_capacity": 2000, "reaction_energy": 200e3,
            "maximum_technical_temperature": 120, "td24": 250}
    body = client.post("/v1/thermal-safety", json=case).get_json()
    assert body["criticality_class"] == 3
    assert body["time_to_maximum_rate"] is None


def test_thermal_safety_missing_choice_names_the_field(client):
    response = client.post("/v1/thermal-safety", json={"process_temperature": 60, "heat_capacity": 2000,
                                                       "reaction_energy": 1e5, "td24": 200})
    assert response.status_code == 422
    assert response.get_json()["errors"][0]["field"] == "maximum_technical_temperature"


# Demo batch (invented): A -> B, first order, k independent of temperature (E = 0), 1 mol/kg of A.
BATCH = {
    "mode": "batch",
    "species": [{"name": "A", "molar_mass": 0.1, "heat_capacity": 2000},
                {"name": "B", "molar_mass": 0.1, "heat_capacity": 2000}],
    "reactions": [{"stoichiometry": {"A": -1, "B": 1}, "orders": {"A": 1}, "rate_constant": 1e-3,
                   "reference_temperature": 50, "activation_energy": 0, "enthalpy": -100e3}],
    "charge": {"mass": 1000, "temperature": 50, "composition": {"A": 1.0}, "density": 900,
               "balance_heat_capacity": 2000},
    "horizon": 1000, "output_points": 11,
}


def test_adiabatic_batch_first_order_closed_forms(client):
    body = client.post("/v1/simulations", json=BATCH).get_json()
    assert body["success"] is True
    # First order at constant k: X = 1 - exp(-k t) (Fogler 2016, ch. 5).
    for t, x in zip(body["series"]["time"], body["series"]["conversion"]):
        assert x == pytest.approx(1 - math.exp(-1e-3 * t), abs=1e-5)
    # Adiabatic rise by definition: dT_ad = (-dH) n_A0 / (m cp) = 1e8 / 2e6 = 50 K; T = T0 + dT_ad X.
    for T, x in zip(body["series"]["temperature"], body["series"]["conversion"]):
        assert T == pytest.approx(50 + 50 * x, abs=1e-3)
    assert body["units"]["series.temperature"] == "degC"


def test_horizon_over_the_server_limit_is_422_naming_it(client, app):
    case = dict(BATCH, horizon=app.config["MAX_SIMULATION_HORIZON"] * 2)
    response = client.post("/v1/simulations", json=case)
    assert response.status_code == 422
    assert response.mimetype == "application/problem+json"
    assert response.get_json()["errors"][0]["field"] == "horizon"


def test_simulation_csv_has_one_row_per_point_with_units(client):
    response = client.post("/v1/simulations?format=csv", json=BATCH)
    lines = response.get_data(as_text=True).strip().splitlines()
    assert response.mimetype == "text/csv"
    assert lines[0].startswith("time [s],temperature [degC]")
    assert "concentration.A [mol/m^3]" in lines[0]
    assert len(lines) == 1 + 11


def test_simulation_chart_svg(client):
    response = client.post("/v1/simulations?format=svg", json=BATCH)
    assert response.status_code == 200
    assert response.mimetype == "image/svg+xml"
    assert response.get_data()[:5] in (b"<?xml", b"<svg ")


def test_cstr_without_reaction_heat_matches_closed_forms(client):
    # Invented demo CSTR; with dH = 0 the single state is the energy-balance mixing temperature
    # T = (rho F cp T0 + UA Tc)/(rho F cp + UA), and first-order conversion k tau/(1 + k tau) (Fogler 2016, ch. 5).
    case = {"volume": 2, "flow": 0.002, "feed_concentration": 1000, "feed_temperature": 30, "density": 1000,
            "heat_capacity": 4000, "rate_constant": 0.004, "reference_temperature": 50, "activation_energy": 0,
            "reaction_enthalpy": 0, "ua": 8000, "coolant_temperature": 20, "grid_points": 201}
    response = client.post("/v1/cstr-steady-states", json=case)
    body = response.get_json()
    assert response.status_code == 200, body
    (state,) = body["states"]
    m_cp = 1000 * 0.002 * 4000
    assert state["temperature"] == pytest.approx((m_cp * 30 + 8000 * 20) / (m_cp + 8000), abs=1e-6)
    assert state["conversion"] == pytest.approx(4 / 5, rel=1e-9)
    assert state["stable"] is True
    png = client.post("/v1/cstr-steady-states?format=png", json=case)
    assert png.mimetype == "image/png" and png.get_data()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize("rate_constant, conversion", [(0.4, 0.4), (1.5, 1.0)])
def test_zero_order_cstr_conversion_is_k_tau_over_c0_capped_at_one(client, rate_constant, conversion):
    # Zero-order CSTR mole balance (Fogler 2016, ch. 5, from memory): c0 - c = k tau while c > 0,
    # so X = min(k tau / c0, 1). Complete conversion used to be a 500 (found by contract fuzzing).
    case = {"volume": 2, "flow": 0.002, "feed_concentration": 1000, "feed_temperature": 30, "density": 1000,
            "heat_capacity": 4000, "rate_constant": rate_constant, "reference_temperature": 50,
            "activation_energy": 0, "reaction_enthalpy": 0, "ua": 8000, "coolant_temperature": 20,
            "order": 0, "grid_points": 201}
    (state,) = client.post("/v1/cstr-steady-states", json=case).json["states"]
    assert state["conversion"] == pytest.approx(conversion, rel=1e-9)


def test_simulation_with_the_vessel_uses_the_heat_transfer_core(client):
    # Consistency (one network serves both): a run given the vessel must equal a run given the UA,
    # coolant flow, c_p and agitator power that /v1/heat-transfer reports for the same state.
    import json
    from pathlib import Path

    production = json.loads((Path(__file__).resolve().parents[1] / "examples" /
                             "cooling_check_production.json").read_text())
    run = {"mode": "semi_batch",
           "species": [{"name": "A", "molar_mass": 0.1, "heat_capacity": 1800},
                       {"name": "B", "molar_mass": 0.14, "heat_capacity": 1700},
                       {"name": "C", "molar_mass": 0.25, "heat_capacity": 1750}],
           "reactions": [{"stoichiometry": {"A": -1, "B": -1, "C": 1}, "orders": {"A": 1, "B": 1},
                          "rate_constant": 2e-4, "reference_temperature": 45, "activation_energy": 65e3,
                          "enthalpy": -165e3}],
           "charge": {"mass": 3500, "temperature": 45, "composition": {"A": 0.8}, "density": 860,
                      "balance_heat_capacity": 1750},
           "feed": {"temperature": 20, "composition": {"B": 6.9}, "mass_flow": "420 kg/h", "start": 0, "end": "1 h"},
           "horizon": "2 h", "output_points": 11}
    with_vessel = dict(run, vessel={"vessel": production["vessel"], "contents": {"fluid": "toluene"},
                                    "coolant": production["coolant"]})
    first = client.post("/v1/simulations", json=with_vessel).json
    assert any(w["code"] == "ua_held_constant" for w in first["warnings"])
    network = client.post("/v1/heat-transfer", json={
        "vessel": production["vessel"], "process_temperature": 45, "coolant": production["coolant"],
        "charge": {"fluid": "toluene", "mass": 3500}}).json
    stream = network["streams"][0]
    heat_capacity = stream["duty"] / (stream["mass_flow"] * (stream["outlet_temperature"] - stream["inlet_temperature"]))
    with_jacket = dict(run, shaft_power=network["agitation"]["power"],
                       jacket={"ua": network["ua"], "coolant_flow": stream["mass_flow"],
                               "coolant_heat_capacity": heat_capacity, "inlet_temperature": 5})
    second = client.post("/v1/simulations", json=with_jacket).json
    assert first["summary"]["maximum_temperature"] == pytest.approx(second["summary"]["maximum_temperature"], rel=1e-6)
    assert first["summary"]["peak_jacket_duty"] == pytest.approx(second["summary"]["peak_jacket_duty"], rel=1e-5)
    assert first["summary"]["peak_jacket_duty"] > 0



def test_coolant_temperatures_are_not_reported_after_the_cooling_failure(client):
    # After the failure no coolant flows (jacket duty zero): its temperatures are null, not a stale value.
    import json
    from pathlib import Path

    body = json.loads((Path(__file__).resolve().parents[1] / "examples" /
                       "simulation_production_failure.json").read_text())
    result = client.post("/v1/simulations", json=body).json
    failure = result["summary"]["failure_time"]
    series = result["series"]
    for time, inlet, duty in zip(series["time"], series["coolant_inlet_temperature"], series["jacket_duty"]):
        assert (inlet is None) == (time > failure)
        if time > failure:
            assert duty == 0.0


def test_cstr_three_states_and_thinned_curves(client):
    # The invented example has three steady states, the middle one unstable (Van Heerden 1953 slope
    # condition: the classic ignition/extinction picture). Curves come back thinned, states exact.
    import json
    from pathlib import Path

    body = json.loads((Path(__file__).resolve().parents[1] / "examples" / "cstr_steady_states.json").read_text())
    result = client.post("/v1/cstr-steady-states", json=body).json
    assert [state["stable"] for state in result["states"]] == [True, False, True]
    curves = result["curves"]
    assert len(curves["temperature"]) == 401
    assert curves["temperature"][0] <= result["states"][0]["temperature"]
    assert result["states"][-1]["temperature"] <= curves["temperature"][-1]
