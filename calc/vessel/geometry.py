"""Vessel geometry: liquid volume, wetted and jacketed area, and helical coils of vertical stirred tanks.

A vessel is a vertical cylinder of inside diameter ``D`` on a bottom head; heights are measured from the
lowest inside point. The vessel is open at the top of the straight side: the *brim* lies at head depth +
straight side. All lengths are **inside** dimensions. Head standards (ASME F&D, DIN 28011, DIN 28013)
refer crown and knuckle radii to the *outside* diameter; using the inside diameter instead changes head
volumes by a few per cent for thin walls, which is within the accuracy of a screening estimate.

The bottom heads (closed forms and the registry :data:`calc.heads.HEADS`) are in :mod:`calc.heads`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache
from typing import Sequence

from scipy.optimize import brentq

from calc.vessel.heads import HEADS, HeadProfile
from calc.validity import CalcWarning, InputError, Warnings, require_positive


# --------------------------------------------------------------------------------------------------
# Vessel, jacket and coils
# --------------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class VesselShape:
    """A vertical cylindrical vessel on a bottom head, open at the top of the straight side.

    ``diameter`` is the inside diameter [m]; ``straight_side`` the tangent-to-tangent (cylindrical)
    height [m]; ``bottom_head`` a key of :data:`calc.heads.HEADS`; ``cone_angle`` the included apex
    angle [deg] of a conical bottom (90 = 45 degrees from vertical), given for conical bottoms only.
    """

    diameter: float
    straight_side: float
    bottom_head: str
    cone_angle: float | None = None


@dataclass(frozen=True)
class JacketCoverage:
    """Which part of the inside wall a jacket covers.

    ``top`` is the height [m] of the jacket's top edge above the lowest inside point; None means up to
    the top of the straight side. ``covers_bottom_head``: the jacket also covers the bottom head.
    """

    covers_bottom_head: bool = True
    top: float | None = None


@dataclass(frozen=True)
class HelicalCoil:
    """An internal helical coil, all lengths in m.

    ``elevation`` is the height of the lowest turn's centre above the lowest inside point; None means
    one tube outside diameter above the bottom tangent line (the tube clears the head by half its OD).
    The coil rises ``turns * pitch`` from its lowest to its highest centreline point.
    """

    tube_outer_diameter: float
    tube_wall: float
    helix_diameter: float
    turns: float
    pitch: float
    elevation: float | None = None

    @property
    def tube_inner_diameter(self) -> float:
        return self.tube_outer_diameter - 2.0 * self.tube_wall


@dataclass(frozen=True)
class FillGeometry:
    """The vessel filled to one level: liquid volume and the areas that it wets (SI units)."""

    volume: float  # m3 of liquid (excluding what the coils displace)
    liquid_level: float  # m above the lowest inside point
    wetted_area: float  # m2 of inside vessel wall (head + shell) under the liquid
    jacketed_area: float  # m2 of the wetted wall behind the jacket
    coil_area: float  # m2 of submerged coil outer surface
    heat_transfer_area: float  # m2, jacketed_area + coil_area
    area_per_volume: float  # 1/m, heat_transfer_area / volume
    displaced_volume: float  # m3 of liquid displaced by the submerged coils
    brim_volume: float  # m3 the empty vessel holds up to the brim
    warnings: Warnings


# Sizes outside these bounds are no stirred tank, and would overflow or underflow the closed forms.
LENGTH_RANGE = (1e-3, 1e3)  # m, for the diameter and the straight side


@lru_cache(maxsize=256)
def _head(shape: VesselShape) -> HeadProfile:
    for name in ("diameter", "straight_side"):
        value = require_positive(f"vessel.{name}", getattr(shape, name))
        if not LENGTH_RANGE[0] <= value <= LENGTH_RANGE[1]:
            raise InputError(f"vessel.{name}", f"must lie between {LENGTH_RANGE[0]:g} m and {LENGTH_RANGE[1]:g} m, "
                                               f"got {value!r}")
    head = HEADS.get(shape.bottom_head)
    if head is None:
        raise InputError("vessel.bottom_head",
                         f"unknown head {shape.bottom_head!r}; choose one of {', '.join(HEADS)}")
    if shape.bottom_head == "conical":
        angle = shape.cone_angle
        if angle is None or not (math.isfinite(angle) and 0.0 < angle < 180.0):
            raise InputError("vessel.cone_angle",
                             f"a conical bottom needs the included apex angle in (0, 180) degrees, got {angle!r}")
    elif shape.cone_angle is not None:
        raise InputError("vessel.cone_angle", f"applies to conical bottoms only, not to {shape.bottom_head!r}")
    return head.build(shape.diameter, shape.cone_angle)


def head_depth(shape: VesselShape) -> float:
    """Depth of the bottom head below the bottom tangent line [m] (inside dimensions)."""
    return _head(shape).depth


def brim_height(shape: VesselShape) -> float:
    """Height of the top of the straight side above the lowest inside point [m]."""
    return _head(shape).depth + shape.straight_side


def _cross_section(shape: VesselShape) -> float:
    return 0.25 * math.pi * shape.diameter ** 2


def volume_at_level(shape: VesselShape, level: float) -> float:
    """Volume [m3] of the empty vessel below ``level`` [m above the lowest inside point].

    Levels below 0 give 0; above the brim the shell is treated as continuing upward (callers check
    the brim; :func:`fill` does).

    >>> volume_at_level(VesselShape(2.5, 2.8, "torispherical_klopper"), 1.5)
    6.531484
    """
    head = _head(shape)
    if level <= head.depth:
        return head.volume(level)
    return head.full_volume + _cross_section(shape) * (level - head.depth)


def level_at_volume(shape: VesselShape, volume: float) -> float:
    """Liquid level [m above the lowest inside point] at which the empty vessel holds ``volume`` [m3].

    Closed form in the shell; Brent's method inside the head (volume rises monotonically with level).

    >>> level_at_volume(VesselShape(0.1, 0.15, "ellipsoidal_2_1"), 0.8e-3)
    0.110192
    """
    head = _head(shape)
    if volume <= 0.0:
        return 0.0
    full = head.full_volume
    if volume >= full:
        return head.depth + (volume - full) / _cross_section(shape)
    return float(brentq(lambda z: head.volume(z) - volume, 0.0, head.depth, xtol=1e-14 * head.depth, rtol=1e-13))


def wetted_area(shape: VesselShape, level: float) -> float:
    """Inside wall area [m2] (bottom head + shell) below ``level`` [m above the lowest inside point]."""
    head = _head(shape)
    shell = math.pi * shape.diameter * max(level - head.depth, 0.0)
    return head.area(level) + shell


def _jacket_top(shape: VesselShape, jacket: JacketCoverage) -> float:
    brim = brim_height(shape)
    if jacket.top is None:
        return brim
    if not (math.isfinite(jacket.top) and 0.0 <= jacket.top <= brim * (1.0 + 1e-12)):
        raise InputError("vessel.jacket.top",
                         f"must lie between 0 and the top of the straight side ({brim:.4g} m), got {jacket.top!r}")
    return min(jacket.top, brim)


def jacketed_area(shape: VesselShape, jacket: JacketCoverage, level: float) -> float:
    """Wetted inside area [m2] behind the jacket: the head part only if the jacket covers the bottom
    head, and the shell up to min(level, jacket top)."""
    head = _head(shape)
    top = min(level, _jacket_top(shape, jacket))
    head_part = head.area(top) if jacket.covers_bottom_head else 0.0
    return head_part + math.pi * shape.diameter * max(top - head.depth, 0.0)


def coil_tube_length(coil: HelicalCoil) -> float:
    r"""Length of a helical coil's tube [m]: :math:`L = N\sqrt{(\pi D_h)^2 + p^2}` (helix geometry)."""
    return coil.turns * math.hypot(math.pi * coil.helix_diameter, coil.pitch)


def coil_outer_area(coil: HelicalCoil) -> float:
    """Outer surface area [m2] of the whole coil tube, pi d_o L."""
    return math.pi * coil.tube_outer_diameter * coil_tube_length(coil)


def coil_height(coil: HelicalCoil) -> float:
    """Overall height [m] of the coil, from the bottom of the lowest turn to the top of the highest."""
    return coil.turns * coil.pitch + coil.tube_outer_diameter


def coil_elevation(shape: VesselShape, coil: HelicalCoil) -> float:
    """Height [m] of the lowest turn's centre; the default is one tube OD above the bottom tangent line."""
    if coil.elevation is not None:
        return coil.elevation
    return head_depth(shape) + coil.tube_outer_diameter


def check_coil(shape: VesselShape, coil: HelicalCoil, index: int = 0) -> None:
    """Raise :class:`InputError` (field ``vessel.coils[index].<name>``) unless the coil fits the vessel."""
    field = f"vessel.coils[{index}]"
    d = require_positive(f"{field}.tube_outer_diameter", coil.tube_outer_diameter)
    require_positive(f"{field}.tube_wall", coil.tube_wall)
    if 2.0 * coil.tube_wall >= d:
        raise InputError(f"{field}.tube_wall", f"must be less than half the tube outside diameter ({d / 2:.4g} m)")
    require_positive(f"{field}.turns", coil.turns)
    if require_positive(f"{field}.pitch", coil.pitch) < d:
        raise InputError(f"{field}.pitch", f"must be at least the tube outside diameter ({d:.4g} m), "
                                           "or neighbouring turns overlap")
    Dh = require_positive(f"{field}.helix_diameter", coil.helix_diameter)
    if Dh <= d or Dh + d >= shape.diameter:
        raise InputError(f"{field}.helix_diameter",
                         f"the coil (helix {Dh:.4g} m + tube {d:.4g} m) must fit inside the vessel "
                         f"diameter {shape.diameter:.4g} m and exceed one tube diameter")
    e = coil_elevation(shape, coil)
    where = f"{field}.elevation" if coil.elevation is not None else f"{field}.turns"
    bottom, top = e - d / 2.0, e + coil.turns * coil.pitch + d / 2.0
    head = _head(shape)
    if not math.isfinite(e) or bottom < 0.0 or (bottom < head.depth and head.radius(bottom) < (Dh + d) / 2.0):
        raise InputError(f"{field}.elevation", f"the lowest turn (centre at {e:.4g} m) cuts into the bottom head")
    if top > brim_height(shape):
        raise InputError(where, f"the coil top ({top:.4g} m) is above the top of the straight side "
                                f"({brim_height(shape):.4g} m)")


def _tube_integrals(u: float, a: float) -> tuple[float, float]:
    # Integrals over t from -inf to u of the submerged cross-section area and wetted perimeter of a
    # horizontal tube of radius a whose centre is t below the liquid surface.
    if u <= -a:
        return 0.0, 0.0
    if u >= a:
        return math.pi * a ** 3 + math.pi * a * a * (u - a), 2.0 * math.pi * a * a + 2.0 * math.pi * a * (u - a)
    x = u / a
    g = x * math.acos(x) - math.sqrt(1.0 - x * x)
    area = a * a * math.pi * u - a ** 3 * g - (a * a - u * u) ** 1.5 / 3.0
    perimeter = 2.0 * a * (math.pi * u - a * g)
    return area, perimeter


def coil_submerged(shape: VesselShape, coil: HelicalCoil, level: float) -> tuple[float, float]:
    r"""Displaced liquid volume [m3] and submerged outer area [m2] of a coil at ``level`` [m].

    The centreline rises linearly along the tube, so each height band of the coil holds the same
    tube length. Integrating the submerged segment area :math:`A(u)` and wetted perimeter :math:`P(u)`
    of a round tube whose centre is u below the surface over the coil's rise H = N p:

    .. math:: V = \frac{L}{H}\int_{e}^{e+H} A(\ell - z)\,dz, \qquad S = \frac{L}{H}\int_{e}^{e+H} P(\ell - z)\,dz

    Exact when fully submerged (pi d^2 L / 4 and pi d L); in between it treats the vertical section of
    the tube as a circle, which is exact in the limit of a small pitch angle (common for vessel coils).
    """
    a = 0.5 * coil.tube_outer_diameter
    e = coil_elevation(shape, coil)
    rise = coil.turns * coil.pitch
    lo_v, lo_s = _tube_integrals(level - e - rise, a)
    hi_v, hi_s = _tube_integrals(level - e, a)
    per_height = coil_tube_length(coil) / rise
    return per_height * (hi_v - lo_v), per_height * (hi_s - lo_s)


def _coils_submerged(shape: VesselShape, coils: Sequence[HelicalCoil], level: float) -> tuple[float, float]:
    pairs = [coil_submerged(shape, c, level) for c in coils]
    return sum(p[0] for p in pairs), sum(p[1] for p in pairs)


def fill(shape: VesselShape, jacket: JacketCoverage | None = None, coils: tuple[HelicalCoil, ...] = (),
         volume: float | None = None, level: float | None = None, field: str | None = None) -> FillGeometry:
    """The vessel filled with ``volume`` [m3] of liquid, or to ``level`` [m]: exactly one of the two.

    Coils displace liquid: for a given liquid volume the level is found where the vessel volume below
    it minus the submerged coil volume equals the liquid volume (Brent's method). The heat-transfer
    area is the jacketed part of the wetted wall plus the submerged coil outer area.

    A 2.5 m plant vessel on a DIN 28011 head with a full jacket and a 12-turn coil, holding 10 m3:

    >>> coil = HelicalCoil(tube_outer_diameter=0.0603, tube_wall=0.0039, helix_diameter=2.0, turns=12, pitch=0.12)
    >>> r = fill(VesselShape(2.5, 2.8, "torispherical_klopper"), JacketCoverage(), (coil,), volume=10.0)
    >>> round(r.liquid_level, 4), round(r.jacketed_area, 2), round(r.coil_area, 2), round(r.area_per_volume, 3)
    (2.2505, 20.06, 14.29, 3.434)
    """
    head = _head(shape)
    coils = tuple(coils)
    for i, coil in enumerate(coils):
        check_coil(shape, coil, i)
    if jacket is not None:
        _jacket_top(shape, jacket)
    brim = brim_height(shape)
    if (volume is None) == (level is None):
        raise InputError("fill", "give exactly one of volume or level")
    field = field or ("fill.level" if level is not None else "fill.volume")  # the request's own path
    if level is not None:
        if not (math.isfinite(level) and 0.0 < level <= brim):
            raise InputError(field, f"must be above 0 and at most the top of the straight side "
                                           f"({brim:.4g} m), got {level!r}")
        displaced = _coils_submerged(shape, coils, level)[0]
        volume = volume_at_level(shape, level) - displaced
        if volume <= 0.0:
            raise InputError(field, f"the coils take up the whole vessel below {level:.4g} m")
    else:
        assert volume is not None  # exactly one of volume and level, checked above
        capacity = volume_at_level(shape, brim) - _coils_submerged(shape, coils, brim)[0]
        if not (math.isfinite(volume) and 0.0 < volume <= capacity * (1.0 + 1e-12)):
            raise InputError(field, f"must be above 0 and at most what the vessel holds up to the top "
                                            f"of the straight side ({capacity:.4g} m3), got {volume!r}")
        level = min(_level_with_coils(shape, coils, min(volume, capacity)), brim)
    displaced, coil_area = _coils_submerged(shape, coils, level)

    warnings = Warnings()
    if jacket is None:
        jacketed = 0.0
    else:
        jacketed = jacketed_area(shape, jacket, level)
        lower_edge = 0.0 if jacket.covers_bottom_head else head.depth
        if level <= lower_edge or jacketed <= 0.0:
            warnings.add(CalcWarning("jacket_not_wetted",
                                     f"the liquid level ({level:.4g} m) does not reach the jacket "
                                     f"(lower edge at {lower_edge:.4g} m): no jacket area is wetted"))
    for i, coil in enumerate(coils):
        e = coil_elevation(shape, coil)
        d = coil.tube_outer_diameter
        if level < e + coil.turns * coil.pitch + d / 2.0:
            state = "is above the liquid" if level <= e - d / 2.0 else "is only partly submerged"
            warnings.add(CalcWarning("coil_not_submerged", f"coil {i} {state} at level {level:.4g} m; "
                                                           "only its submerged area counts"))
    area = jacketed + coil_area
    if not math.isfinite(area / volume):
        raise InputError(field, f"too small a charge ({volume:.4g} m3) for an area per volume")
    return FillGeometry(volume=volume, liquid_level=level, wetted_area=wetted_area(shape, level),
                        jacketed_area=jacketed, coil_area=coil_area, heat_transfer_area=area,
                        area_per_volume=area / volume, displaced_volume=displaced,
                        brim_volume=volume_at_level(shape, brim), warnings=warnings)


def _level_with_coils(shape: VesselShape, coils: tuple[HelicalCoil, ...], volume: float) -> float:
    low = level_at_volume(shape, volume)
    if not coils:
        return low
    total = sum(math.pi / 4.0 * c.tube_outer_diameter ** 2 * coil_tube_length(c) for c in coils)
    high = level_at_volume(shape, volume + total)

    def excess(z: float) -> float:
        return volume_at_level(shape, z) - _coils_submerged(shape, coils, z)[0] - volume
    if excess(low) >= 0.0:
        return low
    if excess(high) <= 0.0:
        return high
    return float(brentq(excess, low, high, xtol=1e-14 * high, rtol=1e-13))


def scale_shape(shape: VesselShape, factor: float) -> VesselShape:
    """A geometrically similar vessel: every length times ``factor`` (angles unchanged)."""
    require_positive("scale_factor", factor)
    return replace(shape, diameter=shape.diameter * factor, straight_side=shape.straight_side * factor)


def scale_jacket(jacket: JacketCoverage, factor: float) -> JacketCoverage:
    """The jacket coverage of a geometrically similar vessel (top edge height times ``factor``)."""
    require_positive("scale_factor", factor)
    return replace(jacket, top=None if jacket.top is None else jacket.top * factor)


def scale_coil(coil: HelicalCoil, factor: float) -> HelicalCoil:
    """A geometrically similar coil: every length times ``factor``, the same number of turns.

    Real plant coils keep standard tube sizes; use this for similarity studies, not for design.
    """
    require_positive("scale_factor", factor)
    return replace(coil, tube_outer_diameter=coil.tube_outer_diameter * factor,
                   tube_wall=coil.tube_wall * factor, helix_diameter=coil.helix_diameter * factor,
                   pitch=coil.pitch * factor,
                   elevation=None if coil.elevation is None else coil.elevation * factor)
