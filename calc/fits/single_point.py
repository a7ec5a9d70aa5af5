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

The root is found with Brent's method on ln f over [1e-3, 1e3] (UA rises strictly with f). The band
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

Each network solve of the back-out first checks the request's deadline (about 12 solves per end and
correlation): :class:`calc.deadline.OutOfTime` once it has passed.
"""
from __future__ import annotations

import math
import threading
from collections import OrderedDict
from dataclasses import replace
from typing import TYPE_CHECKING

from scipy.optimize import brentq

from calc.deadline import NEVER, Deadline
from calc.films.coil_side import COIL_CORRELATIONS
from calc.films.jacket_side import ANNULAR_CORRELATIONS, CHANNEL_TREATMENTS
from calc.films.selection import CorrelationChoice, Measurement
from calc.validity import InputError, fields_renamed
from calc.vessel.model import Vessel

if TYPE_CHECKING:
    from calc.network.heat_transfer import HeatTransferResult, Surface

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
    answer = _resolved(vessel, deadline)
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


def _resolved(vessel: Vessel, deadline: Deadline) -> Vessel:
    from calc.network.heat_transfer import heat_transfer

    calibration = vessel.correlations.calibration
    assert calibration is not None and calibration.measurement is not None  # resolved() checked
    measurement: Measurement = calibration.measurement
    name = measurement.factor_field
    speed = vessel.agitator.speed if measurement.agitator_speed is None else measurement.agitator_speed
    base = replace(vessel.correlations, calibration=None, process_constants=None,
                   remaining_resistance=None).with_factor(name, 1.0)
    at = replace(vessel, agitator=replace(vessel.agitator, speed=speed))
    per_area = measurement.quantity == "overall_coefficient"
    fields = [f"calibration.measurement.{measurement.quantity}",
              f"calibration.measurement.{measurement.quantity}_interval"]

    def solve(choice: CorrelationChoice, factor: float) -> tuple[float, float]:
        deadline.check()
        with fields_renamed(_RENAMED):
            result = heat_transfer(replace(at, correlations=choice.with_factor(name, factor)), measurement.charge,
                                   measurement.coolant, measurement.process_temperature)
        return measured_surface(result, measurement.surface)

    def back_out(choice: CorrelationChoice, values: list[float], field_of: list[str]) -> list[float]:
        """The factor reproducing each measured value under ``choice`` (raises _Unreachable)."""
        ua_low, area = solve(choice, FACTOR_RANGE[0])
        if not area > 0.0:
            raise InputError("calibration.measurement.surface",
                             f"the measured charge wets no {measurement.surface} surface of this vessel")
        ua_high, _ = solve(choice, FACTOR_RANGE[1])
        scale = area if per_area else 1.0
        factors = []
        for value, field in zip(values, field_of):
            target = value * scale
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
            factors.append(math.exp(brentq(lambda x, t=target: math.log(solve(choice, math.exp(x))[0] / t),
                                           math.log(FACTOR_RANGE[0]), math.log(FACTOR_RANGE[1]),
                                           xtol=1e-12, rtol=1e-12)))
        return factors

    try:
        factors = back_out(base, [measurement.value, *measurement.interval], [fields[0], fields[1], fields[1]])
    except _Unreachable as error:
        raise InputError(error.field, error.message) from None
    alternatives: list[tuple[str, str, float, float]] = []
    ruled_out: list[str] = []
    for field, option in service_alternatives(vessel, measurement.surface):
        try:
            low_alt, high_alt = back_out(base.with_service_option(field, option), list(measurement.interval), fields[1:] * 2)
        except _Unreachable:
            ruled_out.append(f"{field}={option}")
            continue
        alternatives.append((field, option, low_alt, high_alt))
    factor, low, high = factors
    deadline.check()
    with fields_renamed(_RENAMED):  # how much of 1/U the process film is at the measured state: how well one UA fixes a
        state = heat_transfer(replace(at, correlations=base.with_factor(name, factor)), measurement.charge,
                              measurement.coolant, measurement.process_temperature)
    measured = _surfaces(state, measurement.surface)
    share = sum(x.area * x.overall.U * x.overall.resistances["process_film"] for x in measured) / sum(
        x.area for x in measured)
    unit = "W/(m2 K)" if per_area else "W/K"
    quantity = "U" if per_area else "UA"
    basis = (f"single-point calibration: measured {quantity} = {measurement.value:.4g} {unit} (95 %: "
             f"{measurement.interval[0]:.4g}-{measurement.interval[1]:.4g}) of the {measurement.surface} at "
             f"{speed * 60.0:.4g} rpm, contents at {measurement.process_temperature - 273.15:.2f} degC, coolant in at "
             f"{measurement.coolant.inlet_temperature - 273.15:.2f} degC; reproduced with the published process-side "
             f"constant a times {factor:.4g} (95 %: {low:.4g}-{high:.4g}). The process film absorbs the difference "
             "(the least certain resistance, and one that carries to other speeds and contents through "
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

