"""Coolant energy balance: closure, limits, inverses, against definitions and an independent ODE solution."""
import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad, solve_ivp

from calc.network.coolant_balance import (coolant_balance, log_mean_temperature_difference, maximum_inlet_temperature,
                          required_flow)
from calc.validity import InputError

T_R = 323.15  # contents at 50 degC
CP = 4180.0

temperatures = st.floats(min_value=250.0, max_value=500.0)
uas = st.floats(min_value=1e-3, max_value=1e6)
flows = st.floats(min_value=1e-4, max_value=1e3)


def test_outlet_matches_direct_integration_of_the_coolant_ode():
    # Independent solution: integrate m cp dT/dA = U (T_r - T) along the area with scipy's solve_ivp.
    U, A, m = 500.0, 10.0, 2.0
    sol = solve_ivp(lambda a, t: [U * (T_R - t[0]) / (m * CP)], (0.0, A), [293.15], rtol=1e-11, atol=1e-11)
    outlet_ode = sol.y[0, -1]
    b = coolant_balance(T_R, 293.15, U * A, m, CP)
    assert b.outlet_temperature == pytest.approx(outlet_ode, rel=1e-9)
    # and the duty equals the integral of the local flux U (T_r - T(A)) dA (quad over the ODE's dense output)
    sol_dense = solve_ivp(lambda a, t: [U * (T_R - t[0]) / (m * CP)], (0.0, A), [293.15],
                          rtol=1e-11, atol=1e-11, dense_output=True)
    flux, _ = quad(lambda a: U * (T_R - sol_dense.sol(a)[0]), 0.0, A, epsabs=1e-6, epsrel=1e-11)
    assert b.duty == pytest.approx(flux, rel=1e-8)


@settings(max_examples=50, deadline=None)
@given(temperatures, temperatures, uas, flows, st.floats(min_value=1500.0, max_value=4500.0))
def test_balance_closes_exactly(t_r, t_in, ua, m, cp):
    # Definition of the LMTD: m cp (T_out - T_in) == U A LMTD (rel 1e-9).
    b = coolant_balance(t_r, t_in, ua, m, cp)
    for value in (b.outlet_temperature, b.duty, b.log_mean_temperature_difference, b.ntu, b.effectiveness):
        assert math.isfinite(value)
    assert m * cp * (b.outlet_temperature - t_in) == pytest.approx(b.duty, rel=1e-9, abs=1e-9 * m * cp)
    assert b.duty == pytest.approx(ua * b.log_mean_temperature_difference, rel=1e-9, abs=1e-12)
    # the outlet lies between inlet and contents temperature (second law)
    assert min(t_in, t_r) - 1e-9 <= b.outlet_temperature <= max(t_in, t_r) + 1e-9


def test_closed_form_lmtd_agrees_with_log_mean_of_end_differences():
    # Definition: LMTD = (dT1 - dT2)/ln(dT1/dT2) with dT1 = T_r - T_in and dT2 = T_r - T_out.
    b = coolant_balance(T_R, 288.15, 20000.0, 3.0, CP)
    expected = log_mean_temperature_difference(T_R - 288.15, T_R - b.outlet_temperature)
    assert b.log_mean_temperature_difference == pytest.approx(expected, rel=1e-12)
    # textbook definition, evaluated by hand: (40 - 10)/ln 4 = 21.640425613334453
    assert log_mean_temperature_difference(40.0, 10.0) == pytest.approx(30.0 / math.log(4.0), rel=1e-14)


def test_lmtd_limits_are_finite():
    # Definition: LMTD -> arithmetic mean as the end differences approach each other, -> 0 when one is 0.
    assert log_mean_temperature_difference(20.0, 20.0 * (1 + 1e-12)) == pytest.approx(20.0, rel=1e-12)
    assert log_mean_temperature_difference(20.0, 20.0 * (1 + 1e-6)) == pytest.approx(20.00001, rel=1e-11)
    assert log_mean_temperature_difference(-5.0, -2.0) == pytest.approx(-3.0 / math.log(2.5), rel=1e-14)
    assert log_mean_temperature_difference(10.0, 0.0) == 0.0
    with pytest.raises(InputError):
        log_mean_temperature_difference(10.0, -1.0)


@pytest.mark.parametrize("ua, m", [(1e-300, 1.0), (1e-12, 1e3), (1e12, 1e-6), (5000.0, 1e12), (0.0, 1.0)])
def test_limits_are_exact_and_finite(ua, m):
    # Limits of T_out = T_r - dT exp(-NTU): NTU -> 0 gives LMTD -> T_r - T_in; NTU -> inf gives T_out -> T_r.
    b = coolant_balance(T_R, 293.15, ua, m, CP)
    assert all(math.isfinite(v) for v in (b.outlet_temperature, b.duty, b.log_mean_temperature_difference))
    if b.ntu < 1e-6:
        assert b.log_mean_temperature_difference == pytest.approx(30.0, rel=1e-6)
        assert b.duty == pytest.approx(ua * 30.0, rel=1e-6, abs=1e-300)
    if b.ntu > 100:
        assert b.outlet_temperature == pytest.approx(T_R, abs=1e-9)
        assert b.duty == pytest.approx(m * CP * 30.0, rel=1e-12)
        assert any(w.code == "coolant_outlet_near_process" for w in b.warnings)


def test_no_driving_force_gives_zero_duty_and_a_warning():
    b = coolant_balance(T_R, T_R, 5000.0, 2.0, CP)
    assert (b.duty, b.log_mean_temperature_difference, b.outlet_temperature) == (0.0, 0.0, T_R)
    assert [w.code for w in b.warnings] == ["no_driving_force"]


def test_bad_input_names_the_field():
    with pytest.raises(InputError) as err:
        coolant_balance(T_R, 293.15, 5000.0, 0.0, CP)
    assert err.value.field == "coolant.flow"
    with pytest.raises(InputError) as err:
        coolant_balance(T_R, 293.15, -1.0, 2.0, CP)
    assert err.value.field == "ua"
    with pytest.raises(InputError) as err:
        coolant_balance(T_R, 270.0, 5000.0, 2.0, CP, freezing_temperature=273.15)
    assert err.value.field == "coolant.inlet_temperature"
    near = coolant_balance(T_R, 275.0, 5000.0, 2.0, CP, freezing_temperature=273.15)
    # a 5 K margin above freezing is common practice, no source
    assert any(w.code == "coolant_near_freezing" for w in near.warnings)


@settings(max_examples=50, deadline=None)
@given(uas, flows, st.floats(min_value=1.0001, max_value=100.0), st.floats(min_value=0.1, max_value=80.0))
def test_duty_is_monotonic(ua, m, factor, driving_force):
    # Physics of a cooled stream (common practice, no source): more flow, more U A or a colder inlet
    # never remove less heat.
    t_in = T_R - driving_force
    base = coolant_balance(T_R, t_in, ua, m, CP).duty
    assert coolant_balance(T_R, t_in, ua, m * factor, CP).duty >= base * (1 - 1e-12)
    assert coolant_balance(T_R, t_in, ua * factor, m, CP).duty >= base * (1 - 1e-12)
    assert coolant_balance(T_R, t_in - 0.5 * factor, ua, m, CP).duty >= base * (1 - 1e-12)


@settings(max_examples=50, deadline=None)
@given(uas, flows, st.floats(min_value=0.5, max_value=80.0))
def test_required_flow_fed_back_gives_the_duty(ua, m, driving_force):
    # Inverse fed back through the forward balance returns the duty to 1e-9 relative.
    t_in = T_R - driving_force
    duty = coolant_balance(T_R, t_in, ua, m, CP).duty
    if duty >= ua * driving_force * (1 - 1e-13):
        return  # numerically at the infinite-flow limit: the flow is not determined
    r = required_flow(T_R, t_in, ua, CP, duty)
    assert r.reachable
    again = coolant_balance(T_R, t_in, ua, r.mass_flow, CP).duty
    assert again == pytest.approx(duty, rel=1e-9)


@settings(max_examples=50, deadline=None)
@given(uas, flows, st.floats(min_value=0.5, max_value=80.0))
def test_maximum_inlet_temperature_fed_back_gives_the_duty(ua, m, driving_force):
    duty = coolant_balance(T_R, T_R - driving_force, ua, m, CP).duty
    limit = maximum_inlet_temperature(T_R, ua, m, CP, duty)
    assert limit.reachable
    assert limit.inlet_temperature == pytest.approx(T_R - driving_force, rel=1e-9)
    again = coolant_balance(T_R, limit.inlet_temperature, ua, m, CP).duty
    assert again == pytest.approx(duty, rel=1e-9)


def test_duty_beyond_the_infinite_flow_limit_is_not_reachable():
    # Infinite-flow limit Q_max = U A (T_r - T_in) (coolant stays at inlet temperature; definition).
    r = required_flow(T_R, 293.15, 5000.0, CP, 5000.0 * 30.0)
    assert not r.reachable and r.mass_flow is None
    assert r.maximum_duty == pytest.approx(150000.0)
    assert "not reachable at any flow" in r.message
    assert not required_flow(T_R, T_R + 1.0, 5000.0, CP, 1.0).reachable
    assert required_flow(T_R, 293.15, 5000.0, CP, 0.0).mass_flow == 0.0


def test_inlet_limit_below_freezing_is_not_reachable():
    limit = maximum_inlet_temperature(T_R, 5000.0, 2.0, CP, 300000.0, freezing_temperature=273.15)
    assert not limit.reachable and limit.inlet_temperature is None
    assert not maximum_inlet_temperature(T_R, 0.0, 2.0, CP, 1.0).reachable
