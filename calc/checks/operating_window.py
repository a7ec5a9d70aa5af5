"""Operating window: the cooling check's margin over a grid of two operating quantities, and its boundary.

Engineers map where a step stays adequate by redoing the check one point at a time. Here the check's
state (vessel, contents, coolant, process temperature, heat release) is varied along two axes chosen
from :data:`AXES`, every grid point is solved in one pass of the vectorised network
(``calc.network.vectorised``; a grid point gives the same margin as the single cooling check with that
value in its request), and the boundary of the adequate region (margin = safety factor) is located on
every grid line where the verdict changes and then solved there to 1e-9 by the same root search as
the check's limits.

A point that cannot be a cooling state (coolant not colder than the contents at that point) is kept in
the grid with no margin and a note. Each point carries ``margin_band``: None unless the caller passes a
``band`` function, the hook for a margin band from correlation alternatives: ``band(states, grid)`` gets
the evaluator (``states.evaluate(list of {quantity: value})`` solves any states in one vector pass, and
``states.networks`` holds the assembled networks) and the grid's states, and returns one band per point.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Callable, Iterable, Sequence

import numpy as np

from calc.cautions import COOLING_CHECK
from calc.checks.cooling_check import (_check_safety_factor, _Search, _search, check_cautions,
                                       cooling_check, margin_of)
from calc.checks.heat_load import Dosing, HeatLoad, HeatRelease, heat_load
from calc.deadline import NEVER, Deadline
from calc.network import vectorised
from calc.network.heat_transfer import Network, assemble
from calc.validity import CalcWarning, InputError, Warnings
from calc.properties import Liquid
from calc.vessel.model import Charge, Coolant, Vessel

#: The quantities an axis may vary, by their dotted request paths.
AXES = ("heat_release.dosing_time", "coolant.inlet_temperature", "coolant.flow", "process_temperature",
        "vessel.agitator.speed")
#: Quantities that change the network itself (contents' state, agitation) rather than the coolant state.
NETWORK_AXES = ("process_temperature", "vessel.agitator.speed")
#: One state of the window: {quantity of an axis: SI value}.
State = dict[str, float]


@dataclass(frozen=True)
class Axis:
    """One axis: the request path it varies and its values, SI (a flow as ``flow_kind`` gives it)."""

    quantity: str
    values: tuple[float, ...]
    flow_kind: str = "mass"  # coolant.flow only: "mass" (kg/s) or "volume" (m3/s)

    @property
    def points(self) -> int:
        """How many values the axis takes."""
        return len(self.values)


@dataclass(frozen=True)
class WindowPoint:
    """One state of the window: its two axis values (SI), margin and verdict; None where not a cooling state."""

    values: tuple[float, ...]  # one per axis
    margin: float | None
    adequate: bool | None
    cooling_capacity: float | None  # W
    heat_load: float | None  # W
    coolant_outlet_temperature: float | None  # K
    note: str = ""
    margin_band: object | None = None


@dataclass(frozen=True)
class OperatingWindow:
    """The grid (first axis outer, second inner), the boundary points and the request's own point."""

    axes: tuple[Axis, ...]  # two
    safety_factor: float
    points: tuple[WindowPoint, ...]
    boundary: tuple[WindowPoint, ...]  # margin = safety factor, on grid lines where the verdict changes
    current: WindowPoint
    adequate_share: float  # of the computed grid points
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = COOLING_CHECK


class _States:
    """Evaluates margins of states given as {quantity: SI value} over the base check, many at a time."""

    def __init__(self, vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                 heat_release: HeatRelease, safety_factor: float, flow_kind: str):
        self.vessel, self.charge, self.coolant = vessel, charge, coolant
        self.process_temperature, self.heat_release = process_temperature, heat_release
        self.safety_factor, self.flow_kind = safety_factor, flow_kind
        self.networks: dict[tuple[float, float], Network | None] = {}
        self.loads: dict[tuple[float, float, float | None], HeatLoad] = {}

    def _network(self, temperature: float, speed: float, coldest_inlet: float) -> Network:
        key = (temperature, speed)
        network = self.networks.get(key)
        if network is None:
            vessel = self.vessel
            if speed != vessel.agitator.speed:
                vessel = replace(vessel, agitator=replace(vessel.agitator, speed=speed))
            # the network's own coolant inlet only has to be a valid one: each state brings its own
            coolant = replace(self.coolant, inlet_temperature=coldest_inlet)
            network = assemble(vessel, self.charge, coolant, temperature)
            self.networks[key] = network
        return network

    def evaluate(self, states: list[State]) -> dict[str, np.ndarray]:
        """Capacity, load, outlet temperature and margin (NaN where not a cooling state) of each state."""
        n = len(states)
        temperature = np.array([s.get("process_temperature", self.process_temperature) for s in states])
        speed = np.array([s.get("vessel.agitator.speed", self.vessel.agitator.speed) for s in states])
        inlet = np.array([s.get("coolant.inlet_temperature", self.coolant.inlet_temperature) for s in states])
        valid = inlet < temperature
        keys = list(zip(temperature.tolist(), speed.tolist()))
        coldest: dict[tuple[float, float], float] = {}
        for key, t_in, ok in zip(keys, inlet.tolist(), valid.tolist()):
            if ok:
                coldest[key] = min(coldest.get(key, math.inf), t_in)
        networks = [self._network(key[0], key[1], cold) for key, cold in coldest.items()]
        order = {key: i for i, key in enumerate(coldest)}
        index = np.where(valid, [order.get(key, -1) for key in keys], -1)
        flow = self._flow_factors(states, inlet)
        coil = flow if self.coolant.coil_flow is None or "coolant.flow" not in states[0] else np.ones(n)
        load = np.full(n, np.nan)
        for i, state in enumerate(states):
            if index[i] >= 0:
                load[i] = self._load(networks[index[i]], state.get("heat_release.dosing_time")).total
        capacity = np.full(n, np.nan)
        outlet = np.full(n, np.nan)
        rows = np.flatnonzero(index >= 0)
        if rows.size:
            solved = vectorised.Prepared(networks).solve(index[rows], inlet[rows], flow[rows], coil[rows])
            capacity[rows], outlet[rows] = solved.duty, solved.outlet_temperature
        with np.errstate(divide="ignore", invalid="ignore"):
            margin = np.where(load > 0.0, capacity / load, np.inf)
        margin[index < 0] = np.nan
        return {"capacity": capacity, "load": load, "outlet": outlet, "margin": margin, "valid": index >= 0}

    def _flow_factors(self, states: list[State], inlet: np.ndarray) -> np.ndarray:
        """Jacket flow of each state over the base coolant's, at the state's inlet temperature."""
        if "coolant.flow" not in states[0]:
            return np.ones(len(states))
        value = np.array([s["coolant.flow"] for s in states])
        base = self.coolant
        if self.flow_kind == base.flow_kind:
            return value / base.flow
        density = base.liquid.states(np.minimum(inlet, self._inlet_ceiling())).density
        if self.flow_kind == "mass":  # axis in kg/s, request in m3/s
            return value / (base.flow * density)
        return value * density / base.flow

    def _inlet_ceiling(self) -> float:
        liquid_range = getattr(self.coolant.liquid, "liquid_range", None)
        return liquid_range()[1] - 1e-2 if liquid_range is not None else math.inf

    def _load(self, network: Network, dosing_time: float | None) -> HeatLoad:
        key = (network.process_temperature, network.vessel.agitator.speed, dosing_time)
        if key not in self.loads:
            release = self.heat_release
            if dosing_time is not None and isinstance(release, Dosing):  # a dosing axis needs the dosing model
                release = replace(release, dosing_time=dosing_time)
            mass = network.fill.volume * network.process_properties.density
            self.loads[key] = heat_load(release, mass, network.process_temperature, network.agitation.power)
        return self.loads[key]


def _check_axes(axes: Sequence[Axis], vessel: Vessel, charge: Charge, coolant: Coolant, heat_release: HeatRelease) -> None:
    if len(axes) != 2:
        raise InputError("axes", f"give exactly two axes, got {len(axes)}")
    if axes[0].quantity == axes[1].quantity:
        raise InputError("axes[1].quantity", "the two axes must vary different quantities")
    for k, axis in enumerate(axes):
        name = f"axes[{k}]"
        if axis.quantity not in AXES:
            raise InputError(f"{name}.quantity", f"unknown quantity {axis.quantity!r}; known: {', '.join(AXES)}")
        if len(axis.values) < 2 or not all(math.isfinite(v) and v > 0 for v in axis.values):
            raise InputError(name, "needs at least two finite, positive values")
        if axis.quantity == "heat_release.dosing_time" and not isinstance(heat_release, Dosing):
            raise InputError(f"{name}.quantity", "a dosing-time axis needs the dosing heat-release model")
        if axis.quantity == "coolant.inlet_temperature":
            _check_liquid(axis, name, coolant.liquid, "coolant.inlet_temperature")
            low = getattr(coolant.liquid, "liquid_range", lambda: (0.0, 0.0))()[0]
            if min(axis.values) <= low:
                raise InputError(name, "reaches the coolant's freezing point")
        if axis.quantity == "process_temperature":
            _check_liquid(axis, name, charge.liquid, "process_temperature")


def _check_liquid(axis: Axis, name: str, liquid: Liquid, field_name: str) -> None:
    """Both ends of a temperature axis within the liquid's range (the error names the end at fault)."""
    for v in (min(axis.values), max(axis.values)):
        try:
            liquid.at(v, field=field_name)
        except InputError as exc:
            raise InputError(f"{name}.{'from' if v == axis.values[0] else 'to'}", exc.message) from None


def operating_window(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                     heat_release: HeatRelease, axes: tuple[Axis, Axis],
                     safety_factor: float = 1.3, band: Callable[[_States, list[State]], Iterable[object]] | None = None,
                     deadline: Deadline = NEVER) -> OperatingWindow:
    """The margin over the grid of ``axes`` around the check's state, its boundary and the check's own point.

    ``deadline`` is checked before the grid and before each pass of the boundary search.
    """
    safety_factor = _check_safety_factor(safety_factor)
    _check_axes(axes, vessel, charge, coolant, heat_release)
    flow_axis = next((a for a in axes if a.quantity == "coolant.flow"), None)
    flow_kind = flow_axis.flow_kind if flow_axis is not None else coolant.flow_kind
    states = _States(vessel, charge, coolant, process_temperature, heat_release, safety_factor, flow_kind)
    first, second = axes
    grid = [{first.quantity: x, second.quantity: y} for x in first.values for y in second.values]
    deadline.check()
    try:
        solved = states.evaluate(grid)
    except InputError as exc:  # a state of the grid the network refuses (e.g. an impeller speed out of range)
        raise InputError("axes", f"a grid point is not a valid state: {exc.field}: {exc.message}") from None
    points = tuple(_point(solved, i, (state[first.quantity], state[second.quantity]), safety_factor)
                   for i, state in enumerate(grid))
    boundary = _boundary(states, axes, solved, safety_factor, deadline)

    # the request's own operating point: the single check, with its warnings (the scalar path)
    check = cooling_check(vessel, charge, coolant, process_temperature, heat_release, safety_factor, limits=False)
    own = tuple(_own_value(a, vessel, coolant, process_temperature, heat_release) for a in axes)
    current = WindowPoint(own, check.margin, check.adequate, check.cooling_capacity, check.heat_load.total,
                          check.coolant_outlet_temperature)
    computed = [p for p in points if p.adequate is not None]
    warnings = Warnings(check.warnings)
    if len(computed) < len(points):
        warnings.add(CalcWarning("window_points_not_computed",
                                 f"{len(points) - len(computed)} grid point(s) have the coolant no colder than the "
                                 "contents: no cooling state, no margin"))
    if band is not None:
        points = tuple(replace(p, margin_band=b) for p, b in zip(points, band(states, grid)))
    share = sum(1 for p in computed if p.adequate) / len(computed) if computed else 0.0
    cautions = check_cautions(heat_release) + (
        "Each grid point is a steady cooling check; the map does not show how the plant moves between points.",)
    return OperatingWindow(tuple(axes), safety_factor, points, boundary, current, share, warnings, cautions)


def _own_value(axis: Axis, vessel: Vessel, coolant: Coolant, process_temperature: float,
               release: HeatRelease) -> float:
    if axis.quantity == "heat_release.dosing_time":
        assert isinstance(release, Dosing)  # _check_axes refuses a dosing-time axis on another model
        return float(release.dosing_time)
    if axis.quantity == "coolant.inlet_temperature":
        return coolant.inlet_temperature
    if axis.quantity == "process_temperature":
        return process_temperature
    if axis.quantity == "vessel.agitator.speed":
        return vessel.agitator.speed
    if axis.flow_kind == coolant.flow_kind:
        return coolant.flow
    mass = coolant.mass_flow()
    if axis.flow_kind == "mass":
        return mass
    return mass / coolant.liquid.at(coolant.inlet_temperature, field="coolant.inlet_temperature").density


def _point(solved: dict[str, np.ndarray], i: int, values: tuple[float, ...], safety_factor: float) -> WindowPoint:
    if not solved["valid"][i]:
        return WindowPoint(tuple(float(v) for v in values), None, None, None, None, None,
                           "coolant not colder than the contents")
    load = float(solved["load"][i])
    margin = margin_of(float(solved["capacity"][i]), load)
    adequate = margin is None or margin >= safety_factor
    outlet = float(solved["outlet"][i])
    return WindowPoint(tuple(float(v) for v in values), margin, adequate, float(solved["capacity"][i]), load,
                       outlet if math.isfinite(outlet) else None)


def _boundary(states: _States, axes: Sequence[Axis], solved: dict[str, np.ndarray], safety_factor: float,
              deadline: Deadline = NEVER) -> tuple[WindowPoint, ...]:
    """Where margin = safety factor on each grid line between neighbours of different verdict (solved)."""
    first, second = axes
    n1, n2 = len(first.values), len(second.values)
    margin = solved["margin"].reshape(n1, n2)
    valid = solved["valid"].reshape(n1, n2)
    good = np.where(valid, margin >= safety_factor, False)
    searches, lines = [], []
    for i in range(n1):
        for j in range(n2):
            for di, dj in ((1, 0), (0, 1)):
                a, b = i + di, j + dj
                if a >= n1 or b >= n2 or not (valid[i, j] and valid[a, b]) or good[i, j] == good[a, b] \
                        or not (np.isfinite(margin[i, j]) and np.isfinite(margin[a, b])):
                    continue
                axis = first if di else second
                lo, hi = (axis.values[i], axis.values[a]) if di else (axis.values[j], axis.values[b])
                f_lo = math.log(margin[i, j] / safety_factor)
                f_hi = math.log(margin[a, b] / safety_factor)
                if f_lo == f_hi:
                    continue
                if lo > hi:
                    lo, hi, f_lo, f_hi = hi, lo, f_hi, f_lo
                guess = lo - f_lo * (hi - lo) / (f_hi - f_lo)
                searches.append(_Search(lo, hi, guess, hi - lo, f_hi > f_lo, 1e-9 * max(abs(hi), 1.0),
                                        {lo: f_lo, hi: f_hi}))
                fixed = {second.quantity: second.values[j]} if di else {first.quantity: first.values[i]}
                lines.append((axis.quantity, fixed))
    if not searches:
        return ()

    def evaluate(wanted: list[tuple[int, float]]) -> Iterable[float]:
        batch = [{**lines[k][1], lines[k][0]: x} for k, x in wanted]
        result = states.evaluate(batch)
        return np.log(result["margin"] / safety_factor)

    _search(searches, evaluate, deadline)
    done = [(k, s.root) for k, s in enumerate(searches) if s.root is not None]
    batch = [{**lines[k][1], lines[k][0]: x} for k, x in done]
    result = states.evaluate(batch)
    return tuple(_point(result, i, (state[first.quantity], state[second.quantity]), safety_factor)
                 for i, state in enumerate(batch))
