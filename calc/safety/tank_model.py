"""The stirred-tank model description: what one dynamic run is given, and what it returns.

The input of :func:`calc.dynamics.simulate` (species, reactions, charge, feed, jacket, controller,
cooling failure, temperature limits, solver and budget), its validation, the operating modes
(batch, semi-batch, continuous: what conversion and accumulation mean in each, and where a
cooling failure is searched), and the result (time series, summary). All quantities SI: K, kg,
mol, m3, s, W, J/mol. Every result is a screening estimate: confirm with reaction calorimetry and
plant data, follow local codes and have a licensed engineer review it.
"""
from __future__ import annotations

import math
import numbers
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Callable, NamedTuple, Sequence

import numpy as np
from scipy.integrate import BDF, LSODA, Radau

from calc.cautions import DYNAMICS
from calc.deadline import NEVER, Deadline
from calc.validity import (CalcWarning, InputError, Warnings, require_finite, require_non_negative,
                           require_positive, require_sign)

if TYPE_CHECKING:  # the model the mode functions take is built from these inputs
    from calc.safety.dynamics import _Model


#: Stiff-capable solvers offered; explicit methods are deliberately absent (runaway kinetics are stiff).
METHODS = {"BDF": BDF, "LSODA": LSODA, "Radau": Radau}


# ----------------------------------------------------------------------------- inputs

@dataclass(frozen=True)
class Species:
    name: str
    molar_mass: float  # kg/mol
    heat_capacity: float  # J/(kg K)


@dataclass(frozen=True)
class Reaction:
    """Power-law kinetics r = k(T) prod c_i^order_i, mol/(m3 s), with k(T) Arrhenius about T_ref."""

    stoichiometry: dict[str, float]  # species name -> coefficient, negative when consumed
    orders: dict[str, float]  # species name -> order, >= 0
    rate_constant: float  # k at reference_temperature, (mol/m3)^(1 - sum of orders)/s
    reference_temperature: float  # K
    activation_energy: float  # J/mol
    enthalpy: float  # J/mol of extent at the enthalpy reference temperature, negative = exothermic
    endothermic: bool = False  # the request declares a heat-absorbing reaction (enthalpy > 0 allowed)


@dataclass(frozen=True)
class InitialCharge:
    """The initial contents. Mass not carried by the listed species is inert balance (solvent)."""

    mass: float  # kg
    temperature: float  # K
    composition: dict[str, float]  # species name -> mol/kg of charge
    density: float  # kg/m3, constant
    balance_heat_capacity: float  # J/(kg K) of the inert balance


@dataclass(frozen=True)
class FeedStep:
    start: float  # s
    end: float  # s
    mass_flow: float  # kg/s


@dataclass(frozen=True)
class Feed:
    temperature: float  # K
    composition: dict[str, float]  # species name -> mol/kg of feed; the rest is inert balance
    steps: tuple[FeedStep, ...]  # ordered, not overlapping

    @classmethod
    def constant(cls, temperature: float, composition: dict[str, float], mass_flow: float,
                 start: float = 0.0, end: float = math.inf) -> "Feed":
        return cls(temperature, composition, (FeedStep(start, end, mass_flow),))


@dataclass(frozen=True)
class Jacket:
    """Heat exchange with a coolant through UA. `model`: "single_pass" (quasi-steady coolant, outlet
    T_out = T - (T - T_in) exp(-UA/(m c_p))) or "holdup" (well-mixed jacket of `holdup_mass`)."""

    ua: float  # W/K
    coolant_flow: float  # kg/s
    coolant_heat_capacity: float  # J/(kg K)
    inlet_temperature: float  # K
    model: str = "single_pass"
    holdup_mass: float | None = None  # kg
    initial_temperature: float | None = None  # K, jacket holdup; default: the coolant inlet


@dataclass(frozen=True)
class Controller:
    """PI control of the contents temperature by the coolant inlet temperature (reverse acting),
    bounded by the utility's range, with back-calculation anti-windup (tracking time = integral time;
    Astrom & Hagglund, *Advanced PID Control*, ISA 2006, section 3.5)."""

    setpoint: float  # K
    gain: float  # K of coolant per K of error
    integral_time: float  # s
    minimum_inlet_temperature: float  # K
    maximum_inlet_temperature: float  # K
    bias: float | None = None  # K, coolant inlet at zero error; default: the jacket's inlet temperature


@dataclass(frozen=True)
class CoolingFailure:
    """Jacket duty drops to zero at `time`; None searches the worst time over the dosing period
    (semi-batch) or the horizon (other modes)."""

    time: float | None = None  # s
    stop_feed: bool = True


@dataclass(frozen=True)
class TemperatureLimit:
    name: str  # e.g. "maximum_temperature", "mtt"
    temperature: float  # K
    terminal: bool = True
    direction: int = 1  # +1 crossing upwards, -1 downwards, 0 either


@dataclass(frozen=True)
class Budget:
    horizon_limit: float = 30 * 86400.0  # s
    output_points: int = 201
    maximum_output_points: int = 20001
    wall_time: float = 10.0  # s of computing for this run
    deadline: Deadline = NEVER  # the caller's clock (a request's budget); the run stops at the sooner of the two


@dataclass(frozen=True)
class SimulationInput:
    mode: str  # "batch", "semi_batch", "continuous"
    species: tuple[Species, ...]
    reactions: tuple[Reaction, ...]
    charge: InitialCharge
    horizon: float  # s
    feed: Feed | None = None
    jacket: Jacket | None = None
    controller: Controller | None = None
    shaft_power: float = 0.0  # W
    mixture_heat_capacity: float | None = None  # J/(kg K); replaces every species' and the balance's
    enthalpy_reference_temperature: float = 298.15  # K
    limiting_reagent: str | None = None
    failure: CoolingFailure | None = None
    limits: tuple[TemperatureLimit, ...] = ()
    method: str = "BDF"
    rtol: float = 1e-7
    budget: Budget = Budget()


# ----------------------------------------------------------------------------- results

@dataclass(frozen=True)
class Series:
    time: np.ndarray  # s
    temperature: np.ndarray  # K
    coolant_inlet_temperature: np.ndarray  # K; NaN after a cooling failure (no coolant flows)
    coolant_outlet_temperature: np.ndarray  # K (the jacket temperature for a holdup jacket); NaN after a failure
    moles: np.ndarray  # mol, shape (species, points)
    concentrations: np.ndarray  # mol/m3, shape (species, points)
    mass: np.ndarray  # kg
    conversion: np.ndarray  # -
    accumulation: np.ndarray  # -
    heat_release_rate: np.ndarray  # W
    jacket_duty: np.ndarray  # W, heat removed from the contents (positive when cooling)
    feed_rate: np.ndarray  # kg/s
    species: tuple[str, ...] = ()  # names, the row order of moles and concentrations

    @property
    def concentrations_by_species(self) -> dict[str, np.ndarray]:
        """Species name -> its concentration series, mol/m3."""
        return dict(zip(self.species, self.concentrations))


@dataclass(frozen=True)
class LimitCrossing:
    name: str
    time: float  # s
    temperature: float  # K


@dataclass(frozen=True)
class Summary:
    maximum_temperature: float  # K
    time_of_maximum_temperature: float  # s
    final_conversion: float
    maximum_accumulation: float
    time_of_maximum_accumulation: float  # s
    peak_heat_release_rate: float  # W
    peak_jacket_duty: float  # W
    limits_crossed: tuple[LimitCrossing, ...]
    closure_error: float  # |dH - sum of terms| / scale
    failure_time: float | None  # s


class FailureTrial(NamedTuple):
    """One failure time tried by the worst-failure search and the peak temperature it led to."""

    failure_time: float  # s
    maximum_temperature: float  # K


@dataclass(frozen=True)
class SimulationResult:
    success: bool
    status: int
    message: str
    species: tuple[str, ...]  # names, the row order of moles and concentrations
    series: Series
    summary: Summary
    failure_search: tuple[FailureTrial, ...] = ()  # every failure time evaluated, by time
    rhs_evaluations: int = 0  # point evaluations of the right-hand side, Jacobian included
    steps: int = 0
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = (DYNAMICS,)


# ----------------------------------------------------------------------------- modes

def _supply_batch(m: _Model) -> float:
    return m.limiting_initial_moles


def _supply_semi_batch(m: _Model) -> float:
    assert m.inp.feed is not None  # a semi-batch input has its feed (validated)
    return m.limiting_initial_moles + m.limiting_feed_moles_per_kg * sum(s.mass_flow * (s.end - s.start) for s in m.inp.feed.steps)


def _supply_continuous(m: _Model) -> float:
    return m.limiting_feed_moles_per_kg * m.inp.charge.mass  # a vessel-full of feed


def _conversion_closed(m: _Model, nL: np.ndarray, mass: np.ndarray, fed: np.ndarray) -> np.ndarray:
    conversion: np.ndarray = (m.limiting_initial_moles + m.limiting_feed_moles_per_kg * fed - nL) / m.limiting_supply
    return conversion


def _conversion_continuous(m: _Model, nL: np.ndarray, mass: np.ndarray, fed: np.ndarray) -> np.ndarray:
    return 1.0 - nL / (mass * m.limiting_feed_moles_per_kg)


def _accumulation_closed(m: _Model, nL: np.ndarray, mass: np.ndarray) -> np.ndarray:
    return nL / m.limiting_supply


def _accumulation_continuous(m: _Model, nL: np.ndarray, mass: np.ndarray) -> np.ndarray:
    return nL / (mass * m.limiting_feed_moles_per_kg)


def _window_dosing(m: _Model) -> tuple[float, float]:
    assert m.inp.feed is not None  # a semi-batch input has its feed (validated)
    return m.inp.feed.steps[0].start, min(m.inp.feed.steps[-1].end, m.inp.horizon)


def _window_horizon(m: _Model) -> tuple[float, float]:
    return 0.0, m.inp.horizon


@dataclass(frozen=True)
class _Mode:
    """Conversion: fraction of all limiting reagent charged and dosed that has reacted (closed modes),
    or 1 - outlet/feed content (continuous). Accumulation: the unconverted fraction present, relative
    to the same total (closed) or to a vessel-full of feed (continuous). Failure window: where the
    worst cooling-failure time is searched. Each function takes the model built from the input
    (calc.dynamics._Model)."""

    has_feed: bool
    has_outflow: bool
    supply: Callable[[_Model], float]
    conversion: Callable[[_Model, np.ndarray, np.ndarray, np.ndarray], np.ndarray]
    accumulation: Callable[[_Model, np.ndarray, np.ndarray], np.ndarray]
    failure_window: Callable[[_Model], tuple[float, float]]


MODES = {
    "batch": _Mode(False, False, _supply_batch, _conversion_closed, _accumulation_closed, _window_horizon),
    "semi_batch": _Mode(True, False, _supply_semi_batch, _conversion_closed, _accumulation_closed,
                        _window_dosing),
    "continuous": _Mode(True, True, _supply_continuous, _conversion_continuous, _accumulation_continuous,
                        _window_horizon),
}
JACKET_MODELS = ("single_pass", "holdup")


# ----------------------------------------------------------------------------- validation

def default_limiting_reagent(inp: SimulationInput, names: Sequence[str]) -> str:
    """The first reactant of the first reaction that is fed (semi-batch), else that is charged."""
    source = inp.feed.composition if inp.mode == "semi_batch" and inp.feed is not None else inp.charge.composition
    for name, value in inp.reactions[0].stoichiometry.items():
        if value < 0 and source.get(name, 0.0) > 0:
            return name
    raise InputError("limiting_reagent", "no reactant of the first reaction is present; name the limiting reagent")




def _composition(field_name: str, composition: dict[str, float], names: set[str], molar_mass: dict[str, float]) -> None:
    for name, value in composition.items():
        if name not in names:
            raise InputError(f"{field_name}.{name}", f"unknown species {name!r}")
        require_non_negative(f"{field_name}.{name}", value)
    if sum(v * molar_mass[k] for k, v in composition.items()) > 1.0 + 1e-12:
        raise InputError(field_name, "the listed species weigh more than the mass they are in (mol/kg x kg/mol > 1)")


def validate(inp: SimulationInput, warnings: Warnings) -> None:
    """Check a run before it is integrated; raise :class:`InputError` naming the first field at fault.

    The checks run in this order: mode and method, species, reactions (unknown species, orders, rate
    parameters, the sign of each enthalpy, mass balance), the charge and run settings, the feed, the
    jacket and controller, the failure time, the limits and the limiting reagent. Conditions that do
    not stop the run (a consumed reactant at zero order, unbalanced stoichiometry) are added to
    ``warnings``.
    """
    if inp.mode not in MODES:
        raise InputError("mode", f"unknown mode {inp.mode!r}; one of {', '.join(MODES)}")
    if inp.method not in METHODS:
        raise InputError("method", f"unknown method {inp.method!r}; one of {', '.join(METHODS)}")
    molar_mass = _validate_species(inp.species)
    if not inp.reactions:
        raise InputError("reactions", "at least one reaction is needed")
    for j, reaction in enumerate(inp.reactions):
        _validate_reaction(f"reactions[{j}]", reaction, molar_mass, warnings)
    _validate_charge_and_settings(inp, molar_mass)
    mode = MODES[inp.mode]
    if mode.has_feed != (inp.feed is not None):
        raise InputError("feed", f"{'is required' if mode.has_feed else 'does not apply'} in mode {inp.mode}")
    if inp.feed is not None:
        _validate_feed(inp.feed, inp.mode, molar_mass)
    _validate_cooling(inp.jacket, inp.controller)
    if inp.failure is not None and inp.failure.time is not None:
        if not (require_non_negative("cooling_failure.time", inp.failure.time) <= inp.horizon):
            raise InputError("cooling_failure.time", f"must lie within the horizon ({inp.horizon:g} s)")
    for i, lim in enumerate(inp.limits):
        require_positive(f"limits[{i}].temperature", lim.temperature)
        if lim.direction not in (-1, 0, 1):
            raise InputError(f"limits[{i}].direction", "must be -1, 0 or 1")
    if inp.limiting_reagent is not None and inp.limiting_reagent not in molar_mass:
        raise InputError("limiting_reagent", f"unknown species {inp.limiting_reagent!r}")


def _validate_species(species: tuple[Species, ...]) -> dict[str, float]:
    """Names unique, molar masses and heat capacities positive; returns name -> molar mass, kg/mol."""
    if not species:
        raise InputError("species", "at least one species is needed")
    names = [s.name for s in species]
    if len(set(names)) != len(names):
        raise InputError("species", "species names must be unique")
    molar_mass = {}
    for i, s in enumerate(species):
        molar_mass[s.name] = require_positive(f"species[{i}].molar_mass", s.molar_mass)
        require_positive(f"species[{i}].heat_capacity", s.heat_capacity)
    return molar_mass


def _validate_reaction(f: str, r: Reaction, molar_mass: dict[str, float], warnings: Warnings) -> None:
    """One reaction (``f`` is its field path): known species, orders >= 0, rate parameters, the
    enthalpy's sign, and a warning when the stoichiometry does not conserve mass."""
    for name, value in r.stoichiometry.items():
        if name not in molar_mass:
            raise InputError(f"{f}.stoichiometry.{name}", f"unknown species {name!r}")
        require_finite(f"{f}.stoichiometry.{name}", value)
    for name, value in r.orders.items():
        if name not in molar_mass:
            raise InputError(f"{f}.orders.{name}", f"unknown species {name!r}")
        require_non_negative(f"{f}.orders.{name}", value)
        if value == 0 and r.stoichiometry.get(name, 0) < 0:
            warnings.add(CalcWarning("zero_order_reactant", f"{f}: zero order in {name}, which it consumes; "
                                     "its amount can fall below zero"))
    require_non_negative(f"{f}.rate_constant", r.rate_constant)
    require_positive(f"{f}.reference_temperature", r.reference_temperature)
    require_non_negative(f"{f}.activation_energy", r.activation_energy)
    require_sign(f"{f}.enthalpy", r.enthalpy, r.endothermic, f"{f}.endothermic")
    imbalance = sum(v * molar_mass[k] for k, v in r.stoichiometry.items())
    scale = sum(abs(v) * molar_mass[k] for k, v in r.stoichiometry.items()) or 1.0
    if abs(imbalance) > 1e-6 * scale:
        warnings.add(CalcWarning("unbalanced_stoichiometry",
                                 f"{f}: the stoichiometry changes mass by {imbalance * 1e3:.4g} g/mol of extent"))


def _validate_charge_and_settings(inp: SimulationInput, molar_mass: dict[str, float]) -> None:
    """The charge, the heat-capacity and enthalpy settings, the horizon, the budget and the tolerance."""
    ch = inp.charge
    require_positive("charge.mass", ch.mass)
    require_positive("charge.temperature", ch.temperature)
    require_positive("charge.density", ch.density)
    require_positive("charge.balance_heat_capacity", ch.balance_heat_capacity)
    _composition("charge.composition", ch.composition, set(molar_mass), molar_mass)
    if inp.mixture_heat_capacity is not None:
        require_positive("mixture_heat_capacity", inp.mixture_heat_capacity)
    require_positive("enthalpy_reference_temperature", inp.enthalpy_reference_temperature)
    require_finite("shaft_power", inp.shaft_power)
    require_positive("horizon", inp.horizon)
    b = inp.budget
    if inp.horizon > b.horizon_limit:
        raise InputError("horizon", f"must not exceed {b.horizon_limit:g} s")
    if not (isinstance(b.output_points, int) and 2 <= b.output_points <= b.maximum_output_points):
        raise InputError("output_points", f"must be a whole number from 2 to {b.maximum_output_points}")
    require_positive("budget.wall_time", b.wall_time)
    if not (isinstance(inp.rtol, numbers.Real) and 1e-12 <= inp.rtol <= 1e-3):
        raise InputError("rtol", "must lie between 1e-12 and 1e-3")


def _validate_feed(feed: Feed, mode: str, molar_mass: dict[str, float]) -> None:
    """Feed temperature and composition; steps in order, not overlapping, and ending for a semi-batch."""
    require_positive("feed.temperature", feed.temperature)
    _composition("feed.composition", feed.composition, set(molar_mass), molar_mass)
    if not feed.steps:
        raise InputError("feed.steps", "at least one feed step is needed")
    previous_end = 0.0
    for i, s in enumerate(feed.steps):
        require_non_negative(f"feed.steps[{i}].start", s.start)
        if not s.end > s.start:
            raise InputError(f"feed.steps[{i}].end", "must be later than the step's start")
        if s.start < previous_end:
            raise InputError(f"feed.steps[{i}].start", "steps must be in order and must not overlap")
        require_non_negative(f"feed.steps[{i}].mass_flow", s.mass_flow)
        previous_end = s.end
    if mode == "semi_batch" and not math.isfinite(previous_end):
        raise InputError(f"feed.steps[{len(feed.steps) - 1}].end", "semi-batch dosing must end")


def _validate_cooling(j: Jacket | None, c: Controller | None) -> None:
    """The jacket (flows, temperatures, model, holdup) and the controller that needs it."""
    if j is not None:
        require_non_negative("jacket.ua", j.ua)
        require_positive("jacket.coolant_flow", j.coolant_flow)
        require_positive("jacket.coolant_heat_capacity", j.coolant_heat_capacity)
        require_positive("jacket.inlet_temperature", j.inlet_temperature)
        if j.model not in JACKET_MODELS:
            raise InputError("jacket.model", f"unknown jacket model {j.model!r}; one of {', '.join(JACKET_MODELS)}")
        if j.model == "holdup":
            require_positive("jacket.holdup_mass", j.holdup_mass if j.holdup_mass is not None else math.nan)
    if c is not None:
        if j is None:
            raise InputError("controller", "needs a jacket whose coolant inlet it manipulates")
        require_positive("controller.setpoint", c.setpoint)
        require_positive("controller.gain", c.gain)
        require_positive("controller.integral_time", c.integral_time)
        require_positive("controller.minimum_inlet_temperature", c.minimum_inlet_temperature)
        if not c.maximum_inlet_temperature > c.minimum_inlet_temperature:
            raise InputError("controller.maximum_inlet_temperature", "must exceed the minimum inlet temperature")
