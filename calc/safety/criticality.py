"""Thermal safety of an exothermic step: adiabatic rise, MTSR, TMR_ad, T_D24 and the criticality class.

The runaway scenario behind the criticality classes: cooling fails while the contents are at the
process temperature T_p. The unconverted reactant present at that moment (the accumulation X_ac)
reacts adiabatically and takes the contents to the maximum temperature of the synthesis reaction,
MTSR = T_p + X_ac dT_ad. Whether that is dangerous depends on two more temperature levels: the
maximum temperature for technical reasons MTT (usually the boiling point at the operating pressure)
and T_D24, the temperature at which a secondary decomposition would reach its maximum rate after
24 h under adiabatic conditions. The order of the four levels T_p < MTSR, MTT, T_D24 is the class
(Stoessel 1993, 2008).

All temperatures are absolute, K. Every verdict here is a screening estimate: confirm it with
reaction calorimetry and adiabatic calorimetry of the decomposition, follow local codes, and have
a licensed engineer review it. The thermal-explosion criteria of a cooled batch (Semenov number,
temperature of no return) are in :mod:`calc.runaway`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from scipy.optimize import brentq

from calc.cautions import THERMAL_SAFETY
from calc.properties import GAS_CONSTANT, STANDARD_PRESSURE, liquid_range
from calc.validity import (SIGN_CONVENTION, CalcWarning, CalculationError, Correlation, InputError, Warnings,
                           require_finite, require_positive, require_temperature)

SECONDS_PER_HOUR = 3600.0
#: Adiabatic time to maximum rate that defines T_D24, s (Stoessel 2008: 24 h).
TMR_CRITERION = 24.0 * SECONDS_PER_HOUR
#: Two temperature levels closer than this draw a warning that the class could flip (common practice,
#: no source: typical uncertainty of calorimetric onset and extrapolated T_D24 values).
BOUNDARY_MARGIN = 5.0
#: Extrapolating a decomposition rate further than this from the measured temperature draws a warning
#: (common practice, no source).
EXTRAPOLATION_LIMIT = 50.0





def adiabatic_temperature_rise_from_energy(reaction_energy: float, heat_capacity: float) -> float:
    r"""Adiabatic temperature rise from the specific reaction energy (definition).

    .. math:: \Delta T_{ad} = Q'_r / c_p'

    Parameters
    ----------
    reaction_energy : float
        Heat released per kilogram of reaction mass, positive when exothermic, [J/kg]
    heat_capacity : float
        Specific heat capacity of the reaction mass, [J/(kg K)]

    Returns
    -------
    dT_ad : float
        Adiabatic temperature rise, [K]

    Notes
    -----
    Exact by definition for a constant heat capacity; an endothermic (negative) energy gives a fall.

    Examples
    --------
    >>> adiabatic_temperature_rise_from_energy(180e3, 1800.0)
    100.0

    References
    ----------
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 2.
    """
    require_finite("reaction_energy", reaction_energy)
    require_positive("heat_capacity", heat_capacity)
    return reaction_energy / heat_capacity


def adiabatic_temperature_rise_from_enthalpy(reaction_enthalpy: float, concentration: float,
                                             density: float, heat_capacity: float) -> float:
    r"""Adiabatic temperature rise from the molar reaction enthalpy (definition).

    .. math:: \Delta T_{ad} = \frac{(-\Delta H_r)\, c_{A0}}{\rho\, c_p'}

    Parameters
    ----------
    reaction_enthalpy : float
        Molar reaction enthalpy, negative when exothermic, [J/mol]
    concentration : float
        Concentration of the limiting reactant in the reaction mass, [mol/m^3]
    density : float
        Density of the reaction mass, [kg/m^3]
    heat_capacity : float
        Specific heat capacity of the reaction mass, [J/(kg K)]

    Returns
    -------
    dT_ad : float
        Adiabatic temperature rise, [K]

    Notes
    -----
    Exact by definition for constant density and heat capacity.

    Examples
    --------
    200 kJ/mol at 1000 mol/m3 in 1000 kg/m3 of a liquid with 2000 J/(kg K):

    >>> adiabatic_temperature_rise_from_enthalpy(-200e3, 1000.0, 1000.0, 2000.0)
    100.0

    References
    ----------
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 2.
    """
    require_finite("reaction_enthalpy", reaction_enthalpy)
    if not (math.isfinite(concentration) and concentration >= 0):
        raise InputError("concentration", f"must be a finite number >= 0, got {concentration!r}")
    require_positive("density", density)
    require_positive("heat_capacity", heat_capacity)
    return -reaction_enthalpy * concentration / (density * heat_capacity)


def mtsr_Stoessel_1993(process_temperature: float, accumulation: float,
                       adiabatic_temperature_rise: float) -> float:
    r"""Maximum temperature of the synthesis reaction for a given accumulation, Stoessel (1993).

    .. math:: MTSR = T_p + X_{ac}\, \Delta T_{ad}

    Parameters
    ----------
    process_temperature : float
        Temperature of the contents when cooling fails, [K]
    accumulation : float
        Largest fraction of the limiting reactant present unconverted, 0 to 1 (1 for a batch), [-]
    adiabatic_temperature_rise : float
        Adiabatic temperature rise of the complete reaction, [K]

    Returns
    -------
    MTSR : float
        Maximum temperature of the synthesis reaction, [K]

    Notes
    -----
    Assumes the feed stops when cooling fails and that `adiabatic_temperature_rise` refers to the
    mass present at the moment of failure (see :func:`mtsr_from_profile` for the mass correction).

    Examples
    --------
    >>> mtsr_Stoessel_1993(353.15, 0.3, 120.0)
    389.15

    References
    ----------
    Stoessel, F. "What is your thermal risk?" *Chem. Eng. Prog.* 89(10), 68-75, 1993.
    """
    require_temperature("process_temperature", process_temperature)
    if not (math.isfinite(accumulation) and 0.0 <= accumulation <= 1.0):
        raise InputError("accumulation", f"must lie between 0 and 1, got {accumulation!r}")
    require_finite("adiabatic_temperature_rise", adiabatic_temperature_rise)
    return process_temperature + accumulation * max(adiabatic_temperature_rise, 0.0)


def mtsr_from_profile(temperature: npt.ArrayLike, accumulation: npt.ArrayLike, adiabatic_temperature_rise: float,
                      mass: npt.ArrayLike | None = None, final_mass: float | None = None) -> tuple[float, int]:
    r"""MTSR of a semi-batch step from a simulated accumulation profile, after Stoessel (2008).

    .. math:: MTSR = \max_t \left[T(t) + X_{ac}(t)\, \Delta T_{ad}\, m_{final}/m(t)\right]

    Parameters
    ----------
    temperature : array_like
        Contents temperature over time, [K]
    accumulation : array_like
        Unconverted fraction of the total limiting reactant over time, 0 to 1, [-]
    adiabatic_temperature_rise : float
        Adiabatic temperature rise of the whole charge, referred to the final mass, [K]
    mass : array_like, optional
        Contents mass over time; without it the mass factor is 1, [kg]
    final_mass : float, optional
        Mass at the end of dosing; defaults to the last value of `mass`, [kg]

    Returns
    -------
    MTSR : float
        Maximum over time, [K]
    index : int
        Index of the time at which it occurs, [-]

    Notes
    -----
    The mass factor applies when dT_ad is referred to the final mass: early in the feed the same
    unconverted amount heats less mass.

    Examples
    --------
    >>> mtsr_from_profile([350.0, 352.0, 351.0], [0.0, 0.25, 0.1], 100.0, [800.0, 900.0, 1000.0])
    (379.77..., 1)

    References
    ----------
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 7.
    """
    T = np.asarray(temperature, dtype=float)
    X = np.asarray(accumulation, dtype=float)
    if T.shape != X.shape or T.size == 0:
        raise InputError("accumulation", "temperature and accumulation profiles must have the same, non-zero length")
    if not (np.all(np.isfinite(X)) and X.min() >= -1e-9 and X.max() <= 1.0 + 1e-9):
        raise InputError("accumulation", "must lie between 0 and 1 at every time")
    factor = np.ones_like(T)
    if mass is not None:
        m = np.asarray(mass, dtype=float)
        if m.shape != T.shape or not np.all(np.isfinite(m) & (m > 0)):
            raise InputError("mass", "must be positive at every time, same length as temperature")
        factor = (m[-1] if final_mass is None else require_positive("final_mass", final_mass)) / m
    values = T + np.clip(X, 0.0, 1.0) * max(adiabatic_temperature_rise, 0.0) * factor
    index = int(np.argmax(values))
    return float(values[index]), index


def decomposition_power(onset_power: float, onset_temperature: float, activation_energy: float,
                        temperature: float) -> float:
    r"""Specific heat-release rate of a zero-order decomposition at another temperature (Arrhenius).

    .. math:: q'(T) = q'(T_0) \exp\left[\frac{E_a}{R}\left(\frac{1}{T_0} - \frac{1}{T}\right)\right]

    Parameters
    ----------
    onset_power : float
        Measured heat-release rate at `onset_temperature`, [W/kg]
    onset_temperature : float
        Temperature at which `onset_power` was measured, [K]
    activation_energy : float
        Activation energy of the decomposition, [J/mol]
    temperature : float
        Temperature of interest, [K]

    Returns
    -------
    q : float
        Heat-release rate, [W/kg]

    Examples
    --------
    >>> round(decomposition_power(1.0, 400.0, 100e3, 410.0), 4)
    2.0821

    References
    ----------
    Townsend, D. I.; Tou, J. C. "Thermal hazard evaluation by an accelerating rate calorimeter."
    *Thermochim. Acta* 37, 1-30, 1980.
    """
    exponent = activation_energy / GAS_CONSTANT * (1.0 / onset_temperature - 1.0 / temperature)
    return onset_power * math.exp(min(exponent, 700.0))


def tmr_ad_Townsend_Tou_1980(heat_capacity: float, temperature: float, power: float,
                             activation_energy: float) -> float:
    r"""Adiabatic time to maximum rate of a zero-order reaction, Townsend & Tou (1980).

    .. math:: TMR_{ad} = \frac{c_p' R T_0^2}{q'(T_0)\, E_a}

    Parameters
    ----------
    heat_capacity : float
        Specific heat capacity of the reaction mass, [J/(kg K)]
    temperature : float
        Initial temperature of the adiabatic runaway, [K]
    power : float
        Specific heat-release rate at `temperature`, [W/kg]
    activation_energy : float
        Activation energy, [J/mol]

    Returns
    -------
    TMR_ad : float
        Time to maximum rate under adiabatic conditions, [s]

    Notes
    -----
    Zero order, reactant consumption neglected, E_a/(R T_0) >> 1; conservative (short) for real
    decompositions that slow as they consume reactant. A warning is given below E_a/(R T_0) = 10
    (common practice, no source). Calorimeter data must first be corrected for the thermal inertia
    of the test cell (phi factor).

    Examples
    --------
    1800 J/(kg K), 400 K, 10 W/kg, 100 kJ/mol:

    >>> round(tmr_ad_Townsend_Tou_1980(1800.0, 400.0, 10.0, 100e3), 1)
    2394.6

    References
    ----------
    Townsend, D. I.; Tou, J. C. "Thermal hazard evaluation by an accelerating rate calorimeter."
    *Thermochim. Acta* 37, 1-30, 1980.
    """
    return heat_capacity * GAS_CONSTANT * temperature ** 2 / (power * activation_energy)


def td24_Townsend_Tou_1980(heat_capacity: float, onset_power: float, onset_temperature: float,
                           activation_energy: float, tmr: float = TMR_CRITERION) -> float:
    r"""Temperature at which TMR_ad equals 24 h (T_D24), solved with Brent's method.

    .. math:: \frac{c_p' R T^2}{q'(T)\, E_a} = 24\ \mathrm{h}, \qquad
              q'(T) = q'(T_0) \exp\left[\frac{E_a}{R}\left(\frac{1}{T_0} - \frac{1}{T}\right)\right]

    Parameters
    ----------
    heat_capacity : float
        Specific heat capacity of the reaction mass, [J/(kg K)]
    onset_power : float
        Measured decomposition heat-release rate at `onset_temperature`, [W/kg]
    onset_temperature : float
        Temperature of that measurement, [K]
    activation_energy : float
        Activation energy of the decomposition, [J/mol]
    tmr : float
        Time to maximum rate that defines the level (24 h by convention), [s]

    Returns
    -------
    T_D24 : float
        Temperature, [K]

    Notes
    -----
    ln TMR_ad is monotonic decreasing in T for T < E_a/(2R), so the root is unique; it is searched
    between 150 K and 1500 K.

    Examples
    --------
    >>> T = td24_Townsend_Tou_1980(1800.0, 10.0, 400.0, 100e3)
    >>> round(T, 2)
    354.85
    >>> q = decomposition_power(10.0, 400.0, 100e3, T)
    >>> round(tmr_ad_Townsend_Tou_1980(1800.0, T, q, 100e3) / 3600, 6)
    24.0

    References
    ----------
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 3;
    Townsend, D. I.; Tou, J. C. *Thermochim. Acta* 37, 1-30, 1980.
    """
    log_target = math.log(tmr)

    def residual(T: float) -> float:
        log_q = math.log(onset_power) + activation_energy / GAS_CONSTANT * (1.0 / onset_temperature - 1.0 / T)
        return math.log(heat_capacity * GAS_CONSTANT * T * T / activation_energy) - log_q - log_target

    low, high = 150.0, min(1500.0, 0.5 * activation_energy / GAS_CONSTANT)
    if not (residual(low) > 0 > residual(high)):
        raise CalculationError("T_D24 lies outside 150 K to 1500 K for this decomposition data")
    return float(brentq(residual, low, high, xtol=1e-9, rtol=1e-14))


# ----------------------------------------------------------------------------- criticality classes

_CLASS_MEANING = {
    1: "no runaway can reach the boiling point or trigger the decomposition; evaporative cooling acts "
       "as a backup",
    2: "the decomposition can be triggered only if the mass is held at the MTT for a long time; "
       "ensure it cannot stay there",
    3: "the boiling point is reached but not T_D24; evaporative cooling is the safety barrier and must "
       "be designed for the vapour rate",
    4: "the boiling point is reached and T_D24 lies above it but below the MTSR; evaporative cooling "
       "must reliably stop the runaway",
    5: "the decomposition can be triggered before or without the boiling barrier; redesign the step, "
       "or provide quench, dump or pressure relief",
}


def criticality_class_Stoessel_1993(process_temperature: float, mtsr: float, mtt: float,
                                    td24: float) -> tuple[int, list[str]]:
    """Criticality class 1-5 from the order of T_p, MTSR, MTT and T_D24, Stoessel (1993).

    ======  ==========================
    class   order of the levels
    ======  ==========================
    1       MTSR < MTT < T_D24
    2       MTSR < T_D24 <= MTT
    3       MTT <= MTSR < T_D24
    4       MTT < T_D24 <= MTSR
    5       T_D24 <= MTT and T_D24 <= MTSR
    ======  ==========================

    Parameters
    ----------
    process_temperature : float
        Process temperature T_p, [K]
    mtsr : float
        Maximum temperature of the synthesis reaction, [K]
    mtt : float
        Maximum temperature for technical reasons (boiling point, pressure limit), [K]
    td24 : float
        Temperature at which the decomposition's TMR_ad is 24 h, [K]

    Returns
    -------
    class : int
        Criticality class, 1 (least) to 5 (most critical), [-]
    reasoning : list of str
        The comparisons that decided it, as sentences.

    Notes
    -----
    Ties: a level *reaches* another when it is greater than or equal to it, so an exact tie always
    falls into the more critical class (MTSR = MTT counts as reaching the boiling point; MTSR = T_D24
    counts as triggering the decomposition; MTT = T_D24 counts as T_D24 below the MTT). The order
    T_D24 < MTSR < MTT, not in the five-row table of Stoessel (1993), is class 5 as in Stoessel (2008):
    the decomposition is triggered before the boiling barrier can act.

    Examples
    --------
    >>> criticality_class_Stoessel_1993(350.0, 370.0, 385.0, 420.0)[0]
    1
    >>> criticality_class_Stoessel_1993(350.0, 385.0, 385.0, 420.0)[0]
    3

    References
    ----------
    Stoessel, F. "What is your thermal risk?" *Chem. Eng. Prog.* 89(10), 68-75, 1993;
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 3.
    """
    def t(value: float) -> str:
        return f"{value - 273.15:.1f} degC"

    reaches_mtt = mtsr >= mtt
    reaches_td24 = mtsr >= td24
    mtt_above_td24 = mtt >= td24
    reasons = [f"Process temperature {t(process_temperature)}, MTSR {t(mtsr)}, MTT {t(mtt)}, "
               f"T_D24 {t(td24)}; a tie counts as reaching the higher level."]
    reasons.append(f"The MTSR {'reaches' if reaches_mtt else 'stays below'} the MTT "
                   f"({t(mtsr)} {'>=' if reaches_mtt else '<'} {t(mtt)}).")
    reasons.append(f"The MTSR {'reaches' if reaches_td24 else 'stays below'} T_D24 "
                   f"({t(mtsr)} {'>=' if reaches_td24 else '<'} {t(td24)}).")
    reasons.append(f"T_D24 lies {'at or below' if mtt_above_td24 else 'above'} the MTT "
                   f"({t(td24)} {'<=' if mtt_above_td24 else '>'} {t(mtt)}).")
    if not reaches_td24:
        if reaches_mtt:
            klass = 3
        else:
            klass = 2 if mtt_above_td24 else 1
    else:
        klass = 5 if mtt_above_td24 else 4
    reasons.append(f"Hence criticality class {klass}: {_CLASS_MEANING[klass]}.")
    if td24 <= process_temperature:
        reasons.append("T_D24 is at or below the process temperature itself: the decomposition can run away "
                       "during normal operation.")
    return klass, reasons


REGISTRY: dict[str, Correlation] = {c.name: c for c in [
    Correlation("Townsend & Tou (1980)", tmr_ad_Townsend_Tou_1980,
                "Townsend, D. I.; Tou, J. C. Thermochim. Acta 37, 1-30, 1980",
                {"E/(R T)": (10.0, None)}),
    Correlation("Stoessel (1993)", criticality_class_Stoessel_1993,
                "Stoessel, F. Chem. Eng. Prog. 89(10), 68-75, 1993", {}),
]}


# ----------------------------------------------------------------------------- the assessment

@dataclass(frozen=True)
class Decomposition:
    """Heat release of the secondary decomposition, measured at one temperature (zero order)."""

    onset_power: float  # W/kg at onset_temperature
    onset_temperature: float  # K
    activation_energy: float  # J/mol


@dataclass(frozen=True)
class ThermalSafetyInput:
    """One step to classify. Give `reaction_energy`, or `reaction_enthalpy` with `concentration` and
    `density`; give `maximum_technical_temperature`, or `contents_fluid` (+ `pressure`) for its
    boiling point; give `decomposition`, or `td24`."""

    process_temperature: float  # K
    heat_capacity: float  # J/(kg K)
    reaction_energy: float | None = None  # J/kg, > 0 exothermic
    reaction_enthalpy: float | None = None  # J/mol, < 0 exothermic
    concentration: float | None = None  # mol/m3
    density: float | None = None  # kg/m3
    accumulation: float = 1.0  # -, 1 = batch (all reactant present when cooling fails)
    maximum_technical_temperature: float | None = None  # K
    contents_fluid: str | None = None
    pressure: float = STANDARD_PRESSURE  # Pa
    decomposition: Decomposition | None = None
    td24: float | None = None  # K


@dataclass(frozen=True)
class ThermalSafetyResult:
    adiabatic_temperature_rise: float  # K
    mtsr: float  # K
    td24: float  # K
    time_to_maximum_rate: float | None  # s, adiabatic, starting at the MTSR; None without decomposition data
    mtt: float  # K
    criticality_class: int
    reasoning: list[str] = field(default_factory=list)
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = (THERMAL_SAFETY,)


def _adiabatic_rise(inp: ThermalSafetyInput) -> float:
    if inp.reaction_energy is not None:
        if inp.reaction_enthalpy is not None:
            raise InputError("reaction_enthalpy", "give either reaction_energy or reaction_enthalpy, not both")
        if not (math.isfinite(inp.reaction_energy) and inp.reaction_energy > 0):
            raise InputError("reaction_energy", f"must be a positive energy released per kg, got "
                                                f"{inp.reaction_energy!r} J/kg (heat released is positive here)")
        return adiabatic_temperature_rise_from_energy(inp.reaction_energy, inp.heat_capacity)
    if inp.reaction_enthalpy is None:
        raise InputError("reaction_energy", "give reaction_energy, or reaction_enthalpy with concentration and density")
    for name in ("concentration", "density"):
        if getattr(inp, name) is None:
            raise InputError(name, "is required with reaction_enthalpy")
    if not (math.isfinite(inp.reaction_enthalpy) and inp.reaction_enthalpy < 0):
        raise InputError("reaction_enthalpy", f"must be negative (exothermic), got {inp.reaction_enthalpy!r} J/mol: "
                                              f"{SIGN_CONVENTION}. A thermal-safety assessment is for a step that "
                                              "releases heat; give the enthalpy as a negative number")
    assert inp.concentration is not None and inp.density is not None  # required above
    return adiabatic_temperature_rise_from_enthalpy(inp.reaction_enthalpy, inp.concentration,
                                                    inp.density, inp.heat_capacity)


def _mtt(inp: ThermalSafetyInput, reasons: list[str]) -> float:
    if inp.maximum_technical_temperature is not None:
        return require_temperature("maximum_technical_temperature", inp.maximum_technical_temperature)
    if inp.contents_fluid is None:
        raise InputError("maximum_technical_temperature",
                         "give the maximum technical temperature, or the contents fluid for its boiling point")
    if not (math.isfinite(inp.pressure) and inp.pressure > 0):
        raise InputError("pressure", f"must be a positive absolute pressure, got {inp.pressure!r}")
    boiling = liquid_range(inp.contents_fluid, None, inp.pressure)[1]
    reasons.append(f"MTT taken as the boiling point of {inp.contents_fluid} at {inp.pressure / 1e5:.4g} bar "
                   f"(CoolProp): {boiling - 273.15:.1f} degC.")
    return boiling


def assess_thermal_safety(inp: ThermalSafetyInput) -> ThermalSafetyResult:
    """Adiabatic rise, MTSR, T_D24, TMR_ad at the MTSR, MTT and the criticality class of one step."""
    warnings = Warnings()
    reasons: list[str] = []
    Tp = require_temperature("process_temperature", inp.process_temperature)
    require_positive("heat_capacity", inp.heat_capacity)
    dT_ad = _adiabatic_rise(inp)
    mtsr = mtsr_Stoessel_1993(Tp, inp.accumulation, dT_ad)
    reasons.append(f"Adiabatic temperature rise {dT_ad:.1f} K; with accumulation {inp.accumulation:.3g} "
                   f"the MTSR is {Tp - 273.15:.1f} + {inp.accumulation * dT_ad:.1f} = {mtsr - 273.15:.1f} degC.")
    mtt = _mtt(inp, reasons)
    if Tp > mtt:
        raise InputError("process_temperature", "lies above the maximum technical temperature")

    tmr = None
    if inp.decomposition is not None:
        if inp.td24 is not None:
            raise InputError("td24", "give either decomposition data or td24, not both")
        d = inp.decomposition
        require_positive("decomposition.onset_power", d.onset_power)
        require_temperature("decomposition.onset_temperature", d.onset_temperature)
        require_positive("decomposition.activation_energy", d.activation_energy)
        try:
            td24 = td24_Townsend_Tou_1980(inp.heat_capacity, d.onset_power, d.onset_temperature, d.activation_energy)
        except CalculationError as exc:
            raise InputError("decomposition", str(exc)) from None
        q_mtsr = decomposition_power(d.onset_power, d.onset_temperature, d.activation_energy, mtsr)
        tmr = tmr_ad_Townsend_Tou_1980(inp.heat_capacity, mtsr, q_mtsr, d.activation_energy)
        check = REGISTRY["Townsend & Tou (1980)"]
        check.check(warnings, **{"E/(R T)": d.activation_energy / (GAS_CONSTANT * max(mtsr, td24))})
        for level, value in (("T_D24", td24), ("MTSR", mtsr)):
            if abs(value - d.onset_temperature) > EXTRAPOLATION_LIMIT:
                warnings.add(_warning("long_extrapolation",
                                      f"the decomposition rate is extrapolated {abs(value - d.onset_temperature):.0f} K "
                                      f"from its measurement to the {level}; measure closer to it"))
        reasons.append(f"T_D24 = {td24 - 273.15:.1f} degC (TMR_ad = 24 h, Townsend & Tou zero-order estimate); "
                       f"TMR_ad at the MTSR = {tmr / SECONDS_PER_HOUR:.3g} h.")
    elif inp.td24 is not None:
        td24 = require_temperature("td24", inp.td24)
        reasons.append(f"T_D24 = {td24 - 273.15:.1f} degC as given; without decomposition kinetics "
                       "the TMR_ad at the MTSR is not computed.")
    else:
        raise InputError("decomposition", "give decomposition data (onset_power, onset_temperature, "
                                          "activation_energy) or td24")

    klass, class_reasons = criticality_class_Stoessel_1993(Tp, mtsr, mtt, td24)
    reasons.extend(class_reasons)
    levels = {"MTSR": mtsr, "MTT": mtt, "T_D24": td24}
    names = list(levels)
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            if abs(levels[a] - levels[b]) < BOUNDARY_MARGIN:
                warnings.add(_warning("near_class_boundary",
                                      f"{a} and {b} lie within {BOUNDARY_MARGIN:g} K of each other; "
                                      "the class may change within the uncertainty of the data"))
    return ThermalSafetyResult(dT_ad, mtsr, td24, tmr, mtt, klass, reasons, warnings)


def _warning(code: str, message: str) -> CalcWarning:
    return CalcWarning(code, message)
