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
* ``maximum_coolant_inlet_temperature``: the inlet temperature between just above the coolant's
  freezing point and T_r (the capacity falls to zero as the inlet approaches T_r), to 1e-9 K.
* ``required_coolant_flow``: log(jacket mass flow), to 1e-10; coil flows change in proportion. The
  capacity rises with flow toward the limit set by the area and the process film; the search stops at
  the largest flow the utility can push (its available pressure difference, maximum velocity and maximum
  flow: :mod:`calc.network.flow_limit`), or, when the utility gives no limit, at
  :data:`FLOW_SEARCH_CAP` times the given flow (with a warning).

Both are searched together on the vectorised network (``calc.network.vectorised``): each pass solves
every candidate of both in one call, a grid around the closed-form estimates until the sign changes,
then Newton steps with slopes from neighbouring points (three or four passes in all, instead of a
dozen scalar solves). The margin band's members (``calc.checks.margin_band``) ride in the same passes,
and a scale-up (``calc.checks.scaleup``) searches the limits and bands of all its scales together
(``begin_check`` each check, then one ``finish_checks`` for all): each state converges on its own, so the
answers are those of one check at a time.

When the given flow is beyond the utility's limits, the coolant-temperature limit is solved at the
largest flow the utility allows, and the check warns (the capacity itself stays at the given flow).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Iterable

import numpy as np

from calc.cautions import COOLING_CHECK, DOSING, ENDOTHERMIC
from calc.deadline import NEVER, Deadline
from calc.network import coolant_balance, vectorised
from calc.checks.heat_load import Dosing, HeatLoad, HeatRelease, heat_load
from calc.checks.margin_band import BandSteps, MarginBand, band_start, band_step, band_steps
from calc.network.flow_limit import FlowLimit, flow_limit
from calc.network.heat_transfer import HeatTransferResult, Network, assemble, heat_transfer, solve
from calc.network.heat_transfer import calibrated as back_out_calibration
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
class LimitValues:
    """The limits as reported: a value where one was found (else None) and, beside each, why.

    Units as ``Limits``. A limit that does not apply or was not solved has None and a note saying so.
    """

    minimum_dosing_time: float | None
    minimum_dosing_time_note: str
    maximum_coolant_inlet_temperature: float | None
    maximum_coolant_inlet_temperature_note: str
    required_coolant_flow: float | None
    required_coolant_flow_note: str


NOT_SOLVED = "not solved for this result"
DOSING_ONLY = "applies to the dosing model only"


def _reported(limit: Limit | None) -> tuple[float | None, str]:
    if limit is None:
        return None, DOSING_ONLY
    return (limit.value if limit.reachable else None), limit.message


def limit_values(limits: Limits | None) -> LimitValues:
    """The solved ``limits`` (or None: not solved) as values and notes."""
    if limits is None:
        return LimitValues(None, NOT_SOLVED, None, NOT_SOLVED, None, NOT_SOLVED)
    return LimitValues(*_reported(limits.minimum_dosing_time), *_reported(limits.maximum_coolant_inlet_temperature),
                       *_reported(limits.required_coolant_flow))


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
    cautions: tuple[str, ...] = COOLING_CHECK
    margin_band: MarginBand | None = None  # the margin over the published alternatives (calc.checks.margin_band)
    calibrated: bool = False
    calibration_basis: str | None = None  # what the calibration changes and where it comes from

    @property
    def limit_values(self) -> LimitValues:
        return limit_values(self.limits)


def check_cautions(heat_release: HeatRelease) -> tuple[str, ...]:
    """The cautions of a check of ``heat_release``: the general ones, then those of a dosing or heat-absorbing step."""
    extra: tuple[str, ...] = (DOSING,) if isinstance(heat_release, Dosing) else ()
    if getattr(heat_release, "endothermic", False):
        extra += (ENDOTHERMIC,)
    return COOLING_CHECK + extra


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
    if not need.reachable or need.mass_flow is None or need.mass_flow == 0.0:
        return jacket * FLOW_SEARCH_CAP
    return need.mass_flow * jacket / flow


@dataclass
class _Search:
    """One monotonic root search x in [low, high] of residual(x) = capacity(x) / target - 1."""

    low: float
    high: float
    estimate: float
    step: float  # first spacing of the bracketing grid around the estimate
    increasing: bool  # the residual rises with x
    xtol: float
    known: dict[float, float] = field(default_factory=dict)  # x -> residual already evaluated
    root: float | None = None
    value: float | None = None  # residual at the root, or at the bound reached when there is none
    done: bool = False
    width: float | None = None  # of the bracket at the last pass

    def bracket(self) -> tuple[float, float] | None:
        points = sorted(self.known)
        for a, b in zip(points, points[1:]):
            if (self.known[a] < 0.0) != (self.known[b] < 0.0) or self.known[b] == 0.0:
                return a, b
        return None

    def next_points(self, spread: float) -> list[float]:
        """Where to evaluate next.

        Until the sign changes: a grid around the estimate, then widening on the side the residual points
        to. Then Newton's step from the bracket end nearest the root, with the slope from its nearest
        evaluated neighbour (the secant of the bracket when that step leaves it, and the midpoint too when
        the bracket stops halving), plus two neighbours ``spread`` of the step away, which bracket the
        root tightly once the step is accurate and give the next slope.
        """
        found = self.bracket()
        points = sorted(self.known)
        if found is None:
            upward = (self.known[points[0]] < 0.0) == self.increasing
            edge = points[-1] if upward else points[0]
            if (upward and edge >= self.high) or (not upward and edge <= self.low):
                self.root, self.value, self.done = None, self.known[edge], True
                return []
            if len(points) == 1:  # first pass: a grid on both sides of the estimate
                grid = [self.estimate + k * self.step for k in (-3, -1, 0, 1, 3)]
            else:  # the residual has one sign everywhere so far: widen on the side it points to
                width = max(points[-1] - points[0], self.step)
                grid = [edge + (1 if upward else -1) * width * k for k in (1, 4, 16)]
            return sorted({min(max(x, self.low), self.high) for x in grid} - set(self.known))
        a, b = found
        fa, fb = self.known[a], self.known[b]
        best = a if abs(fa) <= abs(fb) else b
        if self.known[best] == 0.0 or abs(self.known[best]) < RESIDUAL_TOLERANCE or b - a <= self.xtol:
            self.root, self.value, self.done = best, self.known[best], True
            return []
        x = _newton_step(best, points, self.known)
        wanted = set()
        if x is None or not a < x < b:
            x = a - fa * (b - a) / (fb - fa)
            x = min(max(x, a), b)
        if self.width is not None and b - a > 0.5 * self.width:
            wanted.add(0.5 * (a + b))
        self.width = b - a
        delta = max(spread * abs(x - best), 0.5 * self.xtol)
        wanted |= {x, max(x - delta, a), min(x + delta, b)}
        return sorted(wanted - set(self.known))


def _newton_step(best: float, points: list[float], known: dict[float, float]) -> float | None:
    """Root near ``best`` of the parabola through it and its nearest evaluated neighbours (the line through
    one neighbour when it has only one), by Newton's method on that model; None when it is flat."""
    near = sorted(sorted((x for x in points if x != best), key=lambda x: abs(x - best))[:2] + [best])
    if len(near) < 2:
        return None
    if len(near) == 2:
        (x0, x1), f0, f1 = near, known[near[0]], known[near[1]]
        slope = (f1 - f0) / (x1 - x0)
        return best - known[best] / slope if slope != 0.0 else None
    x0, x1, x2 = near
    d01 = (known[x1] - known[x0]) / (x1 - x0)
    d12 = (known[x2] - known[x1]) / (x2 - x1)
    curvature = (d12 - d01) / (x2 - x0)
    x = best
    for _ in range(8):  # on the model only: cheap
        value = known[x0] + d01 * (x - x0) + curvature * (x - x0) * (x - x1)
        slope = d01 + curvature * (2.0 * x - x0 - x1)
        if slope == 0.0:
            return None
        step = value / slope
        x -= step
        if abs(step) <= 1e-15 * max(abs(x), 1.0):
            break
    return x


#: The neighbours of each Newton point sit this share of its step away.
SPREAD = 0.02
#: A limit is solved when capacity / target - 1 is this small (the margin then equals the safety factor to
#: this relative precision).
RESIDUAL_TOLERANCE = 1e-8
#: Most passes of the limit search (each pass solves every candidate of every limit in one vector call).
MAX_PASSES = 16


def _search(searches: list[_Search], evaluate: Callable[[list[tuple[int, float]]], Iterable[float]],
            deadline: Deadline = NEVER) -> None:
    """Run the searches together: each pass gathers every search's next points and solves them in one call.

    ``evaluate(points)`` takes [(search index, x), ...] and returns the residuals. The secant root of a
    smooth residual in a bracket of width w is off by about w^2 times its curvature, so each pass
    shrinks the bracket to ``SPREAD`` of its width or better; three or four passes reach ``xtol``.
    """
    for _ in range(MAX_PASSES):
        deadline.check()
        wanted = _wanted(searches)
        if not wanted:
            return
        _record(searches, wanted, evaluate(wanted))
    _unfinished(searches)


def _wanted(searches: list[_Search]) -> list[tuple[int, float]]:
    """The next points of every unfinished search, as (search index, x)."""
    return [(i, x) for i, search in enumerate(searches) if not search.done for x in search.next_points(SPREAD)]


def _record(searches: list[_Search], wanted: list[tuple[int, float]], values: Iterable[float]) -> None:
    for (i, x), value in zip(wanted, values):
        searches[i].known[x] = float(value)


def _unfinished(searches: list[_Search]) -> None:
    if any(not search.done for search in searches):  # pragma: no cover - the secant passes converge long before
        raise CalculationError(f"limit search did not converge in {MAX_PASSES} passes")


def _inlet_search(network: Network, coolant: Coolant, target: float, capacity: float) -> tuple[_Search, str]:
    """The inlet-temperature search at ``coolant``'s flow, given the capacity at its own inlet."""
    process_temperature = network.process_temperature
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
    # At fixed U and coolant properties the capacity is proportional to T_r - T_in (calc.coolant):
    # that estimate is close, since U changes little with the inlet temperature.
    driving = process_temperature - given
    estimate = process_temperature - driving * target / capacity if capacity > 0.0 else low
    return _Search(low, high, min(max(estimate, low), high), 0.01 * driving, False, 1e-9,
                   {given: capacity / target - 1.0}), floor


def _solve_limits(checks: list[tuple[Network, HeatTransferResult, float, FlowLimit]], bands: list[BandSteps],
                  deadline: Deadline = NEVER) -> tuple[list[tuple[Limit, Limit]], list[MarginBand]]:
    """Warmest coolant inlet and required coolant flow of each ``(network, result, target, flow limit)``,
    and the margin ``bands`` (:func:`calc.checks.margin_band.band_steps`), solved together on the vectorised
    network: every pass solves the candidates of all searches and the members every band asks for in one
    call (each state converges on its own, so an answer does not depend on the others in the call; the
    searches start warm from the nominal states, band members cold, as the scalar path)."""
    prepared = vectorised.Prepared([network for network, _, _, _ in checks])
    prepared.warm_start([result for _, result, _, _ in checks])
    searches: list[_Search] = []
    owners: list[tuple[int, float, float, bool]] = []  # (network, inlet flow factor, log given flow, inlet search?)
    notes: list[tuple[float, str, str]] = []  # (given flow, floor text, at-flow text)
    for k, (network, result, target, limit) in enumerate(checks):
        coolant = network.coolant
        given = coolant.mass_flow()
        log_given = math.log(given)
        capacity = result.duty
        inlet_flow = 1.0  # the inlet-temperature limit's flow, over the given
        at_flow = "at the given flow"
        if limit.mass_flow is not None and limit.mass_flow < given:
            inlet_flow = limit.mass_flow / given
            capacity = float(prepared.solve(np.array([k]), None, np.array([inlet_flow])).duty[0])
            at_flow = (f"at {limit.mass_flow:.4g} kg/s, the largest flow within {limit.reason} "
                       "(the given flow is beyond it)")
        inlet, floor = _inlet_search(network, coolant, target, capacity)
        estimate = math.log(_flow_estimate(result, target)) if result.streams else log_given
        high = math.log(given * FLOW_SEARCH_CAP if limit.mass_flow is None else limit.mass_flow)
        low = log_given - 30.0 * math.log(10.0)
        # U A rises with the flow, so the fixed-U A estimate is low; the grid around it brackets the root
        flow = _Search(low, high, min(max(estimate, low), high), math.log(1.2), True, 1e-10,
                       {log_given: result.duty / target - 1.0} if log_given <= high else {})
        if not flow.known:  # the given flow is beyond the utility's limit: start from the limit
            flow.known[high] = float(prepared.solve(np.array([k]), None,
                                                    np.array([math.exp(high - log_given)])).duty[0]) / target - 1.0
        searches += [inlet, flow]
        owners += [(k, inlet_flow, log_given, True), (k, inlet_flow, log_given, False)]
        notes.append((given, floor, at_flow))
    targets = np.array([target for _, _, target, _ in checks])
    given_inlets = np.array([network.coolant.inlet_temperature for network, _, _, _ in checks])

    found: list[MarginBand | None] = [None] * len(bands)
    asked = band_start(bands, found)
    for _ in range(MAX_PASSES):
        deadline.check()
        wanted = _wanted(searches)
        if not wanted and not asked:
            break
        index = np.array([owners[i][0] for i, _ in wanted], dtype=int)
        inlets = np.array([x if owners[i][3] else given_inlets[owners[i][0]] for i, x in wanted])
        factors = np.array([owners[i][1] if owners[i][3] else math.exp(x - owners[i][2]) for i, x in wanted])
        solver = prepared
        members = [network for batch in asked.values() for network in batch]
        if members:  # the band members join the pass: networks of their own, started cold, at their own coolant
            solver = vectorised.Prepared(prepared.networks + tuple(members), base=prepared)
            solver.warm_start([result for _, result, _, _ in checks] + [None] * len(members))
            index = np.r_[index, len(checks) + np.arange(len(members))]
            inlets = np.r_[inlets, [member.coolant.inlet_temperature for member in members]]
            factors = np.r_[factors, np.ones(len(members))]
        duty = solver.solve(index, inlets, factors).duty if index.size else np.zeros(0)
        _record(searches, wanted, duty[:len(wanted)] / targets[index[:len(wanted)]] - 1.0)
        asked = band_step(bands, found, asked, duty[len(wanted):])
    _unfinished(searches)
    assert all(band is not None for band in found)  # MAX_PASSES exceeds the band's two passes
    return ([_limits_found(searches[2 * k], searches[2 * k + 1], target, limit, *notes[k][1:])
             for k, (_, _, target, limit) in enumerate(checks)], [band for band in found if band is not None])


def _limits_found(inlet: _Search, flow: _Search, target: float, limit: FlowLimit, floor: str,
                  at_flow: str) -> tuple[Limit, Limit]:
    """The two limits from their finished searches."""
    assert inlet.value is not None and flow.value is not None  # _search evaluates every search
    if inlet.root is None and inlet.value >= 0.0:
        warmest = Limit(inlet.high, True, "every inlet temperature up to the process temperature (or the coolant's "
                                          "boiling point) removes the load with the safety factor",
                        (inlet.value + 1.0) * target)
    elif inlet.root is None:
        warmest = Limit(None, False, f"not reachable: even a coolant inlet just above {floor} does not remove "
                                     f"the load with the safety factor {at_flow}", (inlet.value + 1.0) * target)
    else:
        warmest = Limit(inlet.root, True, "warmest coolant inlet that removes the load with the safety factor "
                                          f"{at_flow}", (inlet.value + 1.0) * target)
    if flow.root is None and flow.value < 0.0:
        if limit.mass_flow is not None:
            needed = Limit(None, False, f"not reachable within {limit.reason}: the largest flow it allows "
                                        f"({limit.mass_flow:.4g} kg/s) does not remove the load with the safety "
                                        "factor (capacity shown at that flow)", (flow.value + 1.0) * target)
        else:
            needed = Limit(None, False, "not reachable at any flow: the area and process film limit the capacity "
                                        f"(shown at {FLOW_SEARCH_CAP:g} times the given flow; the utility gave no "
                                        "available pressure difference, maximum velocity or maximum flow)",
                           (flow.value + 1.0) * target)
    elif flow.root is None:  # pragma: no cover - capacity ~ m c_p (T_r - T_in) vanishes long before 1e-30 of the flow
        raise CalculationError("required coolant flow: no flow low enough to fall short of the load")
    else:
        within = "" if limit.mass_flow is None else f", within {limit.reason} (at most {limit.mass_flow:.4g} kg/s)"
        needed = Limit(math.exp(flow.root), True, "jacket coolant mass flow that removes the load with the safety "
                                                  f"factor (coil flows in proportion){within}",
                       (flow.value + 1.0) * target)
    return warmest, needed


@dataclass
class PendingCheck:
    """A cooling check up to its limit searches and margin band, which :func:`finish_checks` solves with others'."""

    args: tuple[Vessel, Charge, Coolant, float, HeatRelease, float]  # process temperature K, safety factor
    network: Network
    result: HeatTransferResult
    load: HeatLoad
    margin: float | None
    warnings: Warnings
    outlet: float | None
    limit: FlowLimit | None  # None: no limits wanted
    dosing: Limit | None
    band: bool


def begin_check(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                heat_release: HeatRelease, safety_factor: float, limits: bool, band: bool) -> PendingCheck:
    """Everything of a check but its limit searches and band: the network, the load, the margin, warnings."""
    safety_factor = _check_safety_factor(safety_factor)
    network = assemble(vessel, charge, coolant, process_temperature)
    vessel = network.vessel  # with a single-point calibration backed out
    result = solve(network)
    load = heat_load(heat_release, charge_mass(result), process_temperature, result.agitation.power)
    margin = margin_of(result.duty, load.total)
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
    limit = dosing = None
    if limits:
        limit = flow_limit(result.streams, coolant)
        if isinstance(heat_release, Dosing):
            dosing = _minimum_dosing_time(heat_release, process_temperature, result.duty, load.agitator,
                                          safety_factor)
    return PendingCheck((vessel, charge, coolant, process_temperature, heat_release, safety_factor), network, result,
                    load, margin, warnings, outlet, limit, dosing, band)


def finish_checks(pending: list[PendingCheck], deadline: Deadline = NEVER) -> list[CoolingCheck]:
    """The limit searches of all ``pending`` checks together, then all their bands together."""
    searched = [(p, p.limit) for p in pending if p.limit is not None and p.args[5] * p.load.total > 0.0]
    banded = [p for p in pending if p.band]
    limits, bands = _solve_limits(
        [(p.network, p.result, p.args[5] * p.load.total, limit) for p, limit in searched],
        [band_steps(p.args[0], p.args[1], p.args[2], p.args[3], p.result, p.load.total, p.margin, p.args[5],
                    network=p.network) for p in banded], deadline)
    found = dict(zip((id(p) for p, _ in searched), limits))
    spreads = dict(zip(map(id, banded), bands))
    return [_checked(p, found.get(id(p)), spreads.get(id(p))) for p in pending]


def _checked(p: PendingCheck, found: tuple[Limit, Limit] | None, spread: MarginBand | None) -> CoolingCheck:
    vessel, _, _, process_temperature, heat_release, safety_factor = p.args
    warnings = p.warnings
    solved = None
    if p.limit is not None:
        if found is None:  # no net load
            found = (Limit(process_temperature, True, "no net heat load: any coolant colder than the contents will do"),
                     Limit(0.0, True, "no net heat load: no coolant flow is needed"))
        solved = Limits(p.dosing, *found)
    if spread is not None and not spread.holds_across_band:
        warnings.add(CalcWarning("verdict_not_robust", spread.statement))
    cal = vessel.correlations.calibration
    if cal is not None:
        warnings.add(CalcWarning("calibrated", f"calibrated: the process film uses {cal.summary}" + (
            "" if vessel.correlations.remaining_resistance is None else
            f" and the measured remaining resistance {vessel.correlations.remaining_resistance:.4g} m2 K/W")
            + ("; the margin band spans the measurement's 95 % interval" if cal.measurement is not None
               else "; the margin band spans the fit's 95 % intervals")))
    adequate = p.margin is None or p.margin >= safety_factor
    return CoolingCheck(adequate, p.margin, safety_factor, p.load, p.result.duty, p.outlet, p.result, solved, warnings,
                        check_cautions(heat_release), spread, cal is not None, None if cal is None else cal.summary)


@dataclass(frozen=True)
class CheckCase:
    """One check of a batch (:func:`cooling_checks`): a vessel with its coolant, the step's charge and release."""

    vessel: Vessel
    charge: Charge
    coolant: Coolant
    process_temperature: float  # K
    heat_release: HeatRelease


def cooling_checks(cases: list[CheckCase], safety_factor: float = DEFAULT_SAFETY_FACTOR, limits: bool = True,
                   deadline: Deadline = NEVER, band: bool = True) -> list[CoolingCheck | InputError | CalculationError]:
    """The cooling check of many cases at once (a screening): each case's answer, or the input error that case
    alone raised.

    Each case is begun on its own (:func:`begin_check`: its network, load and warnings); then the limit
    searches and margin bands of every case share the vectorised passes (:func:`finish_checks`), where each
    state settles on its own, so a case's answer is the one :func:`cooling_check` gives for it alone.
    ``deadline`` is checked between cases and in every pass (:class:`calc.deadline.OutOfTime` ends the batch);
    a search that fails raises :class:`CalculationError` for the whole batch.
    """
    answers: list[CoolingCheck | InputError | CalculationError | None] = [None] * len(cases)
    pending: dict[int, PendingCheck] = {}
    for index, case in enumerate(cases):
        if index:  # a lone check keeps its whole budget for the searches
            deadline.check()
        try:
            pending[index] = begin_check(back_out_calibration(case.vessel, deadline), case.charge, case.coolant,
                                         case.process_temperature, case.heat_release, safety_factor, limits, band)
        except (InputError, CalculationError) as error:
            answers[index] = error
    for index, answer in zip(pending, finish_checks(list(pending.values()), deadline)):
        answers[index] = answer
    return [answer for answer in answers if answer is not None]


def cooling_check(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                  heat_release: HeatRelease, safety_factor: float = DEFAULT_SAFETY_FACTOR,
                  limits: bool = True, deadline: Deadline = NEVER, band: bool = True) -> CoolingCheck:
    """Compare the cooling capacity at ``process_temperature`` (K) with the heat load.

    ``limits=False`` skips the three solved limits (``CoolingCheck.limits`` is then None), and
    ``band=False`` the margin band, for callers that need only the verdict. The limit searches stop with
    :class:`calc.deadline.OutOfTime` once ``deadline`` has passed.
    """
    return finish_checks([begin_check(back_out_calibration(vessel, deadline), charge, coolant, process_temperature,
                                      heat_release, safety_factor, limits, band)], deadline)[0]
