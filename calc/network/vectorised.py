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
``heat_transfer_many(cases)``
    The same for a list of ``(vessel, charge, coolant, process_temperature)``; equal cases are
    assembled once.

Both return :class:`ManyResult`: arrays of duty, UA, area, outlet temperature of the main stream,
iterations and a convergence flag, one element per state. Warnings are not collected per element (a
grid of 2,500 points would repeat the same few thousands of times): the assembly's warnings are on
each network, and a caller that reports one state in full runs the scalar path there.

Cost: one pass costs a few times one scalar solve for small N and grows slowly with N (numpy's
per-call overhead dominates up to a few hundred states); memory is a few dozen float64 arrays of
N x (surfaces per state).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable, Sequence

import numpy as np

from calc.films import process_side, wall
from calc.network.coolant_balance import single_pass
from calc.network.heat_transfer import MAX_ITERATIONS, TOLERANCE, Network, assemble
from calc.properties import LiquidProperties


@dataclass(frozen=True)
class ManyResult:
    """The solved states, one element each (SI units)."""

    duty: np.ndarray  # W, heat removed by all streams
    ua: np.ndarray  # W/K, all streams
    area: np.ndarray  # m2, wetted heat-transfer area
    outlet_temperature: np.ndarray  # K, the main stream (jacket, else the first coil); NaN without one
    iterations: np.ndarray  # most iterations any of the state's streams took
    converged: np.ndarray  # bool, every stream of the state settled within MAX_ITERATIONS
    networks: tuple[Network, ...]
    network_index: np.ndarray  # which network each state solved

    def __len__(self) -> int:
        return len(self.duty)


def _range(liquid) -> tuple[float, float]:
    """The clamp the scalar path applies to computed temperatures of ``liquid`` (none without a range)."""
    liquid_range = getattr(liquid, "liquid_range", None)
    if liquid_range is None:
        return -np.inf, np.inf
    low, high = liquid_range()
    return low, high


class _ByLiquid:
    """Properties of rows that may belong to different liquids: one table look-up per liquid."""

    def __init__(self, liquids: list, row_liquid: np.ndarray):
        self.liquids = liquids
        self.masks = None if len(liquids) == 1 else [row_liquid == i for i in range(len(liquids))]

    def states(self, temperature: np.ndarray) -> LiquidProperties:
        if self.masks is None:
            return self.liquids[0].states(temperature)
        out = [np.empty_like(temperature) for _ in range(4)]
        for liquid, mask in zip(self.liquids, self.masks):
            s = liquid.states(temperature[mask])
            for target, values in zip(out, (s.density, s.heat_capacity, s.viscosity, s.thermal_conductivity)):
                target[mask] = values
        return LiquidProperties(temperature, *out)


def _index(items: list, item) -> int:
    for i, known in enumerate(items):
        if known == item:
            return i
    items.append(item)
    return len(items) - 1


def _stack(dicts: list[dict]) -> dict:
    """One dict of arrays from dicts with the same keys (numbers) ; strings must agree and stay strings."""
    out = {}
    for key in dicts[0]:
        values = [d[key] for d in dicts]
        out[key] = values[0] if isinstance(values[0], str) else np.array(values, dtype=float)
    return out


def _groups(keys: list) -> list[tuple[object, np.ndarray]]:
    """(key, row indices) for each distinct key, in order of first appearance."""
    found: dict = {}
    for i, key in enumerate(keys):
        found.setdefault(key, []).append(i)
    return [(key, np.array(rows)) for key, rows in found.items()]


def _take(props: LiquidProperties, rows) -> LiquidProperties:
    return LiquidProperties(props.temperature[rows], props.density[rows], props.heat_capacity[rows],
                            props.viscosity[rows], props.thermal_conductivity[rows])


def solve_many(networks: Sequence[Network], network_index=None, inlet_temperature=None,
               flow_factor=None) -> ManyResult:
    """Solve N states of the assembled ``networks`` at once; see the module notes for the arguments."""
    networks = tuple(networks)
    if network_index is None:
        network_index = np.arange(len(networks))
    network_index = np.asarray(network_index, dtype=int).ravel()
    size = max(network_index.size, np.size(inlet_temperature) if inlet_temperature is not None else 0,
               np.size(flow_factor) if flow_factor is not None else 0)
    network_index = np.broadcast_to(network_index, (size,))
    given_inlet = np.array([n.coolant.inlet_temperature for n in networks])[network_index]
    inlet = given_inlet if inlet_temperature is None else \
        np.broadcast_to(np.asarray(inlet_temperature, dtype=float), (size,)).copy()
    factor = np.ones(size) if flow_factor is None else \
        np.broadcast_to(np.asarray(flow_factor, dtype=float), (size,))

    # ---- templates: each network's streams and surfaces, set up once however many states use it
    charge_liquids: list = []
    coolant_liquids: list = []
    stream_template: list[tuple] = []  # (flow, per volume?, coolant liquid index, process temperature)
    surface_template: list[tuple] = []  # (stream template, area, charge liquid, film, formula, layers)
    network_streams: list[np.ndarray] = []
    network_surfaces: list[np.ndarray] = []
    for network in networks:
        charge_i = _index(charge_liquids, network.charge.liquid)
        coolant_i = _index(coolant_liquids, network.coolant.liquid)
        props = network.process_properties
        streams, surfaces = [], []
        for stream in network.streams:
            streams.append(len(stream_template))
            # a volume flow is converted with the density at the inlet, so it moves with the inlet temperature
            coolant = network.coolant
            volume = coolant.flow_kind != "mass"
            flow = stream.mass_flow
            if volume:
                flow = coolant.flow if stream.name == "jacket" or coolant.coil_flow is None else coolant.coil_flow
            stream_template.append((flow, volume, coolant_i, network.process_temperature))
            for model in stream.surfaces:
                film = model.process_film(props.viscosity)  # at ratio 1: the correlation's other arguments
                layer, _ = wall.wall_layers(model.wall, network.vessel.fouling, model.process_radius,
                                            model.process_side)
                surfaces.append(len(surface_template))
                surface_template.append((streams[-1], model.area, charge_i, props, film, model.service_formula,
                                         layer))
        network_streams.append(np.array(streams, dtype=int))
        network_surfaces.append(np.array(surfaces, dtype=int))

    # ---- rows: one per stream of each state, one per surface of each stream (a stream's surfaces adjacent)
    stream_rows, stream_state, surface_rows, surface_stream = [], [], [], []
    first_stream = np.full(size, -1)
    offset = 0
    for n, (streams, surfaces) in enumerate(zip(network_streams, network_surfaces)):
        states = np.flatnonzero(network_index == n)
        if not states.size or not streams.size:
            continue
        k = streams.size
        stream_rows.append(np.tile(streams, states.size))
        stream_state.append(np.repeat(states, k))
        first_stream[states] = offset + k * np.arange(states.size)
        local = np.searchsorted(streams, [surface_template[t][0] for t in surfaces])
        surface_rows.append(np.tile(surfaces, states.size))
        surface_stream.append(offset + np.repeat(k * np.arange(states.size), surfaces.size)
                              + np.tile(local, states.size))
        offset += k * states.size
    n_streams = offset
    if n_streams == 0:
        nothing = np.zeros(size)
        return ManyResult(nothing, nothing.copy(), nothing.copy(), np.full(size, np.nan), np.zeros(size, dtype=int),
                          np.ones(size, dtype=bool), networks, network_index)
    tstream = np.concatenate(stream_rows)
    stream_state = np.concatenate(stream_state)
    tsurface = np.concatenate(surface_rows)
    sid = np.concatenate(surface_stream)
    order = np.argsort(sid, kind="stable")  # a stream's surfaces adjacent, in their own order
    tsurface, sid = tsurface[order], sid[order]

    flows, per_volume, coolant_of, temperatures = (np.array(column) for column in zip(*stream_template))
    t_in = inlet[stream_state]
    t_r = temperatures[tstream]
    stream_coolant = coolant_of[tstream].astype(int)
    coolant = _ByLiquid(coolant_liquids, stream_coolant)
    m = flows[tstream]
    if per_volume.any():
        m = np.where(per_volume[tstream], m * coolant.states(t_in).density, m)
    m = m * factor[stream_state]
    area = np.array([t[1] for t in surface_template])[tsurface]
    surface_charge = np.array([t[2] for t in surface_template], dtype=int)[tsurface]
    mu_bulk = np.array([t[3].viscosity for t in surface_template])[tsurface]
    k_bulk = np.array([t[3].thermal_conductivity / t[4].length for t in surface_template])[tsurface]
    surface_flow_share = np.array([t[5].flow_share for t in surface_template])[tsurface]
    stacked_layers = wall.WallLayers(*(np.array(column)[tsurface] for column in zip(*(t[6] for t in surface_template))))
    process_groups = []
    for key, templates in _groups([(t[4].constants.correlation, tuple(t[4].arguments)) for t in surface_template]):
        rows = np.flatnonzero(np.isin(tsurface, templates))
        position = np.searchsorted(templates, tsurface[rows])
        stacked = _stack([surface_template[t][4].arguments for t in templates])
        process_groups.append((key, rows, {name: value[position] for name, value in stacked.items()}))
    service_groups = []
    for key, templates in _groups([(t[5].function, tuple(sorted((k, v) for k, v in t[5].fixed.items()
                                                                  if isinstance(v, str))))
                                   for t in surface_template]):
        rows = np.flatnonzero(np.isin(tsurface, templates))
        position = np.searchsorted(templates, tsurface[rows])
        stacked = _stack([{k: v for k, v in surface_template[t][5].fixed.items() if not isinstance(v, str)}
                          for t in templates])
        service_groups.append((key, rows, {**{name: value[position] for name, value in stacked.items()},
                                           **dict(key[1])}))
    t_r_rows = t_r[sid]
    coolant_rows = _ByLiquid(coolant_liquids, stream_coolant[sid])
    charge = _ByLiquid(charge_liquids, surface_charge)
    c_low, c_high = (np.array(v) for v in zip(*(_range(liquid) for liquid in coolant_liquids)))
    p_low, p_high = (np.array(v) for v in zip(*(_range(liquid) for liquid in charge_liquids)))
    c_low, c_high = c_low[stream_coolant] + 1e-3, c_high[stream_coolant] - 1e-2
    p_low, p_high = p_low[surface_charge] + 1e-3, p_high[surface_charge] - 1e-2
    c_low_rows, c_high_rows = c_low[sid], c_high[sid]

    mean = t_in.copy()
    process_wall = 0.5 * (t_r_rows + t_in[sid])
    service_wall = process_wall.copy()
    active = np.ones(n_streams, dtype=bool)
    duty = np.zeros(n_streams)
    ua = np.zeros(n_streams)
    outlet = np.zeros(n_streams)
    iterations = np.zeros(n_streams, dtype=int)
    h_process = np.empty(len(sid))
    h_service = np.empty(len(sid))
    starts = np.flatnonzero(np.r_[True, sid[1:] != sid[:-1]])
    for iteration in range(1, MAX_ITERATIONS + 1):
        state = coolant.states(np.clip(mean, c_low, c_high))
        mu_wall = charge.states(np.clip(process_wall, p_low, p_high)).viscosity
        ratio = mu_bulk / mu_wall
        for (key, _), rows, arguments in process_groups:
            function = process_side.CORRELATIONS[key].function
            h_process[rows] = function(viscosity_ratio=ratio[rows], **arguments) * k_bulk[rows]
        at_wall = coolant_rows.states(np.clip(service_wall, c_low_rows, c_high_rows))
        bulk = _take(state, sid)
        flow_rows = m[sid] * surface_flow_share
        for (function, _), rows, fixed in service_groups:
            h_service[rows] = function(_take(bulk, rows), flow_rows[rows], at_wall.viscosity[rows],
                                       at_wall.density[rows], **fixed)[0]
        overall = wall.overall_from_layers(h_process, h_service, stacked_layers)
        new_ua = np.bincount(sid, overall.U * area, minlength=n_streams)
        new_outlet, new_duty, _, _ = single_pass(t_r, t_in, new_ua, m * state.heat_capacity)
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
        rows_active = active[sid]
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
    return ManyResult(total_duty, total_ua, total_area, main_outlet, most, ~unsettled, networks, network_index)


def heat_transfer_many(cases: Iterable[tuple]) -> ManyResult:
    """Solve ``(vessel, charge, coolant, process_temperature)`` cases at once (equal cases assembled once)."""
    networks: list[Network] = []
    seen: dict = {}
    index = []
    for vessel, charge, coolant, process_temperature in cases:
        key = (vessel, charge, coolant, process_temperature)
        if key not in seen:
            seen[key] = len(networks)
            networks.append(assemble(vessel, charge, coolant, process_temperature))
        index.append(seen[key])
    return solve_many(networks, np.array(index, dtype=int))
