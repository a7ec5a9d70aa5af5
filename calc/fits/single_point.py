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
then comes from the measurement's stated 95 % interval: the same back-out at each end gives the
interval of f (``Calibration.factor_interval``), and the margin band's members are those two factors.
A measurement outside what any f in the bracket can give (above the UA of the remaining resistances
alone, or a process film below a thousandth of the published one) is refused with the field named.
"""
from __future__ import annotations

import math
from dataclasses import replace
from functools import lru_cache
from typing import TYPE_CHECKING

from scipy.optimize import brentq

from calc.films.selection import Measurement
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


def resolved(vessel: Vessel) -> Vessel:
    """``vessel`` with a pending single-point calibration backed out (the factor applied); else unchanged."""
    calibration = vessel.correlations.calibration
    if calibration is None or not calibration.pending:
        return vessel
    return _resolved(vessel)


def carried(target: Vessel, reference: Vessel) -> Vessel:
    """``target`` with the factor backed out on the (resolved) ``reference``: a scale-up's similar vessel."""
    calibration = reference.correlations.calibration
    own = target.correlations.calibration
    if calibration is None or calibration.measurement is None or own is None or not own.pending:
        return target
    return replace(target, correlations=target.correlations.calibrated(calibration))


@lru_cache(maxsize=256)
def _resolved(vessel: Vessel) -> Vessel:
    from calc.network.heat_transfer import heat_transfer

    calibration = vessel.correlations.calibration
    assert calibration is not None and calibration.measurement is not None  # resolved() checked
    measurement: Measurement = calibration.measurement
    name = measurement.factor_field
    speed = vessel.agitator.speed if measurement.agitator_speed is None else measurement.agitator_speed
    base = replace(vessel.correlations, calibration=None, process_constants=None,
                   remaining_resistance=None).with_factor(name, 1.0)
    at = replace(vessel, agitator=replace(vessel.agitator, speed=speed))

    def solve(factor: float) -> tuple[float, float]:
        with fields_renamed(_RENAMED):
            result = heat_transfer(replace(at, correlations=base.with_factor(name, factor)), measurement.charge,
                                   measurement.coolant, measurement.process_temperature)
        return measured_surface(result, measurement.surface)

    ua_low, area = solve(FACTOR_RANGE[0])
    if not area > 0.0:
        raise InputError("calibration.measurement.surface",
                         f"the measured charge wets no {measurement.surface} surface of this vessel")
    ua_high, _ = solve(FACTOR_RANGE[1])
    per_area = measurement.quantity == "overall_coefficient"
    scale = area if per_area else 1.0
    targets = [measurement.value * scale] + [v * scale for v in measurement.interval]
    fields = [f"calibration.measurement.{measurement.quantity}",
              f"calibration.measurement.{measurement.quantity}_interval"]
    factors = []
    for i, target in enumerate(targets):
        field = fields[min(i, 1)]
        if target >= ua_high:
            raise InputError(field, f"UA = {target:.4g} W/K cannot be reproduced: even a process film "
                                    f"{FACTOR_RANGE[1]:g} times the published one gives {ua_high:.4g} W/K through the "
                                    "computed wall, fouling and coolant film; check the measurement, its conditions "
                                    "and the stated fouling, or fit the resistances separately (/v1/wilson-plot)")
        if target <= ua_low:
            raise InputError(field, f"UA = {target:.4g} W/K would need a process film below "
                                    f"{FACTOR_RANGE[0]:g} of the published one (that gives {ua_low:.4g} W/K): check "
                                    "the measurement, the wetted surface and the conditions")
        factors.append(math.exp(brentq(lambda x, t=target: math.log(solve(math.exp(x))[0] / t),
                                       math.log(FACTOR_RANGE[0]), math.log(FACTOR_RANGE[1]),
                                       xtol=1e-12, rtol=1e-12)))
    factor, low, high = factors
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
    calibration = replace(calibration, factor=factor, factor_interval=(low, high), basis=basis)
    return replace(vessel, correlations=vessel.correlations.calibrated(calibration))

