"""Cooling check: verdict, margin, solved limits fed back, energy balance against CoolProp, cautions.

Demo data are an invented scenario: the 5 m3 stainless reactor "K-12" (1.8 m, DIN-style dished
bottom, half-pipe jacket) holding toluene at 60 degC, cooled with tower water at 15 degC.
"""
import math
from dataclasses import replace

import CoolProp.CoolProp as CP
import pytest
from hypothesis import given, settings, strategies as st

from calc.vessel import agitation
from calc.vessel import geometry
from calc.films import jacket_side
from calc.films import wall
from calc.cautions import COOLING_CHECK, DOSING
from calc.checks.cooling_check import FLOW_SEARCH_CAP, cooling_check
from calc.checks.heat_load import Dosing, SpecificPower, TotalPower
from calc.network.heat_transfer import heat_transfer
from calc.properties import LibraryLiquid
from calc.validity import InputError
from calc.vessel.model import Charge, Coolant, Vessel

K = 273.15
HOUR = 3600.0
T_R = K + 60
SF = 1.3

VESSEL = Vessel(shape=geometry.VesselShape(1.8, 2.0, "torispherical_fd"), wall=wall.WallSpec(0.012, "stainless_316l"),
                agitator=agitation.Agitator("pitched_blade_turbine", 0.6, 1.5),
                jacket=jacket_side.JacketSpec("half_pipe", pipe_diameter=0.1, pipe_pitch=0.14),
                fouling=wall.Fouling(0.00018, 0.00018), name="K-12")
CHARGE = Charge(LibraryLiquid("toluene"), volume=5.0)
WATER = Coolant(LibraryLiquid("water"), K + 15, 4.0)
DOSE = Dosing(-150e3, 800.0, 3 * HOUR, 120.0, K + 20, 1900.0)


def check(heat_release, coolant=WATER, limits=False, **kw):
    return cooling_check(VESSEL, CHARGE, coolant, T_R, heat_release, SF, limits=limits, **kw)


def rel(a, b):
    return abs(a / b - 1.0)


@pytest.fixture(scope="module")
def capacity():
    return heat_transfer(VESSEL, CHARGE, WATER, T_R).duty


def test_capacity_closes_the_coolant_energy_balance_against_coolprop():
    # definition (steady-flow energy balance) with CoolProp's c_p of water at the stream's mean temperature;
    # the network reads c_p from its property table, within 1e-5 of CoolProp (calc.properties.TABLE_TOLERANCE)
    r = check(SpecificPower(10.0))
    jacket = r.heat_transfer.stream("jacket")
    cp = CP.PropsSI("C", "T", jacket.mean_temperature, "P", 101325.0, "Water")
    rise = r.coolant_outlet_temperature - WATER.inlet_temperature
    assert r.cooling_capacity == pytest.approx(4.0 * cp * rise, rel=1e-5)
    # Incropera & DeWitt 6th ed. sec. 11.4: Q = U A LMTD for one stream at constant temperature
    assert r.cooling_capacity == pytest.approx(jacket.ua * jacket.balance.log_mean_temperature_difference, rel=1e-9)


def test_margin_is_capacity_over_load_and_the_verdict_flips_at_the_safety_factor(capacity):
    # definition: margin = Q_capacity / Q_load with Q_load = Q_r + P_agitator; adequate when margin >= SF
    agitator = check(TotalPower(0.0)).heat_load.agitator
    assert agitator > 0
    edge = capacity / SF - agitator  # the reaction power that puts the margin exactly at SF
    just_in, exact, just_out = (check(TotalPower(edge * s)) for s in (1 - 1e-9, 1.0, 1 + 1e-9))
    for r in (just_in, exact, just_out):
        assert r.margin == pytest.approx(r.cooling_capacity / (r.heat_load.reaction + agitator), rel=1e-12)
    assert exact.margin == pytest.approx(SF, rel=1e-12)
    assert just_in.margin > SF > just_out.margin
    assert just_in.adequate and not just_out.adequate


# 30 W/kg: adequate at a coolant inlet above freezing (40 W/kg was, before the half-pipe fins between turns)
@pytest.mark.parametrize("heat_release", [DOSE, SpecificPower(30.0), SpecificPower(10.0)])
def test_each_solved_limit_fed_back_gives_the_safety_factor(heat_release):
    # definition of each limit: the value at which margin == safety factor
    r = check(heat_release, limits=True)
    lim = r.limits
    inlet = lim.maximum_coolant_inlet_temperature
    assert inlet.reachable
    back = check(heat_release, coolant=replace(WATER, inlet_temperature=inlet.value))
    assert rel(back.margin, SF) < 1e-6
    assert (inlet.value > WATER.inlet_temperature) == r.adequate
    flow = lim.required_coolant_flow
    assert flow.reachable
    back = check(heat_release, coolant=WATER.with_mass_flow(flow.value))
    assert rel(back.margin, SF) < 1e-6
    assert (flow.value < WATER.mass_flow()) == r.adequate
    if isinstance(heat_release, Dosing):
        t = lim.minimum_dosing_time
        assert t.reachable and t.value > 0
        back = check(replace(heat_release, dosing_time=t.value))
        assert rel(back.margin, SF) < 1e-9
    else:
        assert lim.minimum_dosing_time is None


def test_minimum_dosing_time_closed_form(capacity):
    # closed form: Q_load(t) = A/t + P_agitator = Q_capacity/SF  ->  t = A / (Q_capacity/SF - P_agitator)
    r = check(DOSE, limits=True)
    net = 150e3 * 800.0 - 120.0 * 1900.0 * 40.0
    assert r.limits.minimum_dosing_time.value == pytest.approx(net / (capacity / SF - r.heat_load.agitator), rel=1e-12)


def test_minimum_dosing_time_unreachable_when_the_agitator_uses_up_the_capacity():
    # definition: with Q_capacity/SF <= P_agitator no dosing time is slow enough
    warm = replace(WATER, inlet_temperature=T_R - 0.05)
    r = check(DOSE, coolant=warm, limits=True)
    assert r.cooling_capacity / SF < r.heat_load.agitator
    assert r.limits.minimum_dosing_time.reachable is False and r.limits.minimum_dosing_time.value is None


def test_unreachable_flow_and_inlet_temperature_report_the_limit_capacity(capacity):
    # common practice, no source: capacity rises with flow toward the area/process-film limit
    r = check(SpecificPower(80.0), limits=True)
    assert not r.adequate
    flow = r.limits.required_coolant_flow
    assert flow.reachable is False and flow.value is None and "not reachable at any flow" in flow.message
    at_cap = heat_transfer(VESSEL, CHARGE, WATER.with_mass_flow(FLOW_SEARCH_CAP * 4.0), T_R).duty
    assert flow.cooling_capacity == pytest.approx(at_cap, rel=1e-9)
    assert capacity < at_cap < SF * r.heat_load.total
    inlet = r.limits.maximum_coolant_inlet_temperature
    assert inlet.reachable is False and inlet.value is None


def test_no_net_load_is_adequate_with_an_unbounded_margin():
    # definition: nothing to remove; the margin is reported as None, never infinity
    r = check(TotalPower(-5e3), limits=True)
    assert r.heat_load.total < 0 and r.margin is None and r.adequate
    assert "no_net_heat_load" in [w.code for w in r.warnings]
    assert r.limits.required_coolant_flow.value == 0.0
    assert r.limits.maximum_coolant_inlet_temperature.value == T_R


@settings(max_examples=25, deadline=None)
@given(q1=st.floats(1.0, 100.0), q2=st.floats(1.0, 100.0))
def test_margin_falls_as_the_heat_release_rises(q1, q2):
    # definition: capacity does not depend on the release; margin ~ 1 / load
    low, high = sorted((q1, q2))
    a, b = check(SpecificPower(low)), check(SpecificPower(high))
    assert a.cooling_capacity == b.cooling_capacity
    assert b.margin <= a.margin


def test_cautions_ride_along():
    # project rule: every verdict carries the screening cautions
    r = check(SpecificPower(10.0))
    text = " ".join(r.cautions)
    assert r.cautions[:len(COOLING_CHECK)] == COOLING_CHECK
    for phrase in ("25-30 %", "calorimetry", "plant data", "licensed engineer", "cooling failure"):
        assert phrase in text
    assert DOSING in check(DOSE).cautions and DOSING not in r.cautions


@pytest.mark.parametrize("kw, field", [
    ({"safety_factor": 0.8}, "safety_factor"),
    ({"safety_factor": math.inf}, "safety_factor"),
    ({"coolant": replace(WATER, inlet_temperature=T_R + 1)}, "coolant.inlet_temperature"),
])
def test_bad_input_names_the_field(kw, field):
    args = dict(vessel=VESSEL, charge=CHARGE, coolant=WATER, process_temperature=T_R,
                heat_release=SpecificPower(10.0))
    args.update(kw)
    with pytest.raises(InputError) as info:
        cooling_check(**args)
    assert info.value.field == field


def test_a_batch_of_checks_answers_each_case_as_alone():
    """cooling_checks (the screening's path: limit searches and margin bands of every case in the same
    vectorised passes) gives each case the answer of its lone check, to 1e-9, and keeps one case's input error
    to that case. Oracle: the lone cooling_check, whose numbers the tests above pin to CoolProp and closure."""
    from calc.checks.cooling_check import CheckCase, cooling_checks

    brine = Coolant(LibraryLiquid("water"), K + 5, 2.0, maximum_flow=1.5)  # beyond the header's flow
    small = replace(VESSEL, shape=geometry.VesselShape(1.2, 1.2, "torispherical_fd"), name="small")
    cases = [CheckCase(VESSEL, CHARGE, WATER, T_R, DOSE), CheckCase(VESSEL, CHARGE, brine, T_R, DOSE),
             CheckCase(small, CHARGE, WATER, T_R, DOSE),  # 5 m3 does not fit: an InputError of its own
             CheckCase(VESSEL, CHARGE, WATER, T_R, TotalPower(-50e3)),  # no net load: no searches, no band
             CheckCase(VESSEL, CHARGE, WATER, T_R, SpecificPower(40.0))]
    batch = cooling_checks(cases, SF)
    assert isinstance(batch[2], InputError) and batch[2].field == "charge.volume"
    assert batch[3].margin is None and "flow_exceeds_maximum" in [w.code for w in batch[1].warnings]
    for case, answer in zip(cases, batch):
        if isinstance(answer, InputError):
            continue
        alone = cooling_check(case.vessel, case.charge, case.coolant, case.process_temperature, case.heat_release,
                              SF)
        assert (answer.margin is None) == (alone.margin is None) and answer.adequate == alone.adequate
        values = [(answer.cooling_capacity, alone.cooling_capacity)]
        values += [(a, b) for a, b in zip(vars(answer.limit_values).values(), vars(alone.limit_values).values())
                   if isinstance(b, float)]
        if alone.margin is not None:
            values += [(answer.margin, alone.margin), (answer.margin_band.low, alone.margin_band.low),
                       (answer.margin_band.high, alone.margin_band.high)]
        assert all(a == pytest.approx(b, rel=1e-9) for a, b in values)
        assert vars(answer.limit_values).keys() == vars(alone.limit_values).keys()
        assert [w.code for w in answer.warnings] == [w.code for w in alone.warnings]


def test_a_failed_search_in_a_screening_batch_costs_only_its_own_row(monkeypatch):
    """A limit search that does not converge raises for the whole batch; the screening then checks each vessel
    alone, so the others keep their verdicts (the lone check's, to 1e-9) and only that vessel says why it has
    none. Common practice, no source: one bad item never hides a fleet's answers."""
    from calc.checks import cooling_check as module
    from calc.checks.screening import Candidate, screen
    from calc.validity import CalculationError

    searched = module._solve_limits

    def failing(checks, bands, deadline=module.NEVER):
        if any(network.vessel.name == "stubborn" for network, _, _, _ in checks):
            raise CalculationError("limit search did not converge in 16 passes")
        return searched(checks, bands, deadline)

    monkeypatch.setattr(module, "_solve_limits", failing)
    stubborn = replace(VESSEL, name="stubborn")
    rows = {row.key: row for row in screen([Candidate("good", VESSEL, WATER), Candidate("bad", stubborn, WATER)],
                                           CHARGE, T_R, DOSE, SF).rows}
    assert rows["bad"].check is None and rows["bad"].problem == ("(calculation)",
                                                                 "limit search did not converge in 16 passes")
    assert rows["good"].check.margin == pytest.approx(check(DOSE).margin, rel=1e-9)
    assert rows["good"].check.limits is not None
