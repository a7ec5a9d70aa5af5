"""Cooling check: can the vessel remove the heat load with margin, and what would make it do so.

The cooling capacity is the heat the jacket and coil streams remove from contents held at the
process temperature T_r (``calc.heat_transfer``: films, wall, U A and the coolant's warming along
its path). The margin is

    margin = Q_capacity / Q_load        (Q_load from ``calc.heat_load``)

and the vessel is adequate when margin >= safety factor (common practice, no source: the factor
covers the +-25-30 % scatter of the published film correlations). When the load is zero or
negative nothing needs removing: the margin is reported as None (unbounded), never as infinity,
and the vessel is adequate.

Three limits are solved (not estimated) for the safety factor given, each by re-running the whole
heat-transfer network, because properties, films and U change with the quantity varied:

* ``minimum_dosing_time`` (dosing model only): Q_load(t) = A / t + P_agitator with
  A = -dH n - m_feed c_p,feed (T_r - T_feed), so t_min = A / (Q_capacity / SF - P_agitator)
  (closed form; the capacity does not depend on the dosing time at a steady T_r).
* ``maximum_coolant_inlet_temperature``: Brent's method on the inlet temperature between just above
  the coolant's freezing point and T_r (the capacity falls to zero as the inlet approaches T_r).
* ``required_coolant_flow``: Brent's method on log(jacket mass flow); coil flows change in
  proportion. The capacity rises with flow toward the limit set by the area and the process film;
  the search stops at the largest flow the utility can push (its available pressure difference,
  maximum velocity and maximum flow: :mod:`calc.network.flow_limit`), or, when the utility gives no
  limit, at :data:`FLOW_SEARCH_CAP` times the given flow (with a warning).

When the given flow is beyond the utility's limits, the coolant-temperature limit is solved at the
largest flow the utility allows, and the check warns (the capacity itself stays at the given flow).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from scipy.optimize import brentq

from calc.deadline import NEVER, Deadline
from calc.network import coolant_balance
from calc.checks.heat_load import Dosing, HeatLoad, HeatRelease, heat_load
from calc.network.flow_limit import FlowLimit, flow_limit
from calc.network.heat_transfer import HeatTransferResult, heat_transfer
from calc.validity import CalcWarning, CalculationError, InputError, Warnings
from calc.vessel.model import Charge, Coolant, Vessel

#: Safety factor on the heat load when none is given (common practice, no source).
DEFAULT_SAFETY_FACTOR = 1.3
#: Without utility limits the flow search stops at this multiple of the given coolant flow; the capacity
#: there is reported as the limit set by the area and the process film (common practice, no source: a
#: jacket's flow can rarely be raised by two orders of magnitude).
FLOW_SEARCH_CAP = 100.0
#: The inlet-temperature search starts this far above the coolant's freezing point, K.
FREEZING_OFFSET = 0.1
#: For a coolant given by its properties (no known freezing point) the inlet-temperature search
#: reaches this far below the process temperature, K.
EXPLICIT_COOLANT_SPAN = 150.0
#: Closest approach of the coolant inlet to the process temperature in the search, K.
APPROACH = 1e-3

CAUTIONS = (
    "Screening estimate: the film coefficients come from published correlations that scatter by "
    "+-25-30 % against measurements; the safety factor is meant to cover that, not more.",
    "Confirm the heat release with reaction calorimetry and the heat transfer with plant data "
    "(a measured U A or a cooling curve of the real vessel) before relying on this verdict.",
    "Local codes and standards and the review of a licensed engineer govern the design and operation "
    "of the plant; this result does not replace them.",
    "The verdict covers normal operation only, not a cooling failure: assess the loss of cooling "
    "(adiabatic temperature rise, MTSR, time to maximum rate) with the thermal-safety calculation.",
)
DOSING_CAUTION = ("The dosing model assumes the feed reacts as it is added. Any unreacted feed that "
                  "accumulates releases more heat later and is not in this load: check accumulation "
                  "by calorimetry.")
ENDOTHERMIC_CAUTION = ("This step was declared heat-absorbing (endothermic): 'adequate' here means only that "
                       "the cooling does not limit it. Make sure the sign is right: an exothermic step entered "
                       "with a positive enthalpy would be checked as if it needed no cooling.")


@dataclass(frozen=True)
class Limit:
    """One solved limit: its value (SI), whether it exists, why, and the cooling capacity it gives (W)."""

    value: float | None
    reachable: bool
    message: str
    cooling_capacity: float | None = None


@dataclass(frozen=True)
class Limits:
    """The solved limits; ``minimum_dosing_time`` is None unless the heat release is a dosing step.

    Units: ``minimum_dosing_time`` s, ``maximum_coolant_inlet_temperature`` K,
    ``required_coolant_flow`` kg/s of jacket coolant (coil flows in proportion).
    """

    minimum_dosing_time: Limit | None
    maximum_coolant_inlet_temperature: Limit
    required_coolant_flow: Limit


@dataclass(frozen=True)
class CoolingCheck:
    """The verdict, the numbers behind it and the cautions that go with it."""

    adequate: bool
    margin: float | None  # capacity / load; None when the load is <= 0 (no cooling needed)
    safety_factor: float
    heat_load: HeatLoad
    cooling_capacity: float  # W
    coolant_outlet_temperature: float | None  # K, jacket (or first coil) stream
    heat_transfer: HeatTransferResult
    limits: Limits | None
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = CAUTIONS


def charge_mass(result: HeatTransferResult) -> float:
    """Mass of the contents, kg: the liquid volume at T_r times its density there."""
    return result.fill.volume * result.process_properties.density


def _check_safety_factor(safety_factor: float) -> float:
    if isinstance(safety_factor, bool) or not isinstance(safety_factor, (int, float)) \
            or not math.isfinite(safety_factor) or safety_factor < 1.0:
        raise InputError("safety_factor", f"must be a number of at least 1, got {safety_factor!r}")
    return float(safety_factor)


def margin_of(capacity: float, load: float) -> float | None:
    """Q_capacity / Q_load, or None when the load is <= 0 (unbounded margin).

    >>> margin_of(130.0, 100.0), margin_of(130.0, 0.0)
    (1.3, None)
    """
    return capacity / load if load > 0.0 else None


def evaluate(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
             heat_release: HeatRelease) -> tuple[HeatTransferResult, HeatLoad]:
    """The heat-transfer network and the heat load at one state (no verdict, no limits)."""
    result = heat_transfer(vessel, charge, coolant, process_temperature)
    load = heat_load(heat_release, charge_mass(result), process_temperature, result.agitation.power)
    return result, load


def _capacity(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float) -> float:
    return heat_transfer(vessel, charge, coolant, process_temperature).duty


def _minimum_dosing_time(heat_release: Dosing, process_temperature: float, capacity: float,
                         agitator_power: float, safety_factor: float) -> Limit:
    net_energy = heat_release.net_energy(process_temperature)
    if net_energy <= 0.0:
        return Limit(0.0, True, "the dose releases no net heat (the feed's sensible heat takes up the reaction "
                                "heat): any dosing time will do; 0 means no lower bound", capacity)
    available = capacity / safety_factor - agitator_power
    if available <= 0.0:
        return Limit(None, False, "not reachable at any dosing time: the agitator's power alone uses up the "
                                  "cooling capacity divided by the safety factor", capacity)
    return Limit(net_energy / available, True,
                 "shortest dosing time whose heat load the vessel removes with the safety factor", capacity)


def _solve(residual, start: float, step: float, low: float, high: float, increasing: bool, what: str,
           deadline: Deadline = NEVER, **tolerances) -> tuple[float | None, float]:
    """Root of a monotonic ``residual`` in [low, high], searched outward from the estimate ``start``.

    Steps of ``step``, doubling, go the way the residual's sign points until it changes; Brent's
    method then closes the bracket (calls are memoised, so its first two evaluations are free).
    Returns (root, residual there), or (None, residual at the bound reached) when the sign never
    changes: the root lies beyond ``low`` or ``high``. Each new evaluation first checks ``deadline``
    (:class:`calc.deadline.OutOfTime` when it has passed).
    """
    memo: dict[float, float] = {}

    def f(x: float) -> float:
        if x not in memo:
            deadline.check()
            memo[x] = residual(x)
        return memo[x]

    x = min(max(start, low), high)
    fx = f(x)
    while fx != 0.0:
        upward = (fx < 0.0) == increasing
        if (upward and x >= high) or (not upward and x <= low):
            return None, fx
        nxt = min(x + step, high) if upward else max(x - step, low)
        fn = f(nxt)
        if (fn < 0.0) != (fx < 0.0) or fn == 0.0:
            a, b = sorted((x, nxt))
            try:
                root = brentq(f, a, b, **tolerances)
            except (ValueError, RuntimeError) as exc:  # pragma: no cover - the bracket changes sign
                raise CalculationError(f"{what}: {exc}") from None
            return root, f(root)
        x, fx, step = nxt, fn, 2.0 * step
    return x, fx


def _maximum_inlet_temperature(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                               target: float, capacity: float, limit: FlowLimit,
                               deadline: Deadline = NEVER) -> Limit:
    at_flow = "at the given flow"
    if limit.mass_flow is not None and limit.mass_flow < coolant.mass_flow():
        coolant = coolant.with_mass_flow(limit.mass_flow)
        capacity = _capacity(vessel, charge, coolant, process_temperature)
        at_flow = (f"at {limit.mass_flow:.4g} kg/s, the largest flow within {limit.reason} "
                   "(the given flow is beyond it)")
    if target <= 0.0:
        return Limit(process_temperature, True, "no net heat load: any coolant colder than the contents will do")
    liquid_range = getattr(coolant.liquid, "liquid_range", None)
    if liquid_range is not None:
        freezing, boiling = liquid_range()
        low = freezing + FREEZING_OFFSET
        floor = "the coolant's freezing point"
        high = min(process_temperature, boiling) - APPROACH
    else:
        low = max(process_temperature - EXPLICIT_COOLANT_SPAN, 1.0)
        floor = f"{EXPLICIT_COOLANT_SPAN:g} K below the process temperature (no freezing point known)"
        high = process_temperature - APPROACH
    given = coolant.inlet_temperature
    low = min(low, given)

    def residual(inlet: float) -> float:
        if inlet == given:
            return capacity / target - 1.0
        return _capacity(vessel, charge, replace(coolant, inlet_temperature=inlet), process_temperature) / target - 1.0

    # At fixed U and coolant properties the capacity is proportional to T_r - T_in (calc.coolant):
    # that estimate is close, since U changes little with the inlet temperature.
    driving = process_temperature - given
    estimate = process_temperature - driving * target / capacity if capacity > 0.0 else low
    inlet, value = _solve(residual, estimate, 0.01 * driving, low, high, increasing=False,
                          what="maximum coolant inlet temperature", deadline=deadline, xtol=1e-9, rtol=1e-11)
    if inlet is None and value >= 0.0:
        return Limit(high, True, "every inlet temperature up to the process temperature (or the coolant's "
                                 "boiling point) removes the load with the safety factor", (value + 1.0) * target)
    if inlet is None:
        return Limit(None, False, f"not reachable: even a coolant inlet just above {floor} does not remove "
                                  f"the load with the safety factor {at_flow}", (value + 1.0) * target)
    return Limit(inlet, True, "warmest coolant inlet that removes the load with the safety factor "
                              f"{at_flow}", (value + 1.0) * target)


def _flow_estimate(result: HeatTransferResult, target: float) -> float:
    """Jacket mass flow removing ``target`` at the present U A of each stream (closed form), kg/s.

    Streams keep their flow ratios; the total is solved with ``calc.coolant.required_flow`` on the
    lumped U A and capacity rate. A first guess only: U rises with the flow.
    """
    ua = sum(s.ua for s in result.streams)
    rate = sum(s.balance.heat_capacity_rate for s in result.streams)
    flow = sum(s.mass_flow for s in result.streams)
    jacket = result.streams[0].mass_flow
    if ua <= 0.0 or rate <= 0.0:
        return jacket
    heat_capacity = rate / flow
    inlet = result.streams[0].balance.inlet_temperature
    need = coolant_balance.required_flow(result.process_temperature, inlet, ua, heat_capacity, target)
    if not need.reachable or need.mass_flow == 0.0:
        return jacket * FLOW_SEARCH_CAP
    return need.mass_flow * jacket / flow


def _required_flow(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                   target: float, result: HeatTransferResult, limit: FlowLimit,
                   deadline: Deadline = NEVER) -> Limit:
    if target <= 0.0:
        return Limit(0.0, True, "no net heat load: no coolant flow is needed")
    given = coolant.mass_flow()
    capacity = result.duty

    results: dict[float, HeatTransferResult] = {}

    def residual(log_flow: float) -> float:
        if log_flow == math.log(given):
            return capacity / target - 1.0
        if log_flow not in results:
            results[log_flow] = heat_transfer(vessel, charge, coolant.with_mass_flow(math.exp(log_flow)),
                                              process_temperature)
        return results[log_flow].duty / target - 1.0

    estimate = math.log(_flow_estimate(result, target)) if result.streams else math.log(given)
    high = math.log(given * FLOW_SEARCH_CAP if limit.mass_flow is None else limit.mass_flow)
    # U A rises with the flow, so the fixed-U A estimate is off; one more closed-form estimate from the
    # network solved at the first one shows how far, and sets the first step of the search.
    step = math.log(1.2)
    if result.streams and estimate < high:
        deadline.check()
        first = residual(estimate)
        if first != 0.0 and results.get(estimate) is not None and results[estimate].streams:
            again = math.log(_flow_estimate(results[estimate], target))
            step = min(max(1.5 * abs(again - estimate), math.log(1.01)), math.log(4.0))
    low = math.log(given) - 30.0 * math.log(10.0)
    log_flow, value = _solve(residual, estimate, step, low, high,
                             increasing=True, what="required coolant flow", deadline=deadline, xtol=1e-10, rtol=1e-11)
    if log_flow is None and value < 0.0:
        if limit.mass_flow is not None:
            return Limit(None, False, f"not reachable within {limit.reason}: the largest flow it allows "
                                      f"({limit.mass_flow:.4g} kg/s) does not remove the load with the safety factor "
                                      "(capacity shown at that flow)", (value + 1.0) * target)
        return Limit(None, False, "not reachable at any flow: the area and process film limit the capacity "
                                  f"(shown at {FLOW_SEARCH_CAP:g} times the given flow; the utility gave no "
                                  "available pressure difference, maximum velocity or maximum flow)",
                     (value + 1.0) * target)
    if log_flow is None:  # pragma: no cover - capacity ~ m c_p (T_r - T_in) vanishes long before 1e-30 of the flow
        raise CalculationError("required coolant flow: no flow low enough to fall short of the load")
    within = "" if limit.mass_flow is None else f", within {limit.reason} (at most {limit.mass_flow:.4g} kg/s)"
    return Limit(math.exp(log_flow), True, "jacket coolant mass flow that removes the load with the safety factor "
                                           f"(coil flows in proportion){within}", (value + 1.0) * target)


def cooling_check(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                  heat_release: HeatRelease, safety_factor: float = DEFAULT_SAFETY_FACTOR,
                  limits: bool = True, deadline: Deadline = NEVER) -> CoolingCheck:
    """Compare the cooling capacity at ``process_temperature`` (K) with the heat load.

    ``limits=False`` skips the three solved limits (``CoolingCheck.limits`` is then None), for
    callers that need only the verdict. The limit searches stop with :class:`calc.deadline.OutOfTime`
    once ``deadline`` has passed.
    """
    safety_factor = _check_safety_factor(safety_factor)
    result, load = evaluate(vessel, charge, coolant, process_temperature, heat_release)
    capacity = result.duty
    margin = margin_of(capacity, load.total)
    adequate = margin is None or margin >= safety_factor
    warnings = Warnings()
    warnings.extend_unique(result.warnings)
    warnings.extend_unique(load.warnings)
    if margin is None:
        warnings.add(CalcWarning("no_net_heat_load",
                                 f"the heat load is {load.total:.4g} W: nothing needs removing, so the margin "
                                 "is unbounded (reported as null)"))
    stream = result.stream("jacket") or (result.streams[0] if result.streams else None)
    outlet = stream.balance.outlet_temperature if stream is not None else None
    total_flow = sum(s.mass_flow for s in result.streams)
    maximum = coolant.maximum_mass_flow()
    if maximum is not None and total_flow > maximum * (1 + 1e-9):
        warnings.add(CalcWarning("flow_exceeds_maximum", f"the coolant flow to all circuits ({total_flow:.4g} kg/s) "
                                                         f"exceeds the utility's maximum ({maximum:.4g} kg/s)"))
    solved = None
    if limits:
        limit = flow_limit(result.streams, coolant)
        target = safety_factor * load.total
        dosing = None
        if isinstance(heat_release, Dosing):
            dosing = _minimum_dosing_time(heat_release, process_temperature, capacity, load.agitator, safety_factor)
        solved = Limits(dosing,
                        _maximum_inlet_temperature(vessel, charge, coolant, process_temperature, target, capacity,
                                                   limit, deadline),
                        _required_flow(vessel, charge, coolant, process_temperature, target, result, limit,
                                       deadline))
    cautions = CAUTIONS + ((DOSING_CAUTION,) if isinstance(heat_release, Dosing) else ())
    if getattr(heat_release, "endothermic", False):
        cautions += (ENDOTHERMIC_CAUTION,)
    return CoolingCheck(adequate, margin, safety_factor, load, capacity, outlet, result, solved, warnings, cautions)
