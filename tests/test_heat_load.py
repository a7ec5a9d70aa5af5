"""Heat-release models and the heat load: definitions, closures, warnings and input errors.

Demo data are an invented scenario: an alkylation step in a 5 m3 stainless reactor "K-12" dosing
an alkyl chloride (about 800 mol) onto a toluene-based charge at 60 degC.
"""
import math

import pytest
from hypothesis import given, settings, strategies as st

from calc.checks.heat_load import Dosing, MODELS, SpecificPower, TotalPower, heat_load, heat_release_model
from calc.validity import InputError

K = 273.15
HOUR = 3600.0


def test_dosing_reaction_power_is_enthalpy_times_feed_rate():
    # definition: a feed reacting as it is added releases -dH x (molar feed rate)
    dosing = Dosing(-150e3, 800.0, 3 * HOUR)
    load = heat_load(dosing, 4300.0, K + 60, 0.0)
    molar_rate = 800.0 / (3 * HOUR)
    assert load.reaction == pytest.approx(150e3 * molar_rate, rel=1e-12)
    assert load.reaction == pytest.approx(11111.111, rel=1e-6)  # hand computation: 1.2e8 J / 10800 s
    assert load.feed_sensible == 0.0 and load.total == load.reaction


def test_cold_feed_absorbs_its_sensible_heat():
    # definition: feed warming from T_feed to T_r at a constant rate takes m_dot c_p (T_r - T_feed)
    dosing = Dosing(-150e3, 800.0, 3 * HOUR, 120.0, K + 20, 1900.0)
    load = heat_load(dosing, 4300.0, K + 60, 280.0)
    assert load.feed_sensible == pytest.approx(120.0 / (3 * HOUR) * 1900.0 * 40.0, rel=1e-12)
    assert load.total == pytest.approx(load.reaction + 280.0 - load.feed_sensible, rel=1e-12)
    assert not load.warnings


def test_hot_feed_adds_heat_and_warns():
    # definition: a feed warmer than the contents gives up heat (negative sensible uptake)
    dosing = Dosing(-150e3, 800.0, 3 * HOUR, 120.0, K + 80, 1900.0)
    load = heat_load(dosing, 4300.0, K + 60, 280.0)
    assert load.feed_sensible == pytest.approx(-120.0 / (3 * HOUR) * 1900.0 * 20.0, rel=1e-12)
    assert load.total > load.reaction + load.agitator
    assert [w.code for w in load.warnings] == ["feed_hotter_than_contents"]


def test_zero_enthalpy_dosing_warns():
    # definition: dH = 0 releases no heat; the agitator power is then the whole load
    load = heat_load(Dosing(0.0, 800.0, 3 * HOUR), 4300.0, K + 60, 280.0)
    assert load.reaction == 0.0
    assert "no_reaction_heat" in [w.code for w in load.warnings]
    assert load.total == pytest.approx(280.0, rel=1e-12)


def test_declared_endothermic_dosing_takes_up_heat_and_says_so():
    # definition: Q_r = -dH n / t_dose is negative for dH > 0; the step was declared heat-absorbing
    load = heat_load(Dosing(40e3, 800.0, 3 * HOUR, endothermic=True), 4300.0, K + 60, 280.0)
    assert load.reaction == pytest.approx(-40e3 * 800.0 / (3 * HOUR), rel=1e-12)
    assert [w.code for w in load.warnings] == ["endothermic_step"]


def test_positive_enthalpy_without_the_declaration_is_refused():
    # sign convention: thermodynamic, negative = exothermic (common practice, no source)
    with pytest.raises(InputError) as error:
        heat_load(Dosing(40e3, 800.0, 3 * HOUR), 4300.0, K + 60, 280.0)
    assert error.value.field == "heat_release.reaction_enthalpy" and "negative" in error.value.message
    with pytest.raises(InputError) as error:
        heat_load(Dosing(-40e3, 800.0, 3 * HOUR, endothermic=True), 4300.0, K + 60, 280.0)
    assert error.value.field == "heat_release.endothermic"


def test_power_models():
    # definition: specific power times charge mass; a total power is taken as given
    assert heat_load(SpecificPower(25.0), 4300.0, K + 60, 280.0).total == pytest.approx(25.0 * 4300.0 + 280.0)
    assert heat_load(TotalPower(90e3), 4300.0, K + 60, 280.0).reaction == 90e3


def test_scaling_with_charge_mass():
    # definition: per-kg release stays per kg, a total power and a dose grow with the mass, same dosing time
    assert SpecificPower(25.0).scaled(8.0) == SpecificPower(25.0)
    assert TotalPower(90e3).scaled(8.0).power == pytest.approx(720e3)
    dose = Dosing(-150e3, 800.0, 3 * HOUR, 120.0, K + 20, 1900.0).scaled(8.0)
    assert (dose.dosed_amount, dose.feed_mass, dose.dosing_time) == (6400.0, 960.0, 3 * HOUR)


@settings(max_examples=60, deadline=None)
@given(enthalpy=st.floats(-400e3, -1e3), amount=st.floats(1.0, 1e5), hours=st.floats(0.1, 24.0),
       feed=st.floats(0.0, 1e4), feed_t=st.floats(250.0, 400.0), agitator=st.floats(0.0, 5e4))
def test_dose_energy_does_not_depend_on_dosing_time(enthalpy, amount, hours, feed, feed_t, agitator):
    # definition: (load - agitator) x dosing time is the dose's net energy, whatever the dosing time
    dosing = Dosing(enthalpy, amount, hours * HOUR, feed, feed_t, 1900.0)
    load = heat_load(dosing, 1000.0, K + 60, agitator)
    net = -enthalpy * amount - feed * 1900.0 * (K + 60 - feed_t)
    assert (load.total - agitator) * hours * HOUR == pytest.approx(net, rel=1e-9, abs=1e-6 * abs(enthalpy * amount))
    assert load.total == pytest.approx(load.reaction + load.agitator - load.feed_sensible, rel=1e-12, abs=1e-9)


def test_registry_builds_each_model_by_name():
    assert set(MODELS) == {"specific_power", "total_power", "dosing"}
    built = heat_release_model("dosing", reaction_enthalpy=-150e3, dosed_amount=800.0, dosing_time=3 * HOUR)
    assert built == Dosing(-150e3, 800.0, 3 * HOUR)


@pytest.mark.parametrize("model, params, field", [
    ("stirring", {}, "heat_release.model"),
    ("specific_power", {}, "heat_release.power_per_mass"),
    ("specific_power", {"power_per_mass": math.nan}, "heat_release.power_per_mass"),
    ("total_power", {"power": 1.0, "speed": 2.0}, "heat_release.speed"),
    ("dosing", {"reaction_enthalpy": -1e5, "dosed_amount": 10.0, "dosing_time": 0.0}, "heat_release.dosing_time"),
    ("dosing", {"reaction_enthalpy": -1e5, "dosed_amount": -1.0, "dosing_time": 60.0}, "heat_release.dosed_amount"),
    ("dosing", {"reaction_enthalpy": -1e5, "dosed_amount": 10.0, "dosing_time": 60.0, "feed_mass": 5.0},
     "heat_release.feed_temperature"),
    ("dosing", {"reaction_enthalpy": -1e5, "dosed_amount": 10.0, "dosing_time": 60.0, "feed_mass": 5.0,
                "feed_temperature": 293.15}, "heat_release.feed_heat_capacity"),
])
def test_bad_parameters_name_the_field(model, params, field):
    with pytest.raises(InputError) as info:
        heat_release_model(model, **params)
    assert info.value.field == field
