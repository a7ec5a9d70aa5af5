"""Coolant-side (service-side) film coefficients of jackets; the inside of coils is :mod:`calc.coil_side`.

The caller gives the coolant's properties at its mean temperature and its viscosity at the wall
temperature (and iterates both; see :mod:`calc.wall` for the wall temperatures). Each correlation is one
function below, registered with its source and validity range in :data:`CORRELATIONS`; every call
checks the ranges and returns warnings with the result.

Jacket types (``JacketSpec.type``):

- ``annular``: plain annular jacket without baffles. Lehrer (1970) joined to the laminar annulus
  (Gnielinski) by a cube sum (default, ``lehrer_1970``: Lehrer's data are turbulent water, and alone it
  gives about 13 W/m2K for laminar glycol; the lower of the two for the VDI Heat Atlas worked example:
  2924 against 5695 W/m2K), or Stein & Schmidt (1993).
- ``annular_spiral_baffle``: the annulus is a helical channel pitch x gap; part of the flow bypasses the
  baffle through the clearance (default: design on 50 % effective flow).
- ``half_pipe``: half-pipe coil welded on the shell (180 degree section by default).
- ``none``: no jacket; asking for its film is an input error.

``passes`` splits the flow into that many equal zones fed in parallel (each with 1/passes of the flow and
1/passes of the jacket height). The spiral-baffle and half-pipe channels are coiled channels; two
treatments are offered (``JacketSpec.channel``):

- ``curved`` (default): the treatment of helical coil tubes (:mod:`calc.films.coil_side`) on the
  channel's equivalent diameter with r = De/D_c: Schmidt's (1967) laminar correlation up to his
  critical Reynolds number 2300 (1 + 8.6 r^0.45), Gnielinski's interpolation up to 2.2e4, Schmidt (or
  Mori & Nakayama) above. Curvature delays the transition (Re_crit about 8000 for a half pipe of
  De/D_c = 0.08) and raises laminar heat transfer through secondary (Dean) flow, which a coiled
  channel has as much as a coiled tube; so the coil's treatment applies.
- ``straight``: straight-tube correlations (Sieder & Tate laminar below 2100, Gnielinski's 2013
  interpolation, Sieder & Tate turbulent above 1e4 with the curvature factor 1 + 3.5 De/D_c), as in the
  half-pipe method usually attributed to Garvin (CEP 1999, from memory). It gives about a third of
  the curved value in laminar glycol flow; the margin band shows both.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any, Callable, NamedTuple, cast

import numpy as np
from scipy.constants import g

from calc import arrays
from calc.hydraulics.friction import friction_factor_Colebrook_1939
from calc.properties import LiquidProperties
from calc.validity import CalcWarning, Correlation, InputError, Warnings, require_positive

#: Below this coolant velocity a jacket fouls and its film is poor (common practice, no source).
LOW_VELOCITY = 0.3  # m/s
#: Spiral baffle: share of the flow that bypasses the baffle by default; design on 50 % effective flow.
#: Paraphrased, from memory: Perry's Chemical Engineers' Handbook puts the leakage past a loosely fitted
#: spiral baffle at a third to a half of the flow or more.
DEFAULT_BYPASS_FRACTION = 0.5
#: Tube-flow regime limits for jacket channels (Sieder & Tate 1936; Gnielinski's 2013 interpolation between).
LAMINAR_LIMIT, TURBULENT_LIMIT = 2100.0, 1.0e4
#: Laminar limit of the Darcy friction factor used with the Stein & Schmidt tangential-inlet model
#: (Avila et al., Science 333, 192, 2011: Re_c = 2040; from memory).
PIPE_TRANSITION = 2040.0

INLET_TYPES = ("tangential", "radial")
INLET_LOCATIONS = ("bottom", "top")


class _Flow(NamedTuple):
    h: float
    reynolds: float
    velocity: float
    nusselt: float
    length_scale: float


# ---------------------------------------------------------------- correlations


def friction_factor_Stein_Schmidt(Re: float, relative_roughness: float = 0.0) -> float:
    """Darcy friction factor of the Stein & Schmidt tangential-inlet model: 64/Re below Re = 2040,
    Colebrook (1939) above (:func:`calc.hydraulics.friction.friction_factor_Colebrook_1939`). ``Re`` may be
    an array (element by element).

    >>> round(friction_factor_Stein_Schmidt(1e5), 6), friction_factor_Stein_Schmidt(1000.0)
    (0.01799, 0.064)
    """
    if isinstance(Re, np.ndarray):  # Colebrook on the turbulent elements (the laminar ones take it at 2040, unused)
        turbulent = friction_factor_Colebrook_1939(np.maximum(Re, PIPE_TRANSITION), relative_roughness)
        return arrays.where(Re < PIPE_TRANSITION, 64.0 / Re, turbulent)
    if Re < PIPE_TRANSITION:
        return 64.0 / Re
    return friction_factor_Colebrook_1939(Re, relative_roughness)


def h_jacket_Lehrer_1970(m: float, D_tank: float, gap: float, H: float, d_inlet: float, rho: float, cp: float,
                         k: float, mu: float, mu_w: float, inlet_type: str = "tangential",
                         inlet_location: str = "bottom", rho_w: float | None = None, beta: float | None = None,
                         dT: float | None = None, roughness: float = 0.0,
                         warnings: Warnings | None = None) -> _Flow:
    """Plain annular jacket, Lehrer (1970), as given in the VDI Heat Atlas (2010).

    Nu = 0.03 Re^0.75 Pr / [1 + 1.74 (Pr - 1) Re^-0.125] (mu/mu_w)^0.14,  Nu = h d_g/k,  d_g = (8/3)^0.5 gap
    Re = rho v_h d_g / mu,  v_h = (v_s v_in)^0.5 + v_A,  v_in = Q/(pi d_in^2/4),  v_s = Q/(H gap),
    v_A = +-0.5 (2 g H beta dT)^0.5 for a radial inlet (0 for a tangential one)

    Parameters
    ----------
    m : float
        Coolant mass flow through the jacket, [kg/s]
    D_tank : float
        Outside diameter of the vessel shell, [m]
    gap : float
        Annular gap between shell and jacket, [m]
    H : float
        Height of the jacket, [m]
    d_inlet : float
        Inside diameter of the inlet nozzle, [m]
    rho, cp, k, mu : float
        Coolant density [kg/m3], heat capacity [J/(kg K)], conductivity [W/(m K)], viscosity [Pa s]
    mu_w : float
        Coolant viscosity at the wall temperature, [Pa s]
    inlet_type, inlet_location : str
        ``tangential``/``radial`` and ``bottom``/``top``, [-]
    rho_w : float, optional
        Unused here (the Stein & Schmidt buoyancy term needs it), [kg/m3]
    beta : float, optional
        Coolant volumetric expansion coefficient, for the radial-inlet buoyancy term, [1/K]
    dT : float, optional
        Coolant temperature rise through the jacket (negative when the coolant is cooled), [K]
    roughness : float
        Unused here (same call signature as :func:`h_jacket_Stein_Schmidt_1993`), [m]
    warnings : Warnings, optional
        Collects notes on the buoyancy term, [-]

    Returns
    -------
    _Flow
        h [W/(m2 K)], Reynolds number [-], velocity v_h [m/s], Nusselt number [-], d_g [m]

    Notes
    -----
    The cross-flow velocity v_s uses the vertical section H x gap that a swirling inlet jet crosses. The
    printed ht docstring shows the annulus area pi/4 (D_j^2 - D_t^2) instead, but only H x gap reproduces
    the VDI Heat Atlas worked example (2922 W/m2K), so H x gap is used. The buoyancy velocity needs beta
    and dT (Lehrer's dT is taken as the coolant temperature change through the jacket, as in that
    example); it is added when buoyancy helps the flow (heated coolant entering at the bottom, cooled at
    the top). When it opposes and exceeds the forced term the correlation does not apply; the term is
    then left out with a warning. Lehrer's data: water, H/D about 1 (abstract); the Re and Pr ranges
    registered are from memory.

    Examples
    --------
    VDI Heat Atlas (2010) example: 2.5 kg/s water, D_t = 0.6 m, D_j = 0.65 m, H = 0.6 m, d_in = 0.025 m

    >>> round(h_jacket_Lehrer_1970(2.5, 0.6, 0.025, 0.6, 0.025, 995.7, 4178.1, 0.615, 798e-6, 355e-6).h)
    2922

    References
    ----------
    Lehrer, I. H. "Jacket-Side Nusselt Number". Ind. Eng. Chem. Process Des. Dev. 9, 553-558 (1970),
    doi:10.1021/i260036a010. VDI Heat Atlas, 2nd ed., Springer 2010 (worked example).
    """
    Q = m / rho
    Pr = cp * mu / k
    v_in = Q / (math.pi / 4 * d_inlet ** 2)
    v_s = Q / (H * gap)
    forced = arrays.sqrt(v_s * v_in)
    v_a = 0.0
    # the buoyancy term needs beta and dT, which only a single state gives (the network passes neither)
    if inlet_type == "radial" and beta is not None and dT is not None and dT != 0.0:
        magnitude = 0.5 * math.sqrt(2 * g * H * abs(beta * dT))
        assists = (dT > 0) == (inlet_location == "bottom")
        v_a = magnitude if assists else -magnitude
        if forced + v_a <= 0.5 * forced:
            v_a = 0.0
            if warnings is not None:
                warnings.add(CalcWarning("buoyancy_opposes_flow",
                                         "Lehrer (1970): buoyancy opposes the jacket flow and exceeds half the "
                                         "forced velocity; the buoyancy term is left out (not conservative)"))
    v_h = forced + v_a
    d_g = math.sqrt(8.0 / 3.0) * gap
    Re = rho * v_h * d_g / mu
    Nu = 0.03 * Re ** 0.75 * Pr / (1 + 1.74 * (Pr - 1) * Re ** -0.125) * (mu / mu_w) ** 0.14
    return _Flow(Nu * k / d_g, Re, v_h, Nu, d_g)


def Nu_annulus_laminar_Gnielinski(Re: float, Pr: float, dh_over_L: float, diameter_ratio: float) -> float:
    """Mean Nusselt number of laminar, hydrodynamically and thermally developing flow in a concentric annulus
    heated at the inner wall (constant temperature), outer wall insulated: Gnielinski, VDI Heat Atlas G2.

    Nu = (Nu_1^3 + Nu_2^3 + Nu_3^3)^(1/3),  Nu = h d_h/k,  d_h = d_o - d_i,  a = d_i/d_o
    Nu_1 = 3.66 + 1.2 a^-0.8   (fully developed),
    Nu_2 = 1.615 (1 + 0.14 a^-0.5) (Re Pr d_h/L)^(1/3)   (thermal entry),
    Nu_3 = [2/(1 + 22 Pr)]^(1/6) (Re Pr d_h/L)^(1/2)   (simultaneous entry)

    Parameters
    ----------
    Re : float
        Reynolds number on d_h and the mean axial velocity, [-]
    Pr : float
        Prandtl number, [-]
    dh_over_L : float
        Hydraulic diameter over heated length, [-]
    diameter_ratio : float
        Inner over outer diameter of the annulus a = d_i/d_o, (0, 1], [-]

    Returns
    -------
    Nu : float
        Mean Nusselt number on d_h, [-] (times (mu/mu_w)^0.14 by the caller)

    Notes
    -----
    Laminar flow, Re < 2300; the constants are from memory of the VDI Heat Atlas (2010), chapter G2,
    section 2. Nu_1 reproduces Incropera & DeWitt Table 8.2 (one wall insulated, the other at constant
    temperature; from memory: 4.86 at a = 1, 5.74 at a = 0.5, 7.37 at a = 0.25) within 1 % for a >= 0.25;
    jackets have a of about 0.9. With a = 1 it is the parallel-plate channel heated on one side.

    Examples
    --------
    >>> round(Nu_annulus_laminar_Gnielinski(1e-9, 10.0, 0.01, 1.0), 3)  # fully developed
    4.86
    >>> round(Nu_annulus_laminar_Gnielinski(1000.0, 30.0, 0.02, 0.9), 2)
    16.81

    References
    ----------
    Gnielinski, V. "G2 Heat Transfer in Concentric Annular and Parallel Plate Ducts". VDI Heat Atlas, 2nd ed.,
    Springer 2010, 701-708 (from memory). Incropera, F. P.; DeWitt, D. P. Fundamentals of Heat and Mass
    Transfer, Table 8.2 (from memory).
    """
    graetz = Re * Pr * dh_over_L
    Nu_1 = 3.66 + 1.2 * diameter_ratio ** -0.8
    Nu_2 = 1.615 * (1.0 + 0.14 * diameter_ratio ** -0.5) * graetz ** (1 / 3)
    Nu_3 = (2.0 / (1.0 + 22.0 * Pr)) ** (1 / 6) * graetz ** 0.5
    Nu: float = (Nu_1 ** 3 + Nu_2 ** 3 + Nu_3 ** 3) ** (1 / 3)
    return Nu


#: Exponent of the Churchill & Usagi (1972) sum joining the laminar annulus to Lehrer's correlation (a cube
#: sum, the rule by which Stein & Schmidt (1993) and Gnielinski join their laminar and turbulent terms).
ANNULAR_JOIN_EXPONENT = 3.0


def h_jacket_Lehrer_1970_laminar_annulus(m: float, D_tank: float, gap: float, H: float, d_inlet: float,
                                         rho: float, cp: float, k: float, mu: float, mu_w: float,
                                         inlet_type: str = "tangential", inlet_location: str = "bottom",
                                         rho_w: float | None = None, beta: float | None = None,
                                         dT: float | None = None, roughness: float = 0.0,
                                         warnings: Warnings | None = None) -> _Flow:
    """Plain annular jacket from laminar to turbulent flow: Lehrer (1970) joined to the laminar annulus
    (Gnielinski, VDI Heat Atlas G2) by a Churchill & Usagi (1972) cube sum, smooth at every flow.

    h = (h_lam^3 + h_Lehrer^3)^(1/3),
    h_Lehrer from :func:`h_jacket_Lehrer_1970`,
    h_lam = Nu_lam k/d_h (mu/mu_w)^0.14,  Nu_lam = :func:`Nu_annulus_laminar_Gnielinski` (Re_ax, Pr, d_h/H, a),
    d_h = 2 gap,  a = D_t/(D_t + 2 gap),  Re_ax = rho v_ax d_h/mu,  v_ax = Q/(pi (D_t + gap) gap)

    Parameters
    ----------
    m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, inlet_type, inlet_location, rho_w, beta, dT, roughness,
    warnings :
        As :func:`h_jacket_Lehrer_1970`, same units

    Returns
    -------
    _Flow
        h [W/(m2 K)], Lehrer's Reynolds number [-] and velocity v_h [m/s], Nusselt number on d_g [-], d_g [m]

    Notes
    -----
    Lehrer's correlation was fitted on water in turbulent jacket flow; extrapolated to a laminar, viscous
    coolant (30 % glycol, Pr about 30, Re below about 2000) it falls as Re^0.875 and gives films of about
    10 W/m2K, far below what conduction across the developing laminar layer of the annulus gives. The
    laminar asymptote is the annulus as a straight duct: the mean axial velocity on the hydraulic diameter
    over the zone height, the vessel wall heated and the jacket wall insulated. It ignores the inlet jet's
    swirl, so it is a lower bound on laminar flow (Stein & Schmidt's laminar terms use the swirl velocity and
    give more). In turbulent flow the cube sum adds little to Lehrer's value (0.06 % in the VDI Heat Atlas
    example: 2924 against 2922 W/m2K) and it has no switch point, so h varies smoothly with flow and
    temperature. Joining asymptotes this way is Churchill & Usagi's (1972) rule; the exponent 3 is the one
    Stein & Schmidt use for the same jacket (from memory).

    Examples
    --------
    >>> round(h_jacket_Lehrer_1970_laminar_annulus(2.5, 0.6, 0.025, 0.6, 0.025, 995.7, 4178.1, 0.615, 798e-6,
    ...                                            355e-6).h)
    2924

    References
    ----------
    Lehrer (1970), see :func:`h_jacket_Lehrer_1970`. Gnielinski, VDI Heat Atlas, 2nd ed., Springer 2010, G2
    (from memory). Churchill, S. W.; Usagi, R. "A general expression for the correlation of rates of transfer
    and other phenomena". AIChE J. 18, 1121-1128 (1972), doi:10.1002/aic.690180606.
    """
    turbulent = h_jacket_Lehrer_1970(m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, inlet_type=inlet_type,
                                     inlet_location=inlet_location, rho_w=rho_w, beta=beta, dT=dT,
                                     roughness=roughness, warnings=warnings)
    d_h = 2.0 * gap
    v_axial = m / (rho * math.pi * (D_tank + gap) * gap)
    Nu_lam = Nu_annulus_laminar_Gnielinski(rho * v_axial * d_h / mu, cp * mu / k, d_h / H,
                                           D_tank / (D_tank + 2.0 * gap)) * (mu / mu_w) ** 0.14
    n = ANNULAR_JOIN_EXPONENT
    h = ((Nu_lam * k / d_h) ** n + turbulent.h ** n) ** (1.0 / n)
    return _Flow(h, turbulent.reynolds, turbulent.velocity, h * turbulent.length_scale / k, turbulent.length_scale)


def h_jacket_Stein_Schmidt_1993(m: float, D_tank: float, gap: float, H: float, d_inlet: float, rho: float,
                                cp: float, k: float, mu: float, mu_w: float, inlet_type: str = "tangential",
                                inlet_location: str = "bottom", rho_w: float | None = None,
                                beta: float | None = None, dT: float | None = None, roughness: float = 0.0,
                                warnings: Warnings | None = None) -> _Flow:
    """Plain annular jacket, Stein & Schmidt (1993), as given in the VDI Heat Atlas (2010).

    Nu = (Nu_A^3 + Nu_B^3 + Nu_C^3 + Nu_D^3)^(1/3) (mu/mu_w)^0.14,  Nu = h d_ch/k,  d_ch = 2 gap,
    l_ch = [(pi/2)^2 D_t^2 + H^2]^0.5;  Nu_A = 3.66,  Nu_B = 1.62 (Re Pr d_ch/l_ch)^(1/3),
    Nu_C = 0.664 Pr^(1/3) (Re d_ch/l_ch)^0.5,
    Nu_D = 0.0115 Pr^(1/3) Re^0.9 [1 - (2300/Re)^2.5] [1 + (d_ch/l_ch)^(2/3)] for Re > 2300, else 0;
    Re = Re_eq = [Re_J^2 +- |Gr| (H/d_ch)/50]^0.5,  Gr = g rho (rho - rho_w) d_ch^3 / mu^2.
    Tangential inlet: v = (v_x^2 + v_z^2)^0.5 with v_z = Q/(pi D_t gap),
    v_x = v_in ln[1 + (f D_t H/d_in^2) v_x0/v_in] / (f D_t H/d_in^2), v_x0 = K3 + (K3^2 + K4)^0.5,
    K3 = v_in/4 - d_in^2 v_in/(4 f D_t H), K4 = d_in^2 v_in^2/(2 f D_t H), f the Darcy friction factor at Re_J.
    Radial inlet: v = v_M ln(b_M/b_E)/(1 - b_E/b_M), b_E = pi d_in^2/(8 gap),
    b_M = (pi/2) D_t [1 + (pi^2/4) D_t^2/H^2]^0.5, v_M = Q/(2 gap b_M).

    Parameters
    ----------
    m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, inlet_type, inlet_location :
        As :func:`h_jacket_Lehrer_1970`, same units
    rho_w : float, optional
        Coolant density at the wall temperature, for the buoyancy term, [kg/m3]
    beta, dT : float, optional
        Unused here (Lehrer's buoyancy term needs them), [1/K], [K]
    roughness : float
        Roughness of the jacket walls, [m]
    warnings : Warnings, optional
        Collects notes on the buoyancy term, [-]

    Returns
    -------
    _Flow
        h [W/(m2 K)], equivalent Reynolds number [-], channel velocity [m/s], Nusselt number [-], d_ch [m]

    Notes
    -----
    Buoyancy adds to Re when it helps the flow (coolant heated at the wall, rho_w < rho, entering at the
    bottom; or cooled and entering at the top) and subtracts otherwise; Re_eq is kept >= 0, so Nu >= 3.66.
    The tangential-inlet friction factor is iterated to a fixed point (Colebrook, smooth by default):
    plain iteration is the specification (:func:`_plain`); one state reaches it sooner by Steffensen's
    method where that provably lands on the same value (:func:`_settled`), arrays of states step together
    with each element stopping where its own iteration would (:func:`_plain_many`). Arrays give no warnings.
    Covers laminar to turbulent flow by the blend of Nu_A..Nu_D.

    Examples
    --------
    VDI Heat Atlas (2010) example, as Lehrer's, with rho_w = 971.8 kg/m3

    >>> round(h_jacket_Stein_Schmidt_1993(2.5, 0.6, 0.025, 0.6, 0.025, 995.7, 4178.1, 0.615, 798e-6,
    ...                                   355e-6, rho_w=971.8).h)
    5695

    References
    ----------
    Stein, W. A.; Schmidt, W. "Wärmeübergang auf der Wärmeträgerseite eines Rührbehälters mit einem
    einfachen Mantel". Forsch. Ingenieurwes. 59, 73-90 (1993), doi:10.1007/BF02561203.
    VDI Heat Atlas, 2nd ed., Springer 2010 (worked example).
    """
    inputs = (m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, rho_w, roughness)
    vector = arrays.is_array(*inputs)
    if vector and np.broadcast(*(v for v in inputs if v is not None)).size < VECTOR_FROM:
        return _Stein_Schmidt_elementwise(m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, inlet_type,
                                          inlet_location, rho_w, roughness)
    Q = m / rho
    Pr = cp * mu / k
    d_ch = 2.0 * gap
    l_ch = arrays.sqrt((math.pi / 2) ** 2 * D_tank ** 2 + H ** 2)
    v_in = Q / (math.pi / 4 * d_inlet ** 2)
    if inlet_type == "radial":
        b_in = math.pi / 8 * d_inlet ** 2 / gap
        b_mid = math.pi / 2 * D_tank * arrays.sqrt(1 + math.pi ** 2 / 4 * D_tank ** 2 / H ** 2)
        ratio = b_in / b_mid
        equal = abs(ratio - 1.0) < 1e-12  # the limit of the shape factor is 1 there
        apart = arrays.where(equal, 0.5, ratio)
        shape = arrays.where(equal, 1.0, -arrays.log(apart) / (1.0 - apart))
        v_ch = Q / (2 * gap * b_mid) * shape
    else:
        v_z = Q / (math.pi * D_tank * gap)
        # what stays put while the friction factor is iterated, computed once
        spread_per_f, quarter, half_square = D_tank * H / d_inlet ** 2, v_in / 4, v_in ** 2 / 2
        Re_per_v, relative_roughness = rho * d_ch / mu, roughness / d_ch
        ops = np if vector else math  # the same velocity on arrays, element by element

        def velocity(f: float) -> float:
            """The channel velocity with the friction factor ``f``, m/s."""
            spread = f * spread_per_f
            K3 = quarter - quarter / spread
            K4 = half_square / spread
            v_x0 = K3 + ops.sqrt(K3 ** 2 + K4)
            v_x = v_in * ops.log1p(spread * v_x0 / v_in) / spread
            speed: float = ops.hypot(v_x, v_z)
            return speed

        def step(v: float) -> float:
            return velocity(friction_factor_Stein_Schmidt(Re_per_v * v, relative_roughness))

        first = velocity(friction_factor_Stein_Schmidt(1e5, relative_roughness))
        switch = PIPE_TRANSITION / Re_per_v  # the channel velocity at the friction factor's laminar switch
        v_ch = _plain_many(step, first, switch) if vector else _settled(step, first, switch)
    Re = rho * v_ch * d_ch / mu
    if rho_w is not None:
        buoyancy = g * rho * abs(rho - rho_w) * d_ch ** 3 / mu ** 2 * H / d_ch / 50.0
        assists = (rho_w < rho) == (inlet_location == "bottom")
        squared = arrays.where(assists, Re ** 2 + buoyancy, Re ** 2 - buoyancy)
        if warnings is not None and np.any(squared < 0.25 * Re ** 2):
            warnings.add(CalcWarning("buoyancy_opposes_flow",
                                     "Stein & Schmidt (1993): buoyancy opposes the jacket flow and dominates it; "
                                     "mixed convection, the film coefficient is uncertain"))
        Re = arrays.where(rho_w != rho, arrays.sqrt(arrays.maximum(squared, 0.0)), Re)
    Nu_A = 3.66
    Nu_B = 1.62 * (Re * Pr * d_ch / l_ch) ** (1 / 3)
    Nu_C = 0.664 * Pr ** (1 / 3) * arrays.sqrt(Re * d_ch / l_ch)
    # 0 up to Re = 2300, where the bracket [1 - (2300/Re)^2.5] vanishes
    Nu_D = (0.0115 * Pr ** (1 / 3) * Re ** 0.9 * (1 - (2300 / arrays.maximum(Re, 2300.0)) ** 2.5)
            * (1 + (d_ch / l_ch) ** (2 / 3)))
    Nu = (Nu_A ** 3 + Nu_B ** 3 + Nu_C ** 3 + Nu_D ** 3) ** (1 / 3) * (mu / mu_w) ** 0.14
    if vector:  # every item of the flow as an array of the states' shape
        return _Flow._make(np.broadcast_arrays(Nu * k / d_ch, Re, v_ch, Nu, d_ch))
    return _Flow(Nu * k / d_ch, Re, v_ch, Nu, d_ch)


#: The tangential-inlet velocity is settled when one more step moves it by this share or less.
SETTLED = 1e-13
#: Most steps of that fixed-point iteration (the first velocity, at the friction factor of Re = 1e5, included).
FIXED_POINT_STEPS = 100
#: Arrays of this many states or more take the vectorised path (:func:`_plain_many`); fewer go state by state.
#: Measured break-even: about 16 states near the laminar switch (where one state's iteration takes its full
#: steps), about 60 elsewhere (where Steffensen's method settles one state in a few); the sizing's margin bands
#: pass 44 states near the switch.
VECTOR_FROM = 32


#: The last iterates :func:`_plain` looks at when it has not settled: spanning the switch, the step has no fixed point.
TRAIL = 10


def _plain(step: Callable[[float], float], v: float, switch: float) -> float:
    """The fixed point of ``step`` by plain iteration from ``v`` (the first step's result), as specified.

    The friction factor jumps up at its laminar switch (64/Re = 0.031 against Colebrook's 0.049 at Re = 2040),
    so the step jumps down at the switch velocity ``switch``: where the laminar branch's step lies above the
    switch and the turbulent branch's below, there is no fixed point and the iterates cycle across it. The
    channel then runs at the switch (the friction factor somewhere within its jump: the fixed point of the
    step with the jump filled in), which joins the two branches' fixed points continuously as the flow
    changes; before, the answer was wherever the cycle's last step fell (jumps of up to 40 % in h between
    neighbouring flows). Not settled and the last :data:`TRAIL` iterates on both sides of the switch: the switch.
    """
    trail: list[float] = []
    for _ in range(FIXED_POINT_STEPS - 1):
        previous, v = v, step(v)
        if abs(v - previous) <= SETTLED * v:
            return v
        trail = (trail + [v])[-TRAIL:]
    return switch if min(trail) < switch < max(trail) else v


#: Cycle lengths :func:`_plain_many` looks for, one a step in turn (those seen where there is no fixed point).
CYCLES = (2, 3, 4, 5)


def _plain_many(step: Callable[[float], float], first: float, switch: float) -> float:
    """:func:`_plain` on an array of states: each element steps until its own change is within SETTLED (it
    then keeps that value while the others go on), so each is the value plain iteration gives it alone.

    Near the friction factor's laminar switch the step may have no fixed point: the iterates then fall into
    a cycle across the switch, and the answer is the switch velocity ``switch`` (:func:`_plain`). An element
    whose iterate repeats one of p steps before exactly (the step is deterministic, so it cycles from there
    on, across the switch) takes it at once and stops stepping; p is tried in turn from :data:`CYCLES`. One
    still moving after the last step takes it when its last :data:`TRAIL` iterates span it, as :func:`_plain`.
    """
    v: Any = first  # an array of states
    moving = np.ones(np.shape(v), dtype=bool)
    iterates = [v]
    steps = FIXED_POINT_STEPS - 1
    for taken in range(1, steps + 1):
        following = step(v)
        settled = abs(following - v) <= SETTLED * following
        v = np.where(moving, following, v)
        moving &= ~settled
        period = CYCLES[taken % len(CYCLES)]
        if taken >= period:
            cycling = moving & (following == iterates[taken - period])
            if cycling.any():
                v = np.where(cycling, switch, v)
                moving &= ~cycling
        iterates.append(v)
        if not moving.any():
            break
    if moving.any():
        recent = np.array(iterates[-TRAIL:])
        v = np.where(moving & (recent.min(axis=0) < switch) & (switch < recent.max(axis=0)), switch, v)
    settled_values: float = v
    return settled_values


def _steffensen(step: Callable[[float], float], v: float) -> tuple[float | None, float]:
    """The fixed point of ``step`` by Steffensen's method from ``v`` (None when it does not settle), and the
    largest contraction ``|step(b) - step(a)| / |b - a|`` seen on the way."""
    contraction = 0.0
    for _ in range(12):
        a = step(v)
        if abs(a - v) <= SETTLED * a:
            return a, contraction
        b = step(a)
        if abs(b - a) <= SETTLED * b:
            return b, contraction
        curvature = b - 2.0 * a + v
        if curvature == 0.0:
            return None, contraction
        contraction = max(contraction, abs((b - a) / (a - v)))
        extrapolated = v - (a - v) ** 2 / curvature
        v = extrapolated if math.isfinite(extrapolated) and extrapolated > 0.0 else b
    return None, contraction


#: Plain steps :func:`_settled` may take towards the fixed point's side of the laminar switch before it gives
#: up on Steffensen's method (the plain iteration left then settles within its steps at the contraction allowed).
WALK_STEPS = 8


def _settled(step: Callable[[float], float], first: float, switch: float) -> float:
    """The fixed point v = step(v) that plain iteration from ``first`` settles on (:func:`_plain`), reached
    faster by Steffensen's method (Aitken's extrapolation of every two steps; quadratic convergence), with the
    same test for settling, so the two agree to about 1e-13.

    Plain iteration is the specification. Steffensen's answer stands only where plain iteration from the
    current iterate ends there too: it contracts fast enough to settle within its steps (at the largest
    contraction seen, with a margin of 1000) and its iterates, which stay within the distance from the
    iterate to the fixed point, cannot reach the friction factor's laminar switch at the velocity ``switch``
    (the step is discontinuous there, and the two could settle on different sides). Where the switch lies between them, plain steps are taken until the
    iterate has crossed it (as plain iteration does), and Steffensen's method is tried again from there;
    otherwise plain iteration from ``first`` decides.
    """
    v = first
    walked = 0
    while walked <= WALK_STEPS:
        found, contraction = _steffensen(step, v)
        if found is None:
            break
        reach = abs(v - found)
        left = FIXED_POINT_STEPS - 10 - walked  # plain steps left, less a margin
        if contraction >= 1.0 or contraction ** left * reach > 1e-3 * SETTLED * found:
            break  # plain iteration might not settle within its steps
        if not found - reach <= switch <= found + reach:
            return found
        if (v - switch) * (found - switch) > 0.0 or walked == WALK_STEPS:
            break  # the switch is within reach from the fixed point's own side: plain iteration decides
        while (v - switch) * (found - switch) <= 0.0 and walked < WALK_STEPS:  # the plain steps across it
            previous, v = v, step(v)
            walked += 1
            if abs(v - previous) <= SETTLED * v:
                return v
        if (v - switch) * (found - switch) <= 0.0:
            break
    return _plain(step, first, switch)


def _Stein_Schmidt_elementwise(m: float, D_tank: float, gap: float, H: float, d_inlet: float, rho: float,
                               cp: float, k: float, mu: float, mu_w: float, inlet_type: str, inlet_location: str,
                               rho_w: float | None, roughness: float) -> _Flow:
    """:func:`h_jacket_Stein_Schmidt_1993` over a few states (fewer than :data:`VECTOR_FROM`), one at a time.

    For so few, the scalar path's accelerated fixed point (:func:`_settled`) beats the plain iteration on
    arrays (:func:`_plain_many`), whose steps cost numpy's overhead per call rather than per element.
    """
    values = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in
                                   (m, D_tank, gap, H, d_inlet, rho, cp, k, mu, mu_w, rho if rho_w is None else rho_w,
                                    roughness)))
    one_state: Callable[..., _Flow] = h_jacket_Stein_Schmidt_1993
    states = zip(*(a.ravel().tolist() for a in values))  # Python floats, one tuple per state
    rows = [one_state(*state[:10], inlet_type=inlet_type, inlet_location=inlet_location, rho_w=state[10],
                      roughness=state[11]) for state in states]
    return _Flow._make(np.array(column).reshape(values[0].shape) for column in zip(*rows))


def Nu_laminar_Sieder_Tate_1936(Re: float, Pr: float, De_over_L: float) -> float:
    """Laminar flow in a channel, Sieder & Tate (1936), with the fully developed floor 3.66.

    Nu = max[1.86 (Re Pr De/L)^(1/3), 3.66]   (times (mu/mu_w)^0.14 by the caller)

    Parameters
    ----------
    Re : float
        Reynolds number on De, [-]
    Pr : float
        Prandtl number, [-]
    De_over_L : float
        Equivalent diameter over channel length, [-]

    Returns
    -------
    Nu : float
        Nusselt number on De, [-]

    Notes
    -----
    Re < 2100, 0.48 < Pr < 16700 (from memory). The floor is the fully developed constant-wall-temperature
    value (Incropera & DeWitt eq. 8.55) for long channels, where Re Pr De/L < about 8.

    Examples
    --------
    >>> round(Nu_laminar_Sieder_Tate_1936(1000.0, 10.0, 0.01), 3)
    8.633

    References
    ----------
    Sieder, E. N.; Tate, G. E. "Heat Transfer and Pressure Drop of Liquids in Tubes". Ind. Eng. Chem. 28,
    1429-1435 (1936), doi:10.1021/ie50324a027.
    """
    return arrays.maximum(1.86 * (Re * Pr * De_over_L) ** (1 / 3), 3.66)


def Nu_transition_Gnielinski_2013(Re: float, Pr: float, De_over_L: float, De_over_Dc: float) -> float:
    """Transitional flow in a channel: linear interpolation in Re between the laminar and the turbulent
    correlation at the regime limits, the rule of Gnielinski (2013) adopted by the VDI Heat Atlas.

    Nu = (1 - g) Nu_lam(Re_lam) + g Nu_turb(Re_turb),  g = (Re - Re_lam)/(Re_turb - Re_lam)
    with Re_lam = 2100 (Sieder & Tate laminar, here) and Re_turb = 10^4 (Sieder & Tate turbulent with the
    curvature factor), times (mu/mu_w)^0.14 by the caller.

    Parameters
    ----------
    Re : float
        Reynolds number on De, [-]
    Pr : float
        Prandtl number, [-]
    De_over_L : float
        Equivalent diameter over channel length (laminar end), [-]
    De_over_Dc : float
        Equivalent diameter over curvature diameter (turbulent end), [-]

    Returns
    -------
    Nu : float
        Nusselt number on De, [-]

    Notes
    -----
    2100 <= Re <= 10^4. Continuous with both neighbours by construction, so h has no jump where the
    flow regime changes (Hausen's 1943 transition formula stands about 10-20 % below the turbulent
    correlation at Re = 10^4, a jump this rule avoids). Gnielinski interpolates between 2300 and 10^4
    with his own laminar and turbulent equations; here the same rule joins this module's correlations.

    Examples
    --------
    >>> lam = Nu_laminar_Sieder_Tate_1936(2100.0, 5.0, 0.001)
    >>> turb = Nu_turbulent_Sieder_Tate_1936(1e4, 5.0, 0.05)
    >>> Nu_transition_Gnielinski_2013(2100.0, 5.0, 0.001, 0.05) == lam
    True
    >>> round(Nu_transition_Gnielinski_2013(1e4, 5.0, 0.001, 0.05) - turb, 12)
    0.0

    References
    ----------
    Gnielinski, V. "On heat transfer in tubes". Int. J. Heat Mass Transfer 63, 134-140 (2013),
    doi:10.1016/j.ijheatmasstransfer.2013.04.015 (from memory); VDI Heat Atlas, 2nd ed., Springer 2010, G1.
    """
    weight = arrays.clip((Re - LAMINAR_LIMIT) / (TURBULENT_LIMIT - LAMINAR_LIMIT), 0.0, 1.0)
    laminar = Nu_laminar_Sieder_Tate_1936(LAMINAR_LIMIT, Pr, De_over_L)
    turbulent = Nu_turbulent_Sieder_Tate_1936(TURBULENT_LIMIT, Pr, De_over_Dc)
    return (1.0 - weight) * laminar + weight * turbulent


def Nu_turbulent_Sieder_Tate_1936(Re: float, Pr: float, De_over_Dc: float) -> float:
    """Turbulent flow in a coiled channel, Sieder & Tate (1936) with the curvature factor.

    Nu = 0.027 Re^0.8 Pr^(1/3) (1 + 3.5 De/D_c)   (times (mu/mu_w)^0.14 by the caller)

    Parameters
    ----------
    Re : float
        Reynolds number on De, [-]
    Pr : float
        Prandtl number, [-]
    De_over_Dc : float
        Equivalent diameter over the centre-line diameter of the coiled channel, [-]

    Returns
    -------
    Nu : float
        Nusselt number on De, [-]

    Notes
    -----
    Re > 10^4, 0.7 < Pr < 16700 (from memory). The curvature factor 1 + 3.5 De/D_c is the McAdams
    coil correction used for half-pipe and spiral-baffle jackets (Garvin, CEP 1999, from memory).

    Examples
    --------
    >>> round(Nu_turbulent_Sieder_Tate_1936(1e5, 1.2, 0.0), 3)
    286.918

    References
    ----------
    Sieder, E. N.; Tate, G. E. Ind. Eng. Chem. 28, 1429-1435 (1936), doi:10.1021/ie50324a027.
    """
    Nu: float = 0.027 * Re ** 0.8 * Pr ** (1 / 3) * (1 + 3.5 * De_over_Dc)
    return Nu


VDI_HEAT_ATLAS = "VDI Heat Atlas, 2nd ed., Springer 2010"
CORRELATIONS: dict[str, Correlation] = {
    # the default: Lehrer joined to the laminar annulus (Lehrer's own range, from memory, data water, H/D = 1,
    # is 1e3 < Re < 1e5, 1 < Pr < 20; below Re 1e3 the laminar asymptote carries the film)
    "lehrer_1970": Correlation(
        "Lehrer (1970) + laminar annulus", h_jacket_Lehrer_1970_laminar_annulus,
        "Lehrer, Ind. Eng. Chem. Process Des. Dev. 9, 553 (1970), doi:10.1021/i260036a010; " + VDI_HEAT_ATLAS
        + "; laminar annulus: Gnielinski, " + VDI_HEAT_ATLAS + ", G2; joined by the cube sum of Churchill & Usagi, "
        "AIChE J. 18, 1121 (1972)",
        {"Re": (None, 1e5), "Pr": (1.0, 20.0), "H/D": (0.5, 2.0)}),
    "stein_schmidt_1993": Correlation(
        "Stein & Schmidt (1993)", h_jacket_Stein_Schmidt_1993,
        "Stein & Schmidt, Forsch. Ingenieurwes. 59, 73 (1993), doi:10.1007/BF02561203; " + VDI_HEAT_ATLAS,
        {"Pr": (0.6, 1000.0)}),  # from memory
    "sieder_tate_1936_laminar": Correlation(
        "Sieder & Tate (1936), laminar", Nu_laminar_Sieder_Tate_1936,
        "Sieder & Tate, Ind. Eng. Chem. 28, 1429 (1936)", {"Re": (None, LAMINAR_LIMIT), "Pr": (0.48, 16700.0)}),
    "gnielinski_2013": Correlation(
        "Gnielinski (2013), transition interpolation", Nu_transition_Gnielinski_2013,
        "Gnielinski, Int. J. Heat Mass Transfer 63, 134 (2013), doi:10.1016/j.ijheatmasstransfer.2013.04.015; "
        + VDI_HEAT_ATLAS, {"Re": (LAMINAR_LIMIT, TURBULENT_LIMIT)}),
    "sieder_tate_1936_turbulent": Correlation(
        "Sieder & Tate (1936), turbulent, coil factor 1 + 3.5 De/Dc", Nu_turbulent_Sieder_Tate_1936,
        "Sieder & Tate, Ind. Eng. Chem. 28, 1429 (1936); curvature factor after McAdams",
        {"Re": (TURBULENT_LIMIT, None), "Pr": (0.7, 16700.0)}),
}
#: Options of ``JacketSpec.correlation`` for plain annular jackets.
ANNULAR_CORRELATIONS = ("lehrer_1970", "stein_schmidt_1993")
#: The equations and constants of each annular option, as ``GET /v1/correlations`` lists them.
ANNULAR_CONSTANTS: dict[str, dict[str, str | float]] = {
    "lehrer_1970": {
        "turbulent": "Nu = 0.03 Re^0.75 Pr / [1 + 1.74 (Pr - 1) Re^-0.125] (mu/mu_w)^0.14 on d_g = (8/3)^0.5 gap, "
                     "Re on v_h = (v_s v_in)^0.5 + v_A, v_s = Q/(H gap), v_in = Q/(pi d_in^2/4) (Lehrer 1970)",
        "laminar": "Nu = (Nu_1^3 + Nu_2^3 + Nu_3^3)^(1/3) (mu/mu_w)^0.14 on d_h = 2 gap, Nu_1 = 3.66 + 1.2 a^-0.8, "
                   "Nu_2 = 1.615 (1 + 0.14 a^-0.5) (Re_ax Pr d_h/H)^(1/3), "
                   "Nu_3 = [2/(1 + 22 Pr)]^(1/6) (Re_ax Pr d_h/H)^(1/2), a = D_t/(D_t + 2 gap), "
                   "Re_ax on v_ax = Q/(pi (D_t + gap) gap) (Gnielinski, VDI Heat Atlas G2)",
        "combination": "h = (h_laminar^n + h_turbulent^n)^(1/n) (Churchill & Usagi 1972)",
        "n": ANNULAR_JOIN_EXPONENT},
    "stein_schmidt_1993": {
        "equation": "Nu = (3.66^3 + Nu_B^3 + Nu_C^3 + Nu_D^3)^(1/3) (mu/mu_w)^0.14 on d_ch = 2 gap, "
                    "Nu_B = 1.62 (Re Pr d_ch/l_ch)^(1/3), Nu_C = 0.664 Pr^(1/3) (Re d_ch/l_ch)^0.5, "
                    "Nu_D = 0.0115 Pr^(1/3) Re^0.9 [1 - (2300/Re)^2.5] [1 + (d_ch/l_ch)^(2/3)] above Re = 2300"},
}
#: Options of ``JacketSpec.channel`` for half-pipe and spiral-baffle channels (see the module notes).
CHANNEL_TREATMENTS = ("curved", "straight")


# ---------------------------------------------------------------- inputs and results


@dataclass(frozen=True)
class JacketSpec:
    """The jacket as the request gives it (``vessel.jacket``); lengths in m, angles in rad."""

    type: str
    gap: float | None = None  # annular gap (annular, spiral baffle)
    baffle_pitch: float | None = None  # spiral baffle: axial distance between baffle turns
    pipe_diameter: float | None = None  # half pipe: inside diameter of the pipe that was halved
    pipe_pitch: float | None = None  # half pipe: axial distance between turns
    passes: int = 1  # equal zones fed in parallel
    inlet_diameter: float | None = None  # annular: inlet nozzle; default = gap (as in the VDI example)
    inlet_type: str = "tangential"  # annular: tangential | radial
    inlet_location: str = "bottom"  # bottom | top (coolant usually enters low so the jacket vents)
    bypass_fraction: float | None = None  # spiral baffle: default DEFAULT_BYPASS_FRACTION
    correlation: str = "lehrer_1970"  # annular only: one of ANNULAR_CORRELATIONS
    pipe_section_angle: float = math.pi  # half pipe: pi for 180 degree, 2 pi/3 for 120 degree
    roughness: float = 0.0  # wall roughness, m
    channel: str = "curved"  # half pipe, spiral baffle: one of CHANNEL_TREATMENTS
    channel_turbulent: str = "schmidt_1967"  # curved channels: the coil-tube turbulent correlation


@dataclass(frozen=True)
class CoolantFilm:
    """A coolant-side film coefficient with the numbers behind it."""

    h: float  # W/(m2 K)
    reynolds: float  # -
    velocity: float  # m/s
    correlation: str  # authors and year, as cited
    nusselt: float  # -
    prandtl: float  # -
    equivalent_diameter: float  # m, length scale of Re and Nu
    regime: str  # laminar | transitional | turbulent
    warnings: Warnings = field(default_factory=Warnings)


# ---------------------------------------------------------------- jacket films


def _positive(jacket_field: str, value: float | None, what: str) -> float:
    if value is None:
        raise InputError(f"vessel.jacket.{jacket_field}", f"is required for {what}")
    return require_positive(f"vessel.jacket.{jacket_field}", value)


def channel_reynolds(props: LiquidProperties, mass_flow: float, area: float, d: float) -> tuple[float, float]:
    """Mean velocity [m/s] of ``mass_flow`` [kg/s] through a flow ``area`` [m2], and Re on ``d`` [m] (floats or
    arrays): the state of a coolant channel (coil tube, half pipe, spiral baffle)."""
    velocity = mass_flow / (props.density * area)
    return velocity, props.density * velocity * d / props.viscosity


def wall_corrected(Nu: float, props: LiquidProperties, mu_wall: float, d: float) -> tuple[float, float]:
    """(h [W/(m2 K)], Nu) of a channel's Nusselt number on ``d`` [m] times the viscosity correction
    (mu/mu_w)^0.14 (Sieder & Tate 1936)."""
    Nu = Nu * (props.viscosity / mu_wall) ** 0.14
    return Nu * props.thermal_conductivity / d, Nu


def require_coolant_flow(mass_flow: float, mu_wall: float) -> None:
    """The guards every coolant film applies first: a positive flow and wall viscosity."""
    require_positive("coolant.flow", mass_flow)
    require_positive("coolant", mu_wall)  # the coolant's viscosity at the wall


def flow_warnings(warnings: Warnings, Re: float, velocity: float, laminar_below: float, name: str) -> str:
    if velocity < LOW_VELOCITY:
        warnings.add(CalcWarning("low_velocity",
                                 f"coolant velocity {velocity:.3g} m/s is below {LOW_VELOCITY} m/s: poor film "
                                 "coefficient and fouling likely (common practice)"))
    if Re < laminar_below:
        warnings.add(CalcWarning("laminar_flow", f"{name}: laminar coolant flow (Re = {Re:.4g}); the film "
                                                 "coefficient is low and sensitive to geometry"))
        return "laminar"
    return "turbulent" if Re >= TURBULENT_LIMIT else "transitional"


@dataclass(frozen=True)
class FilmFormula:
    """A coolant film as a function of what the network iterates: one formula for one state or many.

    ``function(props, mass_flow, mu_wall, rho_wall, **fixed)`` gives a flow tuple whose first item is h,
    [W/(m2 K)]; ``props`` (:class:`LiquidProperties`), ``mu_wall`` and ``rho_wall`` may hold floats or
    numpy arrays, ``mass_flow`` is the flow through one channel (``flow_share`` of the stream's).
    ``fixed`` holds the geometry, which stays put while the network iterates. ``describe(props, flow,
    warnings)`` turns one state's flow tuple into a :class:`CoolantFilm` with its validity checks.
    """

    function: Callable[..., Any]
    fixed: dict[str, Any]
    flow_share: float
    describe: Callable[..., CoolantFilm]

    def h(self, props: LiquidProperties, stream_mass_flow: float, mu_wall: float, rho_wall: float | None) -> float:
        """Film coefficient for a stream mass flow (floats or arrays), [W/(m2 K)]."""
        h: float = self.function(props, stream_mass_flow * self.flow_share, mu_wall, rho_wall, **self.fixed)[0]
        return h

    def film(self, props: LiquidProperties, stream_mass_flow: float, mu_wall: float, rho_wall: float | None,
             warnings: Warnings, **state: Any) -> CoolantFilm:
        """The film of one state described, with its validity checks added to ``warnings`` (which the formula
        also gets); ``state`` passes the buoyancy inputs (``beta``, ``dT``) of an annular jacket."""
        flow = self.function(props, stream_mass_flow * self.flow_share, mu_wall, rho_wall, warnings=warnings,
                             **state, **self.fixed)
        return self.describe(props, flow, warnings)


def annular_flow(props: LiquidProperties, mass_flow: float, mu_wall: float, rho_wall: float | None,
                 correlation: str, D_tank: float, gap: float, H: float, d_inlet: float, inlet_type: str,
                 inlet_location: str, roughness: float, beta: float | None = None, dT: float | None = None,
                 warnings: Warnings | None = None) -> _Flow:
    """The registered annular-jacket correlation ``correlation`` at a coolant state (floats or arrays)."""
    flow: _Flow = CORRELATIONS[correlation].function(
        mass_flow, D_tank, gap, H, d_inlet, props.density, props.heat_capacity, props.thermal_conductivity,
        props.viscosity, mu_wall, inlet_type=inlet_type, inlet_location=inlet_location, rho_w=rho_wall, beta=beta,
        dT=dT, roughness=roughness, warnings=warnings)
    return flow


class _ChannelFlow(NamedTuple):
    h: float
    reynolds: float
    velocity: float
    nusselt: float
    key: int  # index into _CHANNEL_KEYS: the correlation in force (an array of them on the vectorised path)


_CHANNEL_KEYS = ("sieder_tate_1936_laminar", "gnielinski_2013", "sieder_tate_1936_turbulent")


def channel_flow(props: LiquidProperties, mass_flow: float, mu_wall: float, rho_wall: float | None, area: float,
                 d_e: float, length: float, d_curve: float, beta: float | None = None, dT: float | None = None,
                 warnings: Warnings | None = None) -> _ChannelFlow:
    """Film in a coiled channel (spiral baffle, half pipe): laminar, transitional or turbulent (floats or arrays).

    Laminar below Re = 2100, Gnielinski's interpolation to Re = 10^4, turbulent above. Short channels:
    the laminar entry value at a transitional Re can exceed the interpolation just above Re = 2100;
    transitional flow never transfers less than laminar flow would (common practice, no source), so the
    larger of the two stands and h stays monotonic in the flow across the regime boundary.
    """
    velocity, Re = channel_reynolds(props, mass_flow, area, d_e)
    Pr = props.prandtl
    laminar = Nu_laminar_Sieder_Tate_1936(Re, Pr, d_e / length)
    transition = Nu_transition_Gnielinski_2013(Re, Pr, d_e / length, d_e / d_curve)
    turbulent = Nu_turbulent_Sieder_Tate_1936(Re, Pr, d_e / d_curve)
    entry_wins = laminar > transition
    key = cast(int, arrays.where(Re < LAMINAR_LIMIT, 0, arrays.where(Re < TURBULENT_LIMIT,
                                                                     arrays.where(entry_wins, 0, 1), 2)))
    h, Nu = wall_corrected(arrays.where(key == 0, laminar, arrays.where(key == 1, transition, turbulent)), props,
                           mu_wall, d_e)
    return _ChannelFlow(h, Re, velocity, Nu, key)


def _describe_channel(props: LiquidProperties, flow: _ChannelFlow, warnings: Warnings, d_e: float) -> CoolantFilm:
    entry = CORRELATIONS[_CHANNEL_KEYS[flow.key]]
    entry.check(warnings, Re=flow.reynolds, Pr=props.prandtl)
    regime = flow_warnings(warnings, flow.reynolds, flow.velocity, LAMINAR_LIMIT, entry.name)
    return CoolantFilm(flow.h, flow.reynolds, flow.velocity, entry.name, flow.nusselt, props.prandtl, d_e, regime,
                      warnings)


def _channel_formula(area: float, d_e: float, length: float, d_curve: float, share: float,
                     jacket: JacketSpec) -> FilmFormula:
    """The channel's film: the curved (coil-tube) treatment on De and De/D_c, or the straight one."""
    if jacket.channel not in CHANNEL_TREATMENTS:
        raise InputError("correlations.channel", f"unknown option {jacket.channel!r}; known: "
                                                 f"{', '.join(CHANNEL_TREATMENTS)}")
    if jacket.channel == "curved":
        from calc.films import coil_side  # coil_side builds on this module's CoolantFilm and FilmFormula

        return coil_side.curved_formula(d_e, d_curve, area, share, jacket.channel_turbulent)
    return FilmFormula(channel_flow, {"area": area, "d_e": d_e, "length": length, "d_curve": d_curve}, share,
                       lambda props, flow, warnings: _describe_channel(props, flow, warnings, d_e))


def _annular(jacket: JacketSpec, D_o: float, H: float, warnings: Warnings) -> FilmFormula:
    if jacket.correlation not in ANNULAR_CORRELATIONS:
        raise InputError("vessel.jacket.correlation", f"unknown option {jacket.correlation!r}; known: "
                                                      f"{', '.join(ANNULAR_CORRELATIONS)}")
    gap = _positive("gap", jacket.gap, "an annular jacket")
    if jacket.inlet_diameter is None:
        d_in = gap
        warnings.add(CalcWarning("assumed_inlet_diameter", "jacket inlet nozzle diameter not given; taken "
                                 "equal to the gap (as in the VDI Heat Atlas example); give the real nozzle"))
    else:
        d_in = require_positive("vessel.jacket.inlet_diameter", jacket.inlet_diameter)
    for name, value, options in (("inlet_type", jacket.inlet_type, INLET_TYPES),
                                 ("inlet_location", jacket.inlet_location, INLET_LOCATIONS)):
        if value not in options:
            raise InputError(f"vessel.jacket.{name}", f"unknown option {value!r}; known: {', '.join(options)}")
    entry = CORRELATIONS[jacket.correlation]

    def describe(props: LiquidProperties, flow: _Flow, warnings: Warnings) -> CoolantFilm:
        entry.check(warnings, Re=flow.reynolds, Pr=props.prandtl, **{"H/D": H / D_o})
        regime = flow_warnings(warnings, flow.reynolds, flow.velocity, 2300.0, entry.name)
        return CoolantFilm(flow.h, flow.reynolds, flow.velocity, entry.name, flow.nusselt, props.prandtl,
                          flow.length_scale, regime, warnings)

    fixed = {"correlation": jacket.correlation, "D_tank": D_o, "gap": gap, "H": H, "d_inlet": d_in,
             "inlet_type": jacket.inlet_type, "inlet_location": jacket.inlet_location, "roughness": jacket.roughness}
    return FilmFormula(annular_flow, fixed, 1.0, describe)


def _spiral_baffle(jacket: JacketSpec, D_o: float, H: float, warnings: Warnings) -> FilmFormula:
    gap = _positive("gap", jacket.gap, "a spiral-baffle jacket")
    pitch = _positive("baffle_pitch", jacket.baffle_pitch, "a spiral-baffle jacket")
    bypass = DEFAULT_BYPASS_FRACTION if jacket.bypass_fraction is None else jacket.bypass_fraction
    if not (math.isfinite(bypass) and 0.0 <= bypass < 1.0):
        raise InputError("vessel.jacket.bypass_fraction", f"must be in [0, 1), got {bypass!r}")
    if jacket.bypass_fraction is None:
        warnings.add(CalcWarning("assumed_bypass", f"spiral baffle: {100 * bypass:g} % of the flow assumed to "
                                                   "bypass the baffle (design on 50 % effective flow)"))
    d_curve = D_o + gap
    turns = H / pitch
    length = turns * math.hypot(math.pi * d_curve, pitch)
    return _channel_formula(pitch * gap, 4.0 * gap, length, d_curve, 1.0 - bypass, jacket)


def _half_pipe(jacket: JacketSpec, D_o: float, H: float, warnings: Warnings) -> FilmFormula:
    d = _positive("pipe_diameter", jacket.pipe_diameter, "a half-pipe jacket")
    pitch = _positive("pipe_pitch", jacket.pipe_pitch, "a half-pipe jacket")
    theta = jacket.pipe_section_angle
    if not (math.isfinite(theta) and 0.0 < theta <= math.pi):
        raise InputError("vessel.jacket.pipe_section_angle", "must be between 0 and 180 degrees")
    chord = d * math.sin(theta / 2)
    if pitch < chord:
        raise InputError("vessel.jacket.pipe_pitch", f"{pitch:g} m is less than the half-pipe width "
                                                     f"{chord:g} m: turns would overlap")
    area = d * d / 8.0 * (theta - math.sin(theta))  # circular segment
    d_e = 4.0 * area / chord  # heat-transfer equivalent diameter (pi d/2 for 180 degrees)
    length = H / pitch * math.hypot(math.pi * D_o, pitch)
    return _channel_formula(area, d_e, length, D_o, 1.0, jacket)


def _no_jacket(*_args: object) -> FilmFormula:
    raise InputError("vessel.jacket.type", "the vessel has no jacket (type 'none'): there is no jacket film")


_JACKET_TYPES: dict[str, Callable[[JacketSpec, float, float, Warnings], FilmFormula]] = {
    "annular": _annular, "annular_spiral_baffle": _spiral_baffle, "half_pipe": _half_pipe, "none": _no_jacket}


def jacket_film_formula(jacket: JacketSpec, vessel_outer_diameter: float, jacket_height: float
                        ) -> tuple[FilmFormula, Warnings]:
    """The jacket's coolant film as a :class:`FilmFormula` (geometry checked once), and the geometry's warnings.

    ``passes`` zones in parallel: each takes 1/passes of the flow (``flow_share``) and of the height.
    """
    try:
        handler = _JACKET_TYPES[jacket.type]
    except KeyError:
        raise InputError("vessel.jacket.type", f"unknown option {jacket.type!r}; known: "
                                               f"{', '.join(_JACKET_TYPES)}") from None
    require_positive("vessel.diameter", vessel_outer_diameter)
    require_positive("vessel.jacket.top", jacket_height)
    if not (isinstance(jacket.passes, int) and jacket.passes >= 1):
        raise InputError("vessel.jacket.passes", f"must be a whole number >= 1, got {jacket.passes!r}")
    if not (math.isfinite(jacket.roughness) and jacket.roughness >= 0):
        raise InputError("vessel.jacket.roughness", f"must be a number >= 0, got {jacket.roughness!r}")
    warnings = Warnings()
    n = jacket.passes
    formula = handler(jacket, vessel_outer_diameter, jacket_height / n, warnings)
    return replace(formula, flow_share=formula.flow_share / n), warnings


def service_film_jacket(jacket: JacketSpec, coolant_props: LiquidProperties, mass_flow: float, mu_wall: float,
                        vessel_outer_diameter: float, jacket_height: float, rho_wall: float | None = None,
                        expansion_coefficient: float | None = None,
                        temperature_rise: float | None = None) -> CoolantFilm:
    """Coolant film coefficient in a jacket, referred to the jacket's heated wall.

    Parameters
    ----------
    jacket : JacketSpec
        Jacket type and dimensions, [-]
    coolant_props : LiquidProperties
        Coolant properties at its mean temperature, [-]
    mass_flow : float
        Total coolant mass flow (split over ``jacket.passes``), [kg/s]
    mu_wall : float
        Coolant viscosity at the wall temperature, [Pa s]
    vessel_outer_diameter : float
        Outside diameter of the shell, [m]
    jacket_height : float
        Height of shell covered by the jacket, [m]
    rho_wall : float, optional
        Coolant density at the wall temperature (Stein & Schmidt buoyancy term), [kg/m3]
    expansion_coefficient : float, optional
        Coolant volumetric expansion coefficient (Lehrer radial-inlet buoyancy term), [1/K]
    temperature_rise : float, optional
        Coolant temperature rise through the jacket (Lehrer buoyancy term), [K]

    Returns
    -------
    CoolantFilm

    Examples
    --------
    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(303.15, 995.7, 4178.1, 798e-6, 0.615)
    >>> r = service_film_jacket(JacketSpec("annular", gap=0.025, inlet_diameter=0.025), water, 2.5, 355e-6,
    ...                         0.6, 0.6)
    >>> round(r.h), r.correlation
    (2924, 'Lehrer (1970) + laminar annulus')
    """
    require_coolant_flow(mass_flow, mu_wall)
    formula, warnings = jacket_film_formula(jacket, vessel_outer_diameter, jacket_height)
    return formula.film(coolant_props, mass_flow, mu_wall, rho_wall, warnings, beta=expansion_coefficient,
                        dT=temperature_rise)
