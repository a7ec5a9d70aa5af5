"""Vessel geometry against published head tables, the `fluids` library (test-only oracle) and quadrature.

Oracle notes (read from fluids 1.3.1 source before use): ``V_vertical_<head>(D, a, h)`` gives the volume
of a vertical tank on a convex bottom head of depth ``a`` filled to ``h`` measured from the lowest point,
continuing into the cylinder above ``a``; ``SA_partial_vertical_<head>_head(D, a, h)`` gives the wetted
area of the head alone (h clipped to a); torispherical versions take ``f`` and ``k`` as fractions of D.
``HelicalCoil.tube_length`` is sqrt((pi Do N)^2 + H^2) with H = N pitch.
"""
from __future__ import annotations

import math
import time

import fluids.geometry as fg
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad
from scipy.optimize import brentq

from calc.vessel.geometry import (HelicalCoil, JacketCoverage, VesselShape, brim_height, coil_height, coil_outer_area,
                           coil_submerged, coil_tube_length, fill, head_depth, jacketed_area, level_at_volume,
                           scale_coil, scale_jacket, scale_shape, volume_at_level, wetted_area)
from calc.vessel.heads import HEADS
from calc.validity import InputError

TORI = {"torispherical_fd": (1.0, 0.06), "torispherical_klopper": (1.0, 0.10),
        "torispherical_korbbogen": (0.8, 0.154)}
DIAMETERS = (0.1, 0.6, 2.5)  # lab, pilot, plant


def shape_of(head: str, D: float = 1.0, straight_side: float | None = None, cone_angle: float = 90.0):
    return VesselShape(D, D if straight_side is None else straight_side, head,
                       cone_angle if head == "conical" else None)


# ---------------------------------------------------------------- full heads against fluids.geometry

# (h/D, V/D^3, A/D^2) from fluids.geometry (a_torispherical, V_vertical_torispherical, SA_torispheroidal,
# SA_ellipsoidal_head; test-only oracle), printed to 4 decimals; hemisphere and 2:1 ellipsoid volumes exact.
TABLE = {
    "torispherical_fd": (0.1693, 0.0810, 0.9306),
    "torispherical_klopper": (0.1938, 0.0990, 0.9900),
    "torispherical_korbbogen": (0.2545, 0.1308, 1.0879),
    "ellipsoidal_2_1": (0.25, math.pi / 24, 1.0840),
    "hemispherical": (0.5, math.pi / 12, math.pi / 2),
    "flat": (0.0, 0.0, math.pi / 4),  # common practice, no source: a flat plate of area pi D^2 / 4
}


@pytest.mark.parametrize("head", sorted(TABLE))
def test_full_head_against_fluids_values(head):
    shape = shape_of(head)
    depth = head_depth(shape)
    h, V, A = TABLE[head]
    assert depth == pytest.approx(h, abs=6e-5), "fluids.geometry, h/D"
    assert volume_at_level(shape, depth) == pytest.approx(V, abs=6e-5), "fluids.geometry, V/D^3"
    # just above the head, so that a flat bottom is wetted
    assert wetted_area(shape, depth + 1e-9) == pytest.approx(A, abs=6e-5), "fluids.geometry, A/D^2"


@pytest.mark.parametrize("angle", [60.0, 90.0, 120.0])
def test_full_cone_against_closed_forms(angle):
    # Right circular cone of half-angle a (elementary geometry): h/D = 1/(2 tan a), V/D^3 = pi/(24 tan a), A/D^2 = pi/(4 sin a)
    a = math.radians(angle / 2)
    shape = shape_of("conical", cone_angle=angle)
    assert head_depth(shape) == pytest.approx(1 / (2 * math.tan(a)), rel=1e-12)
    assert volume_at_level(shape, head_depth(shape)) == pytest.approx(math.pi / (24 * math.tan(a)), rel=1e-12)
    assert wetted_area(shape, head_depth(shape)) == pytest.approx(math.pi / (4 * math.sin(a)), rel=1e-12)


def test_din_inner_heights_at_zero_wall():
    # DIN 28011: h2 = 0.1935 D_a - 0.455 s; DIN 28013: h2 = 0.255 D_a - 0.635 s (the standards, from memory).
    # With s = 0 the standards' rounded coefficients agree with the geometry to their printed precision.
    assert head_depth(shape_of("torispherical_klopper")) == pytest.approx(0.1935, abs=5e-4)
    assert head_depth(shape_of("torispherical_korbbogen")) == pytest.approx(0.255, abs=6e-4)


def test_fd_volume_within_quoted_range():
    # Handbooks quote F&D head volume coefficients of 0.078-0.085 D^3, commonly 0.0809 (from memory).
    shape = shape_of("torispherical_fd")
    assert volume_at_level(shape, head_depth(shape)) == pytest.approx(0.0809, abs=2e-4)


@pytest.mark.parametrize("D", DIAMETERS)
def test_full_heads_against_fluids(D):
    for head, (f, k) in TORI.items():  # oracle: fluids a_torispherical, V_vertical_torispherical, SA_torispheroidal
        shape = shape_of(head, D)
        a = fg.a_torispherical(D, f, k)
        assert head_depth(shape) == pytest.approx(a, rel=1e-12)
        assert volume_at_level(shape, a) == pytest.approx(fg.V_vertical_torispherical(D, f, k, a), rel=1e-12)
        assert wetted_area(shape, a) == pytest.approx(fg.SA_torispheroidal(D, f, k), rel=1e-12)
    shape = shape_of("ellipsoidal_2_1", D)  # oracle: fluids SA_ellipsoidal_head
    assert wetted_area(shape, D / 4) == pytest.approx(fg.SA_ellipsoidal_head(D, D / 4), rel=1e-12)
    shape = shape_of("conical", D, cone_angle=70.0)  # oracle: fluids SA_conical_head
    a = head_depth(shape)
    assert wetted_area(shape, a) == pytest.approx(fg.SA_conical_head(D, a), rel=1e-12)


# ---------------------------------------------------------------- partial fill: fluids oracle

def fluids_volume(head, D, shape, h):
    a = head_depth(shape)
    if head in TORI:
        return fg.V_vertical_torispherical(D, *TORI[head], h)
    if head == "flat":
        return math.pi / 4 * D * D * h
    return {"ellipsoidal_2_1": fg.V_vertical_ellipsoidal, "hemispherical": fg.V_vertical_spherical,
            "conical": fg.V_vertical_conical}[head](D, a, h)


def fluids_area(head, D, shape, h):
    a = head_depth(shape)
    shell = math.pi * D * max(h - a, 0.0)
    if head in TORI:
        return fg.SA_partial_vertical_torispherical_head(D, *TORI[head], h) + shell
    if head == "flat":
        return math.pi / 4 * D * D + shell
    fn = {"ellipsoidal_2_1": fg.SA_partial_vertical_ellipsoidal_head,
          "hemispherical": fg.SA_partial_vertical_spherical_head,
          "conical": fg.SA_partial_vertical_conical_head}[head]
    return fn(D, a, h) + shell


LEVEL_FRACTIONS = (0.05, 0.3, 0.5, 0.8, 0.99, 1.0, 1.5, 3.0)  # of the head depth; above 1 is in the shell


@pytest.mark.parametrize("D", DIAMETERS)
@pytest.mark.parametrize("head", sorted(HEADS))
def test_partial_fill_against_fluids(head, D):
    shape = shape_of(head, D, cone_angle=75.0)
    depth = head_depth(shape) or D / 10  # flat: levels in the shell
    for frac in LEVEL_FRACTIONS:
        h = frac * depth
        # oracle: fluids V_vertical_* and SA_partial_vertical_*_head (Jones 2015, 2017)
        assert volume_at_level(shape, h) == pytest.approx(fluids_volume(head, D, shape, h), rel=1e-10), frac
        assert wetted_area(shape, h) == pytest.approx(fluids_area(head, D, shape, h), rel=1e-10), frac


# ---------------------------------------------------------------- partial fill: quadrature of the profile

def profile(head, D, cone_angle=75.0):
    """Independent parametric profile of the head: segments (x(t), z(t), x'(t), z'(t), t0, t1)."""
    R = D / 2
    if head in TORI:
        f, k = TORI[head]
        Rc, r = f * D, k * D
        rho = R - r
        alpha = math.asin(rho / (Rc - r))  # where crown and knuckle meet: sin a = rho / (R - r)
        h = Rc - (Rc - r) * math.cos(alpha)
        return [(lambda t: Rc * math.sin(t), lambda t: Rc * (1 - math.cos(t)),
                 lambda t: Rc * math.cos(t), lambda t: Rc * math.sin(t), 0.0, alpha),
                (lambda t: rho + r * math.sin(t), lambda t: h - r * math.cos(t),
                 lambda t: r * math.cos(t), lambda t: r * math.sin(t), alpha, math.pi / 2)]
    if head in ("ellipsoidal_2_1", "hemispherical"):
        b = D / 4 if head == "ellipsoidal_2_1" else R
        return [(lambda t: R * math.sin(t), lambda t: b * (1 - math.cos(t)),
                 lambda t: R * math.cos(t), lambda t: b * math.sin(t), 0.0, math.pi / 2)]
    b = R / math.tan(math.radians(cone_angle / 2))
    return [(lambda t: R * t, lambda t: b * t, lambda t: R, lambda t: b, 0.0, 1.0)]


def quad_volume_area(head, D, level):
    volume = area = 0.0
    for x, z, dx, dz, t0, t1 in profile(head, D):
        if z(t0) >= level:
            break
        t_end = t1 if z(t1) <= level else brentq(lambda t, z=z: z(t) - level, t0, t1, xtol=1e-15)
        volume += quad(lambda t, x=x, dz=dz: math.pi * x(t) ** 2 * dz(t), t0, t_end, epsabs=0, epsrel=1e-12)[0]
        area += quad(lambda t, x=x, dx=dx, dz=dz: 2 * math.pi * x(t) * math.hypot(dx(t), dz(t)), t0, t_end,
                     epsabs=0, epsrel=1e-12)[0]
    return volume, area


@pytest.mark.parametrize("D", DIAMETERS)
@pytest.mark.parametrize("head", sorted(set(HEADS) - {"flat"}))
def test_partial_fill_against_quadrature(head, D):
    shape = shape_of(head, D, cone_angle=75.0)
    depth = head_depth(shape)
    for frac in (0.02, 0.1, 0.4, 0.7, 0.9, 0.999, 1.0):
        V, A = quad_volume_area(head, D, frac * depth)  # independent: scipy.integrate.quad of the profile
        assert volume_at_level(shape, frac * depth) == pytest.approx(V, rel=1e-9), frac
        assert wetted_area(shape, frac * depth) == pytest.approx(A, rel=1e-9), frac


# ---------------------------------------------------------------- properties (hypothesis)

shapes = st.builds(
    lambda head, D, ratio, angle: shape_of(head, D, ratio * D, angle),
    st.sampled_from(sorted(HEADS)), st.floats(0.05, 5.0), st.floats(0.3, 3.0), st.floats(20.0, 160.0))


@settings(max_examples=50, deadline=None)
@given(shapes, st.floats(1e-6, 1.0))
def test_level_volume_round_trip(shape, fraction):
    # common practice, no source: level_at_volume inverts volume_at_level
    level = fraction * brim_height(shape)
    assert level_at_volume(shape, volume_at_level(shape, level)) == pytest.approx(level, rel=1e-9,
                                                                                 abs=1e-12 * shape.diameter)


@settings(max_examples=50, deadline=None)
@given(shapes, st.floats(0.0, 1.0), st.floats(0.0, 1.0))
def test_volume_and_area_increase_with_level(shape, f1, f2):
    # common practice, no source: more liquid never wets less wall
    lo, hi = sorted((f1, f2))
    brim = brim_height(shape)
    assert volume_at_level(shape, lo * brim) <= volume_at_level(shape, hi * brim)
    assert wetted_area(shape, lo * brim) <= wetted_area(shape, hi * brim) * (1 + 1e-12)


@settings(max_examples=50, deadline=None)
@given(shapes, st.floats(0.05, 1.0), st.floats(0.1, 20.0))
def test_similar_vessels_area_per_volume_scales_as_v_minus_one_third(shape, fraction, factor):
    # common practice, no source (exact for geometrically similar shapes at the same fill fraction):
    # A/V is proportional to V^(-1/3).
    jacket = JacketCoverage(top=0.8 * brim_height(shape))
    coil = HelicalCoil(0.02 * shape.diameter, 0.002 * shape.diameter, 0.7 * shape.diameter, 3, 0.04 * shape.diameter)
    one = fill(shape, jacket, (coil,), level=fraction * brim_height(shape))
    big = scale_shape(shape, factor)
    two = fill(big, scale_jacket(jacket, factor), (scale_coil(coil, factor),),
               level=fraction * brim_height(big))
    assert two.volume / one.volume == pytest.approx(factor ** 3, rel=1e-9)
    assert two.area_per_volume / one.area_per_volume == pytest.approx((two.volume / one.volume) ** (-1 / 3),
                                                                      rel=1e-9)


@settings(max_examples=50, deadline=None)
@given(shapes, st.floats(0.01, 1.0))
def test_fill_closes_volume_balance_with_coil(shape, fraction):
    # common practice, no source: liquid + coil displacement = vessel volume below the level;
    # giving the resulting volume back returns the same level.
    coil = HelicalCoil(0.03 * shape.diameter, 0.003 * shape.diameter, 0.75 * shape.diameter, 4,
                       0.06 * shape.diameter)
    by_level = fill(shape, JacketCoverage(), (coil,), level=fraction * brim_height(shape))
    assert by_level.volume + by_level.displaced_volume == pytest.approx(
        volume_at_level(shape, by_level.liquid_level), rel=1e-12)
    by_volume = fill(shape, JacketCoverage(), (coil,), volume=by_level.volume)
    assert by_volume.liquid_level == pytest.approx(by_level.liquid_level, rel=1e-9)


# ---------------------------------------------------------------- coils

PLANT = VesselShape(2.5, 2.8, "torispherical_klopper")
PLANT_COIL = HelicalCoil(tube_outer_diameter=0.0603, tube_wall=0.0039, helix_diameter=2.0, turns=12, pitch=0.12)


def test_coil_tube_length_and_area_against_fluids():
    # oracle: fluids.geometry.HelicalCoil (tube length sqrt((pi Do N)^2 + H^2), area pi Dt L)
    ref = fg.HelicalCoil(Dt=0.0603, Do=2.0, pitch=0.12, N=12)
    assert coil_tube_length(PLANT_COIL) == pytest.approx(ref.tube_length, rel=1e-12)
    assert coil_outer_area(PLANT_COIL) == pytest.approx(ref.surface_area, rel=1e-12)
    assert coil_height(PLANT_COIL) == pytest.approx(ref.H_total, rel=1e-12)


def test_coil_submerged_volume_and_area_against_quadrature():
    # independent: quad along the tube of fluids' circle-segment area A_partial_circle and wetted perimeter
    # SA_partial_cylindrical_body (per unit length), with the centreline rising linearly along the tube.
    coil, d = PLANT_COIL, PLANT_COIL.tube_outer_diameter
    e = head_depth(PLANT) + d  # documented default elevation
    rise, L = coil.turns * coil.pitch, coil_tube_length(coil)
    for level in (e - d, e, e + 0.3 * rise, e + rise + 0.2 * d, e + rise + d):
        def centre(s):
            return e + rise * s / L

        def depth(s, level=level):
            return min(max(level - centre(s) + d / 2, 0.0), d)
        brk = sorted({min(max((level - e + c) * L / rise, 0.0), L) for c in (-d / 2, d / 2)})
        V = quad(lambda s: fg.A_partial_circle(d, depth(s)), 0, L, points=brk, limit=200, epsrel=1e-10)[0]
        S = quad(lambda s: fg.SA_partial_cylindrical_body(1.0, d, depth(s)), 0, L, points=brk, limit=200,
                 epsrel=1e-10)[0]
        got_V, got_S = coil_submerged(PLANT, coil, level)
        assert got_V == pytest.approx(V, rel=1e-7, abs=1e-12), level
        assert got_S == pytest.approx(S, rel=1e-7, abs=1e-12), level


def test_displacement_raises_level_by_displaced_volume_over_cross_section():
    # common practice, no source: with the level in the shell and the coil fully submerged, the coil
    # raises the level by (pi d^2 L / 4) / (pi D^2 / 4).
    bare = fill(PLANT, JacketCoverage(), (), volume=10.0)
    with_coil = fill(PLANT, JacketCoverage(), (PLANT_COIL,), volume=10.0)
    displaced = math.pi / 4 * PLANT_COIL.tube_outer_diameter ** 2 * coil_tube_length(PLANT_COIL)
    assert with_coil.displaced_volume == pytest.approx(displaced, rel=1e-12)
    assert with_coil.liquid_level - bare.liquid_level == pytest.approx(
        displaced / (math.pi / 4 * PLANT.diameter ** 2), rel=1e-9)
    assert with_coil.coil_area == pytest.approx(coil_outer_area(PLANT_COIL), rel=1e-12)
    assert with_coil.heat_transfer_area == pytest.approx(with_coil.jacketed_area + with_coil.coil_area)
    assert not with_coil.warnings


def test_partly_submerged_coil_warns():
    level = head_depth(PLANT) + 0.5  # coil spans about 0.25 to 1.7 m
    result = fill(PLANT, JacketCoverage(), (PLANT_COIL,), level=level)
    assert [w.code for w in result.warnings] == ["coil_not_submerged"]
    assert 0 < result.coil_area < coil_outer_area(PLANT_COIL)


# ---------------------------------------------------------------- jacket coverage

def test_jacketed_area_coverage_cases():
    # common practice, no source: the jacket covers the head (if told) and the shell up to its top edge
    depth = head_depth(PLANT)
    head_area = wetted_area(PLANT, depth)
    full = JacketCoverage()
    assert jacketed_area(PLANT, full, depth + 1.0) == pytest.approx(head_area + math.pi * 2.5 * 1.0)
    shell_only = JacketCoverage(covers_bottom_head=False, top=depth + 0.7)
    assert jacketed_area(PLANT, shell_only, depth + 1.0) == pytest.approx(math.pi * 2.5 * 0.7)
    assert jacketed_area(PLANT, shell_only, depth / 2) == 0.0
    part_head = JacketCoverage(top=depth / 2)  # a jacket round the lower half of the head only
    assert jacketed_area(PLANT, part_head, depth + 1.0) == pytest.approx(wetted_area(PLANT, depth / 2))
    low = fill(PLANT, shell_only, level=depth / 2)
    assert low.jacketed_area == 0.0 and [w.code for w in low.warnings] == ["jacket_not_wetted"]
    assert low.wetted_area == pytest.approx(wetted_area(PLANT, depth / 2))


def test_fill_by_volume_in_head_only():
    # a small lab charge standing in the bottom head (oracle: fluids V_vertical_torispherical)
    lab = VesselShape(0.1, 0.15, "torispherical_fd")
    result = fill(lab, JacketCoverage(), volume=5.0e-5)
    assert result.liquid_level < head_depth(lab)
    assert fg.V_vertical_torispherical(0.1, 1.0, 0.06, result.liquid_level) == pytest.approx(5.0e-5, rel=1e-10)
    assert result.jacketed_area == pytest.approx(result.wetted_area)


# ---------------------------------------------------------------- errors and speed

@pytest.mark.parametrize("call, field", [
    (lambda: fill(PLANT, volume=100.0), "fill.volume"),
    (lambda: fill(PLANT, volume=-1.0), "fill.volume"),
    (lambda: fill(PLANT, level=3.5), "fill.level"),
    (lambda: fill(PLANT, level=0.0), "fill.level"),
    (lambda: fill(PLANT, level=float("nan")), "fill.level"),
    (lambda: fill(PLANT, volume=1.0, level=1.0), "fill"),
    (lambda: fill(PLANT), "fill"),
    (lambda: fill(PLANT, JacketCoverage(top=4.0), level=1.0), "vessel.jacket.top"),
    (lambda: fill(PLANT, JacketCoverage(top=-0.1), level=1.0), "vessel.jacket.top"),
    (lambda: fill(PLANT, coils=(PLANT_COIL, HelicalCoil(0.05, 0.004, 2.5, 5, 0.1)), level=1.0),
     "vessel.coils[1].helix_diameter"),
    (lambda: fill(PLANT, coils=(HelicalCoil(0.05, 0.004, 2.0, 30, 0.1),), level=1.0), "vessel.coils[0].turns"),
    (lambda: fill(PLANT, coils=(HelicalCoil(0.05, 0.004, 2.0, 3, 0.1, elevation=0.05),), level=1.0),
     "vessel.coils[0].elevation"),
    (lambda: fill(PLANT, coils=(HelicalCoil(0.05, 0.004, 2.0, 3, 0.03),), level=1.0), "vessel.coils[0].pitch"),
    (lambda: fill(PLANT, coils=(HelicalCoil(0.05, 0.03, 2.0, 3, 0.1),), level=1.0), "vessel.coils[0].tube_wall"),
    (lambda: head_depth(VesselShape(1.0, 1.0, "conical")), "vessel.cone_angle"),
    (lambda: head_depth(VesselShape(1.0, 1.0, "conical", 180.0)), "vessel.cone_angle"),
    (lambda: head_depth(VesselShape(1.0, 1.0, "flat", 90.0)), "vessel.cone_angle"),
    (lambda: head_depth(VesselShape(1.0, 1.0, "dished")), "vessel.bottom_head"),
    (lambda: head_depth(VesselShape(-1.0, 1.0, "flat")), "vessel.diameter"),
    (lambda: head_depth(VesselShape(1.0, 0.0, "flat")), "vessel.straight_side"),
    (lambda: head_depth(VesselShape(1e300, 1.0, "flat")), "vessel.diameter"),
    (lambda: head_depth(VesselShape(1.0, 1e-300, "flat")), "vessel.straight_side"),
    (lambda: fill(VesselShape(1e3, 1.0, "flat"), JacketCoverage(), volume=1e-310), "fill.volume"),
    (lambda: scale_shape(PLANT, 0.0), "scale_factor"),
])
def test_bad_input_names_the_field(call, field):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.field == field


def test_registry_matches_the_contract():
    # PRODUCT.md core contract lists the bottom_head options
    assert set(HEADS) == {"flat", "ellipsoidal_2_1", "torispherical_fd", "torispherical_klopper",
                          "torispherical_korbbogen", "hemispherical", "conical"}


def test_level_at_volume_is_fast():
    shape = VesselShape(2.5, 2.8, "torispherical_korbbogen")
    head_volume = volume_at_level(shape, head_depth(shape))
    start = time.perf_counter()
    for i in range(1, 201):
        level_at_volume(shape, head_volume * i / 100)
    assert (time.perf_counter() - start) / 200 < 1e-3
