"""Agitator power, the impeller library and scale-up speeds."""
import math

import pytest
from fluids.core import Froude, Reynolds
from hypothesis import given, settings
from hypothesis import strategies as st

from calc.vessel.agitation import (GRAVITY, IMPELLERS, Agitator, agitation, power_number, power_number_blend,
                            reynolds_impeller, scaled_speed)
from calc.properties import LibraryLiquid, LiquidProperties
from calc.validity import InputError

WATER_25C = LibraryLiquid("water").at(298.15)  # IAPWS-95 / IAPWS 2008 via CoolProp


def codes(result):
    return {w.code for w in result.warnings}


def test_reynolds_and_froude_match_fluids_oracle():
    # Oracle: fluids.core.Reynolds(V, D, rho, mu) = rho V D / mu and Froude(V, L, squared=True) = V^2/(g L);
    # with V = N D and L = D these are the impeller groups rho N D^2/mu and N^2 D/g.
    N, D = 1.7, 0.45
    r = agitation(Agitator("pitched_blade_turbine", D, N), WATER_25C, 1.0, 1.2)
    assert r.reynolds == pytest.approx(Reynolds(V=N * D, D=D, rho=WATER_25C.density, mu=WATER_25C.viscosity),
                                       rel=1e-12)
    assert r.froude == pytest.approx(Froude(N * D, L=D, squared=True), rel=1e-12)
    assert r.tip_speed == pytest.approx(math.pi * N * D, rel=1e-12)


def test_turbulent_rushton_power_closed_form():
    # P = N_p rho N^3 D^5 with N_p = 5 for a baffled six-blade disc turbine in turbulent flow
    # (Raju 2011, p. 166: "disk turbine, Po ~ 5"). Hand value: 5 * 997.05 * 2^3 * 0.5^5 = 1246.3 W.
    r = agitation(Agitator("rushton_turbine", 0.5, 2.0), WATER_25C, 2.0, 1.5)
    assert r.regime == "turbulent"
    assert r.power_number == pytest.approx(5.0, rel=1e-3)
    assert r.power == pytest.approx(1246.3, rel=1e-3)
    assert r.power_per_volume == pytest.approx(r.power / 2.0, rel=1e-12)


@pytest.mark.parametrize("impeller, low, high, reference", [
    ("rushton_turbine", 4.5, 6.0, "Raju 2011 p.166 'about 5'; 5.0-5.5 typical, ~6 Rushton et al. 1950 (from memory)"),
    ("pitched_blade_turbine", 1.1, 1.5, "1.27, 1.1-1.5 with clearance (from memory)"),
    ("hydrofoil", 0.25, 0.35, "Raju 2011 p.166: narrow-blade hydrofoil about 0.3"),
    ("marine_propeller", 0.3, 0.4, "0.32-0.35 for pitch = diameter (from memory)"),
])
def test_turbulent_power_numbers_against_published_values(impeller, low, high, reference):
    # The computed power number at Re ~ 1e6 must sit in the published band.
    D, T = 0.6, 1.8
    r = agitation(Agitator(impeller, D, 3.0), WATER_25C, 4.0, T)
    assert r.reynolds > 1e6
    assert low <= r.power_number <= high, reference


def test_laminar_power_depends_on_viscosity_not_density():
    # In creeping flow P = K_p mu N^2 D^3, independent of density (Raju 2011 p.166; common practice).
    # Propeller with pitch = diameter: K_p = 41 (Raju 2011 p.166).
    syrup = LiquidProperties(298.15, 1300.0, 2000.0, 200.0, 0.3)
    dense = LiquidProperties(298.15, 2600.0, 2000.0, 200.0, 0.3)
    a = Agitator("marine_propeller", 0.3, 0.5)
    r1, r2 = agitation(a, syrup, 0.5, 1.0), agitation(a, dense, 0.5, 1.0)
    assert r1.regime == "laminar"
    assert r1.power == pytest.approx(41.0 * 200.0 * 0.5 ** 2 * 0.3 ** 3, rel=0.01)
    assert r2.power == pytest.approx(r1.power, rel=0.01)


def test_paddle_laminar_constant_from_nagata():
    # Nagata (1975): A = 14 + (b/T)[670 (D/T - 0.6)^2 + 185]; D/T = 0.5, b/T = 0.1 gives 33.17.
    nagata = 14 + 0.1 * (670 * (0.5 - 0.6) ** 2 + 185)
    assert IMPELLERS["paddle"].laminar_constant == pytest.approx(nagata, rel=0.01)


def test_unbaffled_rushton_is_a_fifth_to_a_quarter_of_baffled():
    # Unbaffled turbulent N_p of a disc turbine is about 1/4-1/5 of the baffled value (from memory).
    a = dict(impeller="rushton_turbine", diameter=0.5, speed=2.0)
    baffled = agitation(Agitator(**a), WATER_25C, 2.0, 1.5)
    unbaffled = agitation(Agitator(**a, baffled=False), WATER_25C, 2.0, 1.5)
    assert 0.19 <= unbaffled.power / baffled.power <= 0.26
    assert "unbaffled_vortexing" in codes(unbaffled)


def test_impellers_on_one_shaft_add_and_warn():
    # Power additive for spacing >= about one impeller diameter (common practice, no source).
    one = agitation(Agitator("hydrofoil", 0.6, 1.5), WATER_25C, 6.0, 1.8)
    three = agitation(Agitator("hydrofoil", 0.6, 1.5, count=3), WATER_25C, 6.0, 1.8)
    assert three.power == pytest.approx(3 * one.power, rel=1e-12)
    assert "multiple_impellers" in codes(three)


def test_user_power_number_replaces_library_value():
    r = agitation(Agitator("retreat_curve", 1.2, 1.5, power_number=0.45), WATER_25C, 4.0, 1.8)
    assert r.power_number == pytest.approx(0.45, rel=1e-4)
    assert r.sources["power_number"] == "given by the user"


def test_warnings_for_geometry_and_regime():
    assert "impeller_diameter_ratio" in codes(agitation(Agitator("rushton_turbine", 1.2, 1.0), WATER_25C, 4, 1.8))
    syrup = LiquidProperties(298.15, 1300.0, 2000.0, 50.0, 0.3)
    laminar = agitation(Agitator("rushton_turbine", 0.6, 1.0), syrup, 4, 1.8)
    assert laminar.regime == "laminar" and "laminar_regime" in codes(laminar)
    anchor = agitation(Agitator("anchor", 1.7, 0.5, baffled=False), syrup, 4, 1.8)
    assert "laminar_regime" not in codes(anchor)  # anchors are made for laminar duty
    oil = LiquidProperties(298.15, 900.0, 2000.0, 0.5, 0.15)
    assert agitation(Agitator("pitched_blade_turbine", 0.6, 1.0), oil, 4, 1.8).regime == "transitional"


@pytest.mark.parametrize("agitator, tank, field", [
    (Agitator("rushton_turbine", 1.8, 1.0), 1.8, "vessel.agitator.diameter"),
    (Agitator("rushton_turbine", -0.5, 1.0), 1.8, "vessel.agitator.diameter"),
    (Agitator("rushton_turbine", 0.5, 0.0), 1.8, "vessel.agitator.speed"),
    (Agitator("rushton_turbine", 0.5, 1.0, count=0), 1.8, "vessel.agitator.count"),
    (Agitator("rushton_turbine", 0.5, 1.0, power_number=-1.0), 1.8, "vessel.agitator.power_number"),
    (Agitator("eggbeater", 0.5, 1.0), 1.8, "vessel.agitator.impeller"),
    (Agitator("rushton_turbine", 0.5, 1.0), float("nan"), "vessel.diameter"),
])
def test_impossible_input_names_the_field(agitator, tank, field):
    with pytest.raises(InputError) as err:
        agitation(agitator, WATER_25C, 1.0, tank)
    assert err.value.field == field


def test_unknown_impeller_lists_known_ids():
    with pytest.raises(InputError) as err:
        agitation(Agitator("eggbeater", 0.5, 1.0), WATER_25C, 1.0, 1.8)
    for known in ("rushton_turbine", "pitched_blade_turbine", "hydrofoil", "marine_propeller", "paddle",
                  "anchor", "retreat_curve"):
        assert known in err.value.message


def test_library_ids_are_the_contract():
    assert set(IMPELLERS) == {"rushton_turbine", "pitched_blade_turbine", "hydrofoil", "marine_propeller",
                              "paddle", "anchor", "retreat_curve"}
    for info in IMPELLERS.values():
        assert info.power_number_source and info.laminar_constant_source and info.wall_source


# --- scale-up ---------------------------------------------------------------------------------------

def test_constant_power_per_volume_turbulent_exponent():
    # Turbulent, N_p constant: P = N_p rho N^3 D^5 and V ~ D^3, so P/V ~ N^3 D^2 constant gives N ~ D^(-2/3) (derived).
    a = Agitator("pitched_blade_turbine", 0.2, 6.0)
    N2 = scaled_speed("constant_power_per_volume", a, 8.0, WATER_25C)
    assert N2 == pytest.approx(6.0 * 8.0 ** (-2 / 3), rel=2e-4)


def test_simple_scale_up_rules():
    a = Agitator("rushton_turbine", 0.2, 5.0)
    assert scaled_speed("constant_speed", a, 5.0, WATER_25C) == 5.0
    assert math.pi * scaled_speed("constant_tip_speed", a, 5.0, WATER_25C) * 1.0 == pytest.approx(math.pi * 5.0 * 0.2)
    N2 = scaled_speed("constant_reynolds", a, 5.0, WATER_25C)
    assert reynolds_impeller(1000, N2, 1.0, 1e-3) == pytest.approx(reynolds_impeller(1000, 5.0, 0.2, 1e-3))
    with pytest.raises(InputError) as err:
        scaled_speed("constant_froude_number", a, 5.0, WATER_25C)
    assert err.value.field == "rule" and "constant_power_per_volume" in err.value.message


# --- properties -------------------------------------------------------------------------------------

@settings(max_examples=50, deadline=None)
@given(impeller=st.sampled_from(sorted(IMPELLERS)), baffled=st.booleans(),
       mu=st.floats(1e-4, 100.0), n1=st.floats(0.05, 10.0), n2=st.floats(0.05, 10.0))
def test_power_rises_with_speed(impeller, baffled, mu, n1, n2):
    # P = K_p mu N^2 D^3 + N_p rho N^3 D^5 in the blend: strictly increasing in N (common practice).
    if n1 == n2:
        return
    low, high = sorted((n1, n2))
    liquid = LiquidProperties(298.15, 1000.0, 4000.0, mu, 0.6)
    D = 0.9 * 1.8 if IMPELLERS[impeller].close_clearance else 0.6
    p_low = agitation(Agitator(impeller, D, low, baffled=baffled), liquid, 4.0, 1.8).power
    p_high = agitation(Agitator(impeller, D, high, baffled=baffled), liquid, 4.0, 1.8).power
    assert p_high > p_low


@settings(max_examples=50, deadline=None)
@given(impeller=st.sampled_from(sorted(IMPELLERS)), re1=st.floats(1e-2, 1e7), re2=st.floats(1e-2, 1e7))
def test_power_number_falls_with_reynolds(impeller, re1, re2):
    a = Agitator(impeller, 0.5, 1.0)
    low, high = sorted((re1, re2))
    assert power_number(a, high) <= power_number(a, low)
    # Both asymptotes are respected: K_p/Re and N_p,turb are lower bounds (blend definition).
    info = IMPELLERS[impeller]
    assert power_number(a, low) >= max(info.laminar_constant / low, info.power_number)


@settings(max_examples=50, deadline=None)
@given(impeller=st.sampled_from(sorted(IMPELLERS)), factor=st.floats(0.1, 20.0), mu=st.floats(1e-4, 10.0))
def test_constant_power_per_volume_closes(impeller, factor, mu):
    # Solved on the real power curve: P/V of the two geometrically similar vessels is equal.
    liquid = LiquidProperties(298.15, 1000.0, 4000.0, mu, 0.6)
    D, T, V = 0.3, 0.9, 0.5
    if IMPELLERS[impeller].close_clearance:
        D = 0.85
    a = Agitator(impeller, D, 2.0)
    N2 = scaled_speed("constant_power_per_volume", a, factor, liquid)
    big = Agitator(impeller, D * factor, N2)
    pv1 = agitation(a, liquid, V, T).power_per_volume
    pv2 = agitation(big, liquid, V * factor ** 3, T * factor).power_per_volume
    assert pv2 == pytest.approx(pv1, rel=1e-8)


def test_blend_limits():
    # Exact at both ends by construction: K_p/Re as Re -> 0, N_p,turb as Re -> infinity.
    assert power_number_blend(1e-6, 70.0, 5.0) * 1e-6 == pytest.approx(70.0, rel=1e-6)
    assert power_number_blend(1e12, 70.0, 5.0) == pytest.approx(5.0, rel=1e-10)
    assert GRAVITY == 9.80665  # CGPM 1901 standard gravity
