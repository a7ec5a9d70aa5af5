"""The heat-transfer network of a jacketed, agitated vessel: films, wall, overall U, UA and the coolant.

For well-mixed contents at T_r, each coolant stream (the jacket; each internal coil) exchanges
heat through one or more surfaces in parallel. Each surface is a series of resistances (process
film, process fouling, lining, wall, service fouling, service film: ``calc.wall``). Two things are
solved together, by fixed-point iteration to 1e-6 K:

* the coolant's mean temperature, which sets its properties and is set by the outlet temperature the
  stream's UA produces (``calc.coolant``: T_out = T_r - (T_r - T_in) exp(-UA / m c_p));
* the wall surface temperatures on both sides, which set the wall viscosities of the Sieder-Tate
  factor (mu/mu_w)^0.14 and are set by the heat flux through the resistances.

The iteration is a contraction in practice (viscosity-ratio exponents are small); it is capped, and a
stream that does not settle is reported in ``warnings``, never silently.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Callable

from calc.vessel import agitation
from calc.films import coil_side
from calc.network import coolant_balance
from calc.vessel import geometry
from calc.films import process_side
from calc.films import jacket_side
from calc.films import wall
from calc.films.jacket_side import CoolantFilm
from calc.films.process_side import ProcessFilm
from calc.cautions import HEAT_TRANSFER
from calc.deadline import NEVER, Deadline
from calc.hydraulics import paths
from calc.properties import LiquidProperties
from calc.validity import CalcWarning, InputError, Warnings, fields_renamed, require_positive
from calc.films.selection import CorrelationChoice
from calc.vessel.model import Charge, Coolant, Vessel

TOLERANCE = 1e-6  # K
MAX_ITERATIONS = 60
#: Free space between a coil and the wall, in tube outside diameters, below which the coil shields the jacketed
#: wall's process film (common practice, no source; the sizing keeps this much, ``calc.sizing.jacket_sizing``).
COIL_WALL_CLEARANCE = 1.0


@dataclass(frozen=True)
class Surface:
    """One heat-transfer surface: its area and the resistances across it at the solved state."""

    name: str  # "jacket_shell", "jacket_bottom_head", "coil_0", ...
    area: float  # m2, process side
    process_film: ProcessFilm
    service_film: CoolantFilm  # coolant side
    overall: wall.OverallResult
    process_wall_temperature: float  # K
    service_wall_temperature: float  # K

    @property
    def ua(self) -> float:
        return self.overall.U * self.area


@dataclass(frozen=True)
class Stream:
    """One coolant circuit (the jacket, or one coil) at its solved state."""

    name: str  # "jacket" or "coil_0", ...
    mass_flow: float  # kg/s
    surfaces: tuple[Surface, ...]
    balance: coolant_balance.CoolantBalance
    mean_temperature: float  # K
    iterations: int
    hydraulics: paths.Hydraulics | None = None  # pressure drop at the solved mean temperature
    path: paths.FlowPath | None = None  # the coolant's route, for hydraulic limits

    @property
    def ua(self) -> float:
        return sum(s.ua for s in self.surfaces)

    @property
    def pressure_drop(self) -> float | None:
        """Supply-to-return pressure drop, Pa."""
        return None if self.hydraulics is None else self.hydraulics.pressure_drop

    @property
    def velocity(self) -> float | None:
        """Mean coolant velocity in the channel, m/s."""
        return None if self.hydraulics is None else self.hydraulics.velocity

    @property
    def path_length(self) -> float | None:
        """Length of the coolant's path through one zone, m."""
        return None if self.hydraulics is None else self.hydraulics.path_length

    @property
    def service_velocity(self) -> float | None:
        """Coolant velocity on the stream's first surface, m/s; None without a surface."""
        return self.surfaces[0].service_film.velocity if self.surfaces else None

    @property
    def service_reynolds(self) -> float | None:
        """Coolant Reynolds number on the stream's first surface; None without a surface."""
        return self.surfaces[0].service_film.reynolds if self.surfaces else None


@dataclass(frozen=True)
class FilmCoefficients:
    """Film coefficients by kind of surface, W/(m2 K); None where the vessel has no such wetted surface.

    With several coils, ``process_coil`` and ``service_coil`` are area-weighted means over every
    wetted coil (sum h A / sum A); each coil's own stream is reported beside them.
    """

    process_jacket: float | None = None
    process_bottom_head: float | None = None
    process_coil: float | None = None
    service_jacket: float | None = None
    service_coil: float | None = None


def _area_weighted_film(surfaces: list[Surface], side: str) -> float | None:
    """Sum of h A over sum of A for the ``side`` ("process" or "service") film of ``surfaces``."""
    area = sum(s.area for s in surfaces)
    if not surfaces or area <= 0:
        return None
    films: float = sum(getattr(s, f"{side}_film").h * s.area for s in surfaces)
    return films / area


def _process_film_label(film: ProcessFilm, with_constant: bool) -> str:
    constant = f", a = {film.constant_a:g}" if with_constant else ""
    return f"{film.correlation}{constant} ({film.source})"


@dataclass(frozen=True)
class HeatTransferResult:
    """Everything the network gives at one process temperature."""

    process_temperature: float  # K
    process_properties: LiquidProperties
    fill: geometry.FillGeometry
    agitation: agitation.AgitationResult
    streams: tuple[Stream, ...]
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = HEAT_TRANSFER

    @property
    def ua(self) -> float:
        return sum(s.ua for s in self.streams)

    @property
    def surfaces(self) -> list[Surface]:
        """Every wetted surface of every stream, jacket first."""
        return [surface for stream in self.streams for surface in stream.surfaces]

    def _named(self, name: str) -> Surface | None:
        return next((s for s in self.surfaces if s.name == name), None)

    def _coils(self) -> list[Surface]:
        return [s for s in self.surfaces if s.name.startswith("coil_")]

    @property
    def film_coefficients(self) -> FilmCoefficients:
        shell, head, coils = self._named("jacket_shell"), self._named("jacket_bottom_head"), self._coils()
        jacket_service = shell or head
        return FilmCoefficients(
            process_jacket=None if shell is None else shell.process_film.h,
            process_bottom_head=None if head is None else head.process_film.h,
            process_coil=_area_weighted_film(coils, "process"),
            service_jacket=None if jacket_service is None else jacket_service.service_film.h,
            service_coil=_area_weighted_film(coils, "service"))

    @property
    def correlations(self) -> dict[str, str]:
        """Which correlation (and constants) gave each kind of film."""
        shell, head, coils = self._named("jacket_shell"), self._named("jacket_bottom_head"), self._coils()
        named: dict[str, str] = {}
        if shell is not None:
            named["process_jacket"] = _process_film_label(shell.process_film, True)
            named["service_jacket"] = shell.service_film.correlation
        if head is not None:
            named["process_bottom_head"] = _process_film_label(head.process_film, True)
            named.setdefault("service_jacket", head.service_film.correlation)
        if coils:
            named["process_coil"] = "; ".join(dict.fromkeys(_process_film_label(c.process_film, False)
                                                            for c in coils))
            named["service_coil"] = "; ".join(dict.fromkeys(c.service_film.correlation for c in coils))
        return named

    @property
    def controlling_surface(self) -> Surface | None:
        """The surface carrying most of the UA; None when nothing is wetted."""
        surfaces = self.surfaces
        return max(surfaces, key=lambda s: s.ua) if surfaces else None

    @property
    def controlling_overall(self) -> wall.OverallResult | None:
        """Resistances of the surface carrying most of the UA; None when nothing is wetted."""
        surface = self.controlling_surface
        return None if surface is None else surface.overall

    @property
    def coolant_outlet_temperature(self) -> float | None:
        """Outlet temperature of the jacket stream, K; None without a wetted jacket."""
        jacket = self.stream("jacket")
        return None if jacket is None else jacket.balance.outlet_temperature

    @property
    def area(self) -> float:
        return sum(surface.area for stream in self.streams for surface in stream.surfaces)

    @property
    def overall_coefficient(self) -> float:
        """Area-weighted U over every surface, W/(m2 K); 0 when nothing is wetted."""
        area = self.area
        return self.ua / area if area > 0 else 0.0

    @property
    def duty(self) -> float:
        """Heat removed from the contents by all streams, W."""
        return sum(s.balance.duty for s in self.streams)

    def stream(self, name: str) -> Stream | None:
        return next((s for s in self.streams if s.name == name), None)

    @property
    def controlling(self) -> str:
        """The resistance that is largest on the surface carrying most of the UA."""
        overall = self.controlling_overall
        return "none" if overall is None else overall.controlling


@dataclass(frozen=True)
class _SurfaceModel:
    """What a surface needs from the iteration: films as functions of the wall temperatures."""

    name: str
    area: float
    wall: wall.WallSpec
    process_radius: float
    process_side: str
    process_film: Callable[..., ProcessFilm]  # mu_wall -> process film
    service_film: Callable[..., CoolantFilm]  # props, mu_wall, rho_wall -> coolant film
    service_formula: jacket_side.FilmFormula  # the same coolant film, for arrays of states (vectorised network)
    remaining_resistance: float | None = None  # m2 K/W measured beyond the process film (calibration)
    channel: tuple[float, float] | None = None  # half pipe: (wetted width, pitch), m; the wall between turns as fins


@dataclass(frozen=True)
class StreamModel:
    """One coolant circuit before solving: its surfaces and its mass flow at the coolant given."""

    name: str
    mass_flow: float  # kg/s
    surfaces: tuple[_SurfaceModel, ...]
    path: paths.FlowPath | None = None  # the coolant's route, for its pressure drop


@dataclass(frozen=True)
class Network:
    """The network of one vessel, charge and coolant at one process temperature, assembled but not solved.

    Everything that does not depend on the iterated coolant and wall temperatures is here, checked
    once: the contents' properties, fill, agitation and the streams with their surfaces.
    ``calc.network.vectorised`` solves many of these (and many coolant states of each) at once.
    """

    vessel: Vessel
    charge: Charge
    coolant: Coolant
    process_temperature: float  # K
    process_properties: LiquidProperties
    fill: geometry.FillGeometry
    agitation: agitation.AgitationResult
    streams: tuple[StreamModel, ...]
    warnings: Warnings


def _process_viscosity(charge: Charge, temperature: float, warnings: Warnings) -> float:
    """Viscosity of the contents at the wall; a wall colder than their freezing point is clamped and flagged.

    A process-side wall below the contents' freezing point means a crust can freeze onto the wall,
    which insulates it: the film coefficient computed here then overstates the heat transfer.
    """
    liquid_range = getattr(charge.liquid, "liquid_range", None)
    if liquid_range is not None:
        low, high = liquid_range()
        if temperature < low:
            warnings.add(CalcWarning(
                "wall_below_freezing_point",
                f"the process-side wall ({temperature - 273.15:.1f} degC) is colder than the contents' freezing "
                f"point ({low - 273.15:.1f} degC): product may freeze onto the wall and cut the heat transfer"))
        temperature = min(max(temperature, low + 1e-3), high - 1e-2)
    return charge.liquid.at(temperature, field="process_temperature").viscosity


def _coolant_state(coolant: Coolant, temperature: float) -> LiquidProperties:
    """Coolant properties at a temperature, clamped into the liquid's range near its ends.

    The mean and wall temperatures are computed, not given; when they approach the end of a
    table, the nearest valid state is used (the inlet temperature itself is checked strictly).
    """
    liquid_range = getattr(coolant.liquid, "liquid_range", None)
    if liquid_range is not None:
        low, high = liquid_range()
        temperature = min(max(temperature, low + 1e-3), high - 1e-2)
    return coolant.liquid.at(temperature, field="coolant.inlet_temperature")


def _freezing_point(coolant: Coolant) -> float | None:
    return coolant.liquid.liquid_range()[0] if hasattr(coolant.liquid, "liquid_range") else None


def _state_at(models: list[_SurfaceModel], charge: Charge, coolant: Coolant, mass_flow: float,
              process_temperature: float, fouling: wall.Fouling, warnings: Warnings, mean: float,
              walls: list[tuple[float, float]]) -> tuple[list[Surface], coolant_balance.CoolantBalance]:
    """A stream's surfaces and coolant balance with the coolant's mean temperature ``mean`` and the wall
    temperatures ``walls`` ((process side, service side) per surface), K: one step of the iteration."""
    state = _coolant_state(coolant, mean)
    surfaces = []
    for model, (process_wall, service_wall) in zip(models, walls):
        process_film = model.process_film(_process_viscosity(charge, process_wall, warnings))
        service_wall_state = _coolant_state(coolant, service_wall)
        service_film = model.service_film(state, service_wall_state.viscosity, service_wall_state.density)
        overall = wall.overall_coefficient(process_film.h, service_film.h, model.wall, fouling,
                                           process_radius=model.process_radius, process_side=model.process_side,
                                           channel=model.channel)
        if model.remaining_resistance is not None:
            overall = wall.with_remaining_resistance(overall, model.remaining_resistance)
        surfaces.append(Surface(model.name, model.area, process_film, service_film, overall,
                                process_wall, service_wall))
    ua = sum(s.ua for s in surfaces)
    balance = coolant_balance.coolant_balance(process_temperature, coolant.inlet_temperature, ua, mass_flow,
                                              state.heat_capacity, _freezing_point(coolant))
    return surfaces, balance


def _finish_stream(name: str, surfaces: list[Surface], balance: coolant_balance.CoolantBalance, coolant: Coolant,
                   mass_flow: float, mean: float, iterations: int, warnings: Warnings,
                   path: paths.FlowPath | None) -> Stream:
    """The solved stream: its films' and balance's warnings collected, its pressure drop at ``mean``."""
    for surface in surfaces:
        # The same correlation warns alike on every surface; the wall's verdict is the surface's own.
        warnings.extend_unique(surface.process_film.warnings)
        warnings.extend_unique(surface.service_film.warnings)
        warnings.extend_unique(w if w.code == wall.FIN_BIOT_WARNING else
                               CalcWarning(w.code, f"{surface.name.replace('_', ' ')}: {w.message}")
                               for w in surface.overall.warnings)
    warnings.extend_unique(balance.warnings)
    hydraulics = None
    if path is not None:
        hydraulics = paths.pressure_drop(path, mass_flow, _coolant_state(coolant, mean))
        warnings.extend_unique(CalcWarning(w.code, f"{name} pressure drop: {w.message}") for w in hydraulics.warnings)
        warnings.extend_unique(paths.limit_warnings(hydraulics, name, coolant.available_pressure_drop,
                                                    coolant.maximum_velocity))
    return Stream(name, mass_flow, tuple(surfaces), balance, mean, iterations, hydraulics, path)


def _solve_stream(name: str, models: list[_SurfaceModel], charge: Charge, coolant: Coolant, mass_flow: float,
                  process_temperature: float, fouling: wall.Fouling, warnings: Warnings,
                  path: paths.FlowPath | None = None) -> Stream:
    inlet = coolant.inlet_temperature
    mean = inlet
    walls = [(0.5 * (process_temperature + inlet),) * 2 for _ in models]
    surfaces: list[Surface] = []
    balance = None
    iterations = 0
    for iterations in range(1, MAX_ITERATIONS + 1):  # noqa: B007 - the count after the loop is reported
        surfaces, balance = _state_at(models, charge, coolant, mass_flow, process_temperature, fouling, warnings,
                                      mean, walls)
        new_mean = 0.5 * (inlet + balance.outlet_temperature)
        new_walls = []
        for surface in surfaces:
            temperatures = wall.interface_temperatures(surface.overall, process_temperature, new_mean)
            new_walls.append((temperatures.process_surface, temperatures.service_surface))
        change = max([abs(new_mean - mean)] + [abs(a - b) for old, new in zip(walls, new_walls)
                                                 for a, b in zip(old, new)])
        mean, walls = new_mean, new_walls
        if change < TOLERANCE:
            break
    else:
        warnings.add(CalcWarning("iteration_not_converged",
                                 f"{name}: coolant and wall temperatures did not settle within "
                                 f"{MAX_ITERATIONS} iterations; results are approximate"))
    assert balance is not None  # MAX_ITERATIONS >= 1: the loop ran
    return _finish_stream(name, surfaces, balance, coolant, mass_flow, mean, iterations, warnings, path)


def stream_at(network: Network, index: int, mean: float, walls: list[tuple[float, float]], iterations: int,
              warnings: Warnings) -> Stream:
    """Stream ``index`` of ``network`` evaluated once at a state the vectorised network solved (coolant mean
    temperature and wall temperatures, K): films, balance, warnings and pressure drop as the scalar path
    reports them. Its duty agrees with the scalar solve to the iteration's tolerance (the vectorised
    result's own duty is the scalar one's to 1e-9)."""
    stream = network.streams[index]
    surfaces, balance = _state_at(list(stream.surfaces), network.charge, network.coolant, stream.mass_flow,
                                  network.process_temperature, network.vessel.fouling, warnings, mean, walls)
    return _finish_stream(stream.name, surfaces, balance, network.coolant, stream.mass_flow, mean, iterations,
                          warnings, stream.path)


def _outer_diameter(vessel: Vessel) -> float:
    """Outside diameter of the shell, m (inside diameter + lining + metal, both sides)."""
    spec = vessel.wall
    lining = spec.lining_thickness
    if lining is None:
        lining = wall.material(spec.material).lining_thickness or 0.0
    return vessel.shape.diameter + 2.0 * (spec.thickness + lining)


def calibrated(vessel: Vessel, deadline: Deadline = NEVER) -> Vessel:
    """``vessel`` with a pending single-point calibration resolved (``calc.fits.single_point.resolved``; its
    network solves check ``deadline``)."""
    calibration = vessel.correlations.calibration
    if calibration is None or not calibration.pending:
        return vessel
    from calc.fits.single_point import resolved  # the back-out solves this network: imported on use

    return resolved(vessel, deadline)


def assemble(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float) -> Network:
    """Check the inputs and set up the vessel's network at ``process_temperature`` (K), unsolved.

    A single-point calibration (a measured UA at stated conditions) is backed out here first, once per
    vessel (``calc.fits.single_point``); ``Network.vessel`` carries the result.
    """
    vessel = _resolved(vessel)
    if coolant.inlet_temperature >= process_temperature:
        raise InputError("coolant.inlet_temperature",
                         "must be below the process temperature for cooling "
                         f"({coolant.inlet_temperature - 273.15:.2f} degC >= {process_temperature - 273.15:.2f} degC)")
    props = charge.liquid.at(process_temperature, field="process_temperature")
    volume = charge.liquid_volume(process_temperature)
    filled = geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=volume,
                           field="charge.volume" if charge.volume is not None else "charge.mass")
    stirred = agitation.agitation(vessel.agitator, props, filled.volume, vessel.shape.diameter)
    return _network(vessel, charge, coolant, process_temperature, props, filled, stirred)


def _resolved(vessel: Vessel) -> Vessel:
    """``vessel`` with a pending calibration backed out and the band's fouling factor applied to its fouling."""
    vessel = calibrated(vessel)
    if vessel.correlations.process_fouling_factor != 1.0:  # the margin band's fouling members
        vessel = replace(vessel, fouling=replace(vessel.fouling, process=vessel.fouling.process
                                                 * vessel.correlations.process_fouling_factor),
                         correlations=replace(vessel.correlations, process_fouling_factor=1.0))
    return vessel


def with_correlations(network: Network, correlations: CorrelationChoice) -> Network:
    """``network`` with the vessel's ``correlations`` replaced: equal to ``assemble`` of that vessel with the same
    charge, coolant and process temperature, keeping the parts the correlations do not touch (the contents'
    properties, fill and agitation) instead of recomputing them (the margin band's members)."""
    vessel = _resolved(replace(network.vessel, correlations=correlations))
    flows = {stream.name[:4]: stream.mass_flow for stream in network.streams}  # the same coolant: the same flows
    return _network(vessel, network.charge, network.coolant, network.process_temperature,
                    network.process_properties, network.fill, network.agitation, flows.get("jack"), flows.get("coil"))


def _network(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float, props: LiquidProperties,
             filled: geometry.FillGeometry, stirred: agitation.AgitationResult, jacket_flow: float | None = None,
             coil_flow: float | None = None) -> Network:
    """The streams and surfaces of ``vessel`` (resolved) at a state whose properties, fill and agitation are known
    (and the coolant's jacket and coil mass flows, kg/s, when they are: else worked out from ``coolant``)."""
    warnings = Warnings()
    warnings.extend_unique(filled.warnings)
    warnings.extend_unique(stirred.warnings)
    shape, agitator, level = vessel.shape, vessel.agitator, filled.liquid_level
    choice = vessel.correlations.validate(agitator.impeller)
    streams: list[StreamModel] = []

    jacket = vessel.jacket
    if jacket is not None and filled.jacketed_area > 0:
        head_area = 0.0
        if vessel.coverage.covers_bottom_head and shape.bottom_head != "flat":
            head_area = geometry.wetted_area(shape, min(level, geometry.head_depth(shape)))
        elif vessel.coverage.covers_bottom_head:
            head_area = math.pi * shape.diameter ** 2 / 4.0
        head_area = min(head_area, filled.jacketed_area)
        shell_area = filled.jacketed_area - head_area
        top = vessel.coverage.top if vessel.coverage.top is not None else geometry.brim_height(shape)
        jacket_height = top if vessel.coverage.covers_bottom_head else top - geometry.head_depth(shape)
        outer = _outer_diameter(vessel)

        chosen_jacket = choice.jacket(jacket)
        jacket_formula, geometry_warnings = jacket_side.jacket_film_formula(chosen_jacket, outer,
                                                                            max(jacket_height, 1e-3))
        jacket_flow = require_positive("coolant.flow", coolant.mass_flow() if jacket_flow is None else jacket_flow)

        def service(props_c: LiquidProperties, mu_w: float, rho_w: float | None,
                    _formula: jacket_side.FilmFormula = jacket_formula) -> CoolantFilm:
            # jacket_side.service_film_jacket with the geometry checked once, here
            return _formula.film(props_c, jacket_flow, require_positive("coolant", mu_w), rho_w,
                                 Warnings(geometry_warnings))
        channel = None  # a half pipe wets only its width of every pitch; the wall between turns acts as fins
        if chosen_jacket.type == "half_pipe":
            assert chosen_jacket.pipe_diameter is not None and chosen_jacket.pipe_pitch is not None  # schema-checked
            channel = (chosen_jacket.pipe_diameter * math.sin(chosen_jacket.pipe_section_angle / 2.0),
                       chosen_jacket.pipe_pitch)

        models = []
        for name, area, surface, radius in (("jacket_shell", shell_area, "wall", shape.diameter / 2.0),
                                            ("jacket_bottom_head", head_area, "bottom_head", math.inf)):
            if area <= 0:
                continue
            models.append(_SurfaceModel(
                name, area, vessel.wall, radius, "inside",
                lambda mu_w, _surface=surface: process_side.process_film_jacket(
                    agitator.impeller, stirred.reynolds, props, mu_w, shape.diameter, level,
                    baffled=agitator.baffled, surface=_surface, alternative=choice.process_wall,
                    factor=choice.process_factor, constants=choice.process_constants),
                service, jacket_formula, choice.remaining_resistance, channel))
        streams.append(StreamModel("jacket", jacket_flow, tuple(models),
                                   paths.jacket_path(jacket, outer, max(jacket_height, 1e-3))))
    elif vessel.jacket is not None:
        warnings.add(CalcWarning("jacket_not_wetted", "the liquid does not reach the jacket: no jacket heat transfer"))

    coil_area_total = 0.0
    for index, coil in enumerate(vessel.coils):
        _, area = geometry.coil_submerged(shape, coil, level)
        coil_area_total += area
        if area <= 0:
            continue
        gap = (shape.diameter - coil.helix_diameter - coil.tube_outer_diameter) / 2.0
        if jacket is not None and gap < COIL_WALL_CLEARANCE * coil.tube_outer_diameter:
            warnings.add(CalcWarning(
                "coil_close_to_wall",
                f"coil {index}: {gap * 1e3:.3g} mm between the tube and the wall, less than "
                f"{COIL_WALL_CLEARANCE:g} tube diameter: the coil slows the flow along the jacketed wall, whose "
                "process film is computed as without the coil (optimistic there; common practice, no source)"))
        coil_wall = replace(vessel.wall, thickness=coil.tube_wall, lining_thickness=0.0, lining_conductivity=None)
        if wall.material(coil_wall.material).lining_thickness:  # a glass-lined vessel's coils are alloy
            coil_wall = replace(coil_wall, material="stainless_316l")
        with fields_renamed({"vessel.coils": f"vessel.coils[{index}]"}):
            formula = coil_side.coil_film_formula(coil.tube_inner_diameter, coil.helix_diameter, pitch=coil.pitch,
                                                  correlation=choice.coil_tube)
        flow = coil_flow = coolant.coil_mass_flow() if coil_flow is None else coil_flow
        model = _SurfaceModel(
            f"coil_{index}", area, coil_wall, coil.tube_outer_diameter / 2.0, "outside",
            lambda mu_w, _coil=coil: process_side.process_film_coil(
                agitator.impeller, stirred.reynolds, props, mu_w, shape.diameter, level,
                _coil.tube_outer_diameter, agitator.diameter, baffled=agitator.baffled,
                factor=choice.coil_process_factor, alternative=choice.process_coil),
            lambda props_c, mu_w, rho_w, _coil=coil, _flow=flow: coil_side.service_film_coil(
                _coil.tube_inner_diameter, _coil.helix_diameter, props_c, _flow, mu_w,
                pitch=_coil.pitch, correlation=choice.coil_tube),
            formula)
        streams.append(StreamModel(f"coil_{index}", flow, (model,), paths.coil_path(coil)))
    if not streams:
        warnings.add(CalcWarning("no_cooling_surface", "no wetted jacket or coil area: the vessel cannot be cooled"))
    return Network(vessel, charge, coolant, process_temperature, props, filled, stirred, tuple(streams), warnings)


def heat_transfer(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float) -> HeatTransferResult:
    """Solve the vessel's heat-transfer network at the process temperature ``process_temperature`` (K).

    The readable specification of the solution: one state, every film with its warnings. For many
    states at once (grids, limits, candidates, fleets) see ``calc.network.vectorised``; a test keeps
    the two in agreement.
    """
    return solve(assemble(vessel, charge, coolant, process_temperature))


def solve(network: Network) -> HeatTransferResult:
    """Solve an assembled network (one state, the scalar path)."""
    warnings = Warnings(network.warnings)
    solved = []
    for stream in network.streams:
        # a coil's errors name its place in the request: vessel.coils[i]
        coil = {"vessel.coils": f"vessel.coils[{stream.name[5:]}]"} if stream.name.startswith("coil_") else {}
        with fields_renamed(coil):
            solved.append(_solve_stream(stream.name, list(stream.surfaces), network.charge, network.coolant,
                                        stream.mass_flow, network.process_temperature, network.vessel.fouling,
                                        warnings, stream.path))
    return HeatTransferResult(network.process_temperature, network.process_properties, network.fill,
                              network.agitation, tuple(solved), warnings)




def coolant_balance_at_mean(coolant: Coolant, process_temperature: float, ua: float
                            ) -> coolant_balance.CoolantBalance:
    """Single-pass coolant balance with c_p at the mean coolant temperature it produces.

    The balance carries the mass flow and that c_p. Fixed-point iteration on the mean
    temperature; c_p varies slowly, so a few passes reach 1e-6 K.
    """
    mass_flow = coolant.mass_flow()
    freezing = coolant.liquid.liquid_range()[0] if hasattr(coolant.liquid, "liquid_range") else None
    coolant.liquid.at(coolant.inlet_temperature, field="coolant.inlet_temperature")
    mean = coolant.inlet_temperature
    for _ in range(MAX_ITERATIONS):
        heat_capacity = _coolant_state(coolant, mean).heat_capacity
        balance = coolant_balance.coolant_balance(process_temperature, coolant.inlet_temperature, ua,
                                                         mass_flow, heat_capacity, freezing)
        new_mean = 0.5 * (coolant.inlet_temperature + balance.outlet_temperature)
        if abs(new_mean - mean) < TOLERANCE:
            break
        mean = new_mean
    return balance


@dataclass(frozen=True)
class LumpedExchange:
    """The vessel's jacket and coils reduced to what a dynamic balance needs, at one state."""

    ua: float  # W/K, jacket and coils together
    coolant_flow: float  # kg/s, the jacket stream (coils follow with their own flows)
    coolant_heat_capacity: float  # J/(kg K), at the coolant's solved mean temperature
    inlet_temperature: float  # K
    shaft_power: float  # W, the agitator's power at this state
    warnings: Warnings = field(default_factory=Warnings)


def lumped_exchange(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float) -> LumpedExchange:
    """UA, coolant flow and c_p, and agitator power of the vessel at ``process_temperature``.

    The dynamic balances hold UA constant over a run: films change with the contents' temperature
    and viscosity, so this is the vessel's UA at the state given (normally the start of the run).
    """
    vessel = calibrated(vessel)
    result = heat_transfer(vessel, charge, coolant, process_temperature)
    warnings = Warnings(result.warnings)
    warnings.add(CalcWarning("ua_held_constant",
                             f"UA = {result.ua:.4g} W/K from the heat-transfer network at "
                             f"{process_temperature - 273.15:.2f} degC is held constant over the simulation"))
    if vessel.correlations.calibration is not None:
        warnings.add(CalcWarning("calibrated", "calibrated: UA uses "
                                               f"{vessel.correlations.calibration.summary}"))
    main = result.stream("jacket") or (result.streams[0] if result.streams else None)
    if main is None:
        return LumpedExchange(0.0, coolant.mass_flow(), coolant.liquid.at(coolant.inlet_temperature).heat_capacity,
                          coolant.inlet_temperature, result.agitation.power, warnings)
    # One equivalent single-pass stream with the whole UA: the coils' flows join the jacket's.
    flow = sum(stream.mass_flow for stream in result.streams)
    return LumpedExchange(result.ua, flow, main.balance.heat_capacity_rate / main.mass_flow,
                      coolant.inlet_temperature, result.agitation.power, warnings)
