"""Single-pass coolant energy balance for a jacket or coil around well-mixed contents.

The contents are well mixed at one temperature T_r, so the wall sees T_r everywhere while the
coolant warms along its path. Integrating m_dot c_p dT = U (T_r - T) dA over the area gives

    T_out = T_r - (T_r - T_in) exp(-NTU),      NTU = U A / (m_dot c_p)
    Q     = m_dot c_p (T_out - T_in) = m_dot c_p (T_r - T_in) (1 - exp(-NTU))
    LMTD  = (T_r - T_in) (1 - exp(-NTU)) / NTU,   so that Q = U A LMTD exactly.

This is the single-stream exchanger with one side at constant temperature (effectiveness
1 - exp(-NTU); Incropera & DeWitt, *Fundamentals of Heat and Mass Transfer*, 6th ed., 2007, eq. 11.35a).
``expm1`` keeps every quantity exact and finite at the limits: tiny U A (LMTD -> T_r - T_in),
huge flow (NTU -> 0), huge U A (T_out -> T_r) and zero driving force.

``duty`` is the heat the coolant takes from the contents, W: positive when cooling.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from scipy.special import lambertw

from calc import arrays
from calc.validity import (CalcWarning, InputError, Warnings, require_non_negative, require_positive,
                           require_temperature)

#: Coolant inlet within this many kelvin of its freezing point draws a warning (common practice, no source).
FREEZING_MARGIN = 5.0
#: Effectiveness above which the coolant leaves close to the process temperature (common practice, no source).
SATURATED_EFFECTIVENESS = 0.9


def _effectiveness(ntu: float) -> float:
    """1 - exp(-NTU), exact for small NTU."""
    return -math.expm1(-ntu)


def _effectiveness_per_ntu(ntu: float) -> float:
    """(1 - exp(-NTU)) / NTU, which tends to 1 as NTU -> 0."""
    if ntu < 1e-12:
        return 1.0 - 0.5 * ntu
    return -math.expm1(-ntu) / ntu


def log_mean_temperature_difference(dT1: float, dT2: float) -> float:
    """Logarithmic mean of two end temperature differences, exact as they approach each other.

    LMTD = (dT1 - dT2) / ln(dT1 / dT2), written as dT2 x / ln(1 + x) with x = dT1/dT2 - 1

    Parameters
    ----------
    dT1 : float
        Temperature difference at one end, [K]
    dT2 : float
        Temperature difference at the other end, same sign as `dT1`, [K]

    Returns
    -------
    LMTD : float
        Log-mean temperature difference, [K]

    Notes
    -----
    Tends to the arithmetic mean as dT1 -> dT2 and to 0 when either end difference is 0.
    End differences of opposite sign (a temperature cross) raise :class:`InputError`.

    Examples
    --------
    >>> round(log_mean_temperature_difference(40.0, 10.0), 4)
    21.6404
    >>> log_mean_temperature_difference(20.0, 20.0)
    20.0

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007, eq. 11.15.
    """
    for name, value in (("dT1", dT1), ("dT2", dT2)):
        if not math.isfinite(value):
            raise InputError(name, f"must be a finite temperature difference, got {value!r}")
    if dT1 == 0.0 or dT2 == 0.0:
        return 0.0
    if (dT1 > 0) != (dT2 > 0):
        raise InputError("dT2", "end temperature differences of opposite sign: the temperatures cross")
    x = dT1 / dT2 - 1.0
    if abs(x) < 1e-9:
        return 0.5 * (dT1 + dT2)
    return dT2 * x / math.log1p(x)


@dataclass(frozen=True)
class CoolantBalance:
    """Coolant outlet temperature, duty and mean driving force for one pass through the jacket or coil."""

    process_temperature: float  # K
    inlet_temperature: float  # K
    outlet_temperature: float  # K
    duty: float  # W, heat taken from the contents (negative: the coolant heats them)
    log_mean_temperature_difference: float  # K
    ntu: float  # -
    effectiveness: float  # -, (T_out - T_in) / (T_r - T_in)
    mass_flow: float  # kg/s
    heat_capacity: float  # J/(kg K), of the coolant at its mean temperature
    warnings: Warnings = field(default_factory=Warnings)

    @property
    def heat_capacity_rate(self) -> float:
        """m_dot c_p, W/K."""
        return self.mass_flow * self.heat_capacity


@dataclass(frozen=True)
class FlowRequirement:
    """Coolant mass flow that removes a duty; ``mass_flow`` is None when no flow can."""

    mass_flow: float | None  # kg/s
    reachable: bool
    maximum_duty: float  # W, the infinite-flow limit U A (T_r - T_in)
    message: str
    warnings: Warnings = field(default_factory=Warnings)


@dataclass(frozen=True)
class InletTemperatureLimit:
    """Warmest coolant inlet temperature that still removes a duty; None when none can."""

    inlet_temperature: float | None  # K
    reachable: bool
    message: str
    warnings: Warnings = field(default_factory=Warnings)


def _freezing_warnings(warnings: Warnings, inlet_temperature: float, freezing_temperature: float | None) -> None:
    if freezing_temperature is None:
        return
    if inlet_temperature <= freezing_temperature:
        raise InputError("coolant.inlet_temperature",
                         f"{inlet_temperature - 273.15:.2f} degC is at or below the coolant's freezing point "
                         f"({freezing_temperature - 273.15:.2f} degC)")
    if inlet_temperature < freezing_temperature + FREEZING_MARGIN:
        warnings.add(CalcWarning(
            "coolant_near_freezing",
            f"coolant inlet is within {FREEZING_MARGIN:g} K of its freezing point "
            f"({freezing_temperature - 273.15:.2f} degC); ice can form on cold spots"))


def coolant_balance(process_temperature: float, inlet_temperature: float, ua: float, mass_flow: float,
                    heat_capacity: float, freezing_temperature: float | None = None) -> CoolantBalance:
    """Outlet temperature, duty and LMTD of a coolant passing once along well-mixed contents.

    T_out = T_r - (T_r - T_in) exp(-U A / (m_dot c_p));  Q = m_dot c_p (T_out - T_in) = U A LMTD

    Parameters
    ----------
    process_temperature : float
        Temperature of the well-mixed contents T_r, [K]
    inlet_temperature : float
        Coolant inlet temperature T_in, [K]
    ua : float
        Overall coefficient times area, >= 0, [W/K]
    mass_flow : float
        Coolant mass flow, > 0, [kg/s]
    heat_capacity : float
        Coolant heat capacity at its mean temperature, [J/(kg K)]
    freezing_temperature : float, optional
        Coolant freezing point, for the near-freezing warning, [K]

    Returns
    -------
    CoolantBalance

    Examples
    --------
    Contents at 50 degC, water in at 20 degC, U A = 5 kW/K, 2 kg/s (NTU = 0.598):

    >>> b = coolant_balance(323.15, 293.15, 5000.0, 2.0, 4180.0)
    >>> round(b.outlet_temperature - 273.15, 3), round(b.duty), round(b.log_mean_temperature_difference, 3)
    (33.504, 112894, 22.579)

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007,
    section 11.4 (effectiveness of an exchanger with one stream at constant temperature).
    """
    require_temperature("process_temperature", process_temperature)
    require_temperature("coolant.inlet_temperature", inlet_temperature)
    require_non_negative("ua", ua)
    require_positive("coolant.flow", mass_flow)
    require_positive("coolant.heat_capacity", heat_capacity)
    warnings = Warnings()
    _freezing_warnings(warnings, inlet_temperature, freezing_temperature)

    capacity_rate = mass_flow * heat_capacity
    outlet, duty, ntu, effectiveness = single_pass(process_temperature, inlet_temperature, ua, capacity_rate)
    driving_force = process_temperature - inlet_temperature
    lmtd = driving_force * _effectiveness_per_ntu(ntu)

    if driving_force == 0.0:
        warnings.add(CalcWarning("no_driving_force",
                                 "coolant enters at the process temperature: no heat is exchanged"))
    elif driving_force < 0.0:
        warnings.add(CalcWarning("coolant_warmer_than_process",
                                 "coolant enters warmer than the contents: it heats them (negative duty)"))
    if effectiveness > SATURATED_EFFECTIVENESS and driving_force != 0.0:
        warnings.add(CalcWarning(
            "coolant_outlet_near_process",
            f"coolant leaves within {100 * (1 - effectiveness):.3g} % of the inlet driving force of the process "
            f"temperature (NTU = {ntu:.3g}): the duty is limited by coolant flow, not by U A"))
    return CoolantBalance(process_temperature, inlet_temperature, outlet, duty, lmtd, ntu,
                          effectiveness, mass_flow, heat_capacity, warnings)


def single_pass(process_temperature: float, inlet_temperature: float, ua: float, capacity_rate: float
                ) -> tuple[float, float, float, float]:
    """Outlet temperature (K), duty (W), NTU and effectiveness of one pass; floats or arrays.

    T_out = T_in + (T_r - T_in) eps,  Q = m_dot c_p (T_r - T_in) eps,  eps = 1 - exp(-U A / (m_dot c_p))
    (the formula :func:`coolant_balance` applies after its checks; the vectorised network applies it to
    many states at once).
    """
    ntu = ua / capacity_rate
    driving_force = process_temperature - inlet_temperature
    effectiveness = -arrays.expm1(-ntu)
    return (inlet_temperature + driving_force * effectiveness, capacity_rate * driving_force * effectiveness,
            ntu, effectiveness)


def _ntu_for_fraction(q: float) -> float:
    """NTU > 0 with (1 - exp(-NTU)) / NTU = q, for 0 < q < 1.

    With z = 1 - q NTU the equation is z = exp(-(1 - z)/q), whose non-trivial root is on the principal
    branch of Lambert's W: NTU = [1 + q W0(-exp(-1/q)/q)] / q. Near q = 1 (NTU -> 0), where the
    argument approaches the branch point -1/e, the series NTU = 2d + 4d^2/3 (d = 1 - q) is used instead.
    """
    d = 1.0 - q
    if d < 1e-5:
        return 2.0 * d + 4.0 * d * d / 3.0
    # exp(-1/q)/q written as exp(-1/q - ln q) so that tiny q does not overflow the quotient
    w = float(lambertw(-math.exp(-1.0 / q - math.log(q)), 0).real)
    return (1.0 + q * w) / q


def required_flow(process_temperature: float, inlet_temperature: float, ua: float, heat_capacity: float,
                  duty: float, freezing_temperature: float | None = None) -> FlowRequirement:
    """Coolant mass flow whose single pass removes ``duty`` (closed form via Lambert's W).

    Q = m_dot c_p (T_r - T_in) [1 - exp(-U A / (m_dot c_p))], increasing in m_dot towards U A (T_r - T_in).

    Parameters
    ----------
    process_temperature : float
        Temperature of the contents, [K]
    inlet_temperature : float
        Coolant inlet temperature, [K]
    ua : float
        Overall coefficient times area, [W/K]
    heat_capacity : float
        Coolant heat capacity, [J/(kg K)]
    duty : float
        Heat to remove, >= 0, [W]
    freezing_temperature : float, optional
        Coolant freezing point, [K]

    Returns
    -------
    FlowRequirement
        ``reachable`` is False when ``duty`` >= U A (T_r - T_in): not reachable at any flow.

    Notes
    -----
    The film coefficient itself rises with flow; this inverse holds U A fixed, so the caller iterates
    U A with the flow when that matters.

    Examples
    --------
    >>> r = required_flow(323.15, 293.15, 5000.0, 4180.0, 112894.36)
    >>> round(r.mass_flow, 3)
    2.0
    >>> required_flow(323.15, 293.15, 5000.0, 4180.0, 2e5).reachable
    False
    """
    require_temperature("process_temperature", process_temperature)
    require_temperature("coolant.inlet_temperature", inlet_temperature)
    require_non_negative("ua", ua)
    require_positive("coolant.heat_capacity", heat_capacity)
    require_non_negative("duty", duty)
    warnings = Warnings()
    _freezing_warnings(warnings, inlet_temperature, freezing_temperature)
    maximum = ua * (process_temperature - inlet_temperature)
    if duty == 0.0:
        return FlowRequirement(0.0, True, maximum, "no duty: no coolant flow is needed", warnings)
    if duty >= maximum:
        return FlowRequirement(
            None, False, maximum,
            f"not reachable at any flow: even infinite coolant flow removes at most U A (T_r - T_in) = "
            f"{max(maximum, 0.0):.4g} W", warnings)
    ntu = _ntu_for_fraction(duty / maximum)
    flow = ua / (heat_capacity * ntu)
    if _effectiveness(ntu) > SATURATED_EFFECTIVENESS:
        warnings.add(CalcWarning("coolant_outlet_near_process",
                                 "at this flow the coolant leaves close to the process temperature"))
    return FlowRequirement(flow, True, maximum, "coolant flow that removes the duty at this U A", warnings)


def maximum_inlet_temperature(process_temperature: float, ua: float, mass_flow: float, heat_capacity: float,
                              duty: float, freezing_temperature: float | None = None) -> InletTemperatureLimit:
    """Warmest coolant inlet temperature that still removes ``duty`` (closed form).

    T_in,max = T_r - Q / (m_dot c_p [1 - exp(-U A / (m_dot c_p))])

    Parameters
    ----------
    process_temperature : float
        Temperature of the contents, [K]
    ua : float
        Overall coefficient times area, [W/K]
    mass_flow : float
        Coolant mass flow, [kg/s]
    heat_capacity : float
        Coolant heat capacity, [J/(kg K)]
    duty : float
        Heat to remove, >= 0, [W]
    freezing_temperature : float, optional
        Coolant freezing point; a limit at or below it is reported as not reachable, [K]

    Returns
    -------
    InletTemperatureLimit

    Examples
    --------
    >>> t = maximum_inlet_temperature(323.15, 5000.0, 2.0, 4180.0, 112894.36)
    >>> round(t.inlet_temperature - 273.15, 3)
    20.0
    """
    require_temperature("process_temperature", process_temperature)
    require_non_negative("ua", ua)
    require_positive("coolant.flow", mass_flow)
    require_positive("coolant.heat_capacity", heat_capacity)
    require_non_negative("duty", duty)
    warnings = Warnings()
    capacity_rate = mass_flow * heat_capacity
    if duty == 0.0:
        return InletTemperatureLimit(process_temperature, True,
                                     "no duty: any inlet up to the process temperature will do", warnings)
    removable_per_kelvin = capacity_rate * _effectiveness(ua / capacity_rate)  # W/K of inlet driving force
    if removable_per_kelvin == 0.0:
        return InletTemperatureLimit(None, False, "no heat-transfer area (U A = 0): no inlet temperature "
                                     "removes the duty", warnings)
    limit = process_temperature - duty / removable_per_kelvin
    floor = 0.0 if freezing_temperature is None else freezing_temperature
    if limit <= floor:
        what = "absolute zero" if freezing_temperature is None else "the coolant's freezing point"
        return InletTemperatureLimit(None, False, f"not reachable: the inlet would have to be below {what}",
                                     warnings)
    if freezing_temperature is not None and limit < freezing_temperature + FREEZING_MARGIN:
        warnings.add(CalcWarning("coolant_near_freezing",
                                 "the required inlet temperature is close to the coolant's freezing point"))
    return InletTemperatureLimit(limit, True, "warmest coolant inlet that removes the duty at this flow and U A",
                                 warnings)
