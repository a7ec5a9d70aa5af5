"""Scale-up: similar-vessel geometry, the film exponent at constant P/V, the solved largest volume.

Demo data are an invented scenario: the 5.6 m3 reactor "K-12" (1.8 m, dished bottom, half-pipe
jacket, pitched-blade turbine) taken to 8-64 m3 production vessels, toluene at 60 degC, tower water.
"""
import math

import pytest
from hypothesis import given, settings, strategies as st

from calc.vessel import agitation
from calc.vessel import geometry
from calc.films import jacket_side as service_side
from calc.films import wall
from calc.vessel.agitation import IMPELLERS
from calc.checks.heat_load import Dosing, SpecificPower
from calc.properties import ExplicitLiquid, LibraryLiquid
from calc.checks.scaleup import scale_up
from calc.validity import InputError
from calc.vessel.model import Charge, Coolant, Vessel

K = 273.15
T_R = K + 60
SF = 1.3
REFERENCE = Vessel(shape=geometry.VesselShape(1.8, 2.0, "torispherical_fd"),
                   wall=wall.WallSpec(0.012, "stainless_316l"),
                   agitator=agitation.Agitator("pitched_blade_turbine", 0.6, 1.5),
                   jacket=service_side.JacketSpec("half_pipe", pipe_diameter=0.1, pipe_pitch=0.14),
                   fouling=wall.Fouling(0.00018, 0.00018), name="K-12")
CHARGE = Charge(LibraryLiquid("toluene"), volume=5.0)
WATER = Coolant(LibraryLiquid("water"), K + 15, 4.0)
# constant viscosity, so the Sieder-Tate factor is exactly 1 and only Re and D move the film
OIL = Charge(ExplicitLiquid(870.0, 1700.0, 5.5e-4, 0.13), volume=5.0)
TARGETS = [8.0, 16.0, 32.0, 64.0]


def run(targets=TARGETS, rule="constant_power_per_volume", heat_release=SpecificPower(10.0), charge=CHARGE,
        limits=False, **kw):
    return scale_up(REFERENCE, targets, rule, charge, WATER, T_R, heat_release, SF, limits=limits, **kw)


@pytest.fixture(scope="module")
def family():
    return run()


def test_area_per_volume_falls_as_the_cube_root_of_volume(family):
    # closed form for similar shapes (A ~ L^2, V ~ L^3): A/V x V^(1/3) constant; common practice
    ref = family.scales[0]
    assert ref.scale_factor == 1.0 and ref.volume == pytest.approx(geometry.volume_at_level(
        REFERENCE.shape, geometry.brim_height(REFERENCE.shape)), rel=1e-12)
    invariant = [s.check.heat_transfer.fill.area_per_volume * s.volume ** (1 / 3) for s in family.scales]
    assert max(invariant) / min(invariant) - 1 < 1e-9
    for s in family.scales[1:]:
        assert s.scale_factor == pytest.approx((s.volume / ref.volume) ** (1 / 3), rel=1e-12)
        # same fill fraction: charge volume scales with the vessel volume (definition)
        assert s.charge_volume / s.volume == pytest.approx(ref.charge_volume / ref.volume, rel=1e-12)
        # coolant flow scaled with the heat-transfer area, f^2 for similar shapes (closed form)
        assert s.coolant.flow / WATER.flow == pytest.approx(s.scale_factor ** 2, rel=1e-9)


def test_process_film_at_constant_power_per_volume_follows_the_similarity_exponent():
    # METHODS.md sec. 5 (derived): h ~ D^(2b - 1 - b x) with N ~ D^-x; constant P/V in turbulent flow: x = 2/3,
    # so D^-1/9 for b = 2/3. b is read from the constants the code uses.
    constants = IMPELLERS["pitched_blade_turbine"].wall[0]
    b = constants.b
    expected = 2 * b - 1 - b * 2 / 3
    assert expected == pytest.approx(-1 / 9, rel=1e-12)
    s = run([50.0, 500.0], charge=OIL)
    h = {}
    for scale in s.scales:
        assert scale.check.heat_transfer.agitation.reynolds > 1e4  # turbulent
        shell = next(x for x in scale.check.heat_transfer.stream("jacket").surfaces if x.name == "jacket_shell")
        assert shell.process_film.constants == constants
        h[scale.scale_factor] = (shell.process_film.h, scale.agitator_speed)
    (f1, (h1, n1)), (f2, (h2, n2)) = sorted(h.items())[1:]
    # the speed exponent: N ~ D^-2/3 at constant P/V with a constant power number (Np blend ~1e-4 off)
    assert math.log(n2 / n1) / math.log(f2 / f1) == pytest.approx(-2 / 3, abs=2e-3)
    assert math.log(h2 / h1) / math.log(f2 / f1) == pytest.approx(expected, abs=2e-3)


def test_margin_at_the_largest_adequate_volume_is_the_safety_factor(family):
    # definition of the limit; fed back as an explicit volume target
    v = family.largest_adequate_volume
    assert not family.adequate_beyond_search and family.scales[0].volume < v < family.search_upper_volume
    back = run([v])
    assert abs(back.scales[1].check.margin / SF - 1) < 1e-6
    assert run([v * 0.99]).scales[1].check.adequate and not run([v * 1.01]).scales[1].check.adequate


def test_reference_short_of_the_factor_has_no_adequate_volume():
    s = run([8.0], heat_release=SpecificPower(80.0))
    assert not s.scales[0].check.adequate
    assert s.largest_adequate_volume is None and "reference" in s.largest_adequate_message


def test_adequate_everywhere_reports_the_search_bound():
    s = run([8.0], heat_release=SpecificPower(0.01))
    assert s.adequate_beyond_search and s.largest_adequate_volume == s.search_upper_volume


def test_controlling_resistance_switch_is_located():
    # definition: the largest resistance differs just below and just above the reported volume
    s = run([8.0], rule="as_given")
    assert s.controlling_switch_volumes
    switch = s.controlling_switch_volumes[0]
    below, above = run([switch.volume * 0.99, switch.volume * 1.01], rule="as_given").scales[1:]
    assert below.check.heat_transfer.controlling == switch.below
    assert above.check.heat_transfer.controlling == switch.above


@settings(max_examples=15, deadline=None)
@given(v1=st.floats(6.0, 200.0), v2=st.floats(6.0, 200.0))
def test_margin_falls_with_scale_at_constant_power_per_volume(v1, v2):
    # common practice, no source: h A / V ~ D^-10/9 at constant P/V (METHODS.md sec. 5), so the margin falls
    small, large = sorted((v1, v2))
    if large / small < 1.001:
        return
    s = run([small, large])
    assert s.scales[2].check.margin < s.scales[1].check.margin < s.scales[0].check.margin


def test_dosing_step_scales_with_the_charge():
    # definition: f^3 more moles over the same time releases f^3 more power
    dose = Dosing(-150e3, 800.0, 3 * 3600.0, 120.0, K + 20, 1900.0)
    s = run([16.0], heat_release=dose)
    ratio = s.scales[1].volume / s.scales[0].volume
    assert s.scales[1].check.heat_load.reaction / s.scales[0].check.heat_load.reaction == pytest.approx(ratio, rel=1e-12)


def test_explicit_target_vessels_follow_the_rule():
    # definitions: tip speed pi N D kept; P/V kept (solved on the target's own power curve); as_given keeps N
    target = Vessel(shape=geometry.VesselShape(3.2, 3.0, "ellipsoidal_2_1"), wall=wall.WallSpec(0.014, "carbon_steel"),
                    agitator=agitation.Agitator("pitched_blade_turbine", 1.1, 0.9),
                    jacket=service_side.JacketSpec("half_pipe", pipe_diameter=0.1, pipe_pitch=0.14), name="K-40")
    ref_agitation = run([]).scales[0].check.heat_transfer.agitation
    tip = run([target], rule="constant_tip_speed").scales[1]
    assert tip.check.heat_transfer.agitation.tip_speed == pytest.approx(ref_agitation.tip_speed, rel=1e-12)
    pv = run([target]).scales[1]
    assert pv.check.heat_transfer.agitation.power_per_volume == pytest.approx(ref_agitation.power_per_volume,
                                                                              rel=1e-9)
    assert not pv.generated and pv.name == "K-40"
    assert run([target], rule="as_given").scales[1].agitator_speed == 0.9


@pytest.mark.parametrize("kw, field", [
    ({"rule": "constant_froude"}, "rule"),
    ({"targets": [8.0, -2.0]}, "targets[1].volume"),
    ({"targets": [8.0, "big"]}, "targets[1].volume"),
    ({"coolant_flow_rule": "double"}, "coolant_flow_rule"),
])
def test_bad_input_names_the_field(kw, field):
    with pytest.raises(InputError) as info:
        run(**kw)
    assert info.value.field == field
