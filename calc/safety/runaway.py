"""Thermal explosion of a cooled batch: Semenov number, critical temperature difference, no return.

Semenov's picture: the heat generation of a zero-order exothermic reaction rises exponentially with
the contents temperature, the jacket removes heat linearly, UA (T - T_c). The contents run away when
no stable intersection of the two lines exists, i.e. when the generation curve is steeper than UA
at every temperature reachable from the coolant temperature (Semenov 1928; Townsend 1981; Stoessel
2008, ch. 2).

All temperatures are absolute, K. Every verdict here is a screening estimate: confirm it with
reaction calorimetry and adiabatic calorimetry of the decomposition, follow local codes, and have
a licensed engineer review it.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from scipy.optimize import brentq

from calc.properties import GAS_CONSTANT
from calc.cautions import THERMAL_SAFETY
from calc.safety.criticality import decomposition_power
from calc.validity import CalculationError, Correlation, InputError, Warnings, require_positive, require_temperature


def semenov_number(heat_generation: float, activation_energy: float, ua: float,
                   coolant_temperature: float) -> float:
    r"""Semenov number of a cooled batch, after Semenov (1928).

    .. math:: \psi = \frac{q_g(T_c)\, E}{UA\, R\, T_c^2}

    Stable (no runaway) when psi < 1/e.

    Parameters
    ----------
    heat_generation : float
        Heat-generation rate evaluated at the coolant temperature, [W]
    activation_energy : float
        Activation energy, [J/mol]
    ua : float
        Heat-transfer coefficient times area, [W/K]
    coolant_temperature : float
        Coolant temperature, [K]

    Returns
    -------
    psi : float
        Semenov number, [-]

    Notes
    -----
    Zero order with the Frank-Kamenetskii exponential approximation exp(-E/RT) ~
    exp(-E/RT_c) exp[E (T - T_c)/(R T_c^2)], valid for E/(R T_c) >> 1.

    Examples
    --------
    The critical case: q_g(T_c) = UA R T_c^2/(E e):

    >>> UA, E, Tc = 2000.0, 90e3, 330.0
    >>> q = UA * 8.314462618 * Tc ** 2 / (E * math.e)
    >>> round(semenov_number(q, E, UA, Tc) * math.e, 12)
    1.0

    References
    ----------
    Semenov, N. N. "Zur Theorie des Verbrennungsprozesses." *Z. Phys.* 48, 571-582, 1928.
    """
    return heat_generation * activation_energy / (ua * GAS_CONSTANT * coolant_temperature ** 2)


def critical_temperature_difference_Semenov_1928(temperature: float, activation_energy: float) -> float:
    r"""Critical temperature difference between contents and coolant, Semenov (1928).

    .. math:: \Delta T_{crit} = R T^2 / E

    Parameters
    ----------
    temperature : float
        Contents temperature, [K]
    activation_energy : float
        Activation energy, [J/mol]

    Returns
    -------
    dT_crit : float
        Temperature difference, [K]

    Examples
    --------
    >>> round(critical_temperature_difference_Semenov_1928(350.0, 100e3), 3)
    10.185

    References
    ----------
    Semenov, N. N. *Z. Phys.* 48, 571-582, 1928.
    """
    return GAS_CONSTANT * temperature ** 2 / activation_energy


def temperature_of_no_return_Townsend_1981(onset_power: float, onset_temperature: float,
                                           activation_energy: float, mass: float, ua: float) -> float:
    r"""Temperature of no return: where the heat-generation slope equals the cooling slope UA.

    .. math:: m\, \frac{dq'}{dT}(T_{NR}) = m\, q'(T_{NR}) \frac{E}{R T_{NR}^2} = UA

    Parameters
    ----------
    onset_power : float
        Specific heat-generation rate at `onset_temperature`, zero order, [W/kg]
    onset_temperature : float
        Temperature of that rate, [K]
    activation_energy : float
        Activation energy, [J/mol]
    mass : float
        Mass of the contents, [kg]
    ua : float
        Heat-transfer coefficient times area, [W/K]

    Returns
    -------
    T_NR : float
        Temperature of no return, [K]; the coolant must stay below T_NR - R T_NR^2/E.

    Notes
    -----
    Above T_NR the heat generation rises faster with temperature than the jacket can follow.

    Examples
    --------
    >>> T = temperature_of_no_return_Townsend_1981(1.0, 350.0, 100e3, 5000.0, 20e3)
    >>> round(5000.0 * decomposition_power(1.0, 350.0, 100e3, T) * 100e3 / (8.314462618 * T**2), 6)
    20000.0

    References
    ----------
    Townsend, D. I. "Hazard evaluation of self-accelerating reactions." *Chem. Eng. Prog.* 77(5), 1981;
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 2.
    """
    def residual(T: float) -> float:
        log_q = math.log(mass * onset_power) + activation_energy / GAS_CONSTANT * (1.0 / onset_temperature - 1.0 / T)
        return log_q + math.log(activation_energy / (GAS_CONSTANT * T * T)) - math.log(ua)

    low, high = 100.0, min(3000.0, 0.5 * activation_energy / GAS_CONSTANT)
    if not (residual(low) < 0 < residual(high)):
        raise CalculationError("the temperature of no return lies outside 100 K to 3000 K")
    return float(brentq(residual, low, high, xtol=1e-9, rtol=1e-14))


REGISTRY: dict[str, Correlation] = {c.name: c for c in [
    Correlation("Semenov (1928)", semenov_number, "Semenov, N. N. Z. Phys. 48, 571-582, 1928",
                {"E/(R T)": (10.0, None)}),
]}


# ----------------------------------------------------------------------------- the assessment

@dataclass(frozen=True)
class SemenovResult:
    semenov_number: float  # psi, -
    stable: bool  # psi < 1/e
    critical_temperature_difference: float  # K, R Tc^2/E
    temperature_of_no_return: float  # K
    critical_coolant_temperature: float  # K, T_NR - R T_NR^2/E
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = (THERMAL_SAFETY,)


def assess_semenov(heat_generation: float, reference_temperature: float, activation_energy: float,
                   ua: float, coolant_temperature: float) -> SemenovResult:
    """Semenov criterion for a cooled batch whose zero-order heat generation is known at one temperature.

    `heat_generation` (W) at `reference_temperature` (K) is carried to other temperatures with the
    Arrhenius law of `activation_energy`; the contents are cooled through `ua` (W/K) by coolant at
    `coolant_temperature` (K).
    """
    require_positive("heat_generation", heat_generation)
    require_temperature("reference_temperature", reference_temperature)
    require_positive("activation_energy", activation_energy)
    require_positive("ua", ua)
    Tc = require_temperature("coolant_temperature", coolant_temperature)
    warnings = Warnings()
    REGISTRY["Semenov (1928)"].check(warnings, **{"E/(R T)": activation_energy / (GAS_CONSTANT * Tc)})
    q_c = decomposition_power(heat_generation, reference_temperature, activation_energy, Tc)
    psi = semenov_number(q_c, activation_energy, ua, Tc)
    try:
        T_nr = temperature_of_no_return_Townsend_1981(heat_generation, reference_temperature,
                                                      activation_energy, 1.0, ua)
    except CalculationError as exc:
        raise InputError("heat_generation", str(exc)) from None
    return SemenovResult(psi, psi < 1.0 / math.e,
                         critical_temperature_difference_Semenov_1928(Tc, activation_energy), T_nr,
                         T_nr - critical_temperature_difference_Semenov_1928(T_nr, activation_energy), warnings)
