"""Darcy friction factors of straight and coiled channels, and loss coefficients of fittings.

Straight channels: Hagen-Poiseuille below Re = 2100, Colebrook (1939) above 4000. Coiled channels
(internal coils, half-pipe and spiral-baffle jackets): Schmidt's (1967) laminar and turbulent
friction factors, laminar below his critical Reynolds number. In both, the friction factor in the
transition band is the linear interpolation in Re between the laminar and the turbulent equation
(each evaluated at the actual Re), so the pressure drop has no jump where the regime changes: the
same rule the film coefficients use (Gnielinski 2013, :mod:`calc.films.jacket_side`). The coiled band
runs from Re_crit to Re_crit x 4000/2100, the straight band's relative width.

Each correlation is registered with its source and validity range in :data:`CORRELATIONS`; fitting
loss coefficients are in :data:`LOSS_COEFFICIENTS` with theirs.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.special import wrightomega

from calc.validity import Correlation

#: Straight-channel regime limits (common practice: laminar below about 2100, turbulent above 4000).
LAMINAR_LIMIT, TURBULENT_LIMIT = 2100.0, 4000.0
#: Width of the coiled channels' transition band, relative to its start (the straight band's ratio).
TRANSITION_RATIO = TURBULENT_LIMIT / LAMINAR_LIMIT


def friction_factor_laminar(Re: float) -> float:
    """Darcy friction factor of fully developed laminar flow in a round tube, Hagen-Poiseuille.

    f = 64 / Re

    Parameters
    ----------
    Re : float
        Reynolds number, [-]

    Returns
    -------
    f : float
        Darcy friction factor, [-]

    Notes
    -----
    Re < 2100. Non-circular channels use their hydraulic diameter (a screening approximation).

    Examples
    --------
    >>> friction_factor_laminar(1000.0)
    0.064

    References
    ----------
    Hagen, G. Ann. Phys. 46, 423 (1839); Poiseuille, J. L. M. C. R. Acad. Sci. 11, 961 (1840).
    """
    return 64.0 / Re


def friction_factor_Colebrook_1939(Re: float, relative_roughness: float = 0.0) -> float:
    """Darcy friction factor of turbulent pipe flow, Colebrook (1939), solved exactly.

    1/sqrt(f) = -2 log10(e/(3.7 D) + 2.51/(Re sqrt(f)));  with s = 2.51 (2/ln 10)/Re, c = e/(3.7 D):
    1/sqrt(f) = -(2/ln 10) ln(y),  y = s omega(c/s - ln s)  (omega: Wright's function)

    Parameters
    ----------
    Re : float
        Reynolds number, [-]
    relative_roughness : float
        Roughness over diameter e/D, [-]

    Returns
    -------
    f : float
        Darcy friction factor, [-]

    Notes
    -----
    Turbulent flow, 4000 < Re < 1e8, e/D < 0.05. The omega form is the Lambert-W solution of
    Colebrook's equation (Keady 1998), exact to rounding: no iteration, no root finder.
    ``Re`` and ``relative_roughness`` may be numpy arrays (element by element, as :mod:`calc.arrays`).

    Examples
    --------
    >>> round(friction_factor_Colebrook_1939(1e5), 6)
    0.01799

    References
    ----------
    Colebrook, C. F. "Turbulent Flow in Pipes". J. Inst. Civ. Eng. 11, 133-156 (1939).
    Keady, G. "Colebrook-White formula for pipe flows". J. Hydraul. Eng. 124, 96-97 (1998).
    """
    a = 2.0 / math.log(10.0)
    s = a * 2.51 / Re
    c = relative_roughness / 3.7
    vector = isinstance(Re, np.ndarray) or isinstance(relative_roughness, np.ndarray)  # as arrays.is_array, sooner
    ops = np if vector else math  # arrays: element by element
    omega = wrightomega(c / s - ops.log(s))
    y = s * (omega if vector else float(omega.real))
    f: float = 1.0 / (a * ops.log(y)) ** 2
    return f


def friction_factor_coil_laminar_Schmidt_1967(Re: float, r: float) -> float:
    """Darcy friction factor of laminar flow in a helical coil, Schmidt (1967).

    f = (64/Re) [1 + 0.14 r^0.97 Re^(1 - 0.644 r^0.312)],  r = d/D_c

    Parameters
    ----------
    Re : float
        Reynolds number on the channel diameter, [-]
    r : float
        Channel diameter over the coil's curvature diameter, [-]

    Returns
    -------
    f : float
        Darcy friction factor, [-]

    Notes
    -----
    100 < Re < Re_crit = 2300 (1 + 8.6 r^0.45). Tends to the straight tube's 64/Re as r -> 0.

    Examples
    --------
    >>> round(friction_factor_coil_laminar_Schmidt_1967(250.0, 0.2), 6)
    0.474607

    References
    ----------
    Schmidt, E. F. "Wärmeübergang und Druckverlust in Rohrschlangen". Chem. Ing. Tech. 39, 781-789
    (1967), doi:10.1002/cite.330391302. VDI Heat Atlas, 2nd ed., Springer 2010, chapter Gc.
    """
    f: float = 64.0 / Re * (1.0 + 0.14 * r ** 0.97 * Re ** (1.0 - 0.644 * r ** 0.312))
    return f


def friction_factor_coil_turbulent_Schmidt_1967(Re: float, r: float, relative_roughness: float = 0.0) -> float:
    """Darcy friction factor of turbulent flow in a helical coil, Schmidt (1967).

    Re < 2.2e4:        f = f_s [1 + 2.88e4/Re r^0.62]
    2.2e4 < Re < 1.5e5: f = f_s [1 + 0.0823 (1 + r) r^0.53 Re^0.25],  f_s Colebrook's straight-pipe value

    Parameters
    ----------
    Re : float
        Reynolds number on the channel diameter, [-]
    r : float
        Channel diameter over the coil's curvature diameter, [-]
    relative_roughness : float
        Roughness over channel diameter, [-]

    Returns
    -------
    f : float
        Darcy friction factor, [-]

    Notes
    -----
    Re_crit < Re < 1.5e5. At Re = 2.2e4 the second branch is 1-3 % above the first (for r from
    0.01 to 0.2), so the pressure drop still rises with the flow across the switch.

    Examples
    --------
    >>> round(friction_factor_coil_turbulent_Schmidt_1967(1e4, 0.5), 6)
    0.088756

    References
    ----------
    Schmidt, E. F. Chem. Ing. Tech. 39, 781-789 (1967), doi:10.1002/cite.330391302.
    """
    straight = friction_factor_Colebrook_1939(Re, relative_roughness)
    if Re < 2.2e4:
        factor: float = 1.0 + 2.88e4 / Re * r ** 0.62
    else:
        factor = 1.0 + 0.0823 * (1.0 + r) * r ** 0.53 * Re ** 0.25
    return straight * factor


def coil_critical_reynolds_Schmidt_1967(r: float) -> float:
    """Laminar-turbulent transition inside a helical coil, Schmidt (1967): Re_crit = 2300 (1 + 8.6 r^0.45).

    Parameters
    ----------
    r : float
        Tube inside diameter over curvature diameter, [-]

    Returns
    -------
    Re_crit : float
        Critical Reynolds number, [-]

    Examples
    --------
    >>> round(coil_critical_reynolds_Schmidt_1967(0.05))
    7438

    References
    ----------
    Schmidt, E. F. Chem. Ing. Tech. 39, 781-789 (1967), doi:10.1002/cite.330391302.
    """
    Re_crit: float = 2300.0 * (1 + 8.6 * r ** 0.45)
    return Re_crit


def _blend(Re: float, low: float, high: float, laminar: float, turbulent: float) -> float:
    weight = min(max((Re - low) / (high - low), 0.0), 1.0)
    return (1.0 - weight) * laminar + weight * turbulent


@dataclass(frozen=True)
class Friction:
    """A friction factor with the regime and the correlation behind it."""

    factor: float  # Darcy, -
    regime: str  # laminar | transitional | turbulent
    correlation: str  # registry key


def _over_regimes(Re: float, low: float, high: float, laminar: float, turbulent: Callable[[], float],
                  laminar_key: str, turbulent_key: str) -> Friction:
    """Laminar up to ``low``, turbulent from ``high``, the linear blend in Re between (no jump at either end);
    the turbulent factor is only evaluated above ``low``."""
    if Re <= low:
        return Friction(laminar, "laminar", laminar_key)
    f_turbulent = turbulent()
    if Re >= high:
        return Friction(f_turbulent, "turbulent", turbulent_key)
    return Friction(_blend(Re, low, high, laminar, f_turbulent), "transitional", turbulent_key)


def friction_straight(Re: float, relative_roughness: float = 0.0) -> Friction:
    """Darcy friction factor of a straight channel over every regime (no jump at the switch points).

    >>> friction_straight(1000.0).factor, friction_straight(1e5).regime
    (0.064, 'turbulent')
    """
    return _over_regimes(Re, LAMINAR_LIMIT, TURBULENT_LIMIT, friction_factor_laminar(Re),
                         lambda: friction_factor_Colebrook_1939(Re, relative_roughness), "hagen_poiseuille",
                         "colebrook_1939")


def friction_coiled(Re: float, r: float, relative_roughness: float = 0.0) -> Friction:
    """Darcy friction factor of a coiled channel over every regime (no jump at the switch points).

    ``r`` is the channel diameter over the curvature diameter.

    >>> friction_coiled(1000.0, 0.05).regime, friction_coiled(1e5, 0.05).regime
    ('laminar', 'turbulent')
    """
    low = coil_critical_reynolds_Schmidt_1967(r)
    return _over_regimes(Re, low, TRANSITION_RATIO * low, friction_factor_coil_laminar_Schmidt_1967(Re, r),
                         lambda: friction_factor_coil_turbulent_Schmidt_1967(Re, r, relative_roughness),
                         "schmidt_1967_laminar", "schmidt_1967_turbulent")


CORRELATIONS: dict[str, Correlation] = {
    "hagen_poiseuille": Correlation(
        "Hagen-Poiseuille", friction_factor_laminar, "Hagen, Ann. Phys. 46, 423 (1839); Poiseuille (1840)",
        {"Re": (None, LAMINAR_LIMIT)}),
    "colebrook_1939": Correlation(
        "Colebrook (1939)", friction_factor_Colebrook_1939,
        "Colebrook, J. Inst. Civ. Eng. 11, 133 (1939); exact solution: Keady, J. Hydraul. Eng. 124, 96 (1998)",
        {"Re": (LAMINAR_LIMIT, 1e8), "e/D": (0.0, 0.05)}),
    "schmidt_1967_laminar": Correlation(
        "Schmidt (1967), coil, laminar", friction_factor_coil_laminar_Schmidt_1967,
        "Schmidt, Chem. Ing. Tech. 39, 781 (1967); VDI Heat Atlas, 2nd ed., Springer 2010, Gc",
        {"Re": (100.0, None)}),
    "schmidt_1967_turbulent": Correlation(
        "Schmidt (1967), coil, turbulent", friction_factor_coil_turbulent_Schmidt_1967,
        "Schmidt, Chem. Ing. Tech. 39, 781 (1967); VDI Heat Atlas, 2nd ed., Springer 2010, Gc",
        {"Re": (None, 1.5e5)}),
}


@dataclass(frozen=True)
class LossCoefficient:
    """A fitting's resistance coefficient K: pressure loss K rho v^2 / 2 on the named velocity."""

    name: str
    K: float
    source: str


PERRY = ("Perry's Chemical Engineers' Handbook, 7th ed., Table 6-4 (after Hooper 1981 and Crane TP-410), "
         "from memory")
#: Fitting losses used on the coolant paths (turbulent values).
LOSS_COEFFICIENTS: dict[str, LossCoefficient] = {
    "entrance_sharp": LossCoefficient("sharp-edged entrance from a large space", 0.5, PERRY),
    "exit": LossCoefficient("exit into a large space (velocity head lost, Borda-Carnot)", 1.0, PERRY),
    "elbow_90": LossCoefficient("90 degree standard elbow", 0.75, PERRY),
    "return_bend_180": LossCoefficient("180 degree close return bend", 1.5, PERRY),
}
