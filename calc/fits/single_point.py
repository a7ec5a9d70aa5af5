"""Single-point calibration: what one measured UA (or U) at stated conditions implies for the vessel.

A water run (``/v1/ua-fit``) gives the vessel's UA at one agitator speed, contents temperature, charge
and coolant state. One number cannot separate resistances in series (a Wilson plot over several
speeds can: :mod:`calc.fits.wilson`), so one resistance has to absorb the whole difference between the
measurement and the network's prediction. Here it is the process-side film: its published constant a
(the chosen constant set, ``correlations.process_wall``, or the coil's) is multiplied by f with

    UA_network(f; measured speed, charge, contents temperature, coolant) = UA_measured,

the usual single-point calibration of an agitated vessel (common practice, no source), because

* the process-side constant is the least certain resistance: handbooks differ by 25-40 % for one
  impeller (0.54-0.76 for a disc turbine), while the wall conducts as its material and thickness say
  and forced flow in a jacket or coil channel is predicted within about 20 % (from memory);
* a multiplier on a carries to other speeds, contents and temperatures through Nu = a Re^b Pr^c
  (mu/mu_w)^d: it stands for what the published constant averages over (baffles, clearances, impeller
  details, the vessel's own flow), which does not change with the operating point;
* the coolant film and fouling stay computed at every operating point from the published service-side
  correlation and the stated fouling. Where the difference really sits there (a fouled jacket, a
  bypassing spiral baffle), the multiplier misattributes it and extrapolates wrongly to other coolant
  flows and temperatures: a Wilson plot (two or more speeds) separates the two.

The root is found on ln f over [1e-3, 1e3] (UA rises strictly with f). The band
then comes from the measurement's stated 95 % interval and from the coolant side: the same back-out at
each end of the interval gives the interval of f (``Calibration.factor_interval``), and it is redone
under each published coolant-side alternative of the measured surface (the other annular-jacket
correlation, the other channel treatment, the other coil-tube correlation): the measurement fixes U at
its state whatever the coolant film is, so under another coolant-side correlation another f reproduces
it, and the margin at the design state (another coolant flow, temperature, speed) follows from that
pair (``Calibration.alternative_factors``). The margin band's members are the interval's ends under
every coolant-side alternative. An alternative that cannot reproduce the measurement with any f in the
bracket is ruled out by it (named in the basis, not a member). A measurement outside what any f can
give under the nominal correlations (above the UA of the remaining resistances alone, or a process film
below a thousandth of the published one) is refused with the field named.

All back-outs (every measured value under every coolant-side choice) are solved together on the
vectorised network (``calc.network.vectorised``): one pass over a coarse grid of f (its ends are the
bracket), then one pass per step of a bracketed root iteration over the back-outs not yet converged
(4-6 steps on the examples: 5-7 passes where the scalar path made 60-90 solves). Each pass first checks the request's deadline
(:class:`calc.deadline.OutOfTime` once it has passed). The scalar path, Brent's method one network solve
at a time (``back_out(..., vectorised=False)``), stays as the readable specification; a test holds the
two to 1e-8.
"""
from __future__ import annotations

import functools
import math
import threading
from collections import OrderedDict
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any, Callable

import numpy as np
from scipy.optimize import brentq

from calc.deadline import NEVER, Deadline
from calc.films.coil_side import COIL_CORRELATIONS
from calc.films.jacket_side import ANNULAR_CORRELATIONS, CHANNEL_TREATMENTS
from calc.films.selection import CorrelationChoice, Measurement
from calc.validity import InputError, fields_renamed
from calc.vessel.model import Vessel

if TYPE_CHECKING:
    from calc.films.process_side import ProcessFilm
    from calc.network.heat_transfer import HeatTransferResult, Network, Surface

#: The bracket of the multiplier on the process-side constant.
FACTOR_RANGE = (1e-3, 1e3)

#: The measurement's conditions as the request names them (errors of the network there point at them).
_RENAMED = {"coolant": "calibration.measurement.coolant", "charge": "calibration.measurement.charge",
            "process_temperature": "calibration.measurement.process_temperature",
            "vessel.agitator.speed": "calibration.measurement.agitator_speed"}


def _surfaces(result: HeatTransferResult, surface: str) -> list[Surface]:
    """The solved surfaces of the measured ``surface`` ("jacket": shell and head; "coils": every coil)."""
    return [x for s in result.streams if (s.name == "jacket") == (surface == "jacket") for x in s.surfaces]


def measured_surface(result: HeatTransferResult, surface: str) -> tuple[float, float]:
    """(UA in W/K, process-side area in m2) of the measured ``surface`` ("jacket" or "coils") in a solved network."""
    surfaces = _surfaces(result, surface)
    return sum(x.ua for x in surfaces), sum(x.area for x in surfaces)


def resolved(vessel: Vessel, deadline: Deadline = NEVER) -> Vessel:
    """``vessel`` with a pending single-point calibration backed out (the factor applied); else unchanged.

    The back-out checks ``deadline`` before each network solve; a finished one is remembered per vessel."""
    calibration = vessel.correlations.calibration
    if calibration is None or not calibration.pending:
        return vessel
    with _LOCK:
        known = _RESOLVED.get(vessel)
        if known is not None:
            _RESOLVED.move_to_end(vessel)
            return known
    answer = back_out(vessel, deadline)
    with _LOCK:
        _RESOLVED[vessel] = answer
        while len(_RESOLVED) > _REMEMBERED:
            _RESOLVED.popitem(last=False)
    return answer


#: Vessels resolved lately (the same calibrated vessel is assembled by every solve of a check).
_RESOLVED: OrderedDict[Vessel, Vessel] = OrderedDict()
_REMEMBERED = 256
_LOCK = threading.Lock()


def service_alternatives(vessel: Vessel, surface: str) -> list[tuple[str, str]]:
    """(field of CorrelationChoice, option) of every published coolant-side alternative of the measured ``surface``:
    the options the margin band would vary there (``calc.checks.margin_band.published_members``)."""
    base = vessel.correlations
    coil_tube = [("coil_tube", key) for key in COIL_CORRELATIONS if key != base.coil_tube]
    if surface == "coils":
        return coil_tube
    jacket_type = vessel.jacket.type if vessel.jacket is not None else None
    if jacket_type == "annular":
        return [("annular_jacket", key) for key in ANNULAR_CORRELATIONS if key != base.annular_jacket]
    if jacket_type in ("half_pipe", "annular_spiral_baffle"):
        channel = [("channel", key) for key in CHANNEL_TREATMENTS if key != base.channel]
        return channel + (coil_tube if base.channel == "curved" else [])
    return []


def carried(target: Vessel, reference: Vessel) -> Vessel:
    """``target`` with the factor backed out on the (resolved) ``reference``: a scale-up's similar vessel."""
    calibration = reference.correlations.calibration
    own = target.correlations.calibration
    if calibration is None or calibration.measurement is None or own is None or not own.pending:
        return target
    return replace(target, correlations=target.correlations.calibrated(calibration))


class _Unreachable(Exception):
    """The target UA lies outside what any factor in FACTOR_RANGE gives (``field`` and ``message`` say why)."""

    def __init__(self, field: str, message: str):
        super().__init__(message)
        self.field, self.message = field, message


def _check_reachable(field: str, target: float, ua_low: float, ua_high: float) -> None:
    """Raise :class:`_Unreachable` unless ``target`` (W/K) lies strictly between the UAs at the bracket's ends."""
    if target >= ua_high:
        raise _Unreachable(field, f"UA = {target:.4g} W/K cannot be reproduced: even a process film "
                                  f"{FACTOR_RANGE[1]:g} times the published one gives {ua_high:.4g} W/K through "
                                  "the computed wall, fouling and coolant film; check the measurement, its "
                                  "conditions and the stated fouling, or fit the resistances separately "
                                  "(/v1/wilson-plot)")
    if target <= ua_low:
        raise _Unreachable(field, f"UA = {target:.4g} W/K would need a process film below "
                                  f"{FACTOR_RANGE[0]:g} of the published one (that gives {ua_low:.4g} W/K): "
                                  "check the measurement, the wetted surface and the conditions")


@dataclass(frozen=True)
class _Job:
    """Every back-out of one measurement: under each coolant-side choice (the nominal first), the measured
    values (W/K, or W/(m2 K) for a measured U) to reproduce and the request field each one comes from."""

    at: Vessel  # the vessel at the measured agitator speed
    measurement: Measurement
    back_outs: tuple[tuple[CorrelationChoice, tuple[tuple[float, str], ...]], ...]

    @property
    def name(self) -> str:
        return self.measurement.factor_field

    @property
    def per_area(self) -> bool:
        return self.measurement.quantity == "overall_coefficient"


def _job(vessel: Vessel) -> _Job:
    calibration = vessel.correlations.calibration
    assert calibration is not None and calibration.measurement is not None  # resolved() checked
    measurement: Measurement = calibration.measurement
    speed = vessel.agitator.speed if measurement.agitator_speed is None else measurement.agitator_speed
    base = replace(vessel.correlations, calibration=None, process_constants=None,
                   remaining_resistance=None).with_factor(measurement.factor_field, 1.0)
    value = f"calibration.measurement.{measurement.quantity}"
    interval = f"{value}_interval"
    low, high = measurement.interval
    back_outs: list[tuple[CorrelationChoice, tuple[tuple[float, str], ...]]] = [
        (base, ((measurement.value, value), (low, interval), (high, interval)))]
    back_outs += [(base.with_service_option(field, option), ((low, interval), (high, interval)))
                  for field, option in service_alternatives(vessel, measurement.surface)]
    return _Job(replace(vessel, agitator=replace(vessel.agitator, speed=speed)), measurement, tuple(back_outs))


def _no_surface(measurement: Measurement) -> InputError:
    return InputError("calibration.measurement.surface",
                      f"the measured charge wets no {measurement.surface} surface of this vessel")


#: Tolerances of the root in ln f (both paths; Brent's xtol and rtol).
X_TOLERANCE = R_TOLERANCE = 1e-12


def _factors_scalar(job: _Job, deadline: Deadline) -> list[list[float] | None]:
    """The factor reproducing each measured value of each back-out (None: a coolant-side alternative the
    measurement rules out), by Brent's method on ln f, one scalar network solve at a time: the readable
    specification of :func:`_factors_vectorised`. Raises :class:`_Unreachable` for the nominal back-out."""
    from calc.network.heat_transfer import heat_transfer

    measurement = job.measurement

    def solve(choice: CorrelationChoice, factor: float) -> tuple[float, float]:
        deadline.check()
        with fields_renamed(_RENAMED):
            result = heat_transfer(replace(job.at, correlations=choice.with_factor(job.name, factor)),
                                   measurement.charge, measurement.coolant, measurement.process_temperature)
        return measured_surface(result, measurement.surface)

    out: list[list[float] | None] = []
    for index, (choice, values) in enumerate(job.back_outs):
        ua_low, area = solve(choice, FACTOR_RANGE[0])
        if not area > 0.0:
            raise _no_surface(measurement)
        ua_high, _ = solve(choice, FACTOR_RANGE[1])
        scale = area if job.per_area else 1.0
        factors: list[float] | None = []
        for value, field in values:
            target = value * scale
            try:
                _check_reachable(field, target, ua_low, ua_high)
            except _Unreachable:
                if index == 0:
                    raise
                factors = None
                break
            assert factors is not None
            factors.append(math.exp(brentq(lambda x, t=target, c=choice: math.log(solve(c, math.exp(x))[0] / t),
                                           math.log(FACTOR_RANGE[0]), math.log(FACTOR_RANGE[1]),
                                           xtol=X_TOLERANCE, rtol=R_TOLERANCE)))
        out.append(factors)
    return out


#: The factors of the vectorised back-out's first pass (its ends: FACTOR_RANGE): each back-out starts in its cell.
FACTOR_GRID = (FACTOR_RANGE[0], 0.1, 1.0, 10.0, FACTOR_RANGE[1])
#: Passes of the vectorised root iteration at most (4-6 on the examples); past it, the scalar path.
MAX_PASSES = 30


class _NoBracket(Exception):
    """The vectorised back-out lost its bracket or did not converge: :func:`back_out` takes the scalar path."""


def _scaled_film(film_at: Callable[[float], ProcessFilm], factor: float) -> Callable[[float], ProcessFilm]:
    """The process film of ``film_at`` with its constant a times ``factor``."""
    def film(mu_wall: float) -> ProcessFilm:
        published = film_at(mu_wall)
        a = published.arguments["a"] * factor
        return replace(published, h=published.h * factor, nusselt=published.nusselt * factor, constant_a=a,
                       arguments={**published.arguments, "a": a})
    return film


def _times(network: Network, name: str, factor: float) -> Network:
    """``network`` (assembled with the factor 1) as assembled with ``factor``: the factor multiplies the
    process-side constant a and nothing else (``calc.films.process_side``), and the vectorised network
    evaluates each process film from its ``arguments``, so a is scaled there without assembling again. The
    vessel's correlations say the factor too (``name``, as :meth:`CorrelationChoice.with_factor`): the
    vectorised network shares process films between networks of one agitation by their choice, factor included."""
    vessel = replace(network.vessel, correlations=network.vessel.correlations.with_factor(name, factor))
    return replace(network, vessel=vessel, streams=tuple(
        replace(stream, surfaces=tuple(replace(model, process_film=_scaled_film(model.process_film, factor))
                                       for model in stream.surfaces))
        for stream in network.streams))


def _factors_vectorised(job: _Job, deadline: Deadline) -> list[list[float] | None]:
    """:func:`_factors_scalar`, with every back-out solved together: one vectorised network pass
    (``calc.network.vectorised.solve_many``) over ``FACTOR_GRID`` for every coolant-side choice (its ends are
    the bracket the reachability is judged on; each back-out starts in the grid cell holding its target), then
    one pass per step of the root iteration over every back-out not yet converged. The deadline is checked
    before each pass.

    The iteration is the Anderson-Bjorck variant of regula falsi (Anderson & Bjorck, BIT 13, 1973; from
    memory), bracket kept, in u = 1/f on q = UA_target/UA - 1: with the films' temperature dependence aside,
    1/UA = R + 1/(f h A) is linear in 1/f, so the steps land close to the root and converge superlinearly. An
    element stops when its step in ln f is below Brent's tolerance (``X_TOLERANCE`` + ``R_TOLERANCE`` |ln f|)
    or it hits q = 0; both paths then agree to the network's own convergence (a test holds them to 1e-8).
    Should the grid not bracket a root (UA not rising with f, a non-finite UA) or the iteration not converge
    within ``MAX_PASSES``, it raises :class:`_NoBracket` and :func:`back_out` takes the scalar path.
    """
    from calc.network.heat_transfer import assemble
    from calc.network.vectorised import solve_many

    measurement = job.measurement
    networks: list[Network | None] = []
    failed: InputError | None = None  # an alternative that cannot be assembled: raised after the nominal's checks
    for index, (choice, _) in enumerate(job.back_outs):
        try:
            with fields_renamed(_RENAMED):
                network = assemble(replace(job.at, correlations=choice), measurement.charge, measurement.coolant,
                                   measurement.process_temperature)
        except InputError as error:
            if index == 0:
                raise
            failed, network = failed or error, None
        if network is not None:  # the measured streams alone (each stream is solved on its own), each process film
            # remembered per wall viscosity (every pass asks for it at the bulk's again)
            network = replace(network, streams=tuple(
                replace(s, surfaces=tuple(replace(model, process_film=functools.lru_cache(maxsize=4)(model.process_film))
                                          for model in s.surfaces))
                for s in network.streams if (s.name == "jacket") == (measurement.surface == "jacket")))
        networks.append(network)
    nominal = networks[0]
    assert nominal is not None
    area = sum(model.area for stream in nominal.streams for model in stream.surfaces)
    if not area > 0.0:
        raise _no_surface(measurement)
    scale = area if job.per_area else 1.0

    def solve(which: list[int], factors: Any) -> Any:
        """UA of the measured surface of back-out choice ``which[i]`` at factor ``factors[i]``, in one pass."""
        deadline.check()
        scaled = []
        for index, factor in zip(which, factors):
            network = networks[index]
            assert network is not None
            scaled.append(_times(network, job.name, float(factor)))
        return solve_many(scaled).ua

    usable = [i for i, network in enumerate(networks) if network is not None]
    grid = np.array(FACTOR_GRID)
    found = solve([i for i in usable for _ in FACTOR_GRID], [f for _ in usable for f in FACTOR_GRID])
    curve = {i: found[k * grid.size:(k + 1) * grid.size] for k, i in enumerate(usable)}  # UA over the grid
    choice_of: list[int] = []
    targets: list[float] = []
    out: list[list[float] | None] = []
    for index, (_, values) in enumerate(job.back_outs):
        if index not in curve:  # an alternative that cannot be assembled: its error, where the scalar path raises it
            assert failed is not None
            raise failed
        try:
            for value, field in values:
                _check_reachable(field, value * scale, curve[index][0], curve[index][-1])
        except _Unreachable:
            if index == 0:
                raise
            out.append(None)
            continue
        out.append([])
        choice_of += [index] * len(values)
        targets += [value * scale for value, _ in values]
    target = np.array(targets)
    # the grid's cell holding each target (UA rises with f): UA(f_a) < target <= UA(f_b)
    cell = np.array([np.searchsorted(curve[i], t) for t, i in zip(targets, choice_of)], dtype=int)
    cell = np.clip(cell, 1, grid.size - 1)
    u_a = 1.0 / grid[cell - 1]  # q > 0 at the cell's low factor
    q_a = np.array([t / curve[i][k - 1] - 1.0 for t, i, k in zip(targets, choice_of, cell)])
    u_b = 1.0 / grid[cell]
    q_b = np.array([t / curve[i][k] - 1.0 for t, i, k in zip(targets, choice_of, cell)])
    if not (np.all(q_a > 0.0) and np.all(q_b <= 0.0)):  # UA not rising with f on the grid (or not finite)
        raise _NoBracket
    factor = np.full(target.size, np.nan)
    left = np.arange(target.size)  # the elements not converged yet
    for _ in range(MAX_PASSES):
        if not left.size:
            break
        ua, qa, ub, qb = u_a[left], q_a[left], u_b[left], q_b[left]
        u = (ua * qb - ub * qa) / (qb - qa)
        q = target[left] / solve([choice_of[k] for k in left], 1.0 / u) - 1.0
        if not np.all(np.isfinite(q)):
            raise _NoBracket
        step = np.abs(np.log(ub / u))
        done = (q == 0.0) | (step <= X_TOLERANCE + R_TOLERANCE * np.abs(np.log(u)))
        flip = q * qb < 0.0  # the newest point and the last one straddle the root: the last becomes the far end
        u_a[left] = np.where(flip, ub, ua)
        with np.errstate(divide="ignore", invalid="ignore"):  # q_b = 0: that element has converged
            shrink = 1.0 - q / qb  # Anderson & Bjorck: an end kept again counts less, by how much q fell (else half)
        q_a[left] = np.where(flip, qb, np.where(shrink > 0.0, shrink, 0.5) * qa)
        u_b[left], q_b[left] = u, q
        factor[left] = 1.0 / u
        left = left[~done]
    if left.size:
        raise _NoBracket
    for k, index in enumerate(choice_of):
        found = out[index]
        assert found is not None
        found.append(float(factor[k]))
    return out


def back_out(vessel: Vessel, deadline: Deadline = NEVER, vectorised: bool = True) -> Vessel:
    """``vessel`` with its pending single-point calibration backed out (not remembered: :func:`resolved` is the
    cached entry point). ``vectorised=False`` takes the scalar Brent path (the specification; tests compare)."""
    calibration = vessel.correlations.calibration
    assert calibration is not None and calibration.measurement is not None
    job = _job(vessel)
    measurement = job.measurement
    try:
        try:
            found = (_factors_vectorised if vectorised else _factors_scalar)(job, deadline)
        except _NoBracket:  # never seen on the examples: the specification answers instead
            found = _factors_scalar(job, deadline)
    except _Unreachable as error:
        raise InputError(error.field, error.message) from None
    nominal = found[0]
    assert nominal is not None
    factor, low, high = nominal
    alternatives: list[tuple[str, str, float, float]] = []
    ruled_out: list[str] = []
    for (field, option), factors in zip(service_alternatives(vessel, measurement.surface), found[1:]):
        if factors is None:
            ruled_out.append(f"{field}={option}")
        else:
            alternatives.append((field, option, factors[0], factors[1]))
    from calc.network.heat_transfer import heat_transfer

    base, _ = job.back_outs[0]
    deadline.check()
    with fields_renamed(_RENAMED):  # how much of 1/U the process film is at the measured state: how well one UA fixes a
        state = heat_transfer(replace(job.at, correlations=base.with_factor(job.name, factor)), measurement.charge,
                              measurement.coolant, measurement.process_temperature)
    measured = _surfaces(state, measurement.surface)
    share = sum(x.area * x.overall.U * x.overall.resistances["process_film"] for x in measured) / sum(
        x.area for x in measured)
    unit = "W/(m2 K)" if job.per_area else "W/K"
    quantity = "U" if job.per_area else "UA"
    basis = (f"single-point calibration: measured {quantity} = {measurement.value:.4g} {unit} (95 %: "
             f"{measurement.interval[0]:.4g}-{measurement.interval[1]:.4g}) of the {measurement.surface} at "
             f"{job.at.agitator.speed * 60.0:.4g} rpm, contents at {measurement.process_temperature - 273.15:.2f} degC, "
             f"coolant in at {measurement.coolant.inlet_temperature - 273.15:.2f} degC; reproduced with the published "
             f"process-side constant a times {factor:.4g} (95 %: {low:.4g}-{high:.4g}). The process film absorbs the "
             "difference (the least certain resistance, and one that carries to other speeds and contents through "
             "Nu = a Re^b Pr^c); wall, fouling and coolant film as computed. At the measured state the process film "
             f"is {share * 100:.0f} % of 1/U: the smaller that share, the wider the multiplier's interval for the same "
             "UA interval; a run where the process film dominates (or a Wilson plot) narrows it")
    if alternatives:
        basis += ("; under the other coolant-side correlations the same measurement gives a times " + ", ".join(
            f"{lo:.4g}-{hi:.4g} ({field}={option})" for field, option, lo, hi in alternatives)
            + ", and the band spans them")
    if ruled_out:
        basis += ("; ruled out by the measurement (no process factor reproduces it): " + ", ".join(ruled_out))
    calibration = replace(calibration, factor=factor, factor_interval=(low, high),
                          alternative_factors=tuple(alternatives), basis=basis)
    return replace(vessel, correlations=vessel.correlations.calibrated(calibration))
