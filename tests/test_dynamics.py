"""Dynamic mole and energy balances: closed forms, definitions, energy closure, budgets and cost.

Demo data are an invented scenario (a 6 m3 glass-lined reactor "R-204" dosing reagent A onto
substrate B); every check compares with something outside the module, named beside it.
"""
import math
import time

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.linalg import expm

from calc.safety.dynamics import simulate
from calc.safety.tank_model import (
    Budget, Charge, Controller, CoolingFailure, Feed, FeedStep, Jacket, Reaction, SimulationInput, Species,
    TemperatureLimit,
)
from calc.safety.criticality import adiabatic_temperature_rise_from_enthalpy, mtsr_from_profile
from calc.validity import InputError

K = 273.15
HOUR = 3600.0
SPECIES = (Species("A", 0.12, 1900.0), Species("B", 0.15, 1800.0), Species("P", 0.27, 1850.0))


def a_plus_b(k=2e-5, dH=-160e3, E=70e3):
    return (Reaction({"A": -1, "B": -1, "P": 1}, {"A": 1, "B": 1}, k, K + 60, E, dH),)


def semi_batch(**changes):
    """6 h dosing of A onto B at 60 degC under PI control; 2 h after-reaction (invented demo)."""
    args = dict(mode="semi_batch", species=SPECIES, reactions=a_plus_b(),
                charge=Charge(4000.0, K + 60, {"B": 1.2}, 950.0, 1900.0), horizon=8 * HOUR,
                feed=Feed.constant(K + 25, {"A": 2.6}, 1800.0 / (6 * HOUR), 0.0, 6 * HOUR),
                jacket=Jacket(6000.0, 5.0, 4180.0, K + 55),
                controller=Controller(K + 60, 5.0, 600.0, K + 10, K + 90), shaft_power=2500.0)
    args.update(changes)
    return SimulationInput(**args)


def test_isothermal_first_order_batch_matches_closed_form():
    # Closed form of A -> P, first order, isothermal: X = 1 - exp(-k t) (Fogler 2016, ch. 5, from memory;
    # a standard result). No reaction enthalpy and no jacket keep T constant.
    k = 4e-4
    sp = (Species("A", 0.1, 2000.0), Species("P", 0.1, 2000.0))  # dcp = 0: no enthalpy change at all
    inp = SimulationInput("batch", sp, (Reaction({"A": -1, "P": 1}, {"A": 1}, k, K + 50, 80e3, 0.0),),
                          Charge(1000.0, K + 50, {"A": 2.0}, 900.0, 2000.0), horizon=3 * HOUR,
                          rtol=1e-9, budget=Budget(output_points=50))
    r = simulate(inp)
    assert r.success and r.status == 0
    exact = 1.0 - np.exp(-k * r.series.time)
    assert np.max(np.abs(r.series.conversion - exact)) < 1e-7  # in units of rtol: < 100 rtol
    assert np.ptp(r.series.temperature) < 1e-9


def test_adiabatic_batch_rise_is_dT_ad_times_conversion():
    # Energy balance, definition: adiabatic, constant heat capacity (dcp = 0), so T - T0 = dT_ad X
    # at every time, with dT_ad = (-dH) c_A0/(rho cp) (Stoessel 2008, ch. 2).
    sp = (Species("A", 0.1, 2000.0), Species("P", 0.1, 2000.0))
    inp = SimulationInput("batch", sp, (Reaction({"A": -1, "P": 1}, {"A": 1}, 2e-4, K + 40, 90e3, -120e3),),
                          Charge(1000.0, K + 40, {"A": 1.5}, 1000.0, 2000.0), horizon=4 * HOUR)
    r = simulate(inp)
    dT_ad = adiabatic_temperature_rise_from_enthalpy(-120e3, 1.5 * 1000.0, 1000.0, 2000.0)
    assert dT_ad == pytest.approx(90.0)
    rise = r.series.temperature - (K + 40)
    assert np.max(np.abs(rise - dT_ad * r.series.conversion)) < 1e-6 * dT_ad
    assert r.summary.final_conversion > 0.999  # the runaway completes
    assert r.summary.maximum_temperature == pytest.approx(K + 40 + dT_ad * r.summary.final_conversion, abs=1e-5)


def test_dosing_controlled_semi_batch_releases_enthalpy_times_feed_rate():
    # Definition: with a very fast reaction nothing accumulates, so the heat release rate equals
    # (-dH) x feed molar rate of A (Stoessel 2008, ch. 7: "dosing-controlled" reaction).
    feed_rate, xA, dH = 1800.0 / (6 * HOUR), 2.6, -160e3
    r = simulate(semi_batch(reactions=a_plus_b(k=5e-2), jacket=Jacket(8000.0, 5.0, 4180.0, K + 55)))
    s = r.series
    dosing = (s.time > 0.5 * HOUR) & (s.time < 5.5 * HOUR)
    expected = -dH * feed_rate * xA
    assert np.allclose(s.heat_release_rate[dosing], expected, rtol=2e-3)
    assert r.summary.maximum_accumulation < 2e-3
    # Stiff case, solver cost bounded: k c_B ~ 60 /s over 8 h is a stiffness ratio above 1e6, which an
    # explicit method would pay for with ~1e6 evaluations (Hairer & Wanner 1996, ch. IV.1).
    assert r.rhs_evaluations < 5000, r.rhs_evaluations


def _closure_cases():
    yield "batch", SimulationInput(
        "batch", SPECIES, a_plus_b(), Charge(3000.0, K + 30, {"A": 1.0, "B": 1.2}, 950.0, 1900.0),
        horizon=6 * HOUR, jacket=Jacket(4000.0, 3.0, 4180.0, K + 20), shaft_power=1500.0)
    yield "semi_batch_failure_holdup", semi_batch(
        jacket=Jacket(6000.0, 5.0, 4180.0, K + 55, "holdup", 400.0), failure=CoolingFailure(3 * HOUR))
    yield "semi_batch_steps", semi_batch(feed=Feed(K + 25, {"A": 2.6}, (
        FeedStep(0.0, 2 * HOUR, 0.05), FeedStep(2.5 * HOUR, 6 * HOUR, 0.1))))
    yield "continuous", SimulationInput(
        "continuous", SPECIES, a_plus_b(), Charge(4000.0, K + 60, {"B": 0.5}, 950.0, 1900.0),
        horizon=10 * HOUR, feed=Feed.constant(K + 20, {"A": 1.0, "B": 1.2}, 0.4),
        jacket=Jacket(6000.0, 5.0, 4180.0, K + 40), shaft_power=3000.0)


@pytest.mark.parametrize("name, inp", list(_closure_cases()))
def test_energy_balance_closes(name, inp):
    # Energy conservation (first law): change in contents enthalpy = feed + reaction + jacket + shaft -
    # outflow, each integrated separately. dcp != 0 here (species cp differ), so this also checks the
    # Kirchhoff correction in the temperature equation.
    r = simulate(inp)
    assert r.success, r.message
    assert r.summary.closure_error < 1e-6, f"{name}: energy balance closure {r.summary.closure_error:.3g}"


@pytest.mark.parametrize("method", ["LSODA", "Radau"])
def test_other_stiff_methods_agree_with_bdf(method):
    # Independent integrators (scipy LSODA: Petzold 1983; Radau IIA: Hairer & Wanner 1996) on the same
    # balances must agree on the simulated MTSR within their tolerances.
    bdf = simulate(semi_batch(failure=CoolingFailure(3 * HOUR), rtol=1e-9))
    other = simulate(semi_batch(failure=CoolingFailure(3 * HOUR), rtol=1e-9, method=method))
    assert other.success, other.message
    assert other.summary.maximum_temperature == pytest.approx(bdf.summary.maximum_temperature, abs=1e-4)
    assert other.summary.closure_error < 1e-6


def test_single_pass_jacket_cooling_matches_closed_form():
    # No reaction: C dT/dt = -m cp (1 - exp(-NTU)) (T - T_in), so T - T_in decays exponentially
    # (Incropera & DeWitt 2007, eq. 11.35a, effectiveness of an exchanger with one side isothermal).
    C, UA, mc = 2000.0 * 2000.0, 3000.0, 2.0 * 4180.0
    inp = SimulationInput("batch", SPECIES[:1], (Reaction({"A": -1}, {"A": 1}, 0.0, 300.0, 0.0, 0.0),),
                          Charge(2000.0, K + 80, {"A": 0.1}, 1000.0, 2000.0), horizon=4 * HOUR,
                          mixture_heat_capacity=2000.0, jacket=Jacket(UA, 2.0, 4180.0, K + 20), rtol=1e-9)
    r = simulate(inp)
    rate = mc * -math.expm1(-UA / mc) / C
    exact = K + 20 + 60.0 * np.exp(-rate * r.series.time)
    assert np.max(np.abs(r.series.temperature - exact)) < 1e-5
    duty = mc * -math.expm1(-UA / mc) * (r.series.temperature - (K + 20))
    assert np.allclose(r.series.jacket_duty, duty, rtol=1e-12)


def test_holdup_jacket_matches_matrix_exponential():
    # Linear two-tank system (contents and well-mixed jacket), solved independently with scipy.linalg.expm.
    C, UA, mc, Cj, Tin = 2000.0 * 2000.0, 3000.0, 2.0 * 4180.0, 300.0 * 4180.0, K + 20
    inp = SimulationInput("batch", SPECIES[:1], (Reaction({"A": -1}, {"A": 1}, 0.0, 300.0, 0.0, 0.0),),
                          Charge(2000.0, K + 80, {"A": 0.1}, 1000.0, 2000.0), horizon=2 * HOUR,
                          mixture_heat_capacity=2000.0, jacket=Jacket(UA, 2.0, 4180.0, Tin, "holdup", 300.0),
                          rtol=1e-9, budget=Budget(output_points=7))
    r = simulate(inp)
    A = np.array([[-UA / C, UA / C], [UA / Cj, -(UA + mc) / Cj]])
    x0 = np.array([60.0, 0.0])
    for t, T, Tj in zip(r.series.time, r.series.temperature, r.series.coolant_outlet_temperature):
        x = expm(A * t) @ x0
        assert (T - Tin, Tj - Tin) == (pytest.approx(x[0], abs=1e-5), pytest.approx(x[1], abs=1e-5))


def test_worst_failure_time_agrees_with_accumulation_mtsr():
    # Stoessel (2008, ch. 7): after a failure with the feed stopped, the unconverted A reacts
    # adiabatically, so the simulated peak equals max_t [T + X_ac dT_ad m_final/m(t)] from the nominal
    # run (uniform heat capacity, B in excess, enough time to finish). Checks the search and
    # calc.safety.mtsr_from_profile against each other. No shaft work: it would keep heating after failure.
    base = dict(mixture_heat_capacity=1900.0, horizon=20 * HOUR, budget=Budget(output_points=2001),
                shaft_power=0.0)
    nominal = simulate(semi_batch(**base))
    s = nominal.series
    m_final = s.mass[np.searchsorted(s.time, 6 * HOUR)]
    dT_ad = 160e3 * 2.6 * 1800.0 / (m_final * 1900.0)
    dosing = s.time <= 6 * HOUR
    expected, _ = mtsr_from_profile(s.temperature[dosing], s.accumulation[dosing], dT_ad,
                                    s.mass[dosing], m_final)
    worst = simulate(semi_batch(failure=CoolingFailure(None), **base))
    assert worst.success, worst.message
    assert worst.summary.maximum_temperature == pytest.approx(expected, abs=1e-3)
    assert worst.summary.maximum_temperature >= max(T for _, T in worst.failure_search) - 1e-9
    for t in (2 * HOUR, 4 * HOUR):  # never beaten by a fixed failure time
        fixed = simulate(semi_batch(failure=CoolingFailure(t), **base))
        assert fixed.summary.maximum_temperature <= worst.summary.maximum_temperature + 1e-6


def test_terminal_and_non_terminal_limits():
    # Event location: the run stops exactly at the terminal limit (solve_ivp event semantics).
    inp = semi_batch(failure=CoolingFailure(2 * HOUR), mixture_heat_capacity=1900.0,
                     reactions=a_plus_b(k=2e-6), limits=(TemperatureLimit("alarm", K + 62, terminal=False),
                                                         TemperatureLimit("mtt", K + 65)))
    r = simulate(inp)
    assert r.status == 1 and r.success
    names = [c.name for c in r.summary.limits_crossed]
    assert names == ["alarm", "mtt"]
    assert r.series.temperature[-1] == pytest.approx(K + 65, abs=1e-6)
    assert r.summary.limits_crossed[1].time == pytest.approx(r.series.time[-1])


def test_pi_controller_respects_utility_range_and_removes_offset():
    # Common practice, no source: integral action removes steady offset; the manipulated coolant inlet
    # never leaves the utility's range.
    r = simulate(semi_batch(controller=Controller(K + 60, 5.0, 600.0, K + 40, K + 90)))
    s = r.series
    assert s.coolant_inlet_temperature.min() >= K + 40 - 1e-9
    assert s.coolant_inlet_temperature.max() <= K + 90 + 1e-9
    assert abs(s.temperature[(s.time > 3 * HOUR) & (s.time < 5 * HOUR)] - (K + 60)).max() < 0.5


def test_tiny_wall_time_budget_returns_partial_result():
    start = time.perf_counter()
    r = simulate(semi_batch(budget=Budget(wall_time=1e-4), failure=CoolingFailure(None)))
    assert time.perf_counter() - start < 2.0
    assert (r.success, r.status) == (False, 2)
    assert "budget" in r.message
    assert r.series.time[-1] < 8 * HOUR


@pytest.mark.parametrize("changes, field", [
    ({"mode": "fed_batch"}, "mode"),
    ({"method": "RK45"}, "method"),
    ({"jacket": Jacket(6000.0, 5.0, 4180.0, K + 55, "spray")}, "jacket.model"),
    ({"jacket": Jacket(6000.0, 5.0, 4180.0, K + 55, "holdup")}, "jacket.holdup_mass"),
    ({"feed": Feed(K + 25, {"A": 2.6}, (FeedStep(0, 100, 1.0), FeedStep(50, 200, 1.0)))}, "feed.steps[1].start"),
    ({"feed": Feed(K + 25, {"A": 9.0}, (FeedStep(0, 100, 1.0),))}, "feed.composition"),
    ({"feed": Feed(K + 25, {"Z": 1.0}, (FeedStep(0, 100, 1.0),))}, "feed.composition.Z"),
    ({"failure": CoolingFailure(9 * HOUR)}, "cooling_failure.time"),
    ({"horizon": -1.0}, "horizon"),
    ({"budget": Budget(output_points=1)}, "output_points"),
    ({"charge": Charge(-5.0, K + 60, {"B": 1.2}, 950.0, 1900.0)}, "charge.mass"),
    ({"reactions": (Reaction({"A": -1}, {"A": 1}, 1.0, 300.0, -5.0, 0.0),)}, "reactions[0].activation_energy"),
    ({"feed": None}, "feed"),
])
def test_bad_input_names_the_field(changes, field):
    with pytest.raises(InputError) as info:
        simulate(semi_batch(**changes))
    assert info.value.field == field


@settings(max_examples=15, deadline=None)
@given(Tin=st.floats(K + 5, K + 50), k=st.floats(2e-6, 2e-4))
def test_property_warmer_coolant_never_lowers_peak_and_balance_closes(Tin, k):
    # Monotonic trend (common practice, no source): with everything else fixed, warmer coolant
    # cannot give a cooler peak; and the energy balance closes for any such run (first law).
    runs = [simulate(semi_batch(controller=None, reactions=a_plus_b(k=k), jacket=Jacket(6000.0, 5.0, 4180.0, T)))
            for T in (Tin, Tin + 5.0)]
    assert runs[1].summary.maximum_temperature >= runs[0].summary.maximum_temperature - 1e-6
    assert max(r.summary.closure_error for r in runs) < 1e-6
