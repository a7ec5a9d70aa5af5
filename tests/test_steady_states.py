"""CSTR steady states: all intersections of heat generation and removal, and their stability."""
import math

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from scipy.optimize import brentq

from calc.safety.dynamics import simulate
from calc.safety.tank_model import Charge, Feed, Jacket, Reaction, SimulationInput, Species, Budget
from calc.properties import GAS_CONSTANT as R
from calc.safety.steady_states import CSTRInput, cstr_steady_states, outlet_concentration
from calc.validity import InputError

# Invented cooled CSTR with three steady states (parameters chosen for it, not from a source).
BASE = dict(volume=1.0, flow=1e-3, feed_concentration=2000.0, feed_temperature=300.0, density=1000.0,
            heat_capacity=4000.0, rate_constant=1e-3, reference_temperature=350.0, activation_energy=100e3,
            reaction_enthalpy=-200e3, ua=500.0, coolant_temperature=300.0)


def textbook_roots(p):
    """Fogler's per-mole form (Elements of Chemical Reaction Engineering, 5th ed., ch. 12, from memory):
    G(T) = (-dH) tau k/(1 + tau k), R(T) = C_p0 (1 + kappa)(T - T_c), kappa = UA/(F_A0 C_p0),
    T_c = (kappa T_a + T_0)/(1 + kappa), C_p0 = rho c_p/c_A0 per mole of A fed. Bracketed on a grid."""
    tau = p["volume"] / p["flow"]
    cp0 = p["density"] * p["heat_capacity"] / p["feed_concentration"]
    kappa = p["ua"] / (p["flow"] * p["feed_concentration"] * cp0)
    Tc = (kappa * p["coolant_temperature"] + p["feed_temperature"]) / (1 + kappa)

    def f(T):
        k = p["rate_constant"] * math.exp(-p["activation_energy"] / R * (1 / T - 1 / p["reference_temperature"]))
        return -p["reaction_enthalpy"] * tau * k / (1 + tau * k) - cp0 * (1 + kappa) * (T - Tc)

    grid = np.arange(280.0, 600.0, 0.5)
    values = [f(T) for T in grid]
    return [brentq(f, a, b, xtol=1e-12) for a, b, fa, fb in zip(grid, grid[1:], values, values[1:]) if fa * fb < 0]


def test_three_steady_states_match_the_textbook_form_solved_independently():
    r = cstr_steady_states(CSTRInput(**BASE))
    expected = textbook_roots(BASE)
    assert len(expected) == 3
    assert [s.temperature for s in r.states] == pytest.approx(expected, abs=1e-7)
    # Van Heerden (1953): with three intersections the middle one fails the slope condition.
    assert [s.slope_stable for s in r.states] == [True, False, True]
    assert [s.stable for s in r.states] == [True, False, True]
    for s in r.states:  # steady mole balance: c = c0/(1 + tau k), Fogler ch. 5 (from memory)
        k = BASE["rate_constant"] * math.exp(-BASE["activation_energy"] / R * (1 / s.temperature - 1 / 350.0))
        assert s.concentration == pytest.approx(2000.0 / (1 + 1000.0 * k), rel=1e-12)


def _rhs(p, c, T):
    """Transient mole and energy balances of the CSTR, written out independently for differencing."""
    tau = p["volume"] / p["flow"]
    k = p["rate_constant"] * math.exp(-p["activation_energy"] / R * (1 / T - 1 / p["reference_temperature"]))
    rho_cp = p["density"] * p["heat_capacity"]
    dc = (p["feed_concentration"] - c) / tau - k * c
    dT = ((p["feed_temperature"] - T) / tau - k * c * p["reaction_enthalpy"] / rho_cp
          - p["ua"] * (T - p["coolant_temperature"]) / (rho_cp * p["volume"]))
    return np.array([dc, dT])


def test_eigenvalues_match_a_finite_difference_jacobian():
    # Independent Jacobian by central differences of the balances (Aris & Amundson 1958: linear stability).
    for s in cstr_steady_states(CSTRInput(**BASE)).states:
        hc, hT = 1e-4 * s.concentration, 1e-4
        J = np.column_stack([
            (_rhs(BASE, s.concentration + hc, s.temperature) - _rhs(BASE, s.concentration - hc, s.temperature)) / (2 * hc),
            (_rhs(BASE, s.concentration, s.temperature + hT) - _rhs(BASE, s.concentration, s.temperature - hT)) / (2 * hT),
        ])
        expected = sorted(np.linalg.eigvals(J), key=lambda e: (e.real, e.imag))
        got = sorted(s.eigenvalues, key=lambda e: (e.real, e.imag))
        assert np.allclose(got, expected, rtol=1e-5, atol=1e-12)
        # Van Heerden's slope condition is the determinant condition: det J > 0 (Aris & Amundson 1958).
        assert s.slope_stable == (np.linalg.det(J) > 0)


def _dynamic_run(p, T_start, c_start, hours):
    """The same CSTR in calc.dynamics: 1:1 mass-balanced species, huge coolant flow so T_coolant = T_c."""
    sp = (Species("A", 0.1, p["heat_capacity"]), Species("P", 0.1, p["heat_capacity"]))
    rx = (Reaction({"A": -1, "P": 1}, {"A": 1}, p["rate_constant"], p["reference_temperature"],
                   p["activation_energy"], p["reaction_enthalpy"]),)
    rho = p["density"]
    charge = Charge(rho * p["volume"], T_start, {"A": c_start / rho}, rho, p["heat_capacity"])
    feed = Feed.constant(p["feed_temperature"], {"A": p["feed_concentration"] / rho}, rho * p["flow"])
    jacket = Jacket(p["ua"], 1e9, 4180.0, p["coolant_temperature"])
    return simulate(SimulationInput("continuous", sp, rx, charge, hours * 3600.0, feed=feed, jacket=jacket,
                                    rtol=1e-9, budget=Budget(output_points=2001, wall_time=300.0)))


def test_transient_runs_settle_on_the_stable_states():
    # Consistency of two code paths: a cold start settles on the low state and a hot start on the high
    # one; neither stays at the unstable middle state (Van Heerden 1953).
    low, middle, high = cstr_steady_states(CSTRInput(**BASE)).states
    cold = _dynamic_run(BASE, 300.0, 2000.0, 20)
    hot = _dynamic_run(BASE, 390.0, 100.0, 20)
    assert cold.series.temperature[-1] == pytest.approx(low.temperature, abs=1e-3)
    assert hot.series.temperature[-1] == pytest.approx(high.temperature, abs=1e-3)


def test_positive_trace_state_oscillates_although_it_meets_the_slope_condition():
    # Aris & Amundson (1958); Uppal, Ray & Poore, Chem. Eng. Sci. 29, 967 (1974), from memory: a unique
    # steady state can be unstable with a limit cycle around it.
    p = dict(BASE, ua=10000.0, rate_constant=1e-2, coolant_temperature=320.0)
    (state,) = cstr_steady_states(CSTRInput(**p)).states
    assert state.slope_stable and not state.stable
    assert all(e.real > 0 and e.imag != 0 for e in state.eigenvalues)
    run = _dynamic_run(p, state.temperature + 0.1, state.concentration, 30)
    late = run.series.time > 25 * 3600
    assert np.ptp(run.series.temperature[late]) > 5.0  # sustained oscillation, not decay to the state


def test_second_order_outlet_concentration_closed_form():
    # Quadratic root of c0 - c = tau k c^2 (Fogler 2016, ch. 5, from memory).
    c0, a = 1500.0, np.array([1e-5, 1e-3, 0.1])
    expected = (-1 + np.sqrt(1 + 4 * a * c0)) / (2 * a)
    assert np.allclose(outlet_concentration(c0, a, 2.0), expected, rtol=1e-10)


@settings(max_examples=50, deadline=None)
@given(ua=st.floats(100.0, 20000.0), kref=st.floats(1e-5, 1e-1), Tc=st.floats(280.0, 360.0),
       order=st.sampled_from([0.5, 1.0, 2.0]))
def test_property_states_balance_and_alternate(ua, kref, Tc, order):
    # Geometry of the intersections (Van Heerden 1953): Q_g = Q_r at each state, the slope condition
    # alternates pass/fail/pass along increasing temperature, and the first and last states pass.
    p = dict(BASE, ua=ua, rate_constant=kref, coolant_temperature=Tc, order=order, grid_points=1001)
    r = cstr_steady_states(CSTRInput(**p))
    assert r.states
    for s in r.states:
        removal = 4000.0 * (s.temperature - 300.0) + ua * (s.temperature - Tc)
        assert s.heat_generation == pytest.approx(removal, rel=1e-7, abs=1e-3)
    flags = [s.slope_stable for s in r.states]
    assert flags[0] and flags[-1]
    assert all(a != b for a, b in zip(flags, flags[1:]))


@pytest.mark.parametrize("changes, field", [
    ({"volume": -1.0}, "volume"), ({"order": -1.0}, "order"), ({"grid_points": 3}, "grid_points"),
    ({"temperature_range": (400.0, 300.0)}, "maximum_temperature"), ({"reaction_enthalpy": math.nan}, "reaction_enthalpy"),
])
def test_bad_input_names_the_field(changes, field):
    with pytest.raises(InputError) as info:
        cstr_steady_states(CSTRInput(**dict(BASE, **changes)))
    assert info.value.field == field
