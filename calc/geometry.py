"""Vessel geometry: liquid volume, wetted and jacketed area, and helical coils of vertical stirred tanks.

A vessel is a vertical cylinder of inside diameter ``D`` on a bottom head; heights are measured from the
lowest inside point. The vessel is open at the top of the straight side: the *brim* lies at head depth +
straight side. All lengths are **inside** dimensions. Head standards (ASME F&D, DIN 28011, DIN 28013)
refer crown and knuckle radii to the *outside* diameter; using the inside diameter instead changes head
volumes by a few per cent for thin walls, which is within the accuracy of a screening estimate.

Each bottom head is one entry of :data:`HEADS`, built from small closed-form functions (spherical cap,
torus knuckle zone, oblate spheroid zone, cone), each giving the liquid volume and the wetted inside
area when the liquid stands at height ``z`` inside the head.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache, partial
from typing import Callable

from scipy.optimize import brentq

from .validity import CalcWarning, InputError, Warnings, require_positive

_HANDBOOK = ("Bronshtein, I.N., Semendyayev, K.A., Musiol, G., Muehlig, H., Handbook of Mathematics, "
             "5th ed., Springer, Berlin, 2007 (solids of revolution)")
_JONES = ("Jones, D., Calculating Tank Volume, 2015, and Calculating Tank Wetted Area, Chemical Processing, "
          "April 2017")


# --------------------------------------------------------------------------------------------------
# Closed forms of the head shapes. ``z`` is the liquid height above the lowest point of the head.
# --------------------------------------------------------------------------------------------------

def volume_spherical_cap(radius: float, z: float) -> float:
    r"""Volume of a spherical cap (Archimedes), as in mathematical handbooks.

    .. math:: V = \frac{\pi z^2 (3R - z)}{3}

    Parameters
    ----------
    radius : float
        Radius of the sphere, R [m]
    z : float
        Height of the cap, 0 <= z <= 2R [m]

    Returns
    -------
    V : float
        Volume of the cap [m^3]

    Notes
    -----
    Exact. Used for the hemispherical head (R = D/2) and the crown of torispherical heads.

    Examples
    --------
    A hemisphere of radius 1 m holds 2 pi / 3 m3:

    >>> volume_spherical_cap(1.0, 1.0)
    2.0943951

    References
    ----------
    Bronshtein, I.N., Semendyayev, K.A., Musiol, G., Muehlig, H., Handbook of Mathematics, 5th ed.,
    Springer, Berlin, 2007.
    """
    return math.pi * z * z * (3.0 * radius - z) / 3.0


def area_spherical_cap(radius: float, z: float) -> float:
    r"""Curved area of a spherical cap or zone (Archimedes), as in mathematical handbooks.

    .. math:: A = 2 \pi R z

    Parameters
    ----------
    radius : float
        Radius of the sphere, R [m]
    z : float
        Height of the cap, 0 <= z <= 2R [m]

    Returns
    -------
    A : float
        Curved surface area of the cap [m^2]

    Notes
    -----
    Exact.

    Examples
    --------
    >>> area_spherical_cap(1.0, 1.0)  # hemisphere, 2 pi R^2
    6.2831853

    References
    ----------
    Bronshtein, I.N., Semendyayev, K.A., Musiol, G., Muehlig, H., Handbook of Mathematics, 5th ed.,
    Springer, Berlin, 2007.
    """
    return 2.0 * math.pi * radius * z


def depth_torispherical_head(D: float, f: float, k: float) -> float:
    r"""Depth of a torispherical head with crown radius fD and knuckle radius kD.

    .. math:: h = R - (R - r)\cos\alpha, \quad \sin\alpha = \frac{D/2 - r}{R - r},
              \quad R = fD,\ r = kD

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    f : float
        Crown radius as a fraction of D [-]
    k : float
        Knuckle radius as a fraction of D [-]

    Returns
    -------
    h : float
        Depth of the head [m]

    Notes
    -----
    Requires 0 < k < 1/2 and f > 1/2 (a crown large enough to meet the knuckle tangentially).

    Examples
    --------
    DIN 28011 (Kloepper) head, h/D = 0.1938 (coolmargin METHODS table; DIN gives 0.1935 D_a - 0.455 s):

    >>> depth_torispherical_head(1.0, 1.0, 0.1)
    0.1937742

    References
    ----------
    Jones, D., Calculating Tank Volume, 2015. DIN 28011 (1993), DIN 28013 (2012); ASME Boiler and
    Pressure Vessel Code, Section VIII, Division 1.
    """
    R, r = f * D, k * D
    cos_a = math.sqrt(1.0 - ((0.5 * D - r) / (R - r)) ** 2)
    return R - (R - r) * cos_a


def _torispherical_parts(D: float, f: float, k: float):
    R, r = f * D, k * D
    rho = 0.5 * D - r
    sin_a = rho / (R - r)
    alpha = math.asin(sin_a)
    cos_a = math.cos(alpha)
    crown = R * (1.0 - cos_a)
    return R, r, rho, alpha, cos_a, crown, crown + r * cos_a


def volume_torispherical_head(D: float, f: float, k: float, z: float) -> float:
    r"""Liquid volume in a torispherical head filled to height z: spherical crown plus toroidal knuckle.

    Crown (0 <= z <= h_c): :math:`V = \pi z^2 (3R - z)/3`, with :math:`h_c = R(1-\cos\alpha)`.
    Knuckle (h_c < z <= h): with w the depth below the tangent line and :math:`\rho = D/2 - r`,

    .. math::
        V = V_c + \pi\left[F(r\cos\alpha) - F(h - z)\right],\quad
        F(w) = (\rho^2 + r^2) w - \frac{w^3}{3} + \rho\left[w\sqrt{r^2 - w^2} + r^2\sin^{-1}\frac{w}{r}\right]

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    f : float
        Crown radius as a fraction of D [-]
    k : float
        Knuckle radius as a fraction of D [-]
    z : float
        Liquid height above the lowest point of the head [m]; clipped to [0, h]

    Returns
    -------
    V : float
        Liquid volume inside the head [m^3]

    Notes
    -----
    Exact for the ideal profile (integral of pi x(z)^2 over the crown and knuckle profile).
    The full head, :math:`F(r\cos\alpha)`, reduces to the closed form of METHODS.md section 8.

    Examples
    --------
    Full ASME F&D head (f = 1, k = 0.06), V/D^3 = 0.0810 (METHODS table; quoted 0.0809):

    >>> volume_torispherical_head(1.0, 1.0, 0.06, 1.0)
    0.0810

    References
    ----------
    Jones, D., Calculating Tank Volume, 2015 (the same volumes in another closed form).
    """
    R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)
    z = min(max(z, 0.0), depth)
    if z <= crown:
        return volume_spherical_cap(R, z)

    def F(w: float) -> float:
        s = min(w / r, 1.0)
        return (rho * rho + r * r) * w - w ** 3 / 3.0 + rho * (w * math.sqrt(max(r * r - w * w, 0.0))
                                                            + r * r * math.asin(s))
    return volume_spherical_cap(R, crown) + math.pi * (F(r * cos_a) - F(depth - z))


def area_torispherical_head(D: float, f: float, k: float, z: float) -> float:
    r"""Wetted inside area of a torispherical head filled to height z: spherical crown plus knuckle zone.

    Crown (0 <= z <= h_c): :math:`A = 2\pi R z`. Knuckle (h_c < z <= h):

    .. math::
        A = 2\pi R h_c + 2\pi r\left[(z - h_c) + \rho\left(\frac{\pi}{2} - \alpha
            - \sin^{-1}\frac{h - z}{r}\right)\right]

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    f : float
        Crown radius as a fraction of D [-]
    k : float
        Knuckle radius as a fraction of D [-]
    z : float
        Liquid height above the lowest point of the head [m]; clipped to [0, h]

    Returns
    -------
    A : float
        Wetted inside area of the head [m^2]

    Notes
    -----
    Exact for the ideal profile. At z = h it reduces to
    :math:`2\pi R h_c + 2\pi r[\rho(\pi/2 - \alpha) + r\cos\alpha]` (METHODS.md section 8).

    Examples
    --------
    Full DIN 28013 (Korbbogen) head, A/D^2 = 1.0879 (METHODS table):

    >>> area_torispherical_head(1.0, 0.8, 0.154, 1.0)
    1.0879

    References
    ----------
    Jones, D., Calculating Tank Wetted Area, Chemical Processing, April 2017.
    """
    R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)
    z = min(max(z, 0.0), depth)
    if z <= crown:
        return area_spherical_cap(R, z)
    knuckle = (z - crown) + rho * (0.5 * math.pi - alpha - math.asin(min((depth - z) / r, 1.0)))
    return area_spherical_cap(R, crown) + 2.0 * math.pi * r * knuckle


def volume_ellipsoidal_head(D: float, depth: float, z: float) -> float:
    r"""Liquid volume in a semi-ellipsoidal (spheroidal) head of depth b filled to height z.

    .. math:: V = \pi \frac{R^2}{b^2} z^2 \left(b - \frac{z}{3}\right), \quad R = D/2

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    depth : float
        Depth of the head, b (D/4 for a 2:1 head) [m]
    z : float
        Liquid height above the lowest point of the head [m]; clipped to [0, b]

    Returns
    -------
    V : float
        Liquid volume inside the head [m^3]

    Notes
    -----
    Exact. A full 2:1 head holds pi D^3 / 24.

    Examples
    --------
    >>> volume_ellipsoidal_head(1.0, 0.25, 0.25)  # pi/24
    0.1308997

    References
    ----------
    Bronshtein et al., Handbook of Mathematics, 5th ed., Springer, 2007; Jones, D., Calculating Tank
    Volume, 2015.
    """
    z = min(max(z, 0.0), depth)
    R = 0.5 * D
    return math.pi * R * R / (depth * depth) * z * z * (depth - z / 3.0)


def area_ellipsoidal_head(D: float, depth: float, z: float) -> float:
    r"""Wetted inside area of an oblate semi-ellipsoidal head (depth b < D/2) filled to height z.

    With y the depth below the tangent line and :math:`c^2 = R^2 - b^2`:

    .. math::
        A = \frac{2\pi R}{b^2}\left[H(b) - H(b - z)\right],\quad
        H(y) = \frac{1}{2}\left[y\sqrt{b^4 + c^2 y^2} + \frac{b^4}{c}\sinh^{-1}\frac{c\,y}{b^2}\right]

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    depth : float
        Depth of the head, b, with 0 < b < D/2 [m]
    z : float
        Liquid height above the lowest point of the head [m]; clipped to [0, b]

    Returns
    -------
    A : float
        Wetted inside area of the head [m^2]

    Notes
    -----
    Exact (surface of revolution of the ellipse). At z = b it reduces to the oblate spheroid half area
    :math:`\pi R^2 + \pi R b^2 \sinh^{-1}(c/b)/c`; for 2:1 heads A/D^2 = 1.0840.

    Examples
    --------
    >>> area_ellipsoidal_head(1.0, 0.25, 0.25)
    1.08398

    References
    ----------
    Bronshtein et al., Handbook of Mathematics, 5th ed., Springer, 2007; Jones, D., Calculating Tank
    Wetted Area, Chemical Processing, April 2017.
    """
    z = min(max(z, 0.0), depth)
    R, b = 0.5 * D, depth
    b4, c = b ** 4, math.sqrt(R * R - b * b)

    def H(y: float) -> float:
        return 0.5 * (y * math.sqrt(b4 + c * c * y * y) + b4 / c * math.asinh(c * y / (b * b)))
    return 2.0 * math.pi * R / (b * b) * (H(b) - H(b - z))


def volume_conical_head(D: float, half_angle: float, z: float) -> float:
    r"""Liquid volume in a conical bottom (apex down) filled to height z.

    .. math:: V = \frac{\pi}{3} z^3 \tan^2\beta, \quad 0 \le z \le \frac{D}{2\tan\beta}

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    half_angle : float
        Half the included apex angle, beta, measured from the vertical [rad]
    z : float
        Liquid height above the apex [m]; clipped to the cone depth

    Returns
    -------
    V : float
        Liquid volume inside the cone [m^3]

    Notes
    -----
    Exact.

    Examples
    --------
    A 90 degree cone (45 degrees from vertical) under a 1 m shell holds pi / 24 m3:

    >>> volume_conical_head(1.0, math.pi / 4, 0.5)
    0.1308997

    References
    ----------
    Bronshtein et al., Handbook of Mathematics, 5th ed., Springer, 2007.
    """
    t = math.tan(half_angle)
    z = min(max(z, 0.0), 0.5 * D / t)
    return math.pi / 3.0 * z ** 3 * t * t


def area_conical_head(D: float, half_angle: float, z: float) -> float:
    r"""Wetted inside area of a conical bottom (apex down) filled to height z.

    .. math:: A = \pi \frac{z^2 \tan\beta}{\cos\beta}

    Parameters
    ----------
    D : float
        Inside diameter of the shell [m]
    half_angle : float
        Half the included apex angle, beta, measured from the vertical [rad]
    z : float
        Liquid height above the apex [m]; clipped to the cone depth

    Returns
    -------
    A : float
        Wetted inside area of the cone [m^2]

    Notes
    -----
    Exact; the full cone has :math:`\pi D^2 / (4 \sin\beta)`.

    Examples
    --------
    >>> area_conical_head(1.0, math.pi / 4, 0.5)  # pi / (4 sin 45 deg)
    1.1107207

    References
    ----------
    Bronshtein et al., Handbook of Mathematics, 5th ed., Springer, 2007.
    """
    t = math.tan(half_angle)
    z = min(max(z, 0.0), 0.5 * D / t)
    return math.pi * z * z * t / math.cos(half_angle)


# --------------------------------------------------------------------------------------------------
# Head registry
# --------------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class HeadProfile:
    """One head of one diameter: depth and functions of the liquid height z inside it (SI)."""

    depth: float  # m
    volume: Callable[[float], float]  # m3 of liquid in the head at height z
    area: Callable[[float], float]  # m2 of wetted inside head area at height z
    radius: Callable[[float], float]  # m, inside radius of the head at height z

    @property
    def full_volume(self) -> float:
        return self.volume(self.depth)

    @property
    def full_area(self) -> float:
        return self.area(math.inf)  # every head clips z; a flat bottom is wetted by any z > 0


@dataclass(frozen=True)
class HeadType:
    """A registry entry: the head's name, its dimensional standard and a builder (D, cone angle)."""

    id: str
    name: str
    source: str
    build: Callable[[float, float | None], HeadProfile]


def _flat(D: float, cone_angle: float | None) -> HeadProfile:
    # At z = 0 nothing is wetted; any liquid at all wets the whole bottom.
    return HeadProfile(0.0, lambda z: 0.0, lambda z: math.pi * D * D / 4.0 if z > 0.0 else 0.0,
                       lambda z: 0.5 * D)


def _torispherical(f: float, k: float):
    def build(D: float, cone_angle: float | None) -> HeadProfile:
        R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)

        def radius(z: float) -> float:
            z = min(max(z, 0.0), depth)
            if z <= crown:
                return math.sqrt(max(z * (2.0 * R - z), 0.0))
            return rho + math.sqrt(max(r * r - (depth - z) ** 2, 0.0))
        return HeadProfile(depth, partial(volume_torispherical_head, D, f, k),
                           partial(area_torispherical_head, D, f, k), radius)
    return build


def _ellipsoidal_2_1(D: float, cone_angle: float | None) -> HeadProfile:
    b, R = 0.25 * D, 0.5 * D
    return HeadProfile(b, partial(volume_ellipsoidal_head, D, b), partial(area_ellipsoidal_head, D, b),
                       lambda z: R * math.sqrt(max(1.0 - ((b - min(max(z, 0.0), b)) / b) ** 2, 0.0)))


def _hemispherical(D: float, cone_angle: float | None) -> HeadProfile:
    R = 0.5 * D

    def clip(z: float) -> float:
        return min(max(z, 0.0), R)
    return HeadProfile(R, lambda z: volume_spherical_cap(R, clip(z)), lambda z: area_spherical_cap(R, clip(z)),
                       lambda z: math.sqrt(clip(z) * (2.0 * R - clip(z))))


def _conical(D: float, cone_angle: float | None) -> HeadProfile:
    beta = math.radians(cone_angle) / 2.0
    depth = 0.5 * D / math.tan(beta)
    return HeadProfile(depth, partial(volume_conical_head, D, beta), partial(area_conical_head, D, beta),
                       lambda z: min(max(z, 0.0), depth) * math.tan(beta))


_ASME = "ASME Boiler and Pressure Vessel Code, Section VIII, Division 1"
HEADS: dict[str, HeadType] = {h.id: h for h in [
    HeadType("flat", "Flat bottom", "common practice, no source", _flat),
    HeadType("ellipsoidal_2_1", "2:1 semi-ellipsoidal head (depth D/4)", _ASME, _ellipsoidal_2_1),
    HeadType("torispherical_fd", "Flanged and dished head (crown radius D, knuckle 0.06 D)",
             _ASME, _torispherical(1.0, 0.06)),
    HeadType("torispherical_klopper", "Kloepper head (crown radius D, knuckle 0.1 D)",
             "DIN 28011:1993", _torispherical(1.0, 0.10)),
    HeadType("torispherical_korbbogen", "Korbbogen head (crown radius 0.8 D, knuckle 0.154 D)",
             "DIN 28013:2012", _torispherical(0.8, 0.154)),
    HeadType("hemispherical", "Hemispherical head", _HANDBOOK, _hemispherical),
    HeadType("conical", "Conical bottom (apex down; included apex angle given)", _HANDBOOK, _conical),
]}


# --------------------------------------------------------------------------------------------------
# Vessel, jacket and coils
# --------------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class VesselShape:
    """A vertical cylindrical vessel on a bottom head, open at the top of the straight side.

    ``diameter`` is the inside diameter [m]; ``straight_side`` the tangent-to-tangent (cylindrical)
    height [m]; ``bottom_head`` a key of :data:`HEADS`; ``cone_angle`` the included apex angle [deg]
    of a conical bottom (90 = 45 degrees from vertical), given for conical bottoms only.
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
    return brentq(lambda z: head.volume(z) - volume, 0.0, head.depth, xtol=1e-14 * head.depth, rtol=1e-13)


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


def _coils_submerged(shape: VesselShape, coils, level: float) -> tuple[float, float]:
    pairs = [coil_submerged(shape, c, level) for c in coils]
    return sum(p[0] for p in pairs), sum(p[1] for p in pairs)


def fill(shape: VesselShape, jacket: JacketCoverage | None = None, coils: tuple[HelicalCoil, ...] = (),
         volume: float | None = None, level: float | None = None) -> FillGeometry:
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
    field = "fill.level" if level is not None else "fill.volume"
    if level is not None:
        if not (math.isfinite(level) and 0.0 < level <= brim):
            raise InputError(field, f"must be above 0 and at most the top of the straight side "
                                           f"({brim:.4g} m), got {level!r}")
        displaced = _coils_submerged(shape, coils, level)[0]
        volume = volume_at_level(shape, level) - displaced
        if volume <= 0.0:
            raise InputError(field, f"the coils take up the whole vessel below {level:.4g} m")
    else:
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
    return brentq(excess, low, high, xtol=1e-14 * high, rtol=1e-13)


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
