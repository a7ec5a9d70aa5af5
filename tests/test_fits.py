"""Plant data: UA from a logged run and the Wilson plot, against closed forms, an independent ODE and noise."""
import json
import math
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from calc.fits.ua_fit import fit_ua
from calc.fits.wilson import wilson_plot
from calc.validity import InputError

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
M, CP = 3000.0, 4180.0  # kg, J/(kg K): an invented 3 m3 water run


def closed_form_cooldown(UA, t, T0=345.15, T_in=288.15, rate=None, shaft_power=0.0):
    """Well-mixed contents, constant inlet: T = T_inf + (T0 - T_inf) exp(-UA_eff t/(M cp)),
    T_inf = T_in + P/UA_eff, UA_eff = m c (1 - exp(-UA/(m c))) (the single-pass coolant's effectiveness,
    Incropera & DeWitt, eq. 11.35 with C_r = 0; textbook closed form)."""
    ua_eff = UA if rate is None else rate * (1 - math.exp(-UA / rate))
    T_inf = T_in + shaft_power / ua_eff
    return T_inf + (T0 - T_inf) * np.exp(-ua_eff * t / (M * CP)), ua_eff


@pytest.mark.parametrize("noise", [0.0, 0.05, 0.2])
def test_ua_recovered_from_closed_form_cooldown_with_noise(noise):
    # Issue 12: synthetic series with known UA and noise -> UA inside the 95 % interval and within 3 %.
    rng = np.random.default_rng(12)
    t = np.linspace(0.0, 3 * 3600.0, 120)
    T, _ = closed_form_cooldown(900.0, t)
    fit = fit_ua(t, T + rng.normal(0, noise, t.size), np.full(t.size, 288.15), M, CP)
    assert fit.ua == pytest.approx(900.0, rel=0.03 if noise else 1e-7)
    if noise:  # without noise the interval shrinks to the integrator's tolerance
        assert fit.ua_interval[0] <= 900.0 <= fit.ua_interval[1]
    assert fit.time_constant == pytest.approx(M * CP / fit.ua, rel=1e-12)


def test_ua_with_coolant_balance_shaft_power_and_varying_inlet_against_an_independent_ode():
    # An independent integration (Radau, scipy) of M c dT/dt = -UA_eff (T - T_in(t)) + P with a wandering
    # inlet, plus the coolant-side outlet T_out = T - (T - T_in) exp(-UA/(m c)); the fit uses LSODA.
    UA, rate, P = 1500.0, 1.2 * 4186.0, 4000.0
    ua_eff = rate * (1 - math.exp(-UA / rate))

    def inlet(time):
        return 283.15 + 2.0 * np.sin(time / 1500.0)
    t = np.linspace(0.0, 4 * 3600.0, 150)
    solution = solve_ivp(lambda time, y: [(-ua_eff * (y[0] - inlet(time)) + P) / (M * CP)], (0, t[-1]), [340.0],
                         t_eval=t, method="Radau", rtol=1e-11, atol=1e-11)
    T = solution.y[0]
    outlet = T - (T - inlet(t)) * math.exp(-UA / rate)
    rng = np.random.default_rng(7)
    fit = fit_ua(t, T + rng.normal(0, 0.1, t.size), inlet(t), M, CP, outlet=outlet + rng.normal(0, 0.1, t.size),
                 coolant_flow=1.2, coolant_heat_capacity=4186.0, shaft_power=P)
    assert fit.uses_coolant_balance and not fit.effective
    assert fit.ua == pytest.approx(UA, rel=0.03)
    assert fit.ua_interval[0] <= UA <= fit.ua_interval[1]
    # leaving out the shaft work biases UA: the option matters
    biased = fit_ua(t, T, inlet(t), M, CP, coolant_flow=1.2, coolant_heat_capacity=4186.0)
    assert abs(biased.ua / UA - 1) > 0.03


def test_interval_covers_the_true_ua_about_95_percent_of_the_time():
    # Coverage of the linearised 95 % interval (Bates & Watts 1988) over 40 seeded noisy logs: at least 85 %.
    t = np.linspace(0.0, 2 * 3600.0, 60)
    T, _ = closed_form_cooldown(700.0, t)
    inside = 0
    for seed in range(40):
        rng = np.random.default_rng(seed)
        fit = fit_ua(t, T + rng.normal(0, 0.2, t.size), np.full(t.size, 288.15), M, CP)
        inside += fit.ua_interval[0] <= 700.0 <= fit.ua_interval[1]
    assert inside >= 34


@pytest.mark.parametrize("change, field, words", [
    ({"time": [0, 60, 120, 180, 240], "contents_temperature": [70, 66, 62.5, 59.4, 56.6],
      "coolant_inlet_temperature": [15.0] * 5}, "series.time", "too short"),
    ({"time": [0, 60, 120]}, "series.contents_temperature", "one value per time"),
    ({"time": [0, 60, 120, 120, 240, 300, 360, 420]}, "series.time", "increase strictly"),
    ({"coolant_inlet_temperature": [69.5, 65.6, 62.1, 59.0, 56.2, 53.7, 51.5, 49.5]},
     "series.coolant_inlet_temperature", "no driving force"),
    ({"coolant_inlet_temperature": [80.0] * 8}, "mode", "wrong side"),
    ({"contents_temperature": [60.0, 60.1, 60.0, 60.1, 60.0, 60.1, 60.0, 60.1]}, "series.contents_temperature",
     "cannot be told"),
])
def test_series_that_cannot_determine_ua_is_a_422_saying_why(client, change, field, words):
    series = {"time": [0, 600, 1200, 1800, 2400, 3000, 3600, 4200],
              "contents_temperature": [70, 66, 62.5, 59.4, 56.6, 54.1, 51.9, 49.9],
              "coolant_inlet_temperature": [15.0] * 8} | change
    body = {"mode": "cooling", "charge": {"mass": 2000, "heat_capacity": 4180}, "series": series}
    response = client.post("/v1/ua-fit", json=body)
    assert response.status_code == 422
    problem = response.get_json()
    assert problem["errors"][0]["field"] == field and words in problem["errors"][0]["message"]


def test_csv_upload_with_units_equals_the_json_form(client):
    body = json.loads((EXAMPLES / "ua_fit_water_run.json").read_text())
    series = body["series"]
    rows = ["time [min],contents_temperature [degF],coolant_inlet_temperature [degC]"]
    for t, T, Tin in zip(series["time"]["values"], series["contents_temperature"]["values"],
                         series["coolant_inlet_temperature"]["values"]):
        rows.append(f"{t},{T * 9 / 5 + 32!r},{Tin}")
    query = "mode=cooling&charge.fluid=water&charge.volume=4.9%20m%5E3"
    by_csv = client.post(f"/v1/ua-fit?{query}", data="\r\n".join(rows), content_type="text/csv").get_json()
    plain = dict(body, series={k: v for k, v in series.items() if k != "coolant_outlet_temperature"})
    plain.pop("coolant"), plain.pop("vessel")
    by_json = client.post("/v1/ua-fit", json=plain).get_json()
    assert by_csv["ua"] == pytest.approx(by_json["ua"], rel=1e-6)  # degF -> degC by pint, same fit
    assert by_json["effective"] is True


def test_ua_fit_demo_over_http_with_chart(client):
    body = json.loads((EXAMPLES / "ua_fit_water_run.json").read_text())
    result = client.post("/v1/ua-fit", json=body).get_json()
    assert result["uses_coolant_balance"] and result["ua_interval"][0] < result["ua"] < result["ua_interval"][1]
    assert result["overall_coefficient"] == pytest.approx(result["ua"] / result["heat_transfer_area"], rel=1e-12)
    assert len(result["residuals"]) == len(body["series"]["time"]["values"])
    assert client.post("/v1/ua-fit?format=svg", json=body).data.startswith(b"<?xml")


def wilson_runs(a=0.55, R=1.2e-3, T=2.0, k=0.6, Pr=6.0, noise=0.01, seed=3):
    rng = np.random.default_rng(seed)
    Re = np.geomspace(2e4, 4e5, 6)
    U = 1.0 / (R + T / (a * k * Pr ** (1 / 3) * Re ** (2 / 3)))
    return Re, U * (1 + rng.normal(0, noise, Re.size))


def test_wilson_recovers_constant_and_resistance_within_5_percent():
    # Issue 12: synthetic runs (1 % noise on U) from 1/U = R + T/(a k Pr^c Re^b) (Wilson 1915 form).
    Re, U = wilson_runs()
    fit = wilson_plot(Re, U, 2.0, 0.6, 6.0)
    assert fit.process_constant == pytest.approx(0.55, rel=0.05)
    assert fit.remaining_resistance == pytest.approx(1.2e-3, rel=0.05)
    assert fit.process_constant_interval[0] <= 0.55 <= fit.process_constant_interval[1]
    assert fit.remaining_resistance_interval[0] <= 1.2e-3 <= fit.remaining_resistance_interval[1]


def test_wilson_refusals():
    with pytest.raises(InputError, match="at least 3 runs"):
        wilson_plot([1e4, 2e4], [500, 600], 2.0, 0.6, 6.0)
    with pytest.raises(InputError, match="factor 1.5"):
        wilson_plot([1e4, 1.1e4, 1.2e4], [500, 510, 520], 2.0, 0.6, 6.0)
    with pytest.raises(InputError, match="does not fall"):
        wilson_plot([1e4, 3e4, 9e4], [600, 500, 400], 2.0, 0.6, 6.0)


def test_wilson_over_http_from_logged_series(client):
    # Runs given as logs: each fitted as /v1/ua-fit does, then the line; the demo vessel and charge.
    demo = json.loads((EXAMPLES / "wilson_plot_runs.json").read_text())
    direct = client.post("/v1/wilson-plot", json=demo).get_json()
    assert direct["calibration"]["process_constant"] == direct["process_constant"]
    assert client.post("/v1/wilson-plot?format=svg", json=demo).status_code == 200
    area = client.post("/v1/ua-fit", json=json.loads((EXAMPLES / "ua_fit_water_run.json").read_text())).get_json()[
        "heat_transfer_area"]  # the demo vessel's area at 4.9 m3
    runs = []
    t = np.linspace(0.0, 5400.0, 46)
    for run in demo["runs"]:
        U = run["overall_coefficient"]
        # closed form with water near 50 degC (988 kg/m3, 4181 J/(kg K), rounded IAPWS values)
        T = 15.0 + 45.0 * np.exp(-U * area * t / (4.9 * 988.0 * 4181.0))
        runs.append({"speed": run["speed"], "series": {"time": t.tolist(), "contents_temperature": T.tolist(),
                                                        "coolant_inlet_temperature": [15.0] * t.size}})
    logged = client.post("/v1/wilson-plot", json=dict(demo, runs=runs)).get_json()
    assert logged["process_constant"] == pytest.approx(direct["process_constant"], rel=0.05)


def test_fits_follow_the_answer_presentation_on_every_input_form(client):
    # The CSV log takes the shaping options beside its fields (unit.<field> overrides were read as request
    # fields before); 1 kW/K = 1000 W/K (SI prefix, BIPM SI Brochure 9th ed., table 7). Charts label their
    # axes in the answer's units.
    body = json.loads((EXAMPLES / "ua_fit_water_run.json").read_text())
    series = body["series"]
    rows = ["time [min],contents_temperature [degC],coolant_inlet_temperature [degC]"]
    rows += [f"{t},{T},{Tin}" for t, T, Tin in zip(series["time"]["values"], series["contents_temperature"]["values"],
                                                  series["coolant_inlet_temperature"]["values"])]
    query = "mode=cooling&charge.fluid=water&charge.volume=4.9%20m%5E3"
    si = client.post(f"/v1/ua-fit?{query}", data="\r\n".join(rows), content_type="text/csv").get_json()
    kilo = client.post(f"/v1/ua-fit?{query}&unit.ua=kW/K", data="\r\n".join(rows), content_type="text/csv").get_json()
    assert kilo["units"]["ua"] == "kW/K" and kilo["ua"] == pytest.approx(si["ua"] / 1000.0, rel=1e-12)
    us = client.post("/v1/ua-fit?format=svg&output_units=us", json=body).get_data(as_text=True)
    assert "degF" in us and "degC" not in us
    demo = json.loads((EXAMPLES / "wilson_plot_runs.json").read_text())
    wilson = client.post("/v1/wilson-plot?format=svg&output_units=us", json=demo).get_data(as_text=True)
    assert "h*ft^2*delta_degF/BTU" in wilson and "m^2*K/W" not in wilson
