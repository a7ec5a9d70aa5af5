"""Bottom heads of vertical vessels: closed-form liquid volume and wetted area, and the head registry.

Each bottom head is one entry of :data:`HEADS`, built from small closed-form functions (spherical cap,
torus knuckle zone, oblate spheroid zone, cone), each giving the liquid volume and the wetted inside
area when the liquid stands at height ``z`` inside the head. All lengths are **inside** dimensions;
head standards (ASME F&D, DIN 28011, DIN 28013) refer crown and knuckle radii to the *outside*
diameter, which changes head volumes by a few per cent for thin walls (see :mod:`calc.geometry`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from functools import partial
from typing import Callable, NamedTuple

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


class _TorisphericalParts(NamedTuple):
    """A torispherical head of crown radius R = f D and knuckle radius r = k D, [m] and [rad]."""

    R: float  # crown radius
    r: float  # knuckle radius
    rho: float  # distance of the knuckle's centre from the axis, D/2 - r
    alpha: float  # half-angle of the crown's spherical cap
    cos_a: float
    crown: float  # depth of the spherical cap
    depth: float  # depth of the whole head


def _within(z: float, depth: float) -> float:
    """A liquid height ``z`` [m] limited to the head, [0, ``depth``]: below it nothing, above it the full head."""
    return min(max(z, 0.0), depth)


def _torispherical_parts(D: float, f: float, k: float) -> _TorisphericalParts:
    R, r = f * D, k * D
    rho = 0.5 * D - r
    sin_a = rho / (R - r)
    alpha = math.asin(sin_a)
    cos_a = math.cos(alpha)
    crown = R * (1.0 - cos_a)
    return _TorisphericalParts(R, r, rho, alpha, cos_a, crown, crown + r * cos_a)


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
    The full head, :math:`F(r\cos\alpha)`, reduces to the closed form of a spherical cap of radius R
    plus a toroidal knuckle of radius r (elementary solid geometry; the tests check it against
    ``fluids.geometry.V_vertical_torispherical``).

    Examples
    --------
    Full ASME F&D head (f = 1, k = 0.06), V/D^3 = 0.0810 (``fluids.geometry`` gives the same to 4 decimals;
    handbooks quote 0.0809, from memory):

    >>> volume_torispherical_head(1.0, 1.0, 0.06, 1.0)
    0.0810

    References
    ----------
    Jones, D., Calculating Tank Volume, 2015 (the same volumes in another closed form).
    """
    R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)
    z = _within(z, depth)
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
    :math:`2\pi R h_c + 2\pi r[\rho(\pi/2 - \alpha) + r\cos\alpha]` (spherical cap plus the toroidal
    knuckle by Pappus's centroid theorem).

    Examples
    --------
    Full DIN 28013 (Korbbogen) head, A/D^2 = 1.0879 (``fluids.geometry.SA_torispheroidal`` gives the same):

    >>> area_torispherical_head(1.0, 0.8, 0.154, 1.0)
    1.0879

    References
    ----------
    Jones, D., Calculating Tank Wetted Area, Chemical Processing, April 2017.
    """
    R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)
    z = _within(z, depth)
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
    z = _within(z, depth)
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
    z = _within(z, depth)
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
    z = _within(z, 0.5 * D / t)
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
    z = _within(z, 0.5 * D / t)
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


def _torispherical(f: float, k: float) -> Callable[[float, float | None], HeadProfile]:
    def build(D: float, cone_angle: float | None) -> HeadProfile:
        R, r, rho, alpha, cos_a, crown, depth = _torispherical_parts(D, f, k)

        def radius(z: float) -> float:
            z = _within(z, depth)
            if z <= crown:
                return math.sqrt(max(z * (2.0 * R - z), 0.0))
            return rho + math.sqrt(max(r * r - (depth - z) ** 2, 0.0))
        return HeadProfile(depth, partial(volume_torispherical_head, D, f, k),
                           partial(area_torispherical_head, D, f, k), radius)
    return build


def _ellipsoidal_2_1(D: float, cone_angle: float | None) -> HeadProfile:
    b, R = 0.25 * D, 0.5 * D
    return HeadProfile(b, partial(volume_ellipsoidal_head, D, b), partial(area_ellipsoidal_head, D, b),
                       lambda z: R * math.sqrt(max(1.0 - ((b - _within(z, b)) / b) ** 2, 0.0)))


def _hemispherical(D: float, cone_angle: float | None) -> HeadProfile:
    R = 0.5 * D
    return HeadProfile(R, lambda z: volume_spherical_cap(R, _within(z, R)),
                       lambda z: area_spherical_cap(R, _within(z, R)),
                       lambda z: math.sqrt(_within(z, R) * (2.0 * R - _within(z, R))))


def _conical(D: float, cone_angle: float | None) -> HeadProfile:
    assert cone_angle is not None  # calc.vessel.geometry refuses a conical head without one
    beta = math.radians(cone_angle) / 2.0
    depth = 0.5 * D / math.tan(beta)
    return HeadProfile(depth, partial(volume_conical_head, D, beta), partial(area_conical_head, D, beta),
                       lambda z: _within(z, depth) * math.tan(beta))


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
