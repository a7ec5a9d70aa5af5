"""The heat-transfer network solved for many states at once (numpy), element by element as the scalar path.

``calc.network.heat_transfer.heat_transfer`` is the readable specification: one state, each film with
its warnings. This module solves the same fixed-point problem (coolant mean temperature and wall
surface temperatures, to ``TOLERANCE`` K) for N states in one pass over arrays: every film, wall and
coolant balance is evaluated by the same functions the scalar path calls (the correlations take
floats or arrays, ``calc.arrays``), the iteration starts where the scalar one starts and each element
stops at the iteration where the scalar one would stop. A test keeps the two in agreement to 1e-9.

Entry points
------------
``solve_many(networks, network_index=None, inlet_temperature=None, flow_factor=None)``
    N states of any mix of assembled networks (``heat_transfer.assemble``: vessel, charge, coolant and
    process temperature, checked once each). State i solves ``networks[network_index[i]]`` with the
    coolant entering at ``inlet_temperature[i]`` (K; default: the network's coolant) and every stream's
    flow times ``flow_factor[i]`` (default 1). Operating points of one vessel (a grid over coolant
    inlet temperature and flow, the solved limits), N vessels or jacket designs (candidates, a fleet),
    or N alternatives of one (an ensemble) are all this call.
``Prepared(networks).solve(...)``
    The same, with the networks set up once for several calls (the limit searches).
``heat_transfer_many(cases)``
    The same for a list of ``(vessel, charge, coolant, process_temperature)``; equal cases are
    assembled once.

Both return :class:`ManyResult`: arrays of duty, UA, area, outlet temperature of the main stream,
iterations and a convergence flag, one element per state; ``rows`` (:class:`StreamRows`) holds each
stream's flow, duty, UA, outlet and mean temperature and each surface's wall temperatures. Warnings are not collected per element (a
grid of 2,500 points would repeat the same few thousands of times): the assembly's warnings are on
each network, and a caller that reports one state in full runs the scalar path there.

Cost: one pass costs a few times one scalar solve for small N and grows slowly with N (numpy's
per-call overhead dominates up to a few hundred states); memory is a few dozen float64 arrays of
N x (surfaces per state).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Callable, Iterable, Optional, Sequence

import numpy as np

from calc.films import process_side, wall
from calc.network.coolant_balance import single_pass
from calc.network.heat_transfer import MAX_ITERATIONS, TOLERANCE, Network, assemble
from calc.properties import Liquid, LiquidProperties, PropertyTable

if TYPE_CHECKING:
    from calc.network.heat_transfer import HeatTransferResult
    from calc.vessel.model import Charge, Coolant, Vessel

#: One case of :func:`assemble_cases`: (vessel, charge, coolant, process temperature in K).
Case = tuple["Vessel", "Charge", "Coolant", float]
#: An optional per-state array argument of :meth:`Prepared.solve` (None: the default for every state).
OptionalArray = Optional[np.ndarray]


@dataclass(frozen=True)
class ManyResult:
    """The solved states, one element each (SI units)."""

    duty: np.ndarray  # W, heat removed by all streams
    ua: np.ndarray  # W/K, all streams
    area: np.ndarray  # m2, wetted heat-transfer area
    outlet_temperature: np.ndarray  # K, the main stream (jacket, else the first coil); NaN without one
    iterations: np.ndarray  # most iterations any of the state's streams took
    converged: np.ndarray  # bool, every stream of the state settled within MAX_ITERATIONS
    controlling: np.ndarray  # the largest resistance on the surface with the most U A ("none": no surface)
    networks: tuple[Network, ...]
    network_index: np.ndarray  # which network each state solved
    rows: StreamRows | None = None  # every stream and surface of every state (None when nothing is wetted)

    def __len__(self) -> int:
        return len(self.duty)


@dataclass(frozen=True)
class StreamRows:
    """The solved streams and surfaces of every state (SI units), for callers that report streams one by one.

    Stream rows are grouped by state in the order of each network's streams (``Network.streams``); surface
    rows are grouped by stream in each stream's own order. ``state`` and ``stream`` index back.
    """

    state: np.ndarray  # per stream row: the state it belongs to
    mass_flow: np.ndarray  # kg/s
    duty: np.ndarray  # W
    ua: np.ndarray  # W/K
    outlet_temperature: np.ndarray  # K
    mean_temperature: np.ndarray  # K, the coolant's mean temperature (its properties are taken there)
    stream: np.ndarray  # per surface row: its stream row
    process_wall_temperature: np.ndarray  # K
    service_wall_temperature: np.ndarray  # K


def _range(liquid: Liquid) -> tuple[float, float]:
    """The clamp the scalar path applies to computed temperatures of ``liquid`` (none without a range)."""
    liquid_range = getattr(liquid, "liquid_range", None)
    if liquid_range is None:
        return -np.inf, np.inf
    low, high = liquid_range()
    return low, high


_FromTable = Callable[[PropertyTable, np.ndarray], np.ndarray]
_FromStates = Callable[[LiquidProperties], Any]


class _ByLiquid:
    """Properties of rows that may belong to different liquids: one table look-up per liquid."""

    def __init__(self, liquids: list[Liquid], row_liquid: np.ndarray):
        self.liquids = liquids
        self.masks = None if len(liquids) == 1 else [row_liquid == i for i in range(len(liquids))]

    def states(self, temperature: np.ndarray) -> LiquidProperties:
        if self.masks is None:
            states: LiquidProperties = self.liquids[0].states(temperature)
            return states
        out = [np.empty_like(temperature) for _ in range(4)]
        for liquid, mask in zip(self.liquids, self.masks):
            s = liquid.states(temperature[mask])
            for target, values in zip(out, (s.density, s.heat_capacity, s.viscosity, s.thermal_conductivity)):
                target[mask] = values
        return _liquid_arrays(temperature, *out)

    def viscosity(self, temperature: np.ndarray) -> np.ndarray:
        """The viscosity alone (a table look-up where the liquid has a table), as in :meth:`states`."""
        return self._each(temperature, lambda table, t: table.viscosities(t), lambda s: s.viscosity)

    def density(self, temperature: np.ndarray) -> np.ndarray:
        """The density alone, as in :meth:`states`."""
        return self._each(temperature, lambda table, t: table.densities(t), lambda s: s.density)

    def _each(self, temperature: np.ndarray, from_table: _FromTable, from_states: _FromStates) -> np.ndarray:
        if self.masks is None:
            return self._one(self.liquids[0], temperature, from_table, from_states)
        out = np.empty_like(temperature)
        for liquid, mask in zip(self.liquids, self.masks):
            out[mask] = self._one(liquid, temperature[mask], from_table, from_states)
        return out

    @staticmethod
    def _one(liquid: Liquid, temperature: np.ndarray, from_table: _FromTable, from_states: _FromStates) -> np.ndarray:
        table = getattr(liquid, "table", None)
        found = from_states(liquid.states(temperature)) if table is None else from_table(table(), temperature)
        return np.asarray(found)


def _index(items: list[Any], item: Any) -> int:
    for i, known in enumerate(items):
        if known == item:
            return i
    items.append(item)
    return len(items) - 1


def _stack(dicts: list[dict[str, Any]]) -> dict[str, Any]:
    """One dict of arrays from dicts with the same keys (numbers) ; strings must agree and stay strings."""
    out = {}
    for key in dicts[0]:
        values = [d[key] for d in dicts]
        out[key] = values[0] if isinstance(values[0], str) else np.array(values, dtype=float)
    return out


def _groups(keys: list[Any]) -> list[tuple[Any, np.ndarray]]:
    """(key, row indices) for each distinct key, in order of first appearance."""
    found: dict[Any, list[int]] = {}
    for i, key in enumerate(keys):
        found.setdefault(key, []).append(i)
    return [(key, np.array(rows)) for key, rows in found.items()]


def _liquid_arrays(*values: Any) -> LiquidProperties:
    """A :class:`LiquidProperties` of arrays, one element per state (its fields are annotated for one state)."""
    return LiquidProperties(*values)


def _take(props: Any, rows: np.ndarray) -> LiquidProperties:
    return _liquid_arrays(props.temperature[rows], props.density[rows], props.heat_capacity[rows],
                          props.viscosity[rows], props.thermal_conductivity[rows])


class Prepared:
    """Networks set up for the vectorised solve: every stream and surface as a template row, once.

    Build it once and call :meth:`solve` as often as needed (the limit searches solve the same network
    at new coolant states several times); ``solve_many`` builds one per call.
    """

    charge_liquids: list[Liquid]
    coolant_liquids: list[Liquid]
    streams_t: list[tuple[Any, ...]]  # per stream template (see __init__)
    surfaces_t: list[tuple[Any, ...]]  # per surface template

    def __init__(self, networks: Sequence[Network], base: Prepared | None = None):
        """``base``: a Prepared whose networks are the first of ``networks`` (the same objects); their templates
        are taken from it instead of being set up again (the limit searches add the band's members)."""
        self.networks = tuple(networks)
        done = 0 if base is None else len(base.networks)
        if base is not None and self.networks[:done] != base.networks:
            raise ValueError("base: its networks must be the first of networks")
        charge_liquids: list[Liquid] = [] if base is None else list(base.charge_liquids)
        coolant_liquids: list[Liquid] = [] if base is None else list(base.coolant_liquids)
        # (flow, per volume?, coolant liquid index, process temperature)
        streams_t: list[tuple[Any, ...]] = [] if base is None else list(base.streams_t)
        # (stream template, area, charge liquid, bulk props, film, formula, layers, remaining resistance of a
        # calibration or None)
        surfaces_t: list[tuple[Any, ...]] = [] if base is None else list(base.surfaces_t)
        self.network_streams: list[np.ndarray] = [] if base is None else list(base.network_streams)
        self.network_surfaces: list[np.ndarray] = [] if base is None else list(base.network_surfaces)
        self.network_local: list[np.ndarray] = [] if base is None else list(base.network_local)
        self.streams_t, self.surfaces_t = streams_t, surfaces_t
        # Networks built from one network by ``heat_transfer.with_correlations`` (the band's members) share its
        # agitation object and so its geometry: a surface's film at the bulk viscosity and its wall layers
        # depend then only on the process-side choice and the fouling. Keyed by that object's id, which stays
        # valid while these networks (held here) live; a base's entries are its own networks'.
        self.films: dict[tuple[Any, ...], Any] = {} if base is None else dict(base.films)
        for network in self.networks[done:]:
            charge_i = _index(charge_liquids, network.charge.liquid)
            coolant_i = _index(coolant_liquids, network.coolant.liquid)
            props = network.process_properties
            streams, surfaces = [], []
            for stream in network.streams:
                streams.append(len(streams_t))
                # a volume flow is converted with the density at the inlet: it moves with the inlet temperature
                coolant = network.coolant
                volume = coolant.flow_kind != "mass"
                flow = stream.mass_flow
                if volume:
                    flow = coolant.flow if stream.name == "jacket" or coolant.coil_flow is None else coolant.coil_flow
                follows = stream.name == "jacket" or coolant.coil_flow is None  # moves with coolant.flow
                streams_t.append((flow, volume, coolant_i, network.process_temperature, follows))
                choice = network.vessel.correlations
                for model in stream.surfaces:
                    key = (id(network.agitation), model.name, choice.process_wall, choice.process_factor,
                           choice.process_constants, choice.process_coil, choice.coil_process_factor)
                    if key not in self.films:  # at ratio 1: the correlation's other arguments
                        self.films[key] = model.process_film(props.viscosity)
                    layers = (id(network.agitation), model.name, network.vessel.fouling)
                    if layers not in self.films:
                        self.films[layers] = wall.wall_layers(model.wall, network.vessel.fouling,
                                                              model.process_radius, model.process_side,
                                                              channel=model.channel)[0]
                    film, layer = self.films[key], self.films[layers]
                    surfaces.append(len(surfaces_t))
                    surfaces_t.append((streams[-1], model.area, charge_i, props, film, model.service_formula, layer,
                                       model.remaining_resistance))
            self.network_streams.append(np.array(streams, dtype=int))
            self.network_surfaces.append(np.array(surfaces, dtype=int))
            self.network_local.append(np.searchsorted(streams, [surfaces_t[t][0] for t in surfaces]).astype(int))
        self.charge_liquids, self.coolant_liquids = charge_liquids, coolant_liquids
        if streams_t:
            flows, volumes, coolant_of, temperatures, jacket_flow = (np.array(column) for column in zip(*streams_t))
            self.flows, self.per_volume = flows.astype(float), volumes.astype(bool)
            self.follows = jacket_flow.astype(bool)
            self.coolant_of, self.temperatures = coolant_of.astype(int), temperatures.astype(float)
        if not surfaces_t:
            return
        self.area = np.array([t[1] for t in surfaces_t])
        self.surface_charge = np.array([t[2] for t in surfaces_t], dtype=int)
        self.mu_bulk = np.array([t[3].viscosity for t in surfaces_t])
        self.k_bulk = np.array([t[3].thermal_conductivity / t[4].length for t in surfaces_t])
        self.share = np.array([t[5].flow_share for t in surfaces_t])
        columns: Any = (np.array(column) for column in zip(*(t[6] for t in surfaces_t)))
        self.layers: Any = wall.WallLayers(*columns)  # of arrays, one element per template
        # calibration: the measured resistance beyond the process film; NaN where the surface has none
        self.remaining = np.array([np.nan if t[7] is None else t[7] for t in surfaces_t], dtype=float)
        self.calibrated = bool(np.isfinite(self.remaining).any())
        # correlation groups: one array call per correlation (and per option string) for all rows using it
        self.process_group = np.empty(len(surfaces_t), dtype=int)
        self.process_position = np.empty(len(surfaces_t), dtype=int)
        self.process_groups = []
        for g, (key, templates) in enumerate(_groups([(t[4].constants.correlation, tuple(t[4].arguments))
                                                      for t in surfaces_t])):
            self.process_group[templates] = g
            self.process_position[templates] = np.arange(templates.size)
            self.process_groups.append((process_side.CORRELATIONS[key[0]].function,
                                        _stack([surfaces_t[t][4].arguments for t in templates])))
        self.service_group = np.empty(len(surfaces_t), dtype=int)
        self.service_position = np.empty(len(surfaces_t), dtype=int)
        self.service_groups = []
        keys = [(t[5].function, tuple(sorted((k, v) for k, v in t[5].fixed.items() if isinstance(v, str))))
                for t in surfaces_t]
        for g, (key, templates) in enumerate(_groups(keys)):
            self.service_group[templates] = g
            self.service_position[templates] = np.arange(templates.size)
            numbers = _stack([{k: v for k, v in surfaces_t[t][5].fixed.items() if not isinstance(v, str)}
                              for t in templates])
            self.service_groups.append((key[0], numbers, dict(key[1])))
        self.start: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None  # warm start: see warm_start
        self.coolant_range = np.array([_range(liquid) for liquid in coolant_liquids]) + [1e-3, -1e-2]
        self.charge_range = np.array([_range(liquid) for liquid in charge_liquids]) + [1e-3, -1e-2]

    def warm_start(self, results: Sequence[HeatTransferResult | None]) -> None:
        """Start later solves from solved states (one scalar ``HeatTransferResult`` per network, in order;
        None for a network that starts cold, where the scalar path starts).

        Each stream starts with its mean coolant and wall temperatures at the same fractions of the
        driving force T_r - T_in as in the solved state, which cuts the iterations for nearby states
        (the limit searches). The answer stays the fixed point to ``TOLERANCE``; it is no longer the
        scalar path's iterate bit for bit, so grids that must match the scalar path start cold.
        """
        mean: list[float] = []
        process: list[float] = []
        service: list[float] = []
        for network, result in zip(self.networks, results):
            if result is None:
                mean += [np.nan] * len(network.streams)
                count = sum(len(stream.surfaces) for stream in network.streams)
                process += [np.nan] * count
                service += [np.nan] * count
                continue
            for stream in result.streams:
                driving = network.process_temperature - stream.balance.inlet_temperature
                mean.append((network.process_temperature - stream.mean_temperature) / driving)
                for surface in stream.surfaces:
                    process.append((network.process_temperature - surface.process_wall_temperature) / driving)
                    service.append((network.process_temperature - surface.service_wall_temperature) / driving)
        self.start = (np.array(mean), np.array(process), np.array(service))

    def solve(self, network_index: OptionalArray = None, inlet_temperature: OptionalArray = None,
              flow_factor: OptionalArray = None, coil_flow_factor: OptionalArray = None) -> ManyResult:
        """Solve N states; see the module notes for the arguments.

        ``coil_flow_factor`` (default: ``flow_factor``) multiplies the flow of coils that have a flow of
        their own (``coolant.coil_flow``); coils without one follow the jacket's ``flow_factor``.
        """
        networks = self.networks
        if network_index is None:
            network_index = np.arange(len(networks))
        network_index = np.asarray(network_index, dtype=int).ravel()
        size = max(network_index.size, np.size(inlet_temperature) if inlet_temperature is not None else 0,
                   np.size(flow_factor) if flow_factor is not None else 0)
        network_index = np.broadcast_to(network_index, (size,))
        inlet = np.array([n.coolant.inlet_temperature for n in networks])[network_index] \
            if inlet_temperature is None else np.broadcast_to(np.asarray(inlet_temperature, dtype=float), (size,))
        factor = np.ones(size) if flow_factor is None else \
            np.broadcast_to(np.asarray(flow_factor, dtype=float), (size,))
        coil_factor = factor if coil_flow_factor is None else \
            np.broadcast_to(np.asarray(coil_flow_factor, dtype=float), (size,))

        # rows: one per stream of each state, one per surface of each stream (a stream's surfaces adjacent)
        stream_rows: list[np.ndarray] = []
        state_rows: list[np.ndarray] = []
        surface_rows: list[np.ndarray] = []
        surface_stream: list[np.ndarray] = []
        first_stream = np.full(size, -1)
        offset = 0
        for n, (streams, surfaces, local) in enumerate(zip(self.network_streams, self.network_surfaces,
                                                           self.network_local)):
            states = np.flatnonzero(network_index == n) if len(networks) > 1 else np.arange(size)
            if not states.size or not streams.size:
                continue
            k = streams.size
            stream_rows.append(np.tile(streams, states.size))
            state_rows.append(np.repeat(states, k))
            first_stream[states] = offset + k * np.arange(states.size)
            surface_rows.append(np.tile(surfaces, states.size))
            surface_stream.append(offset + np.repeat(k * np.arange(states.size), surfaces.size)
                                  + np.tile(local, states.size))
            offset += k * states.size
        if offset == 0 or not surface_rows or not np.concatenate(surface_rows).size:
            nothing = np.zeros(size)
            return ManyResult(nothing, nothing.copy(), nothing.copy(), np.full(size, np.nan),
                              np.zeros(size, dtype=int), np.ones(size, dtype=bool),
                              np.full(size, "none", dtype=object), networks, network_index)
        tstream = np.concatenate(stream_rows)
        stream_state = np.concatenate(state_rows)
        tsurface = np.concatenate(surface_rows)
        sid = np.concatenate(surface_stream)
        if len(networks) > 1:
            order = np.argsort(sid, kind="stable")  # a stream's surfaces adjacent, in their own order
            tsurface, sid = tsurface[order], sid[order]
        return self._iterate(size, network_index, inlet, factor, coil_factor, tstream, stream_state, tsurface, sid,
                             first_stream)

    def _iterate(self, size: int, network_index: np.ndarray, inlet: np.ndarray, factor: np.ndarray,
                 coil_factor: np.ndarray, tstream: np.ndarray, stream_state: np.ndarray, tsurface: np.ndarray,
                 sid: np.ndarray, first_stream: np.ndarray) -> ManyResult:
        n_streams = tstream.size
        t_in = inlet[stream_state]
        t_r = self.temperatures[tstream]
        stream_coolant = self.coolant_of[tstream]
        coolant = _ByLiquid(self.coolant_liquids, stream_coolant)
        m = self.flows[tstream]
        if self.per_volume.any():
            m = np.where(self.per_volume[tstream], m * coolant.states(t_in).density, m)
        m = m * np.where(self.follows[tstream], factor[stream_state], coil_factor[stream_state])
        area = self.area[tsurface]
        mu_bulk = self.mu_bulk[tsurface]
        k_bulk = self.k_bulk[tsurface]
        flow_rows = m[sid] * self.share[tsurface]
        columns: Any = (column[tsurface] for column in self.layers)
        layers = wall.WallLayers(*columns)
        remaining = self.remaining[tsurface] if self.calibrated else None
        process = []
        for g, (function, stacked) in enumerate(self.process_groups):
            rows = np.flatnonzero(self.process_group[tsurface] == g) if len(self.process_groups) > 1 else None
            position = self.process_position[tsurface if rows is None else tsurface[rows]]
            process.append((function, rows, {name: value[position] for name, value in stacked.items()}))
        service = []
        for g, (function, numbers, strings) in enumerate(self.service_groups):
            rows = np.flatnonzero(self.service_group[tsurface] == g) if len(self.service_groups) > 1 else None
            position = self.service_position[tsurface if rows is None else tsurface[rows]]
            service.append((function, rows, {**{name: value[position] for name, value in numbers.items()},
                                             **strings}))
        coolant_rows = _ByLiquid(self.coolant_liquids, stream_coolant[sid])
        charge = _ByLiquid(self.charge_liquids, self.surface_charge[tsurface])
        c_low, c_high = self.coolant_range[stream_coolant].T
        p_low, p_high = self.charge_range[self.surface_charge[tsurface]].T
        c_low_rows, c_high_rows = c_low[sid], c_high[sid]
        t_r_rows = t_r[sid]

        mean = t_in.copy()  # where the scalar path starts
        process_wall = 0.5 * (t_r_rows + t_in[sid])
        service_wall = process_wall.copy()
        if self.start is not None:  # warm, except the networks started cold (NaN fractions)
            fraction = self.start[0][tstream]
            mean = np.where(np.isnan(fraction), mean, t_r - fraction * (t_r - t_in))
            fraction = self.start[1][tsurface]
            process_wall = np.where(np.isnan(fraction), process_wall, t_r_rows - fraction * (t_r_rows - t_in[sid]))
            fraction = self.start[2][tsurface]
            service_wall = np.where(np.isnan(fraction), service_wall, t_r_rows - fraction * (t_r_rows - t_in[sid]))
        active = np.ones(n_streams, dtype=bool)
        duty = np.zeros(n_streams)
        ua = np.zeros(n_streams)
        outlet = np.zeros(n_streams)
        iterations = np.zeros(n_streams, dtype=int)
        h_process = np.empty(sid.size)
        h_service = np.empty(sid.size)
        starts = np.flatnonzero(np.r_[True, sid[1:] != sid[:-1]])
        for iteration in range(1, MAX_ITERATIONS + 1):
            # a correlation whose rows have all settled is not evaluated again: those rows keep the films of
            # the iteration they settled in (as the scalar path reports them), and nothing else reads them
            rows_active = active[sid]
            state = coolant.states(np.clip(mean, c_low, c_high))
            ratio = mu_bulk / charge.viscosity(np.clip(process_wall, p_low, p_high))
            for function, rows, arguments in process:
                if rows is None:
                    h_process[:] = function(viscosity_ratio=ratio, **arguments) * k_bulk
                elif rows_active[rows].any():
                    h_process[rows] = function(viscosity_ratio=ratio[rows], **arguments) * k_bulk[rows]
            at_wall = np.clip(service_wall, c_low_rows, c_high_rows)
            wall_viscosity, wall_density = coolant_rows.viscosity(at_wall), coolant_rows.density(at_wall)
            bulk = _take(state, sid)
            for function, rows, fixed in service:
                if rows is None:
                    h_service[:] = function(bulk, flow_rows, wall_viscosity, wall_density, **fixed)[0]
                elif rows_active[rows].any():
                    h_service[rows] = function(_take(bulk, rows), flow_rows[rows], wall_viscosity[rows],
                                               wall_density[rows], **fixed)[0]
            overall = wall.overall_from_layers(h_process, h_service, layers)  # type: ignore[arg-type]  # arrays
            if remaining is not None:
                overall = wall.with_remaining_resistance(overall, remaining)
            new_ua = np.bincount(sid, overall.U * area, minlength=n_streams)
            new_outlet, new_duty, _, _ = single_pass(t_r, t_in, new_ua, m * state.heat_capacity)  # type: ignore[arg-type]
            new_mean = 0.5 * (t_in + new_outlet)
            temperatures = wall.interface_temperatures(overall, t_r_rows, new_mean[sid])
            change = np.maximum(np.abs(new_mean - mean), np.maximum.reduceat(
                np.maximum(np.abs(temperatures.process_surface - process_wall),
                           np.abs(temperatures.service_surface - service_wall)), starts))
            duty = np.where(active, new_duty, duty)
            ua = np.where(active, new_ua, ua)
            outlet = np.where(active, new_outlet, outlet)
            iterations = np.where(active, iteration, iterations)
            mean = np.where(active, new_mean, mean)
            process_wall = np.where(rows_active, temperatures.process_surface, process_wall)
            service_wall = np.where(rows_active, temperatures.service_surface, service_wall)
            active &= ~(change < TOLERANCE)
            if not active.any():
                break

        total_duty = np.bincount(stream_state, duty, minlength=size)
        total_ua = np.bincount(stream_state, ua, minlength=size)
        total_area = np.bincount(stream_state, np.bincount(sid, area, minlength=n_streams), minlength=size)
        main_outlet = np.where(first_stream >= 0, outlet[np.maximum(first_stream, 0)], np.nan)
        most = np.zeros(size, dtype=int)
        np.maximum.at(most, stream_state, iterations)
        unsettled = np.zeros(size, dtype=bool)
        np.logical_or.at(unsettled, stream_state, active)
        # as HeatTransferResult.controlling: the largest layer (first in LAYERS on a tie) of the surface
        # carrying the most U A (first on a tie)
        row_state = stream_state[sid]
        order = np.lexsort((np.arange(sid.size), -(overall.U * area), row_state))
        first = order[np.r_[True, row_state[order][1:] != row_state[order][:-1]]]
        resistances = np.array([np.broadcast_to(overall.resistances[name], sid.shape) for name in wall.LAYERS])
        controlling = np.full(size, "none", dtype=object)
        controlling[row_state[first]] = np.array(wall.LAYERS, dtype=object)[np.argmax(resistances[:, first], axis=0)]
        stream_rows = StreamRows(stream_state, m, duty, ua, outlet, mean, sid, process_wall, service_wall)
        return ManyResult(total_duty, total_ua, total_area, main_outlet, most, ~unsettled, controlling,
                          self.networks, network_index, stream_rows)


def solve_many(networks: Sequence[Network], network_index: OptionalArray = None,
               inlet_temperature: OptionalArray = None, flow_factor: OptionalArray = None) -> ManyResult:
    """Solve N states of the assembled ``networks`` at once; see the module notes for the arguments."""
    return Prepared(networks).solve(network_index, inlet_temperature, flow_factor)


def assemble_cases(cases: Iterable[Case]) -> tuple[list[Network], np.ndarray]:
    """The networks of ``(vessel, charge, coolant, process_temperature)`` cases (equal cases assembled once)
    and which network each case is."""
    networks: list[Network] = []
    seen: dict[Case, int] = {}
    index = []
    for vessel, charge, coolant, process_temperature in cases:
        key = (vessel, charge, coolant, process_temperature)
        if key not in seen:
            seen[key] = len(networks)
            networks.append(assemble(vessel, charge, coolant, process_temperature))
        index.append(seen[key])
    return networks, np.array(index, dtype=int)


def heat_transfer_many(cases: Iterable[Case]) -> ManyResult:
    """Solve ``(vessel, charge, coolant, process_temperature)`` cases at once (equal cases assembled once)."""
    return solve_many(*assemble_cases(cases))
