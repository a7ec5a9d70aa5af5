"""Process-side film coefficients to the jacketed wall and to helical coils."""
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from calc.films import process_side
from calc.vessel.agitation import IMPELLERS, Agitator, agitation, scaled_speed
from calc.films.process_side import (CORRELATIONS, nusselt_agitated_Chilton_Drew_Jebens_1944,
                               nusselt_coil_Oldshue_Gretton_1954, process_film_coil, process_film_jacket)
from calc.properties import LibraryLiquid, LiquidProperties
from calc.validity import InputError

WATER_30C = LibraryLiquid("water").at(303.15)  # IAPWS via CoolProp: 995.65 kg/m3, 0.7972 mPa s, 0.6144 W/(m K)


def codes(result):
    return {w.code for w in result.warnings}


def test_rushton_wall_film_hand_calculation():
    # Hand calculation with Coker (2001) Table 7-14, six-blade flat turbine, baffled, Re > 400:
    # Nu = 0.74 Re^0.67 Pr^0.33 (mu/mu_w)^0.14. Water at 30 degC, T = H = 1.8 m, D = 0.6 m, 90 rpm:
    # Re = 995.65*1.5*0.36/7.972e-4 = 6.744e5; Pr = 5.424; Re^0.67 = 8042; Pr^0.33 = 1.747;
    # Nu = 0.74*8042*1.747 = 10397; h = 10397*0.6144/1.8 = 3549 W/(m2 K).
    r = agitation(Agitator("rushton_turbine", 0.6, 1.5), WATER_30C, 4.6, 1.8)
    film = process_film_jacket("rushton_turbine", r.reynolds, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    assert r.reynolds == pytest.approx(6.744e5, rel=1e-3)
    assert film.nusselt == pytest.approx(10397, rel=1e-3)
    assert film.h == pytest.approx(3549, rel=1e-3)
    assert film.constant_a == 0.74 and "Coker" in film.source
    assert not film.warnings


def test_rushton_published_values_kept_outside_the_blend():
    # Coker (2001) Table 7-14: a = 0.54 below Re = 400, 0.74 above (same exponents). Outside the blend
    # band (one decade centred on 400: 126.5 to 1265) each published value stands exactly.
    low, high = process_side.blend_range(400.0)
    assert (low, high) == pytest.approx((400 / 10 ** 0.5, 400 * 10 ** 0.5))
    below = process_film_jacket("rushton_turbine", 120.0, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    above = process_film_jacket("rushton_turbine", 1300.0, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    assert below.constant_a == 0.54 and above.constant_a == 0.74
    assert below.nusselt == pytest.approx(0.54 * 120 ** 0.67 * WATER_30C.prandtl ** 0.33, rel=1e-12)
    middle = process_film_jacket("rushton_turbine", 400.0, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    assert middle.constant_a == pytest.approx(0.5 * (0.54 + 0.74), rel=1e-12)  # w = 1/2 at the switch


def test_rushton_film_smooth_in_speed_across_the_switch():
    # Issue found by an independent check: h jumped +37 % between Re 398 and 401. Scan the agitator speed
    # finely across the whole blend (Re 100-2000): h must rise with speed and no step may exceed what
    # the Re^0.67 power law alone gives plus a small allowance (the blend's slope), i.e. no jump.
    import numpy as np
    speeds = np.geomspace(0.5, 25.0, 3000)  # rev/s; 0.3 m impeller in a viscous liquid (0.9 Pa s)
    props = LiquidProperties(303.15, 1000.0, 2000.0, 0.9, 0.15)
    res = [1000.0 * n * 0.09 / 0.9 for n in speeds]
    assert res[0] < 100 and res[-1] > 1500
    h = np.array([process_film_jacket("rushton_turbine", Re, props, 0.9, 1.0, 1.0).h for Re in res])
    ratio = h[1:] / h[:-1]
    step = speeds[1] / speeds[0]
    assert np.all(ratio > 1.0)
    # power law alone: step**0.67; the blend adds about ln(0.74/0.54) * max dw/dlog10(Re) (1.5) per decade;
    # allow 2 (a jump of 37 % at one step would exceed this by orders of magnitude)
    assert ratio.max() < step ** 0.67 * (0.74 / 0.54) ** (2.0 * np.log10(step)) * (1 + 1e-9)


def test_pitched_blade_height_factor():
    # HIM (Penney & Atiemo-Obeng 2004): 4-blade 45 degree PBT a = 0.45, G_c = (H/T)^-0.15.
    # H/T = 1.2 multiplies Nu by 1.2^-0.15 = 0.97302 (hand calculation).
    args = ("pitched_blade_turbine", 2e5, WATER_30C, WATER_30C.viscosity, 1.8)
    assert (process_film_jacket(*args, 2.16).nusselt / process_film_jacket(*args, 1.8).nusselt
            == pytest.approx(0.97302, rel=1e-4))
    assert process_film_jacket(*args, 1.8).nusselt == pytest.approx(
        0.45 * 2e5 ** (2 / 3) * WATER_30C.prandtl ** (1 / 3), rel=1e-12)  # HIM constants, standard geometry


def test_viscosity_correction_exponent():
    # Sieder-Tate wall correction (mu/mu_w)^0.14 (Sieder & Tate, Ind. Eng. Chem. 28, 1429, 1936):
    # a wall twice as fluid as the bulk raises h by 2^0.14 = 1.1019.
    bulk = process_film_jacket("hydrofoil", 1e5, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    cold = process_film_jacket("hydrofoil", 1e5, WATER_30C, WATER_30C.viscosity / 2, 1.8, 1.8)
    assert cold.h / bulk.h == pytest.approx(1.1019, rel=1e-4)


def test_coil_form_agrees_with_original_oldshue_gretton():
    # Original (from memory): Nu_o = 0.17 Re^0.67 Pr^0.37 (D/T)^0.1 (d_o/T)^0.5; the HIM restatement
    # uses 0.03 about D/T = 1/3, d_o/T = 0.04 (Penney & Atiemo-Obeng, Handbook of Industrial Mixing, 2004,
    # ch. 14; 0.17 (1/3)^0.1 0.04^0.5 = 0.0305, arithmetic).
    for Re in (1e4, 1e5):
        for D_T, do_T in ((1 / 3, 0.04), (0.4, 0.03)):
            original = 0.17 * Re ** 0.67 * D_T ** 0.1 * do_T ** 0.5
            ours = nusselt_coil_Oldshue_Gretton_1954(Re, 1.0, 1.0, D_T, do_T, 0.03, 2 / 3, 1 / 3, 0.14)
            assert ours == pytest.approx(original, rel=0.06)


def test_coil_film_uses_tube_diameter_and_geometry():
    # Disc turbine coil (HIM 0.03 form): doubling d_o at fixed T multiplies Nu_o by 2^0.5 and h by
    # 2^0.5/2 = 0.7071 (h = Nu_o k / d_o).
    args = ("rushton_turbine", 3e5, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    thin, thick = process_film_coil(*args, 0.05, 0.6), process_film_coil(*args, 0.10, 0.6)
    assert thick.h / thin.h == pytest.approx(2 ** 0.5 / 2, rel=1e-12)
    assert thin.h == pytest.approx(thin.nusselt * WATER_30C.thermal_conductivity / 0.05, rel=1e-12)


def test_paddle_coil_nusselt_on_tank_diameter():
    # Chilton, Drew & Jebens (1944), paddle, coil: h T/k = 0.87 Re^0.62 Pr^(1/3) (mu/mu_w)^0.14 (from memory).
    r = process_film_coil("paddle", 5e4, WATER_30C, WATER_30C.viscosity, 1.8, 1.8, 0.05, 0.9)
    expected = 0.87 * 5e4 ** 0.62 * WATER_30C.prandtl ** (1 / 3) * WATER_30C.thermal_conductivity / 1.8
    assert r.h == pytest.approx(expected, rel=1e-12)


def test_bottom_head_constants_and_fallback():
    # HIM: PBT bottom head a = 1.08 vs wall 0.45 (same exponents and G_c).
    args = (2e5, WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    wall = process_film_jacket("pitched_blade_turbine", *args)
    head = process_film_jacket("pitched_blade_turbine", *args, surface="bottom_head")
    assert head.h / wall.h == pytest.approx(1.08 / 0.45, rel=1e-12)
    prop = process_film_jacket("marine_propeller", *args, surface="bottom_head")
    assert "bottom_head_uses_wall_constants" in codes(prop)
    assert prop.h == pytest.approx(process_film_jacket("marine_propeller", *args).h, rel=1e-12)


def test_anchor_bands_meet_continuously():
    # HIM anchor: 0.69 Re^(1/2) (12-100), 0.32 Re^(2/3) (>= 100); the fits meet at
    # Re = (0.69/0.32)^6 = 100.5 (derived), where the switch is made.
    crossing = (0.69 / 0.32) ** 6
    just_below = process_film_jacket("anchor", crossing * (1 - 1e-9), WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    just_above = process_film_jacket("anchor", crossing * (1 + 1e-9), WATER_30C, WATER_30C.viscosity, 1.8, 1.8)
    assert just_below.constant_a == 0.69 and just_above.constant_a == 0.32
    assert just_above.h == pytest.approx(just_below.h, rel=1e-8)
    assert "outside_validity_range" in codes(
        process_film_jacket("anchor", 5.0, WATER_30C, WATER_30C.viscosity, 1.8, 1.8))  # below HIM's Re = 12


def test_warnings_ride_along():
    mu = WATER_30C.viscosity
    assert "outside_validity_range" in codes(process_film_jacket("paddle", 1000.0, WATER_30C, mu, 1.8, 1.8))
    assert "correlation_regime" in codes(process_film_jacket("hydrofoil", 2000.0, WATER_30C, mu, 1.8, 1.8))
    assert "laminar_regime" in codes(process_film_jacket("pitched_blade_turbine", 5.0, WATER_30C, mu, 1.8, 1.8))
    unbaffled = process_film_jacket("rushton_turbine", 1e5, WATER_30C, mu, 1.8, 1.8, baffled=False)
    assert "baffling_basis" in codes(unbaffled)


def test_coil_with_an_axial_impeller_borrows_the_propeller_form_and_says_so():
    # No published coil constants for the pitched-blade turbine: the propeller's (HIM, axial flow) serve,
    # flagged; the value must equal the propeller's at the same Re (same correlation, same constants).
    borrowed = process_film_coil("pitched_blade_turbine", 1e5, WATER_30C, 1e-3, 1.8, 1.8, 0.05, 0.6)
    propeller = process_film_coil("marine_propeller", 1e5, WATER_30C, 1e-3, 1.8, 1.8, 0.05, 0.6)
    assert borrowed.h == pytest.approx(propeller.h, rel=1e-12)
    assert "coil_constants_borrowed" in codes(borrowed) and "coil_constants_borrowed" not in codes(propeller)


@pytest.mark.parametrize("call, field", [
    (lambda: process_film_coil("anchor", 1e5, WATER_30C, 1e-3, 1.8, 1.8, 0.05, 0.6), "vessel.coils"),
    (lambda: process_film_jacket("rushton_turbine", 1e5, WATER_30C, 1e-3, 1.8, 1.8, surface="lid"), "surface"),
    (lambda: process_film_jacket("whisk", 1e5, WATER_30C, 1e-3, 1.8, 1.8), "vessel.agitator.impeller"),
    (lambda: process_film_jacket("rushton_turbine", 1e5, WATER_30C, 0.0, 1.8, 1.8), "charge.viscosity"),
    (lambda: process_film_jacket("rushton_turbine", 0.0, WATER_30C, 1e-3, 1.8, 1.8), "vessel.agitator.speed"),
    (lambda: process_film_coil("rushton_turbine", 1e5, WATER_30C, 1e-3, 1.8, 1.8, -0.05, 0.6),
     "vessel.coils.tube_outer_diameter"),
])
def test_bad_input_names_the_field(call, field):
    with pytest.raises(InputError) as err:
        call()
    assert err.value.field == field


def test_registry_names_resolve_to_the_authors_functions():
    # Every registry entry's function carries the authors' names it is filed under (coolmargin convention).
    for key, entry in CORRELATIONS.items():
        authors = key.rsplit("_", 1)[0]  # "oldshue_gretton"
        assert authors in entry.function.__name__.lower(), key
        assert getattr(process_side, entry.function.__name__) is entry.function
    for info in IMPELLERS.values():
        for constants in info.wall + info.bottom_head + info.coil:
            assert constants.correlation in CORRELATIONS and constants.source


def test_constant_power_per_volume_film_falls_as_minus_one_ninth():
    # Derived from Nu = h T/k ~ Re^b, Re = rho N D^2/mu: with N ~ D^-2/3 and b = 2/3, h ~ D^(2b-1-bx) = D^(-1/9).
    # PBT wall (HIM, b = 2/3) in turbulent water; speed solved on the power curve.
    small = Agitator("pitched_blade_turbine", 0.2, 5.0)
    factor = 10.0
    N2 = scaled_speed("constant_power_per_volume", small, factor, WATER_30C)
    films = []
    for a, T in ((small, 0.6), (Agitator("pitched_blade_turbine", 0.2 * factor, N2), 0.6 * factor)):
        Re = agitation(a, WATER_30C, 0.2 * (T / 0.6) ** 3, T).reynolds
        films.append(process_film_jacket("pitched_blade_turbine", Re, WATER_30C, WATER_30C.viscosity, T, T).h)
    assert films[1] / films[0] == pytest.approx(factor ** (-1 / 9), rel=1e-3)


def test_nusselt_form_doctest_value():
    # Coker (2001) constants at Re = 1e5, Pr = 6: 0.74 * 1e5^0.67 * 6^0.33 = 2992 (hand calculation).
    assert nusselt_agitated_Chilton_Drew_Jebens_1944(1e5, 6.0, 1.0, 0.74, 0.67, 0.33, 0.14) == pytest.approx(
        2992.4, rel=1e-4)


@settings(max_examples=50, deadline=None)
@given(impeller=st.sampled_from(sorted(IMPELLERS)), mu=st.floats(1e-4, 50.0),
       n1=st.floats(0.05, 10.0), n2=st.floats(0.05, 10.0), baffled=st.booleans())
def test_wall_film_rises_with_speed(impeller, mu, n1, n2, baffled):
    # h ~ Re^b with b > 0 in every band, and band switches never step down (common practice, no source).
    if n1 == n2:
        return
    liquid = LiquidProperties(298.15, 1000.0, 3000.0, mu, 0.5)
    D = 1.6 if IMPELLERS[impeller].close_clearance else 0.6
    low, high = sorted((n1, n2))
    h = [process_film_jacket(impeller, agitation(Agitator(impeller, D, n, baffled=baffled), liquid, 4.6,
                                                 1.8).reynolds, liquid, mu, 1.8, 1.8, baffled).h
         for n in (low, high)]
    assert h[1] > h[0]


@settings(max_examples=50, deadline=None)
@given(impeller=st.sampled_from(["rushton_turbine", "marine_propeller", "paddle"]),
       re1=st.floats(10.0, 1e7), re2=st.floats(10.0, 1e7))
def test_coil_film_rises_with_reynolds(impeller, re1, re2):
    if re1 == re2:
        return
    low, high = sorted((re1, re2))
    h = [process_film_coil(impeller, Re, WATER_30C, WATER_30C.viscosity, 1.8, 1.8, 0.05, 0.6).h
         for Re in (low, high)]
    assert h[1] > h[0]


def test_every_published_constant_set_hands_over_without_a_jump():
    # Every library and alternative wall set of every impeller either meets its neighbour (different Re
    # exponents) or differs from it only in a (blended): checked by switch_reynolds for the whole library.
    for impeller in IMPELLERS:
        for bands in process_side.wall_alternatives(impeller).values():
            for transition in process_side.transitions(bands):
                assert transition["re_from"] <= transition["re_to"]
