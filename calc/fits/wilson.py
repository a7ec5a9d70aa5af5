"""Wilson plot: a vessel's own process-side constant and its remaining resistance from runs at several speeds.

Between runs that differ only in agitator speed, every resistance but the process film stays put
(wall, fouling, coolant film at the same coolant flow and temperature), while the process film follows
Nu = h T/k = a Re^b Pr^c (mu/mu_w)^d. So

    1/U = R_rem + (T / (a k Pr^c Vi^d)) Re^-b,

a straight line in x = Re^-b: its intercept is the remaining resistance R_rem (wall + fouling + service
film, on the process-side area) and its slope m gives a = T / (k Pr^c Vi^d m) (Wilson, 1915). The line
is fitted by ordinary least squares (``scipy.stats.linregress``); the 95 % intervals are
estimate +- t(0.975, n - 2) standard error for the intercept and the slope, and a's interval follows from
the slope's (a is monotonic in m). b is taken from the correlation form (2/3 by default), as in Wilson's
method, where the velocity exponent is assumed.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from scipy import stats

from calc.validity import CalcWarning, InputError, Warnings

#: Fewest runs (speeds) of a Wilson plot: two parameters and an estimate of the scatter.
MIN_RUNS = 3


@dataclass(frozen=True)
class WilsonPlot:
    """The fitted line and what it says about the vessel."""

    process_constant: float  # a
    process_constant_interval: tuple[float, float]
    remaining_resistance: float  # m2 K/W, on the process-side area
    remaining_resistance_interval: tuple[float, float]
    slope: float  # m2 K/W
    slope_interval: tuple[float, float]
    exponent: float  # b
    prandtl_exponent: float  # c
    reynolds: np.ndarray
    x: np.ndarray  # Re^-b
    inverse_u: np.ndarray  # 1/U, m2 K/W
    fitted_inverse_u: np.ndarray
    r_squared: float
    warnings: Warnings = field(default_factory=Warnings)


def wilson_plot(reynolds: npt.ArrayLike, overall_coefficients: npt.ArrayLike, tank_diameter: float,
                conductivity: float, prandtl: float,
                exponent: float = 2.0 / 3.0, prandtl_exponent: float = 1.0 / 3.0,
                viscosity_ratio: float = 1.0, viscosity_exponent: float = 0.14) -> WilsonPlot:
    """Fit 1/U = R_rem + m Re^-b over runs at several speeds (Wilson 1915); a = T/(k Pr^c Vi^d m).

    Parameters
    ----------
    reynolds : sequence
        Impeller Reynolds number of each run, [-]
    overall_coefficients : sequence
        Measured U of each run on the process-side area, [W/(m2 K)]
    tank_diameter : float
        Inside diameter T, [m]
    conductivity, prandtl : float
        Contents' conductivity [W/(m K)] and Prandtl number [-] (at the runs' mean temperature)
    exponent, prandtl_exponent : float
        b and c of the correlation form, [-]
    viscosity_ratio, viscosity_exponent : float
        mu/mu_w during the runs and its exponent d, [-]

    Examples
    --------
    Runs made from a = 0.5 and R_rem = 1e-3 m2 K/W (T = 2 m, k = 0.6, Pr = 6) are recovered exactly:

    >>> Re = np.array([1e4, 3e4, 1e5, 3e5])
    >>> U = 1 / (1e-3 + 2 / (0.5 * 0.6 * 6 ** (1 / 3) * Re ** (2 / 3)))
    >>> fit = wilson_plot(Re, U, 2.0, 0.6, 6.0)
    >>> round(fit.process_constant, 6), round(fit.remaining_resistance * 1e3, 6)
    (0.5, 1.0)

    References
    ----------
    Wilson, E. E. "A basis for rational design of heat transfer apparatus". Trans. ASME 37, 47-82 (1915).
    """
    Re = np.asarray(reynolds, dtype=float)
    U = np.asarray(overall_coefficients, dtype=float)
    if Re.shape != U.shape or Re.ndim != 1:
        raise InputError("runs", "every run needs its speed and its overall coefficient (or series)")
    if len(Re) < MIN_RUNS:
        raise InputError("runs", f"a Wilson plot needs at least {MIN_RUNS} runs at different speeds, got {len(Re)}")
    if not (np.all(np.isfinite(U)) and np.all(U > 0)):
        raise InputError("runs", "every overall coefficient must be a positive number")
    if np.ptp(np.log(Re)) < math.log(1.5):
        raise InputError("runs", "the runs' Reynolds numbers span less than a factor 1.5: the slope (the process "
                                 "film) cannot be told from the scatter; vary the speed more")
    warnings = Warnings()
    x, y = Re ** -exponent, 1.0 / U
    line = stats.linregress(x, y)
    dof = len(x) - 2
    if dof < 1:  # pragma: no cover - MIN_RUNS guards it
        raise InputError("runs", "too few runs")
    t = float(stats.t.ppf(0.975, dof)) if dof > 0 else math.inf
    slope, intercept = float(line.slope), float(line.intercept)
    slope_half, intercept_half = t * float(line.stderr), t * float(line.intercept_stderr)
    if slope <= 0:
        raise InputError("runs", "1/U does not fall as the speed rises: the runs cannot separate the process film "
                                 "(check that only the speed changed between them)")
    group = conductivity * prandtl ** prandtl_exponent * viscosity_ratio ** viscosity_exponent / tank_diameter

    def constant(m: float) -> float:
        return 1.0 / (group * m) if m > 0 else math.inf

    slope_low, slope_high = slope - slope_half, slope + slope_half
    if slope_low <= 0:
        warnings.add(CalcWarning("wilson_slope_uncertain",
                                 "the slope's 95 % interval reaches zero: the process constant's upper bound is "
                                 "unbounded; add runs over a wider speed range"))
    if intercept < 0:
        warnings.add(CalcWarning("wilson_negative_intercept",
                                 f"the intercept (remaining resistance) is negative ({intercept:.3g} m2 K/W): the runs "
                                 "do not follow the assumed exponent b, or other conditions changed between them"))
    fitted = intercept + slope * x
    return WilsonPlot(constant(slope), (constant(slope_high), constant(slope_low)), intercept,
                      (intercept - intercept_half, intercept + intercept_half), slope, (slope_low, slope_high),
                      exponent, prandtl_exponent, Re, x, y, fitted, float(line.rvalue ** 2), warnings)
