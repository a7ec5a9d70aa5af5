"""Coolant pressure drops against Darcy-Weisbach with `fluids` friction factors and fittings (test-only oracles)."""
import math

import pytest
from fluids.core import dP_from_K
from fluids.fittings import Hooper2K, entrance_sharp, exit_normal
from fluids.friction import (Clamond, friction_factor_curved, friction_laminar, helical_laminar_fd_Mori_Nakayama,
                             helical_laminar_fd_Schmidt, helical_laminar_fd_White, helical_turbulent_fd_Mori_Nakayama,
                             helical_turbulent_fd_Schmidt, helical_turbulent_fd_Srinivasan)
from hypothesis import given, settings
from hypothesis import strategies as st

from calc.films.jacket_side import JacketSpec
from calc.hydraulics import friction
from calc.hydraulics.paths import coil_path, jacket_path, pressure_drop
from calc.properties import LiquidProperties
from calc.vessel.geometry import HelicalCoil

# Water at 20 degC (IAPWS values, rounded)
WATER_20 = LiquidProperties(293.15, 998.2, 4184.0, 1.0016e-3, 0.5984)


# ---------------------------------------------------------------- friction factors

@pytest.mark.parametrize("Re", [4000.0, 2e4, 1e5, 1e6, 1e8])
@pytest.mark.parametrize("eD", [0.0, 1e-5, 1e-3, 0.02])
def test_straight_turbulent_is_colebrook_as_solved_by_clamond(Re, eD):
    # fluids.friction.Clamond (oracle): Colebrook's equation solved to machine precision (Clamond 2009).
    assert friction.friction_straight(Re, eD).factor == pytest.approx(Clamond(Re, eD), rel=1e-10)


@pytest.mark.parametrize("Re", [10.0, 500.0, 2100.0])
def test_straight_laminar_is_hagen_poiseuille(Re):
    assert friction.friction_straight(Re).factor == pytest.approx(friction_laminar(Re), rel=1e-14)  # fluids oracle


@pytest.mark.parametrize("r", [0.01, 0.05, 0.1, 0.2])
@pytest.mark.parametrize("Re", [150.0, 1000.0, 2000.0])
def test_coiled_laminar_is_schmidt_as_fluids_has_it(Re, r):
    # fluids.friction.helical_laminar_fd_Schmidt (oracle; its code: 64/Re [1 + 0.14 r^0.97 Re^(1-0.644 r^0.312)]).
    assert friction.friction_coiled(Re, r).factor == pytest.approx(helical_laminar_fd_Schmidt(Re, r, 1.0), rel=1e-12)


@pytest.mark.parametrize("r", [0.01, 0.05, 0.1, 0.2])
@pytest.mark.parametrize("Re", [3e4, 6e4, 1.4e5])
def test_coiled_turbulent_is_schmidt_as_fluids_has_it(Re, r):
    # fluids.friction.helical_turbulent_fd_Schmidt (oracle; straight part by Clamond, curvature by Schmidt 1967).
    # Re is above Re_crit x 4000/2100 for every r here, so no transition blending applies.
    assert Re >= friction.TRANSITION_RATIO * friction.coil_critical_reynolds_Schmidt_1967(r)
    assert friction.friction_coiled(Re, r).factor == pytest.approx(helical_turbulent_fd_Schmidt(Re, r, 1.0),
                                                                   rel=1e-9)


@pytest.mark.parametrize("r", [0.02, 0.05, 0.1])
@pytest.mark.parametrize("Re", [3e4, 1e5])
def test_coiled_turbulent_agrees_with_independent_correlations(Re, r):
    # Two other published turbulent coil correlations: Mori & Nakayama (1967) via fluids (oracle), and
    # Srinivasan et al. (1970) by hand, Fanning f (D/d)^0.5 = 0.084 [Re (d/D)^2]^-0.2 (from memory), i.e. Darcy
    # 0.336 r^0.1 Re^-0.2. Schmidt's value lies within their scatter (common practice: coil friction
    # correlations differ by ~15 %). fluids' helical_turbulent_fd_Srinivasan is not used: its code evaluates
    # 0.336 (Re r^0.5)^-0.2, with r^-0.1 instead of r^+0.1, which is 2.4 times the others at r = 0.02.
    ours = friction.friction_coiled(Re, r).factor
    srinivasan = 0.336 * r ** 0.1 * Re ** -0.2
    assert helical_turbulent_fd_Srinivasan(Re, r, 1.0) == pytest.approx(0.336 * (Re * r ** 0.5) ** -0.2, rel=1e-12)
    for other in (helical_turbulent_fd_Mori_Nakayama(Re, r, 1.0), srinivasan):
        assert ours == pytest.approx(other, rel=0.15)


@pytest.mark.parametrize("r", [0.02, 0.05, 0.1])
@pytest.mark.parametrize("Re", [500.0, 1000.0, 2000.0])
def test_coiled_laminar_is_conservative_against_white_and_mori_nakayama(Re, r):
    # White (1929) and Mori & Nakayama (1967) laminar coil friction factors (fluids oracles): Schmidt's value
    # is never below them and at most 30 % above (laminar coil correlations scatter by 20-30 %, common
    # practice, no source), so the pressure drop errs on the high side.
    ours = friction.friction_coiled(Re, r).factor
    for other in (helical_laminar_fd_White(Re, r, 1.0), helical_laminar_fd_Mori_Nakayama(Re, r, 1.0)):
        assert other <= ours <= 1.3 * other


def test_coiled_tends_to_straight_as_curvature_vanishes():
    # Schmidt's forms reduce to the straight tube as d/D_c -> 0 (fluids docstring; physics).
    assert friction.friction_coiled(1000.0, 1e-9).factor == pytest.approx(64 / 1000.0, rel=1e-6)
    assert friction.friction_coiled(1e5, 1e-9).factor == pytest.approx(Clamond(1e5, 0.0), rel=1e-4)


@given(r=st.floats(0.005, 0.25), eD=st.sampled_from([0.0, 1e-4]))
@settings(max_examples=30, deadline=None, derandomize=True)
def test_no_jump_and_rising_pressure_drop_across_the_regimes(r, eD):
    # The pressure drop f Re^2 (at fixed geometry and fluid) must rise with the flow across every switch point:
    # laminar/transition/turbulent and Schmidt's 2.2e4 branch (straight and coiled).
    grid = [10 ** (2.2 + 0.002 * i) for i in range(1700)]  # Re from 160 to 4e5
    for function in (lambda Re: friction.friction_coiled(Re, r, eD), lambda Re: friction.friction_straight(Re, eD)):
        values = [function(Re).factor * Re * Re for Re in grid]
        assert all(b > a for a, b in zip(values, values[1:]))
        ratios = [b / a for a, b in zip(values, values[1:])]
        assert max(ratios) < 1.05  # a step of 0.46 % in Re never moves dp by more than 5 %: no jump


# ---------------------------------------------------------------- fittings

def test_loss_coefficients_against_published_tables():
    K = friction.LOSS_COEFFICIENTS
    assert K["entrance_sharp"].K == entrance_sharp(method="Crane")  # Crane TP-410 via fluids: 0.5
    assert K["exit"].K == exit_normal()  # 1.0, Borda-Carnot into a large space (fluids)
    # Hooper (1981) 2-K method (fluids oracle), standard screwed 90 degree elbow, 2 in pipe, Re = 1e5: about 0.6.
    assert K["elbow_90"].K == pytest.approx(Hooper2K(Di=2.067, Re=1e5, name="Elbow, 90°, Standard (R/D = 1), Screwed"),
                                            rel=0.3)


#: Crane TP-410, "Flow of Fluids through Valves, Fittings and Pipe", friction factor f_T of clean commercial
#: steel pipe in the zone of complete turbulence, by nominal size (from memory).
CRANE_F_T = {"1": 0.023, "1-1/2": 0.021, "2": 0.019, "2-1/2": 0.018, "3": 0.018, "4": 0.017, "6": 0.015}


@pytest.mark.parametrize("nps", list(CRANE_F_T))
def test_bend_losses_against_crane_tp410(nps):
    from calc.sizing.pipes import pipe_size

    f_T = CRANE_F_T[nps]
    d = pipe_size(nps).inner_diameter("40")
    # Crane's f_T is the fully rough limit of the Colebrook equation for commercial steel (roughness 0.0457 mm,
    # Crane TP-410, from memory); ours, solved by Clamond's method at Re = 1e8, gives it within 5 % (the table is
    # rounded to two figures and read off the Moody chart).
    assert friction.friction_straight(1e8, 4.57e-5 / d).factor == pytest.approx(f_T, rel=0.05)
    # Crane's bend losses: a standard 90 degree elbow K = 30 f_T, a close-pattern return bend K = 50 f_T
    # (from memory). Ours are Perry's Table 6-4 (0.75 and 1.5): at or above Crane's for every size the sizing uses
    # (conservative), and within a factor of two of it.
    K = friction.LOSS_COEFFICIENTS
    assert 30 * f_T <= K["elbow_90"].K <= 2 * 30 * f_T
    assert 50 * f_T <= K["return_bend_180"].K <= 2 * 50 * f_T


# ---------------------------------------------------------------- paths: Darcy-Weisbach by hand

def _darcy_weisbach(f, L, d, rho, v, K=0.0, v_K=None):
    v_K = v if v_K is None else v_K
    return f * L / d * rho * v * v / 2 + dP_from_K(K, rho, v_K)


def test_coil_pressure_drop_is_darcy_weisbach_with_curved_friction():
    # A 12-turn coil of 2 in Sch 10S tube (ID 54.76 mm, ASME B36.19M via fluids.nearest_pipe), helix 1.4 m,
    # pitch 0.12 m, 3 kg/s of water at 20 degC: fully turbulent.
    coil = HelicalCoil(0.0603, 0.00277, 1.4, 12, 0.12)
    path = coil_path(coil)
    r = pressure_drop(path, 3.0, WATER_20)
    d = 0.0603 - 2 * 0.00277
    D_c = 1.4 * (1 + (0.12 / (math.pi * 1.4)) ** 2)
    L = 12 * math.hypot(math.pi * 1.4, 0.12)
    v = 3.0 / 998.2 / (math.pi / 4 * d * d)
    Re = 998.2 * v * d / 1.0016e-3
    f = friction_factor_curved(Re, d, D_c, Method="Schmidt turbulent")  # fluids oracle
    K = 0.5 + 0.75 + 0.75 + 1.0  # entrance, two elbows at the leads, exit (Perry's Table 6-4, from memory)
    assert r.path_length == pytest.approx(L, rel=1e-12)
    assert r.velocity == pytest.approx(v, rel=1e-12)
    assert r.pressure_drop == pytest.approx(_darcy_weisbach(f, L, d, 998.2, v, K), rel=1e-9)


def test_half_pipe_zone_pressure_drop_is_darcy_weisbach_on_the_hydraulic_diameter():
    # 180 degree half pipe of 3 in Sch 40 (ID 77.93 mm), pitch 0.12 m, on a 1.824 m shell, 2.5 m high, 2 zones.
    jacket = JacketSpec("half_pipe", pipe_diameter=0.07793, pipe_pitch=0.12, passes=2)
    r = pressure_drop(jacket_path(jacket, 1.824, 2.5), 6.0, WATER_20)
    d = 0.07793
    area = math.pi * d * d / 8
    d_h = 4 * area / (math.pi * d / 2 + d)  # hydraulic diameter of a semicircle: pi d / (pi + 2)
    assert d_h == pytest.approx(math.pi * d / (math.pi + 2), rel=1e-12)
    L = 1.25 / 0.12 * math.hypot(math.pi * 1.824, 0.12)
    v = 3.0 / 998.2 / area
    Re = 998.2 * v * d_h / 1.0016e-3
    f = friction_factor_curved(Re, d_h, 1.824, Method="Schmidt turbulent")
    assert r.pressure_drop == pytest.approx(_darcy_weisbach(f, L, d_h, 998.2, v, 3.0), rel=1e-9)


def test_annular_jacket_is_straight_channel_plus_nozzle_losses():
    jacket = JacketSpec("annular", gap=0.05, inlet_diameter=0.08)
    r = pressure_drop(jacket_path(jacket, 1.824, 2.5), 6.0, WATER_20)
    area = math.pi * 1.874 * 0.05
    v = 6.0 / 998.2 / area
    v_nozzle = 6.0 / 998.2 / (math.pi / 4 * 0.08 ** 2)
    Re = 998.2 * v * 0.1 / 1.0016e-3
    assert Re < 2100 and r.regime == "laminar"  # the axial flow in a plain annulus is slow (0.02 m/s here)
    f = friction_laminar(Re)
    expected = _darcy_weisbach(f, 2.5, 0.1, 998.2, v, 1.5, v_nozzle)
    assert r.pressure_drop == pytest.approx(expected, rel=1e-9)
    assert r.fittings_loss > 10 * r.friction_loss  # the nozzles dominate a plain jacket (common practice, no source)


def test_spiral_baffle_channel_flow_is_net_of_the_bypass():
    base = dict(gap=0.05, baffle_pitch=0.2, inlet_diameter=0.08)
    tight = pressure_drop(jacket_path(JacketSpec("annular_spiral_baffle", bypass_fraction=0.0, **base), 1.824, 2.5),
                          6.0, WATER_20)
    leaky = pressure_drop(jacket_path(JacketSpec("annular_spiral_baffle", bypass_fraction=0.5, **base), 1.824, 2.5),
                          6.0, WATER_20)
    assert leaky.velocity == pytest.approx(0.5 * tight.velocity, rel=1e-12)
    assert leaky.friction_loss < tight.friction_loss
    assert leaky.fittings_loss == pytest.approx(tight.fittings_loss, rel=1e-12)  # nozzles carry the whole flow


@given(m=st.floats(0.05, 20.0), zones=st.integers(1, 4), pitch=st.floats(0.07, 0.3))
@settings(max_examples=40, deadline=None, derandomize=True)
def test_half_pipe_trends(m, zones, pitch):
    # More flow -> more pressure drop; more zones (flow and height split) -> less; more pitch -> shorter path, less.
    def dp(m_, zones_, pitch_):
        return pressure_drop(jacket_path(JacketSpec("half_pipe", pipe_diameter=0.0525, pipe_pitch=pitch_,
                                                    passes=zones_), 1.8, 2.4), m_, WATER_20).pressure_drop
    base = dp(m, zones, pitch)
    assert dp(1.1 * m, zones, pitch) > base
    assert dp(m, zones + 1, pitch) < base
    assert dp(m, zones, 1.2 * pitch) < base


def test_path_gives_pressure_drop_in_network_streams():
    from pathlib import Path
    import json

    from calc.network.heat_transfer import heat_transfer
    from schemas.cooling import CoolingCheckRequestSchema

    body = json.loads((Path(__file__).parents[1] / "examples" / "cooling_check_production.json").read_text())
    args = CoolingCheckRequestSchema().load(body)
    result = heat_transfer(args["vessel"], args["charge"], args["coolant"], args["process_temperature"])
    stream = result.stream("jacket")
    props = args["coolant"].liquid.at(stream.mean_temperature)
    again = pressure_drop(jacket_path(args["vessel"].jacket, 1.824, 2.2 + 0.1693 * 1.8), stream.mass_flow, props)
    # the network's path uses the shell OD (1.8 m + 2 x 12 mm) and the jacketed height (straight side + F&D head)
    assert stream.pressure_drop == pytest.approx(again.pressure_drop, rel=2e-3)
    assert stream.velocity > 0 and stream.path_length > 50
