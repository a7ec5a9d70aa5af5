"""Coolant-side film coefficients in curved channels: inside helical coils (tube side), and the
half-pipe and spiral-baffle jacket channels when treated as curved (``channel="curved"``).

Laminar below Schmidt's critical Reynolds number, fully turbulent above Re = 2.2e4 (Schmidt 1967, or
Mori & Nakayama 1967), and in between the linear interpolation of Gnielinski's method for helically
coiled tubes (VDI Heat Atlas, chapter Gc; from memory): Schmidt's own transitional formula starts
30-50 % above his laminar one at Re_crit, a jump this rule avoids. Each correlation is registered with
its source and validity range in :data:`CORRELATIONS`. The result is the jackets'
:class:`calc.films.jacket_side.CoolantFilm`.
"""
from __future__ import annotations

import math

from typing import Callable, NamedTuple

import numpy as np

from calc import arrays
from calc.films.jacket_side import (VDI_HEAT_ATLAS, CoolantFilm, FilmFormula, channel_reynolds, flow_warnings,
                                    require_coolant_flow, wall_corrected)
from calc.properties import LiquidProperties
from calc.hydraulics.friction import coil_critical_reynolds_Schmidt_1967
from calc.validity import Correlation, InputError, Warnings, require_positive


def Nu_coil_laminar_Schmidt_1967(Re: float, Pr: float, r: float) -> float:
    """Laminar flow inside a helical coil, Schmidt (1967), as given in the VDI Heat Atlas.

    Nu = 3.66 + 0.08 [1 + 0.8 r^0.9] Re^m Pr^(1/3),  m = 0.5 + 0.2903 r^0.194,  r = d/D_c

    Parameters
    ----------
    Re : float
        Reynolds number on the tube inside diameter, [-]
    Pr : float
        Prandtl number, [-]
    r : float
        Tube inside diameter over curvature diameter of the coil, [-]

    Returns
    -------
    Nu : float
        Nusselt number on the tube inside diameter, [-]

    Notes
    -----
    100 < Re < Re_crit = 2300 (1 + 8.6 r^0.45) (VDI Heat Atlas, Gc; ranges from memory).

    Examples
    --------
    >>> round(Nu_coil_laminar_Schmidt_1967(1000.0, 5.0, 0.05), 3)
    17.654

    References
    ----------
    Schmidt, E. F. "Wärmeübergang und Druckverlust in Rohrschlangen". Chem. Ing. Tech. 39, 781-789 (1967),
    doi:10.1002/cite.330391302. VDI Heat Atlas, chapter Gc (helically coiled tubes; Gnielinski).
    """
    m = 0.5 + 0.2903 * r ** 0.194
    Nu: float = 3.66 + 0.08 * (1 + 0.8 * r ** 0.9) * Re ** m * Pr ** (1 / 3)
    return Nu


def Nu_coil_turbulent_Schmidt_1967(Re: float, Pr: float, r: float) -> float:
    """Turbulent flow inside a helical coil, Schmidt (1967).

    Re_crit < Re < 2.2e4: Nu = 0.023 [1 + 14.8 (1 + r) r^(1/3)] Re^(0.8 - 0.22 r^0.1) Pr^(1/3)
    2.2e4 < Re < 1.5e5:   Nu = 0.023 [1 + 3.6 (1 - r) r^0.8] Re^0.8 Pr^(1/3)

    Parameters
    ----------
    Re : float
        Reynolds number on the tube inside diameter, [-]
    Pr : float
        Prandtl number, [-]
    r : float
        Tube inside diameter over curvature diameter of the coil, [-]

    Returns
    -------
    Nu : float
        Nusselt number on the tube inside diameter, [-]

    Notes
    -----
    Re_crit = 2300 (1 + 8.6 r^0.45) < Re < 1.5e5.

    Examples
    --------
    >>> round(Nu_coil_turbulent_Schmidt_1967(2e5, 0.7, 0.05), 1)
    466.3

    References
    ----------
    Schmidt, E. F. Chem. Ing. Tech. 39, 781-789 (1967), doi:10.1002/cite.330391302.
    """
    return arrays.where(Re < 2.2e4,  # the second range from 2.2e4 on (meets the transition)

                        0.023 * (1 + 14.8 * (1 + r) * r ** (1 / 3)) * Re ** (0.8 - 0.22 * r ** 0.1) * Pr ** (1 / 3),
                        0.023 * (1 + 3.6 * (1 - r) * r ** 0.8) * Re ** 0.8 * Pr ** (1 / 3))


def Nu_coil_turbulent_Mori_Nakayama_1967(Re: float, Pr: float, r: float) -> float:
    """Turbulent flow inside a helical coil, Mori & Nakayama (1967).

    Pr >= 1: Nu = Pr^0.4/41 Re^(5/6) r^(1/12) [1 + 0.061/(Re r^2.5)^(1/6)]
    Pr < 1:  Nu = Pr/[26.2 (Pr^(2/3) - 0.074)] Re^0.8 r^0.1 [1 + 0.098/(Re r^2)^0.2]

    Parameters
    ----------
    Re : float
        Reynolds number on the tube inside diameter, [-]
    Pr : float
        Prandtl number, [-]
    r : float
        Tube inside diameter over curvature diameter of the coil, [-]

    Returns
    -------
    Nu : float
        Nusselt number on the tube inside diameter, [-]

    Notes
    -----
    Re r^2 > 0.1 (El-Genk & Schriener 2016 review, as quoted in ht).

    Examples
    --------
    >>> round(Nu_coil_turbulent_Mori_Nakayama_1967(2e5, 0.7, 0.05), 1)
    496.3

    References
    ----------
    Mori, Y.; Nakayama, W. "Study on Forced Convective Heat Transfer in Curved Pipes". Int. J. Heat Mass
    Transfer 10, 681-695 (1967), doi:10.1016/0017-9310(67)90113-5.
    """
    return arrays.where(Pr < 1,
                        Pr / (26.2 * (Pr ** (2 / 3) - 0.074)) * Re ** 0.8 * r ** 0.1 * (1 + 0.098 * (Re * r * r) ** -0.2),
                        Pr ** 0.4 / 41 * Re ** (5 / 6) * r ** (1 / 12) * (1 + 0.061 / (Re * r ** 2.5) ** (1 / 6)))




#: Fully turbulent flow in a helical coil above this Reynolds number (Schmidt 1967; VDI Heat Atlas Gc).
COIL_TURBULENT_REYNOLDS = 2.2e4


def Nu_coil_transition_Gnielinski_1986(Re: float, Pr: float, r: float,
                                       turbulent: Callable[[float, float, float], float]
                                       = Nu_coil_turbulent_Schmidt_1967) -> float:
    """Transitional flow in a helical coil: linear interpolation in Re, Gnielinski's rule for coiled tubes.

    Nu = g Nu_lam(Re_crit) + (1 - g) Nu_turb(2.2e4),  g = (2.2e4 - Re)/(2.2e4 - Re_crit),
    Re_crit = 2300 (1 + 8.6 r^0.45); Nu_lam is Schmidt's laminar form, Nu_turb the chosen turbulent one.

    Parameters
    ----------
    Re : float
        Reynolds number on the tube inside (or channel equivalent) diameter, [-]
    Pr : float
        Prandtl number, [-]
    r : float
        Diameter over curvature diameter, [-]
    turbulent : callable
        Turbulent correlation Nu(Re, Pr, r), [-]

    Returns
    -------
    Nu : float
        Nusselt number, [-]

    Notes
    -----
    Re_crit <= Re <= 2.2e4. Continuous with both neighbours by construction.

    Examples
    --------
    >>> Re_crit = coil_critical_reynolds_Schmidt_1967(0.05)
    >>> Nu_coil_transition_Gnielinski_1986(Re_crit, 5.0, 0.05) == Nu_coil_laminar_Schmidt_1967(Re_crit, 5.0, 0.05)
    True

    References
    ----------
    Gnielinski, V. "Heat transfer and pressure drop in helically coiled tubes". Proc. 8th Int. Heat
    Transfer Conf., San Francisco, vol. 6, 2847-2854 (1986) (from memory); VDI Heat Atlas, 2nd ed., Springer
    2010, chapter Gc.
    """
    Re_crit = coil_critical_reynolds_Schmidt_1967(r)
    weight = arrays.clip((COIL_TURBULENT_REYNOLDS - Re) / (COIL_TURBULENT_REYNOLDS - Re_crit), 0.0, 1.0)
    Nu: float = (weight * Nu_coil_laminar_Schmidt_1967(Re_crit, Pr, r)
                 + (1.0 - weight) * turbulent(COIL_TURBULENT_REYNOLDS, Pr, r))
    return Nu


CORRELATIONS: dict[str, Correlation] = {
    "gnielinski_coil_transition": Correlation(
        "Gnielinski (1986), coiled-tube transition interpolation", Nu_coil_transition_Gnielinski_1986,
        "Gnielinski, 8th Int. Heat Transfer Conf. (1986), as in the " + VDI_HEAT_ATLAS + ", chapter Gc (from memory)",
        {"Re": (None, 2.2e4)}),
    "schmidt_1967_laminar": Correlation(
        "Schmidt (1967), laminar", Nu_coil_laminar_Schmidt_1967,
        "Schmidt, Chem. Ing. Tech. 39, 781 (1967); " + VDI_HEAT_ATLAS, {"Re": (100.0, None)}),
    "schmidt_1967": Correlation(
        "Schmidt (1967)", Nu_coil_turbulent_Schmidt_1967,
        "Schmidt, Chem. Ing. Tech. 39, 781 (1967)", {"Re": (None, 1.5e5)}),
    "mori_nakayama_1967": Correlation(
        "Mori & Nakayama (1967)", Nu_coil_turbulent_Mori_Nakayama_1967,
        "Mori & Nakayama, Int. J. Heat Mass Transfer 10, 681 (1967)", {"Re r^2": (0.1, None)}),
}
#: Options of the coil's turbulent correlation.
COIL_CORRELATIONS = ("schmidt_1967", "mori_nakayama_1967")


def _check_correlation(correlation: str) -> None:
    if correlation not in COIL_CORRELATIONS:
        raise InputError("correlations.coil_tube", f"unknown option {correlation!r}; known: "
                                                   f"{', '.join(COIL_CORRELATIONS)}")


def service_film_coil(tube_inner_diameter: float, helix_diameter: float, coolant_props: LiquidProperties,
                      mass_flow: float, mu_wall: float, pitch: float | None = None, parallel_tubes: int = 1,
                      correlation: str = "schmidt_1967") -> CoolantFilm:
    """Coolant film coefficient inside a helical coil, on the tube inside area.

    Laminar below Re_crit (Schmidt 1967, VDI form), turbulent above 2.2e4 (``correlation``), interpolated
    between (:func:`Nu_coil_transition_Gnielinski_1986`); all times
    (mu/mu_w)^0.14 (Sieder & Tate's viscosity correction, common practice). With a pitch, the curvature
    diameter is D_c [1 + (p/(pi D_c))^2] (VDI Heat Atlas, Gc).

    Parameters
    ----------
    tube_inner_diameter : float
        Inside diameter of the coil tube, [m]
    helix_diameter : float
        Centre-line diameter of the helix, [m]
    coolant_props : LiquidProperties
        Coolant properties at its mean temperature, [-]
    mass_flow : float
        Total coolant flow, split over ``parallel_tubes``, [kg/s]
    mu_wall : float
        Coolant viscosity at the wall temperature, [Pa s]
    pitch : float, optional
        Axial pitch of the turns, [m]
    parallel_tubes : int
        Number of coils fed in parallel, [-]
    correlation : str
        Turbulent correlation, one of COIL_CORRELATIONS, [-]

    Returns
    -------
    CoolantFilm

    Examples
    --------
    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(293.15, 998.2, 4184.0, 1.0016e-3, 0.5984)
    >>> r = service_film_coil(0.05, 1.0, water, 2.0, 1.0016e-3)
    >>> r.regime, round(r.reynolds)
    ('turbulent', 50848)
    """
    require_coolant_flow(mass_flow, mu_wall)
    formula = coil_film_formula(tube_inner_diameter, helix_diameter, pitch, parallel_tubes, correlation)
    return formula.film(coolant_props, mass_flow, mu_wall, None, Warnings())


class _CoilFlow(NamedTuple):
    h: float
    reynolds: float
    velocity: float
    nusselt: float
    critical_reynolds: float


def coil_flow(props: LiquidProperties, mass_flow: float, mu_wall: float, rho_wall: float | None, d: float,
              D_c: float, correlation: str, area: float | None = None, beta: float | None = None,
              dT: float | None = None, warnings: Warnings | None = None) -> _CoilFlow:
    """Film in a coil tube or curved channel at a coolant state (floats or arrays): Schmidt laminar below
    Re_crit, Gnielinski's interpolation to 2.2e4, the turbulent ``correlation`` above; times (mu/mu_w)^0.14.
    ``d`` is the (equivalent) diameter, ``area`` the flow area (default the tube's pi d^2/4)."""
    area = math.pi / 4 * d * d if area is None else area
    velocity, Re = channel_reynolds(props, mass_flow, area, d)
    Pr = props.prandtl
    r = d / D_c
    Re_crit = coil_critical_reynolds_Schmidt_1967(r)
    turbulent = CORRELATIONS[correlation].function
    # only the regimes present are evaluated (the same numbers as evaluating all three and choosing)
    if not arrays.is_array(Re, Pr, r):
        Nu = (Nu_coil_laminar_Schmidt_1967(Re, Pr, r) if Re < Re_crit else
              Nu_coil_transition_Gnielinski_1986(Re, Pr, r, turbulent) if Re < COIL_TURBULENT_REYNOLDS else
              turbulent(Re, Pr, r))
    elif np.all(Re >= COIL_TURBULENT_REYNOLDS):
        Nu = turbulent(Re, Pr, r)
    else:
        Nu = arrays.where(Re < Re_crit, Nu_coil_laminar_Schmidt_1967(Re, Pr, r),
                          arrays.where(Re < COIL_TURBULENT_REYNOLDS,
                                       Nu_coil_transition_Gnielinski_1986(Re, Pr, r, turbulent), turbulent(Re, Pr, r)))
    h, Nu = wall_corrected(Nu, props, mu_wall, d)
    return _CoilFlow(h, Re, velocity, Nu, Re_crit)


def _describer(d: float, D_c: float, correlation: str) -> Callable[[LiquidProperties, _CoilFlow, Warnings],
                                                                    CoolantFilm]:
    def describe(props: LiquidProperties, flow: _CoilFlow, warnings: Warnings) -> CoolantFilm:
        Re, r = flow.reynolds, d / D_c
        key = ("schmidt_1967_laminar" if Re < flow.critical_reynolds else
               "gnielinski_coil_transition" if Re < COIL_TURBULENT_REYNOLDS else correlation)
        entry = CORRELATIONS[key]
        entry.check(warnings, Re=Re, **{"Re r^2": Re * r * r})
        regime = flow_warnings(warnings, Re, flow.velocity, flow.critical_reynolds, entry.name)
        if regime != "laminar":
            regime = "turbulent" if Re >= COIL_TURBULENT_REYNOLDS else "transitional"
        return CoolantFilm(flow.h, Re, flow.velocity, entry.name, flow.nusselt, props.prandtl, d, regime, warnings)
    return describe


def curved_formula(d_e: float, d_curve: float, area: float, share: float, correlation: str) -> FilmFormula:
    """A curved jacket channel (half pipe, spiral baffle) treated as a coil tube of diameter De, curvature De/D_c."""
    _check_correlation(correlation)
    return FilmFormula(coil_flow, {"d": d_e, "D_c": d_curve, "correlation": correlation, "area": area}, share,
                       _describer(d_e, d_curve, correlation))


def coil_film_formula(tube_inner_diameter: float, helix_diameter: float, pitch: float | None = None,
                      parallel_tubes: int = 1, correlation: str = "schmidt_1967") -> FilmFormula:
    """The coil's coolant film as a :class:`~calc.films.jacket_side.FilmFormula` (geometry checked once)."""
    _check_correlation(correlation)
    d = require_positive("vessel.coils.tube_wall", tube_inner_diameter)  # the bore left by the wall
    D_c = require_positive("vessel.coils.helix_diameter", helix_diameter)
    if D_c <= d:
        raise InputError("vessel.coils.helix_diameter", "must exceed the tube diameter")
    if not (isinstance(parallel_tubes, int) and parallel_tubes >= 1):
        raise InputError("vessel.coils.parallel_tubes", f"must be a whole number >= 1, got {parallel_tubes!r}")
    if pitch is not None:
        D_c *= 1 + (require_positive("vessel.coils.pitch", pitch) / (math.pi * D_c)) ** 2

    return FilmFormula(coil_flow, {"d": d, "D_c": D_c, "correlation": correlation, "area": math.pi / 4 * d * d},
                       1.0 / parallel_tubes, _describer(d, D_c, correlation))
