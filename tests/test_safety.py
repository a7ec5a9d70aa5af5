"""Thermal safety: adiabatic rise, MTSR, TMR_ad, T_D24, criticality classes and the Semenov criterion."""
import math
import re

import pytest
from hypothesis import given, settings, strategies as st
from scipy.integrate import quad

from calc.properties import GAS_CONSTANT as R
from calc.safety import runaway
from calc.safety import criticality
from calc.safety.runaway import assess_semenov, semenov_number
from calc.safety.criticality import (
    Decomposition, ThermalSafetyInput, adiabatic_temperature_rise_from_enthalpy, assess_thermal_safety,
    criticality_class_Stoessel_1993, decomposition_power, mtsr_from_profile, mtsr_Stoessel_1993,
    td24_Townsend_Tou_1980, tmr_ad_Townsend_Tou_1980,
)
from calc.validity import InputError

K = 273.15


def test_tmr_ad_is_the_asymptote_of_the_exact_adiabatic_induction_time():
    # Independent solution: for a zero-order adiabatic runaway c_p dT/dt = q'(T), the time to maximum
    # rate (T -> infinity) is the integral of c_p/q'(T) dT. Townsend & Tou (1980) keep the leading term
    # of its expansion in eps = R T0/E: substituting u = 1/T0 - 1/T gives exact = TMR_ad (1 + 2 eps + ...)
    # (asymptotic expansion, derived here; Frank-Kamenetskii approximation).
    cp, T0, q0, E = 1800.0, 380.0, 0.5, 120e3
    exact, _ = quad(lambda T: cp / decomposition_power(q0, T0, E, T), T0, 5000.0, limit=200)
    closed = tmr_ad_Townsend_Tou_1980(cp, T0, q0, E)
    eps = R * T0 / E
    assert closed == pytest.approx(cp * R * T0 ** 2 / (q0 * E), rel=1e-15)  # Townsend & Tou (1980) formula
    assert exact / closed - 1.0 == pytest.approx(2 * eps, rel=0.15)  # next term of the expansion


def test_td24_gives_24_hours_when_fed_back():
    # Definition of T_D24 (Stoessel 2008, ch. 3): TMR_ad(T_D24) = 24 h.
    cp, q0, T0, E = 2100.0, 5.0, 430.0, 85e3
    T = td24_Townsend_Tou_1980(cp, q0, T0, E)
    q = decomposition_power(q0, T0, E, T)
    assert tmr_ad_Townsend_Tou_1980(cp, T, q, E) == pytest.approx(24 * 3600.0, rel=1e-9)
    assert T < T0  # 5 W/kg at 430 K gives a TMR of minutes, so the 24 h level lies below


@settings(max_examples=50, deadline=None)
@given(q0=st.floats(0.01, 100.0), E=st.floats(50e3, 250e3))
def test_td24_falls_as_the_decomposition_gets_faster(q0, E):
    # Monotonic trend: a larger heat-release rate at the same temperature means a lower T_D24
    # (Arrhenius law; common practice, no source).
    T_slow = td24_Townsend_Tou_1980(1800.0, q0, 450.0, E)
    T_fast = td24_Townsend_Tou_1980(1800.0, 2 * q0, 450.0, E)
    assert T_fast < T_slow


def test_adiabatic_rise_and_mtsr_definitions():
    # Definitions (Stoessel 1993): dT_ad = (-dH) c / (rho cp); MTSR = Tp + X_ac dT_ad.
    dT = adiabatic_temperature_rise_from_enthalpy(-150e3, 1200.0, 950.0, 1900.0)
    assert dT == pytest.approx(150e3 * 1200.0 / (950.0 * 1900.0), rel=1e-15)
    assert mtsr_Stoessel_1993(340.0, 0.25, dT) == pytest.approx(340.0 + 0.25 * dT, rel=1e-15)
    # Mass factor m_final/m(t) (Stoessel 2008, ch. 7): 20 % unconverted in half the final mass heats twice.
    mtsr, i = mtsr_from_profile([340.0, 341.0], [0.2, 0.0], 100.0, [500.0, 1000.0])
    assert (mtsr, i) == (pytest.approx(380.0), 0)


# Constructed orderings of (MTSR, MTT, T_D24) for each class, Stoessel, Chem. Eng. Prog. 89(10), 68 (1993), table.
@pytest.mark.parametrize("mtsr, mtt, td24, expected", [
    (360.0, 380.0, 400.0, 1),  # MTSR < MTT < T_D24
    (360.0, 400.0, 380.0, 2),  # MTSR < T_D24 < MTT
    (380.0, 360.0, 400.0, 3),  # MTT < MTSR < T_D24
    (400.0, 360.0, 380.0, 4),  # MTT < T_D24 < MTSR
    (400.0, 380.0, 360.0, 5),  # T_D24 < MTT < MTSR
    (380.0, 400.0, 360.0, 5),  # T_D24 < MTSR < MTT: decomposition before boiling (Stoessel 2008)
    # Ties at each boundary fall into the more critical class (documented choice):
    (380.0, 380.0, 400.0, 3),  # MTSR = MTT: boiling point reached
    (360.0, 380.0, 380.0, 2),  # MTT = T_D24: decomposition triggered at the MTT
    (380.0, 360.0, 380.0, 4),  # MTSR = T_D24 above the MTT
    (380.0, 380.0, 380.0, 5),  # all equal
])
def test_criticality_classes_at_and_between_boundaries(mtsr, mtt, td24, expected):
    klass, reasons = criticality_class_Stoessel_1993(340.0, mtsr, mtt, td24)
    assert klass == expected
    assert reasons[-1].startswith(f"Hence criticality class {expected}")


_T = st.floats(300.0, 600.0)


@settings(max_examples=50, deadline=None)
@given(mtsr=_T, mtt=_T, td24=_T, step=st.floats(0.0, 100.0))
def test_class_never_falls_as_mtsr_rises_or_td24_falls(mtsr, mtt, td24, step):
    # Monotonic by construction of the scheme (Stoessel 1993): a hotter runaway or a less stable
    # mixture can only make the step more critical.
    base = criticality_class_Stoessel_1993(290.0, mtsr, mtt, td24)[0]
    assert criticality_class_Stoessel_1993(290.0, mtsr + step, mtt, td24)[0] >= base
    assert criticality_class_Stoessel_1993(290.0, mtsr, mtt, td24 - step)[0] >= base


def test_semenov_number_at_the_independently_computed_critical_point():
    # Independent solution with the full Arrhenius law: tangency of q_g(T) = q_ref exp(-E/RT)-form and
    # q_r = UA (T - Tc) needs T - Tc = R T^2/E (quadratic in T). At that critical heat generation
    # Semenov's psi equals 1/e up to the Frank-Kamenetskii approximation error, O(R Tc/E)
    # (Semenov 1928).
    UA, E, Tc = 3000.0, 110e3, 320.0
    a = E / R
    T_star = (a - math.sqrt(a * a - 4 * a * Tc)) / 2  # root of T^2 - a T + a Tc = 0
    q_star = UA * (T_star - Tc)  # generation at the tangent point
    q_c = decomposition_power(q_star, T_star, E, Tc)
    psi = semenov_number(q_c, E, UA, Tc)
    assert abs(psi * math.e - 1.0) < 3 * R * Tc / E
    result = assess_semenov(q_star, T_star, E, UA, Tc)
    assert result.temperature_of_no_return == pytest.approx(T_star, rel=1e-9)  # dq_g/dT = UA there
    assert result.critical_coolant_temperature == pytest.approx(Tc, rel=1e-9)
    assert result.critical_temperature_difference == pytest.approx(R * Tc ** 2 / E)  # Semenov (1928)


def test_assessment_of_a_batch_step_with_water_boiling_point():
    # MTT from CoolProp: normal boiling point of water 373.124 K (IAPWS-95, from memory).
    # Invented demo step; checks wiring against the functions tested above.
    inp = ThermalSafetyInput(process_temperature=K + 60, heat_capacity=3800.0, reaction_energy=190e3,
                             accumulation=0.4, contents_fluid="water",
                             decomposition=Decomposition(2.0, K + 180, 95e3))
    r = assess_thermal_safety(inp)
    assert r.mtt == pytest.approx(373.124, abs=0.01)
    assert r.adiabatic_temperature_rise == pytest.approx(50.0)
    assert r.mtsr == pytest.approx(K + 80.0)
    assert r.criticality_class == 1  # 80 degC < 100 degC < T_D24
    assert r.td24 > r.mtt
    assert r.time_to_maximum_rate > 24 * 3600  # MTSR below T_D24 (TMR falls monotonically with T)
    assert any("long_extrapolation" == w.code for w in r.warnings)  # 180 degC measurement, far from T_D24


@pytest.mark.parametrize("changes, field", [
    ({"accumulation": 1.2}, "accumulation"),
    ({"decomposition": Decomposition(2.0, 450.0, 0.0)}, "decomposition.activation_energy"),
    ({"decomposition": Decomposition(-1.0, 450.0, 9e4)}, "decomposition.onset_power"),
    ({"decomposition": None}, "decomposition"),
    ({"maximum_technical_temperature": None}, "maximum_technical_temperature"),
    ({"reaction_energy": -5.0}, "reaction_energy"),
    ({"td24": 400.0}, "td24"),
    ({"process_temperature": 420.0}, "process_temperature"),
])
def test_bad_input_names_the_field(changes, field):
    base = dict(process_temperature=340.0, heat_capacity=1900.0, reaction_energy=1e5, accumulation=0.5,
                maximum_technical_temperature=383.0, decomposition=Decomposition(2.0, 450.0, 9e4))
    base.update(changes)
    with pytest.raises(InputError) as info:
        assess_thermal_safety(ThermalSafetyInput(**base))
    assert info.value.field == field


def test_registry_names_resolve_to_the_authors_functions():
    # STYLE: every registry entry resolves to a function of its module that carries the first author's
    # name; a year in the function name is the cited year, and the source cites that year.
    for module in (criticality, runaway):
        for key, entry in module.REGISTRY.items():
            first_author = entry.name.split()[0].lower()
            year = entry.name.split("(")[1][:4]
            name = entry.function.__name__
            assert first_author in name.lower(), key
            assert getattr(module, name) is entry.function, key
            assert re.findall(r"\d{4}", name) in ([], [year]), key
            assert year in entry.source, key
