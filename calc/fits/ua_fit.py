"""UA of a vessel from a logged heat-up or cool-down (a water or solvent run through the jacket).

The contents (mass M, heat capacity c_p, well mixed) exchange heat with a single-pass coolant:

    M c_p dT/dt = -UA_eff (T - T_in(t)) + P_shaft - Q_loss,
    UA_eff = m_c c_c [1 - exp(-UA / (m_c c_c))]   (coolant flow known; the same single-pass balance as
                                                   calc.network.coolant_balance)
    UA_eff = UA                                   (coolant flow not known: UA is then effective, the
                                                   coolant's warming along the jacket included)

and, when the coolant outlet is logged with the flow known, the coolant-side balance of the same UA,

    T_out = T - (T - T_in) exp(-UA / (m_c c_c)).

UA and the initial contents temperature T_0 are found by nonlinear least squares (``scipy.optimize.
least_squares``) on the temperature residuals of both balances. The energy balance is solved exactly
with the inlet temperature linear between logged points (the closed form of a linear first-order ODE
on each step): smooth in UA, so the least-squares Jacobian is clean, where an adaptive integrator's
step control would add noise; the tests check it against ``scipy.integrate.solve_ivp`` (Radau). The 95 %
interval is UA +- t(0.975, n - p) s sqrt[(J^T J)^-1]_UA, with s^2 the residual variance (the usual
linearised interval of nonlinear regression; Bates & Watts, Nonlinear Regression Analysis and Its
Applications, Wiley 1988). The time constant is M c_p / UA_eff. Shaft work and heat losses enter as
given constants.

A series that cannot determine UA is refused with an :class:`InputError` saying why: too short, a clock
that does not increase, no driving force, no temperature change, coolant on the wrong side.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from scipy import stats
from scipy.optimize import least_squares

from calc.validity import CalcWarning, InputError, Warnings

#: Fewest points a series may have (two parameters, and enough left to estimate the scatter).
MIN_POINTS = 6
#: Smallest driving force, K: below it the exchanged heat is lost in the sensors' noise (common practice).
MIN_DRIVING_FORCE = 1.0
#: Smallest change of the contents' temperature over the series, K.
MIN_CHANGE = 0.5
MODES = ("cooling", "heating")
#: Logged temperatures beyond this are not a liquid run (and would overflow the fit), K.
MAX_TEMPERATURE = 5000.0
#: Longest clock reading, s.
MAX_DURATION = 1.0e9


@dataclass(frozen=True)
class Series:
    """A logged run, SI: time s, temperatures K; ``outlet`` may be None."""

    time: np.ndarray
    contents: np.ndarray
    inlet: np.ndarray
    outlet: np.ndarray | None = None


@dataclass(frozen=True)
class UAFit:
    """The fitted UA with its interval, residuals and what the fit rests on."""

    ua: float  # W/K
    ua_interval: tuple[float, float]  # W/K, 95 %
    standard_error: float  # W/K
    initial_temperature: float  # K, fitted
    time_constant: float  # s, M c_p / UA_eff
    time: np.ndarray  # s, the logged clock
    contents: np.ndarray  # K, logged contents temperature
    fitted: np.ndarray  # K, contents temperature of the fit at the logged times
    residuals: np.ndarray  # K, contents (measured - fitted)
    outlet_residuals: np.ndarray | None  # K, coolant outlet
    rms: float  # K
    points: int
    degrees_of_freedom: int
    uses_coolant_balance: bool
    effective: bool  # True when the coolant flow was not given (UA includes the coolant's warming)
    warnings: Warnings = field(default_factory=Warnings)


def _array(name: str, values: npt.ArrayLike) -> np.ndarray:
    try:
        array = np.asarray(values, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"series.{name}", "must be a list of numbers") from None
    if array.ndim != 1:
        raise InputError(f"series.{name}", "must be a list of numbers")
    if not np.all(np.isfinite(array)):
        raise InputError(f"series.{name}", "holds a value that is not a finite number")
    return array


def check_series(series: Series, mode: str) -> None:
    """Refuse a series that cannot determine UA, saying why (InputError on the field at fault)."""
    t, T, T_in = series.time, series.contents, series.inlet
    n = len(t)
    others = [("contents_temperature", T), ("coolant_inlet_temperature", T_in)]
    if series.outlet is not None:
        others.append(("coolant_outlet_temperature", series.outlet))
    for name, array in others:
        if len(array) != n:
            raise InputError(f"series.{name}", f"has {len(array)} values but series.time has {n}: every "
                                               "series needs one value per time")
    for name, array in others:
        if np.any(array <= 0.0) or np.any(array > MAX_TEMPERATURE):
            raise InputError(f"series.{name}", f"every logged temperature must lie between absolute zero and "
                                               f"{MAX_TEMPERATURE:g} K")
    if n < MIN_POINTS:
        raise InputError("series.time", f"too short: {n} points; at least {MIN_POINTS} are needed to fit UA and "
                                        "the starting temperature and still estimate the scatter")
    steps = np.diff(t)
    if not (abs(t[0]) <= MAX_DURATION and abs(t[-1]) <= MAX_DURATION):
        raise InputError("series.time", f"the clock must stay within {MAX_DURATION:g} s (about 30 years)")
    if np.any(steps <= 0):
        where = int(np.argmax(steps <= 0)) + 1
        raise InputError("series.time", f"the clock must increase strictly: value {where} ({t[where]:g} s) does "
                                        f"not come after value {where - 1} ({t[where - 1]:g} s)")
    if mode not in MODES:
        raise InputError("mode", f"unknown mode {mode!r}; known: {', '.join(MODES)}")
    sign = 1.0 if mode == "cooling" else -1.0
    difference = sign * (T - T_in)
    if np.max(difference) < MIN_DRIVING_FORCE and np.max(-difference) >= MIN_DRIVING_FORCE:
        other = "heating" if mode == "cooling" else "cooling"
        raise InputError("mode", f"the coolant is on the wrong side of the contents for {mode} throughout: is this "
                                 f"a {other} run? Check the mode and the columns")
    if np.max(difference) < MIN_DRIVING_FORCE:
        side = "colder" if mode == "cooling" else "warmer"
        raise InputError("series.coolant_inlet_temperature",
                         f"no driving force: the coolant is never more than {MIN_DRIVING_FORCE:g} K {side} than the "
                         f"contents, so no heat flows that the log could measure (mode {mode})")
    if np.mean(difference) < 0:
        raise InputError("mode", f"the coolant is mostly on the wrong side of the contents for {mode}: check the "
                                 "mode and the columns")
    if np.ptp(T) < MIN_CHANGE:
        raise InputError("series.contents_temperature",
                         f"the contents change by only {np.ptp(T):.3g} K over the log: UA cannot be told from the "
                         f"sensors' noise (at least {MIN_CHANGE:g} K needed; log longer or with a larger driving force)")


def fit_ua(time: npt.ArrayLike, contents: npt.ArrayLike, inlet: npt.ArrayLike, mass: float, heat_capacity: float,
           mode: str = "cooling", outlet: npt.ArrayLike | None = None,
           coolant_flow: float | None = None, coolant_heat_capacity: float | None = None,
           shaft_power: float = 0.0, heat_loss: float = 0.0) -> UAFit:
    """Least-squares UA [W/K] of a logged run (see the module notes for the model and the interval).

    Parameters
    ----------
    time, contents, inlet : sequences
        Clock [s], contents temperature [K], coolant inlet temperature [K]
    mass, heat_capacity : float
        Charge mass [kg] and heat capacity [J/(kg K)]
    mode : str
        ``cooling`` or ``heating``, [-]
    outlet : sequence, optional
        Coolant outlet temperature [K]; used with the coolant flow
    coolant_flow, coolant_heat_capacity : float, optional
        Coolant mass flow [kg/s] and heat capacity [J/(kg K)]
    shaft_power, heat_loss : float
        Agitator power into the contents and heat lost to the surroundings, constant [W]

    Returns
    -------
    UAFit

    Examples
    --------
    A closed-form cool-down, T = T_in + 40 exp(-t UA / (M c_p)), UA = 500 W/K, M c_p = 4.18e6 J/K:

    >>> t = np.linspace(0.0, 7200.0, 25)
    >>> T = 293.15 + 40.0 * np.exp(-t * 500.0 / 4.18e6)
    >>> round(fit_ua(t, T, np.full(25, 293.15), 1000.0, 4180.0).ua, 3)
    500.0
    """
    series = Series(_array("time", time), _array("contents_temperature", contents),
                    _array("coolant_inlet_temperature", inlet),
                    None if outlet is None else _array("coolant_outlet_temperature", outlet))
    check_series(series, mode)
    for name, value in (("charge.mass", mass), ("charge.heat_capacity", heat_capacity)):
        if not (math.isfinite(value) and value > 0):
            raise InputError(name, f"must be a positive number, got {value!r}")
    warnings = Warnings()
    rate = None
    if coolant_flow is not None:
        if coolant_heat_capacity is None or not coolant_heat_capacity > 0 or not coolant_flow > 0:
            raise InputError("coolant.flow", "a coolant flow needs the coolant's heat capacity (give its fluid)")
        rate = coolant_flow * coolant_heat_capacity
    uses_outlet = series.outlet is not None and rate is not None
    if series.outlet is not None and rate is None:
        warnings.add(CalcWarning("outlet_unused", "the coolant outlet is logged but the coolant flow is not given: "
                                                  "the coolant-side balance cannot be used"))
    if rate is None:
        warnings.add(CalcWarning("effective_ua", "no coolant flow given: the fitted UA is effective (it includes "
                                                 "the coolant's warming along the jacket), valid at this flow only"))
    t, T, T_in = series.time, series.contents, series.inlet
    capacity = mass * heat_capacity
    net = shaft_power - heat_loss

    def effective(ua: float) -> float:
        return ua if rate is None else rate * -math.expm1(-ua / rate)

    # Starting guess from the integral form, linear in UA_eff:
    # T(t) - T(0) - net t / (M c_p) = -(UA_eff / M c_p) int (T - T_in) dt.
    integral = np.concatenate(([0.0], np.cumsum(0.5 * (T[1:] - T_in[1:] + T[:-1] - T_in[:-1]) * np.diff(t))))
    rise = T - T[0] - net * (t - t[0]) / capacity
    guess = -float(np.dot(integral, rise) / np.dot(integral, integral)) * capacity
    if rate is not None and guess >= rate:
        guess = 0.9 * rate
    if rate is not None:
        guess = -rate * math.log1p(-guess / rate) if guess > 0 else guess
    scale = max(guess, capacity / (t[-1] - t[0]) * 1e-3)

    steps = np.diff(t)
    slopes = np.diff(T_in) / steps

    def simulate(ua: float, T0: float) -> np.ndarray:
        """Exact solution with the inlet linear between logged points: on each step (s from its start)
        T = T_p(s) + (T_start - T_p(0)) exp(-k s), T_p = T_in,start + (q - B)/k + B s,
        k = UA_eff/(M c_p), q = net/(M c_p), B the inlet's slope (a linear ODE's closed form)."""
        k = effective(ua) / capacity
        q = net / capacity
        decay = np.exp(-k * steps)
        out = np.empty_like(t)
        out[0] = T0
        offset = (q - slopes) / k
        for i in range(len(steps)):
            start = T_in[i] + offset[i]
            out[i + 1] = start + slopes[i] * steps[i] + (out[i] - start) * decay[i]
        return out

    def residuals(parameters: np.ndarray) -> np.ndarray:
        ua = parameters[0] * scale
        model = simulate(ua, T[0] + parameters[1])
        out = [model - T]
        if uses_outlet and rate is not None:
            out.append(model - (model - T_in) * math.exp(-ua / rate) - series.outlet)
        return np.concatenate(out)

    # parameters: UA / its first estimate, and T_0 - T(0) in K (both of order 1, so the steps are balanced)
    result = least_squares(residuals, [1.0, 0.0], bounds=([1e-9, -np.inf], [np.inf, np.inf]), x_scale="jac",
                           xtol=1e-12, ftol=1e-12, gtol=1e-12)
    ua = float(result.x[0] * scale)
    res = result.fun
    dof = len(res) - 2
    variance = float(res @ res) / dof
    jacobian = result.jac
    try:
        covariance = np.linalg.inv(jacobian.T @ jacobian) * variance
    except np.linalg.LinAlgError:
        raise InputError("series", "the series cannot determine UA: the fit does not depend on it") from None
    standard_error = float(math.sqrt(max(covariance[0, 0], 0.0)) * scale)
    half = float(stats.t.ppf(0.975, dof)) * standard_error
    if standard_error > 0.25 * ua:
        warnings.add(CalcWarning("ua_poorly_determined",
                                 f"UA = {ua:.4g} W/K +- {half:.3g} (95 %): the log determines UA poorly; log longer, "
                                 "with a larger driving force or at a steadier coolant temperature"))
    initial = float(T[0] + result.x[1])
    fitted = simulate(ua, initial)
    outlet_residuals = None
    if uses_outlet and rate is not None:
        outlet_residuals = series.outlet - (fitted - (fitted - T_in) * math.exp(-ua / rate))
    return UAFit(ua, (max(ua - half, 0.0), ua + half), standard_error, initial,
                 capacity / effective(ua), t, T, fitted, T - fitted, outlet_residuals,
                 float(math.sqrt(np.mean(res ** 2))), len(t), dof, uses_outlet, rate is None, warnings)
