"""Jacket sizing: enumerate candidate jackets and coils for a vessel shell, evaluate each, recommend one.

Each candidate is the vessel shell with one jacket (plain annular, spiral-baffle annular, half-pipe in
parallel zones), one internal helical coil, or both, evaluated by the same heat-transfer network as the
cooling check (:func:`calc.network.heat_transfer.heat_transfer`) with the utility's flow. When that
flow is beyond what the utility can push through the candidate (available pressure difference,
maximum velocity, maximum flow: :mod:`calc.network.flow_limit`), the candidate is evaluated at the
largest flow it can push, and says so. A candidate is feasible when its capacity at that flow
meets the heat load times the safety factor.

Candidates (defaults; every list can be given):

- annular jackets over gaps, with and without a spiral baffle over baffle pitches; inlet and outlet
  nozzles: the smallest schedule-40 pipe carrying the flow at no more than 2.5 m/s (common practice,
  no source: nozzles are sized for 1-3 m/s);
- half-pipe jackets (180 degree, from schedule-40 pipe, ASME B36.10M) over nominal sizes, pitches
  (1.25, 1.5 and 2 outside diameters unless given) and 1..4 parallel zones;
- internal helical coils (schedule-10S tube, ASME B36.19M) centred in the annulus between impeller tip
  and wall, pitch two tube diameters, from one tube diameter above the bottom tangent line, over a
  quarter to all of the turns that fit below the liquid level (common practice, no source);
- jacket + coil: when no jacket alone meets the duty, the highest-capacity jacket of each jacket type
  with each coil.

Half pipes are rated a little low (conservative): the heat the half pipe's own walls conduct into the
coolant is left out, and the one-dimensional fin treatment of the wall between turns understates U where
the wall's Biot number is high (``fin_biot_high``; :data:`calc.films.wall.FIN_BIOT_LIMIT`). A half pipe
rejected by a small margin may therefore do in practice; the margin band does not cover these two.

Ranking (common practice, no source): "smallest" is the least heat-transfer area that meets the duty;
among equal areas (every jacket covers the same wall) the simplest type (plain annular, then spiral
baffle, then half pipe), then the least coolant hold-up (the volume of the channels: the least
fabricated jacket or coil), then the least pressure drop.

Margin bands: every feasible candidate (``options.margin_bands = "all"``: every evaluated candidate;
``"recommendation"``: only the feasible ones the recommendation has to look at, as a scale-up uses it)
carries the cooling check's margin band (:mod:`calc.checks.margin_band`: the margin over the published
alternatives of every resistance and the fouling range), all bands built together in shared vectorised
passes (:func:`calc.checks.margin_band.margin_bands`), and ``verdict_not_robust`` where the verdict at
the nominal margin does not hold across the band. Bands of the infeasible candidates are left out by
default because they double the time of a sizing (tests/benchmarks/sizing.py) and cannot change the
recommendation.

The overall recommendation (common practice, no source) is robust first: a feasible design whose band
stays at or above the safety factor is preferred to any feasible design whose band falls below it (a
design that meets the duty only with the nominal correlations is a bet on one correlation, and a new
vessel has no measured UA to settle it). Among designs equally robust it prefers a jacket alone (no
internals to clean, no displaced volume, no obstruction to the flow), then a jacket with a coil, then a
coil alone; within those, the ranking above. When no feasible design's verdict holds across its band,
the recommendation says so. ``smallest_feasible`` keeps its plain meaning (the smallest feasible design
of each type, robust or not).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from typing import Any, NamedTuple

import numpy as np

from calc.cautions import COOLING_CHECK
from calc.checks.cooling_check import charge_mass, check_cautions, margin_of
from calc.checks.heat_load import HeatLoad, HeatRelease, heat_load
from calc.checks.margin_band import MarginBand, band_steps, margin_bands
from calc.deadline import NEVER, Deadline
from calc.films.jacket_side import JacketSpec
from calc.network.flow_limit import FlowLimit, flow_limit, within_limits
from calc.network.heat_transfer import (COIL_WALL_CLEARANCE, MAX_ITERATIONS, HeatTransferResult, Network, assemble,
                                        stream_at)
from calc.network.vectorised import Prepared
from calc.sizing import pipes
from calc.validity import CalcWarning, InputError, Warnings
from calc.vessel import geometry
from calc.vessel.model import Charge, Coolant, Vessel

JACKET_TYPES = ("annular", "annular_spiral_baffle", "half_pipe")
TYPES = JACKET_TYPES + ("coil", "jacket_and_coil")
#: Preference of the overall recommendation, most preferred first (see the module notes).
PREFERENCE = ("annular", "annular_spiral_baffle", "half_pipe", "jacket_and_coil", "coil")
NOZZLE_VELOCITY = 2.5  # m/s, common practice, no source
PITCH_RATIOS = (1.25, 1.5, 2.0)  # half-pipe pitch over the pipe's outside diameter, common practice
COIL_PITCH_RATIO = 2.0  # coil pitch over tube OD, common practice, no source
COIL_CLEARANCE_RATIO = COIL_WALL_CLEARANCE  # free space on each side of a coil tube, in tube ODs, common practice
TURN_FRACTIONS = (0.25, 0.5, 0.75, 1.0)
HALF_PIPE_SCHEDULE, COIL_SCHEDULE = "40", "10S"
DEFAULT_COIL_TUBE_SIZES = ("1", "1-1/2", "2", "3")
#: Which candidates carry a margin band: the feasible ones (default), every evaluated one, or only those the
#: recommendation needs (the feasible ones in its order up to the first whose verdict holds across its band).
BAND_SCOPES = ("feasible", "all", "recommendation")
#: Most candidates one sizing evaluates (a request whose lists multiply beyond this is refused).
MAX_CANDIDATES = 600

SIZING_CAUTION = ("A sized design is a thermal and hydraulic screening: the jacket's pressure rating, the "
                  "shell's stiffening, weld access, coil supports and vibration, venting and draining are the "
                  "vessel fabricator's to confirm under the applicable pressure-vessel code.")


@dataclass(frozen=True)
class SizingOptions:
    """What to enumerate; lengths in m. None means the defaults of the module notes."""

    types: tuple[str, ...] = TYPES
    gaps: tuple[float, ...] = (0.025, 0.038, 0.05, 0.075, 0.1)
    baffle_pitches: tuple[float, ...] = (0.1, 0.15, 0.2, 0.3, 0.4)
    pipe_sizes: tuple[str, ...] = ("1-1/2", "2", "2-1/2", "3", "4")
    pipe_pitches: tuple[float, ...] | None = None
    zones: tuple[int, ...] = (1, 2, 3, 4)
    coil_tube_sizes: tuple[str, ...] | None = None  # default DEFAULT_COIL_TUBE_SIZES, those that fit
    coil_turns: tuple[int, ...] | None = None
    coil_helix_diameter: float | None = None
    covers_bottom_head: bool = True
    jacket_top: float | None = None
    margin_bands: str = "feasible"  # one of BAND_SCOPES


@dataclass(frozen=True)
class Candidate:
    """One evaluated design. Flows in kg/s, pressure in Pa, lengths in m, areas in m2, powers in W."""

    index: int
    type: str
    description: str
    jacket: JacketSpec | None
    coil: geometry.HelicalCoil | None
    pipe_size: str | None  # NPS of the half pipe, or of the coil tube
    heat_transfer_area: float
    overall_coefficient: float
    cooling_capacity: float
    margin: float | None
    coolant_flow: float  # flow of the first circuit (``coolant.flow``: the jacket's, else the coil's)
    total_coolant_flow: float  # all circuits together
    velocity: float  # the largest channel velocity over the circuits
    pressure_drop: float  # the largest circuit pressure drop
    path_length: float  # of the circuit with the largest pressure drop
    displaced_volume: float  # m3 of liquid displaced by the coil
    holdup_volume: float  # m3 of coolant in the channels of every circuit
    process_film_jacket: float | None  # W/(m2 K)
    process_film_coil: float | None
    flow_limited: bool
    feasible: bool
    reason: str
    warning_codes: tuple[str, ...] = ()
    coverage: geometry.JacketCoverage = field(default_factory=geometry.JacketCoverage)
    #: half pipes: the overall surface efficiency of the jacketed wall (channel coverage and the fins between
    #: turns, :func:`calc.films.wall.half_pipe_surface_efficiency`); None for other designs
    surface_efficiency: float | None = None
    #: the margin over the published alternatives of every resistance (:mod:`calc.checks.margin_band`): given for
    #: every feasible design (every evaluated one with ``options.margin_bands = "all"``), None for the others
    margin_band: MarginBand | None = None

    @property
    def verdict_not_robust(self) -> bool | None:
        """The verdict (feasible or not) changes within the margin band; None without a band."""
        return None if self.margin_band is None else not self.margin_band.holds_across_band

    @property
    def robust(self) -> bool:
        """Feasible, and still so across the margin band (no net load: nothing to hold)."""
        return self.feasible and (self.margin is None or (self.margin_band is not None
                                                          and self.margin_band.holds_across_band))

    @property
    def jacket_geometry(self) -> dict[str, Any] | None:
        """The jacket as a request's ``vessel.jacket`` gives it (so the design can be checked again)."""
        if self.jacket is None:
            return None
        keys = ("type", "gap", "baffle_pitch", "pipe_diameter", "pipe_pitch", "passes", "inlet_diameter")
        return {k: getattr(self.jacket, k) for k in keys} | {
            "covers_bottom_head": self.coverage.covers_bottom_head, "top": self.coverage.top}


@dataclass(frozen=True)
class Recommendation:
    index: int | None
    type: str | None
    description: str
    reasoning: str


@dataclass(frozen=True)
class SizedDesign:
    """The recommended design of one sizing (for a scale-up's scales)."""

    recommendation: Recommendation
    candidate: Candidate | None
    candidates_evaluated: int


@dataclass(frozen=True)
class SmallestFeasible:
    type: str
    index: int | None


@dataclass(frozen=True)
class JacketSizing:
    candidates: tuple[Candidate, ...]
    recommendation: Recommendation
    smallest_feasible: dict[str, int | None]  # type -> candidate index or None
    heat_load: HeatLoad | None
    duty: float  # W, heat load x safety factor
    safety_factor: float
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = COOLING_CHECK + (SIZING_CAUTION,)

    @property
    def candidates_evaluated(self) -> int:
        return len(self.candidates)

    @property
    def smallest_feasible_by_type(self) -> tuple[SmallestFeasible, ...]:
        """For each type of design, the index of its smallest feasible candidate (None: none feasible)."""
        return tuple(SmallestFeasible(kind, index) for kind, index in self.smallest_feasible.items())

    @property
    def recommended(self) -> SizedDesign:
        index = self.recommendation.index
        return SizedDesign(self.recommendation, None if index is None else self.candidates[index],
                           len(self.candidates))


# ---------------------------------------------------------------- the envelope


def _coil_geometry(vessel: Vessel, size: pipes.PipeSize, helix: float | None) -> tuple[float, float]:
    """(helix diameter, pitch) of a coil of tube ``size`` centred between impeller tip and wall."""
    T, D = vessel.shape.diameter, vessel.agitator.diameter
    d = size.outer_diameter
    return ((T + D) / 2.0 if helix is None else helix), COIL_PITCH_RATIO * d


def check_envelope(vessel: Vessel, options: SizingOptions) -> None:
    """Refuse options no design can meet (an :class:`InputError` naming the ``options`` field)."""
    for name in ("types",):
        for i, value in enumerate(getattr(options, name)):
            if value not in TYPES:
                raise InputError(f"options.{name}[{i}]", f"unknown type {value!r}; known: {', '.join(TYPES)}")
    sizes = [pipes.pipe_size(n, f"options.pipe_sizes[{i}]") for i, n in enumerate(options.pipe_sizes)]
    if options.pipe_pitches is not None and "half_pipe" in options.types and sizes:
        widest = max(sizes, key=lambda s: s.outer_diameter)
        for i, pitch in enumerate(options.pipe_pitches):
            if pitch < widest.outer_diameter:
                raise InputError(f"options.pipe_pitches[{i}]",
                                 f"{pitch:g} m is below the width of the NPS {widest.nps} half pipe "
                                 f"({widest.outer_diameter:g} m): neighbouring turns would overlap")
    if options.margin_bands not in BAND_SCOPES:
        raise InputError("options.margin_bands", f"must be one of {', '.join(BAND_SCOPES)}, got "
                                                 f"{options.margin_bands!r}")
    for i, zones in enumerate(options.zones):
        if not 1 <= zones <= 20:
            raise InputError(f"options.zones[{i}]", f"must be between 1 and 20, got {zones!r}")
    if not any(t in options.types for t in ("coil", "jacket_and_coil")):
        return
    for i, nps in enumerate(options.coil_tube_sizes or ()):
        size = pipes.pipe_size(nps, f"options.coil_tube_sizes[{i}]")
        need = size.outer_diameter * (1.0 + 2.0 * COIL_CLEARANCE_RATIO)
        annulus = _annulus(vessel)
        if need > annulus:
            raise InputError(f"options.coil_tube_sizes[{i}]",
                             f"an NPS {nps} coil needs {need:.4g} m (tube and a tube diameter of clearance each "
                             f"side) but the annulus between impeller tip and wall is {annulus:.4g} m")
    if options.coil_helix_diameter is None:
        return
    T, D = vessel.shape.diameter, vessel.agitator.diameter
    helix = options.coil_helix_diameter
    for nps in _coil_sizes(vessel, options, Warnings()):
        d = pipes.pipe_size(nps).outer_diameter
        inner, outer = (helix - d) / 2.0, (helix + d) / 2.0
        if inner - D / 2.0 < COIL_CLEARANCE_RATIO * d or T / 2.0 - outer < COIL_CLEARANCE_RATIO * d:
            raise InputError("options.coil_helix_diameter",
                             f"a helix of {helix:g} m with NPS {nps} tube leaves less than one tube diameter "
                             f"to the impeller tip ({D / 2:.4g} m radius) or the wall ({T / 2:.4g} m radius)")


def _annulus(vessel: Vessel) -> float:
    """Radial room between the impeller tip and the wall, m."""
    return (vessel.shape.diameter - vessel.agitator.diameter) / 2.0


def _coil_sizes(vessel: Vessel, options: SizingOptions, warnings: Warnings) -> tuple[str, ...]:
    """The coil tube sizes to try: those given (checked by :func:`check_envelope`), or the defaults that fit
    between impeller and wall with a tube diameter of clearance each side."""
    if options.coil_tube_sizes is not None:
        return options.coil_tube_sizes
    fit = tuple(n for n in DEFAULT_COIL_TUBE_SIZES
                if pipes.pipe_size(n).outer_diameter * (1.0 + 2.0 * COIL_CLEARANCE_RATIO) <= _annulus(vessel))
    if len(fit) < len(DEFAULT_COIL_TUBE_SIZES):
        warnings.add(CalcWarning("coil_sizes_left_out", f"coil tube sizes that do not fit between impeller and wall "
                                                        f"({_annulus(vessel):.3g} m) are left out; tried: "
                                                        f"{', '.join(fit) or 'none'}"))
    return fit


def _coils(vessel: Vessel, charge: Charge, process_temperature: float, options: SizingOptions,
           warnings: Warnings) -> list[tuple[str, geometry.HelicalCoil]]:
    volume = charge.liquid_volume(process_temperature)
    level = geometry.fill(vessel.shape, None, (), volume=volume).liquid_level
    out = []
    for nps in _coil_sizes(vessel, options, warnings):
        size = pipes.pipe_size(nps)
        helix, pitch = _coil_geometry(vessel, size, options.coil_helix_diameter)
        d = size.outer_diameter
        elevation = geometry.head_depth(vessel.shape) + d
        room = min(level, geometry.brim_height(vessel.shape)) - elevation - d  # top turn a tube OD under the surface
        most = math.floor(room / pitch) if room > 0 else 0
        if options.coil_turns is not None:
            for j, turns in enumerate(options.coil_turns):
                if turns > most:
                    raise InputError(f"options.coil_turns[{j}]",
                                     f"{turns} turns of NPS {nps} tube at a pitch of {pitch:.4g} m do not fit below "
                                     f"the liquid level ({level:.4g} m): at most {most}")
            counts = sorted(set(options.coil_turns))
        else:
            counts = sorted({max(2, round(f * most)) for f in TURN_FRACTIONS}) if most >= 2 else []
        if not counts:
            warnings.add(CalcWarning("coil_does_not_fit", f"no NPS {nps} coil of two or more turns fits below the "
                                                          f"liquid level ({level:.4g} m)"))
        for turns in counts:
            out.append((nps, geometry.HelicalCoil(d, size.wall(COIL_SCHEDULE), helix, float(turns), pitch)))
    return out


def _jackets(vessel: Vessel, coolant: Coolant, options: SizingOptions) -> list[tuple[str, str | None, JacketSpec]]:
    volume_flow = coolant.mass_flow() / coolant.liquid.at(coolant.inlet_temperature).density
    nozzle = pipes.nozzle_for(volume_flow, NOZZLE_VELOCITY).inner_diameter("40")
    out: list[tuple[str, str | None, JacketSpec]] = []
    if "annular" in options.types:
        out += [("annular", None, JacketSpec("annular", gap=g, inlet_diameter=nozzle)) for g in options.gaps]
    if "annular_spiral_baffle" in options.types:
        out += [("annular_spiral_baffle", None, JacketSpec("annular_spiral_baffle", gap=g, baffle_pitch=p,
                                                           inlet_diameter=nozzle))
                for g in options.gaps for p in options.baffle_pitches]
    if "half_pipe" in options.types:
        for nps in options.pipe_sizes:
            size = pipes.pipe_size(nps)
            pitches = options.pipe_pitches or tuple(r * size.outer_diameter for r in PITCH_RATIOS)
            out += [("half_pipe", nps, JacketSpec("half_pipe", pipe_diameter=size.inner_diameter(HALF_PIPE_SCHEDULE),
                                                  pipe_pitch=p, passes=n))
                    for p in pitches for n in options.zones]
    return out


# ---------------------------------------------------------------- one candidate


def describe(jacket: JacketSpec | None, coil: geometry.HelicalCoil | None, nps: str | None,
             coil_nps: str | None) -> str:
    parts = []
    mm = {name: 1e3 * (getattr(jacket, name, None) or 0.0) for name in ("gap", "baffle_pitch", "pipe_pitch")}
    if jacket is not None and jacket.type == "annular":
        parts.append(f"annular jacket, gap {mm['gap']:.0f} mm")
    elif jacket is not None and jacket.type == "annular_spiral_baffle":
        parts.append(f"annular jacket, gap {mm['gap']:.0f} mm, spiral baffle pitch {mm['baffle_pitch']:.0f} mm")
    elif jacket is not None:
        zones = "1 zone" if jacket.passes == 1 else f"{jacket.passes} parallel zones"
        parts.append(f"half-pipe jacket NPS {nps}, pitch {mm['pipe_pitch']:.0f} mm, {zones}")
    if coil is not None:
        parts.append(f"coil NPS {coil_nps}, {coil.turns:g} turns on {coil.helix_diameter:.3g} m")
    return " + ".join(parts)


@dataclass(frozen=True)
class Design:
    """One candidate design before evaluation: a jacket, a coil or both, with the nominal sizes named."""

    kind: str
    jacket: JacketSpec | None
    coil: geometry.HelicalCoil | None
    nps: str | None = None
    coil_nps: str | None = None


@dataclass(frozen=True)
class _SetUp:
    """A design's network assembled at the flow the utility can push through it (or why it cannot be)."""

    design: Design
    vessel: Vessel
    network: Network | None
    limit: FlowLimit | None
    limited: bool
    error: str | None


def _set_up(design: Design, shell: Vessel, charge: Charge, coolant: Coolant, process_temperature: float) -> _SetUp:
    vessel = replace(shell, jacket=design.jacket, coils=() if design.coil is None else (design.coil,))
    try:
        network = assemble(vessel, charge, coolant, process_temperature)
        # the flow limit needs only the paths (no solve): the network is assembled again at the flow it allows
        limit = None if within_limits(network.streams, coolant) else flow_limit(network.streams, coolant)
        limited = limit is not None and limit.mass_flow is not None and \
            limit.mass_flow < coolant.mass_flow() * (1.0 - 1e-9)
        if limited:
            assert limit is not None and limit.mass_flow is not None
            network = assemble(vessel, charge, coolant.with_mass_flow(limit.mass_flow), process_temperature)
    except InputError as exc:
        return _SetUp(design, vessel, None, None, False, exc.message)
    return _SetUp(design, vessel, network, limit, limited, None)


def _solved(setups: list[_SetUp]) -> dict[int, tuple[HeatTransferResult, float]]:
    """Every assembled design solved in one pass of the vectorised network: position in ``setups`` ->
    (the result stream by stream, evaluated once at the solved state; the solved duty, W)."""
    ready = [i for i, s in enumerate(setups) if s.network is not None]
    if not ready:
        return {}
    networks = [n for n in (setups[i].network for i in ready) if n is not None]
    many = Prepared(networks).solve()
    rows = many.rows
    out: dict[int, tuple[HeatTransferResult, float]] = {}
    stream_first = np.searchsorted(rows.state, np.arange(len(ready))) if rows is not None else None
    surface_first = np.searchsorted(rows.stream, np.arange(rows.state.size)) if rows is not None else None
    for k, i in enumerate(ready):
        network = networks[k]
        warnings = Warnings(network.warnings)
        streams = []
        for j, model in enumerate(network.streams):
            assert rows is not None and stream_first is not None and surface_first is not None
            row = int(stream_first[k]) + j
            first = int(surface_first[row])
            walls = [(float(rows.process_wall_temperature[first + n]), float(rows.service_wall_temperature[first + n]))
                     for n in range(len(model.surfaces))]
            streams.append(stream_at(network, j, float(rows.mean_temperature[row]), walls, int(many.iterations[k]),
                                     warnings))
        if not bool(many.converged[k]):
            warnings.add(CalcWarning("iteration_not_converged", "coolant and wall temperatures did not settle within "
                                                                f"{MAX_ITERATIONS} iterations; results are approximate"))
        out[i] = (HeatTransferResult(network.process_temperature, network.process_properties, network.fill,
                                     network.agitation, tuple(streams), warnings), float(many.duty[k]))
    return out


def _not_evaluated(index: int, setup: _SetUp, coverage: geometry.JacketCoverage) -> Candidate:
    d = setup.design
    return Candidate(index, d.kind, describe(d.jacket, d.coil, d.nps, d.coil_nps), d.jacket, d.coil,
                     d.nps or d.coil_nps, 0.0, 0.0, 0.0, None, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, None, None, False,
                     False, f"not evaluated: {setup.error}", (), coverage)


def _candidate(index: int, setup: _SetUp, result: HeatTransferResult, capacity: float, load: HeatLoad,
               safety_factor: float, coverage: geometry.JacketCoverage) -> Candidate:
    d = setup.design
    margin = margin_of(capacity, load.total)
    streams = [s for s in result.streams if s.hydraulics is not None]
    worst = max(streams, key=lambda s: s.pressure_drop or 0.0) if streams else None
    films: dict[str, float | None] = {"jacket": None, "coil": None}
    efficiency = None
    for stream in result.streams:
        for surface in stream.surfaces:
            key = "jacket" if stream.name == "jacket" else "coil"
            if films[key] is None or surface.name == "jacket_shell":
                films[key] = surface.process_film.h
            if surface.name == "jacket_shell" and d.jacket is not None and d.jacket.type == "half_pipe":
                efficiency = surface.overall.surface_efficiency
    feasible = margin is None or margin >= safety_factor
    flow = result.streams[0].mass_flow if result.streams else 0.0
    drop = 0.0 if worst is None else (worst.pressure_drop or 0.0)
    at = (f"at {flow:.3g} kg/s" + (f" (cut back by {setup.limit.reason})" if setup.limited and setup.limit else "")
          + (f", {drop / 1e5:.3g} bar" if worst is not None else ""))
    if margin is None:
        reason = "no net heat load to remove"
    elif feasible:
        reason = f"meets the duty: margin {margin:.3g} >= {safety_factor:g} {at}"
    else:
        reason = (f"falls short: capacity {capacity / 1e3:.4g} kW against {safety_factor:g} x "
                  f"{load.total / 1e3:.4g} kW (margin {margin:.3g}) {at}")
    codes = tuple(dict.fromkeys(w.code for w in result.warnings))
    return Candidate(
        index, d.kind, describe(d.jacket, d.coil, d.nps, d.coil_nps), d.jacket, d.coil, d.nps or d.coil_nps,
        result.area, result.ua / result.area if result.area > 0 else 0.0, capacity, margin, flow,
        sum(s.mass_flow for s in result.streams), max((s.velocity or 0.0 for s in streams), default=0.0), drop,
        0.0 if worst is None else (worst.path_length or 0.0), result.fill.displaced_volume,
        sum(s.path.area * s.path.length * s.path.branches for s in streams if s.path is not None), films["jacket"],
        films["coil"], setup.limited, feasible, reason, codes, coverage, surface_efficiency=efficiency)


def _load(heat_release: HeatRelease, result: HeatTransferResult, process_temperature: float) -> HeatLoad:
    return heat_load(heat_release, charge_mass(result), process_temperature, result.agitation.power)


class Evaluated(NamedTuple):
    candidate: Candidate
    result: HeatTransferResult | None  # None: not evaluated
    load: HeatLoad | None
    network: Network | None  # as solved (at the flow the utility can push)


def evaluate_designs(designs: list[Design], vessel: Vessel, charge: Charge, coolant: Coolant,
                     process_temperature: float, heat_release: HeatRelease, safety_factor: float, first_index: int = 0,
                     deadline: Deadline = NEVER) -> list[Evaluated]:
    """Evaluate designs at the utility's flow, each cut back to what the utility can push through it: every
    network assembled (one by one, checking ``deadline``), then all solved in one vectorised pass."""
    setups = []
    for design in designs:
        deadline.check()
        setups.append(_set_up(design, vessel, charge, coolant, process_temperature))
    deadline.check()
    solved = _solved(setups)
    out: list[Evaluated] = []
    for i, setup in enumerate(setups):
        if i not in solved:
            out.append(Evaluated(_not_evaluated(first_index + i, setup, vessel.coverage), None, None, None))
            continue
        result, capacity = solved[i]
        load = _load(heat_release, result, process_temperature)
        out.append(Evaluated(_candidate(first_index + i, setup, result, capacity, load, safety_factor,
                                        vessel.coverage), result, load, setup.network))
    return out


def evaluate_candidate(index: int, kind: str, vessel: Vessel, charge: Charge, coolant: Coolant,
                       process_temperature: float, heat_release: HeatRelease, safety_factor: float,
                       jacket: JacketSpec | None, coil: geometry.HelicalCoil | None, nps: str | None = None,
                       coil_nps: str | None = None) -> tuple[Candidate, HeatTransferResult | None, HeatLoad | None]:
    """Evaluate one design at the utility's flow, cut back to what the utility can push."""
    evaluated = evaluate_designs([Design(kind, jacket, coil, nps, coil_nps)], vessel, charge, coolant,
                                 process_temperature, heat_release, safety_factor, index)[0]
    return evaluated.candidate, evaluated.result, evaluated.load


# ---------------------------------------------------------------- the whole sizing


def _rank_key(candidate: Candidate) -> tuple[float, int, float, float, int]:
    return (round(candidate.heat_transfer_area, 6), PREFERENCE.index(candidate.type), round(candidate.holdup_volume, 6),
            candidate.pressure_drop, candidate.index)


def jacket_sizing(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                  heat_release: HeatRelease, safety_factor: float, options: SizingOptions = SizingOptions(),
                  deadline: Deadline = NEVER) -> JacketSizing:
    """Enumerate, evaluate and rank the candidate designs for the shell ``vessel`` (its own jacket and coils
    are ignored; the coverage of ``options`` applies). Each candidate first checks ``deadline``
    (:class:`calc.deadline.OutOfTime` once it has passed)."""
    check_envelope(vessel, options)
    warnings = Warnings()
    brim = geometry.brim_height(vessel.shape)
    if options.jacket_top is not None and options.jacket_top > brim:
        raise InputError("options.jacket_top", f"must be at most the top of the straight side ({brim:.4g} m), "
                                               f"got {options.jacket_top:g}")
    shell = replace(vessel, jacket=None, coils=(),
                    coverage=geometry.JacketCoverage(options.covers_bottom_head, options.jacket_top))
    # what no design changes (coolant colder than the contents, the charge fits, the agitator) is checked once
    # here, so it is refused as the request's error rather than reported against every candidate
    assemble(shell, charge, coolant, process_temperature)  # its warnings are each candidate's
    jackets = _jackets(shell, coolant, options)
    # combinations asked for without jackets alone: the jackets are still evaluated, as the combinations' bases
    combos_only = "jacket_and_coil" in options.types and not any(t in options.types for t in JACKET_TYPES)
    bases = _jackets(shell, coolant, replace(options, types=JACKET_TYPES)) if combos_only else []
    coils = _coils(shell, charge, process_temperature, options, warnings) \
        if any(t in options.types for t in ("coil", "jacket_and_coil")) else []
    most = len(jackets) + len(bases) + len(coils) * (1 + len(JACKET_TYPES) * ("jacket_and_coil" in options.types))
    if most > MAX_CANDIDATES:
        raise InputError("options", f"up to {most} candidates: at most {MAX_CANDIDATES} per sizing; "
                                    "give shorter lists")
    designs = [Design(kind, jacket, None, nps) for kind, nps, jacket in jackets]
    if "coil" in options.types:
        designs += [Design("coil", None, coil, None, coil_nps) for coil_nps, coil in coils]
    evaluated = evaluate_designs(designs, shell, charge, coolant, process_temperature, heat_release, safety_factor,
                                 deadline=deadline)
    jackets_alone = [e.candidate for e in evaluated if e.candidate.type in JACKET_TYPES]
    if combos_only:
        jackets_alone = [e.candidate for e in evaluate_designs([Design(kind, jacket, None, nps) for kind, nps, jacket
                                                                in bases], shell, charge, coolant,
                                                               process_temperature, heat_release, safety_factor,
                                                               deadline=deadline)]
    if "jacket_and_coil" in options.types and (combos_only or not any(c.feasible for c in jackets_alone)):
        combos = []
        for kind in JACKET_TYPES:
            of_kind = [c for c in jackets_alone if c.type == kind and c.cooling_capacity > 0]
            if not of_kind:
                continue
            best = max(of_kind, key=lambda c: c.cooling_capacity)
            combos += [Design("jacket_and_coil", best.jacket, coil, best.pipe_size if kind == "half_pipe" else None,
                              coil_nps) for coil_nps, coil in coils]
        evaluated += evaluate_designs(combos, shell, charge, coolant, process_temperature, heat_release,
                                      safety_factor, len(evaluated), deadline)
    candidates = [e.candidate for e in evaluated]
    load = next((e.load for e in evaluated if e.load is not None), None)
    if not candidates:
        raise InputError("options.types", "no candidate to evaluate: choose at least one type")
    if any(c.type == "jacket_and_coil" for c in candidates):
        warnings.add(CalcWarning("coil_shields_wall",
                                 "jacket + coil: the jacket wall's process film is computed as without the coil; a "
                                 "coil between impeller and wall slows the flow along the wall and lowers that film "
                                 "(not modelled: the combined capacity may be optimistic)"))
    smallest = {}
    for kind in TYPES:
        feasible = [c for c in candidates if c.type == kind and c.feasible]
        smallest[kind] = min(feasible, key=_rank_key).index if feasible else None
    if options.margin_bands == "recommendation":
        # in the order of the recommendation without bands, in growing batches, until one holds across its band:
        # the first that does is the recommendation (robust first); when none does, every feasible design is banded
        queue = sorted((c for c in candidates if c.feasible), key=lambda c: (_group(c), _rank_key(c)))
        size = 1
        while queue:
            batch, queue = queue[:size], queue[size:]
            _attach(candidates, evaluated, [c.index for c in batch], safety_factor, deadline)
            if any(candidates[c.index].robust for c in batch):
                break
            size *= 4
    else:
        _attach(candidates, evaluated, [i for i, e in enumerate(evaluated)
                                        if options.margin_bands == "all" or e.candidate.feasible], safety_factor,
                deadline)
    recommendation = _recommend(candidates, safety_factor)
    duty = safety_factor * load.total if load is not None else 0.0
    cautions = check_cautions(heat_release) + (SIZING_CAUTION,)
    return JacketSizing(tuple(candidates), recommendation, smallest, load, duty, safety_factor, warnings, cautions)


def _attach(candidates: list[Candidate], evaluated: list[Evaluated], indices: list[int], safety_factor: float,
            deadline: Deadline) -> None:
    """Give the candidates at ``indices`` their margin bands (and ``verdict_not_robust`` where it applies)."""
    deadline.check()
    for index, band in _bands(evaluated, indices, safety_factor).items():
        codes = candidates[index].warning_codes + (() if band.holds_across_band else ("verdict_not_robust",))
        candidates[index] = replace(candidates[index], margin_band=band, warning_codes=codes)


def _bands(evaluated: list[Evaluated], indices: list[int], safety_factor: float) -> dict[int, MarginBand]:
    """The margin bands of the evaluated designs at ``indices``, all together: each is the cooling check's band
    (:func:`calc.checks.margin_band.band_steps` of the network as solved, at the flow the utility can push), and
    every pass solves the members of all bands in one call of the vectorised network."""
    chosen = [(i, e) for i, e in ((i, evaluated[i]) for i in indices)
              if e.network is not None and e.result is not None and e.load is not None]
    steps = []
    for _, e in chosen:
        assert e.network is not None and e.result is not None and e.load is not None
        network = e.network
        steps.append(band_steps(network.vessel, network.charge, network.coolant, network.process_temperature,
                                e.result, e.load.total, e.candidate.margin, safety_factor, network=network))
    return dict(zip((i for i, _ in chosen), margin_bands(steps))) if steps else {}


def _group(candidate: Candidate) -> int:
    """Rank of the candidate's kind in the recommendation: a jacket alone, a jacket with a coil, a coil alone."""
    return 0 if candidate.type in JACKET_TYPES else 1 if candidate.type == "jacket_and_coil" else 2


def _recommend_key(candidate: Candidate) -> tuple[bool, int, tuple[float, int, float, float, int]]:
    return not candidate.robust, _group(candidate), _rank_key(candidate)


WHY = ("a jacket alone meets the duty (no internals to clean, no displaced volume)",
       "no jacket alone meets the duty; a jacket with an internal coil does",
       "only an internal coil meets the duty")
KINDS = ("a jacket alone", "a jacket with an internal coil", "an internal coil alone")


def _band_text(candidate: Candidate) -> str:
    band = candidate.margin_band
    if band is None or band.low is None or band.high is None:
        return ""
    return f" (band {band.low:.3g}-{band.high:.3g}, low end with {band.low_set_by})"


def _recommend(candidates: list[Candidate], safety_factor: float) -> Recommendation:
    feasible = [c for c in candidates if c.feasible]
    if feasible:
        best = min(feasible, key=_recommend_key)
        margin = best.margin if best.margin is None else round(best.margin, 3)
        why = WHY[_group(best)] if _group(best) == min(map(_group, feasible)) else (
            f"{KINDS[_group(best)]} meets the duty across its margin band, where the simpler kinds meet it only at "
            "the nominal margin")
        which = " whose verdict holds across their margin band" if best.robust else ""
        reasoning = (f"{why}; "
                     f"of the feasible designs{which} this has the least heat-transfer area "
                     f"({best.heat_transfer_area:.3g} m2) and, among equal areas, the simplest type and the least "
                     f"coolant hold-up ({best.holdup_volume * 1e3:.3g} L); pressure drop "
                     f"{best.pressure_drop / 1e5:.3g} bar, margin {margin}{_band_text(best)} against the safety "
                     f"factor {safety_factor:g} at {best.coolant_flow:.3g} kg/s")
        if best.robust:
            passed = [c for c in feasible if not c.robust and (_group(c), _rank_key(c)) < (_group(best),
                                                                                          _rank_key(best))]
            if passed:
                first = min(passed, key=lambda c: (_group(c), _rank_key(c)))
                reasoning += (f". Preferred to {len(passed)} smaller or simpler feasible design(s), such as "
                              f"#{first.index} ({first.description}, margin {first.margin:.3g}"
                              f"{_band_text(first)}), whose verdict does not hold across the band: they meet the "
                              "duty only with the nominal correlations")
        else:
            reasoning += (". CAUTION: no feasible design's verdict holds across its margin band; this one falls to "
                          f"{best.margin_band.low:.3g} with {best.margin_band.low_set_by}, below the safety factor. "
                          "It meets the duty only with the nominal correlations: confirm the film coefficients "
                          "(a water run on a similar vessel) or design for more margin (a colder coolant, a longer "
                          "dosing time, a higher available pressure difference)"
                          if best.margin_band is not None and best.margin_band.low is not None else
                          ". Its margin band was not computed")
        return Recommendation(best.index, best.type, best.description, reasoning)
    top = max(candidates, key=lambda c: c.cooling_capacity)
    return Recommendation(None, None, "no feasible design",
                          f"no candidate meets the duty with the safety factor {safety_factor:g} within the utility's "
                          f"limits; the highest capacity is {top.cooling_capacity / 1e3:.4g} kW ({top.description}, "
                          f"margin {top.margin if top.margin is None else round(top.margin, 3)}). Consider a colder "
                          "coolant, a longer dosing time, more agitation, a higher available pressure difference, or "
                          "an external loop")
