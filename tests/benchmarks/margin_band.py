"""Margin band and plant-data fits, measured: ``.venv/bin/python -m tests.benchmarks.margin_band``.

Prints, in one run: the band's width on the demo check and on three vessels of our own (invented
scenarios), the cost of the band relative to the plain check (with and without the solved limits; goal:
at most +50 % on a check with its limits), the single-point back-out on the vectorised network against
the scalar Brent path (``backout`` as the argument prints that section alone), and the UA fit's
accuracy against the noise on the logged temperatures (seeded, closed-form logs).
Not a test: the numbers are for the record (issue 12), nothing asserts on timings.
"""
from __future__ import annotations

import copy
import json
import statistics
import sys
import time
from pathlib import Path

import numpy as np

from dataclasses import replace

from calc.checks.cooling_check import cooling_check
from calc.films.selection import Calibration, Measurement
from calc.fits.single_point import back_out, measured_surface, resolved
from calc.network.heat_transfer import heat_transfer
from calc.properties import LibraryLiquid
from calc.vessel.model import Charge
from calc.fits.ua_fit import fit_ua
from schemas.cooling import CoolingCheckRequestSchema

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def cases() -> dict[str, dict]:
    """The demo production check and three invented vessels (demo data only, not references)."""
    demo = json.loads((EXAMPLES / "cooling_check_production.json").read_text())
    annular = copy.deepcopy(demo)  # R-250A: 2.5 m3 disc turbine, annular jacket and a coil, cooling water
    annular["vessel"].update(name="R-250A annular, coil", diameter="1.4 m", straight_side="1.5 m")
    annular["vessel"]["jacket"] = {"type": "annular", "gap": "40 mm", "inlet_diameter": "50 mm"}
    annular["vessel"]["agitator"] = {"impeller": "rushton_turbine", "diameter": "0.47 m", "speed": "110 rpm"}
    annular["vessel"]["coils"] = [{"tube_outer_diameter": "42 mm", "tube_wall": "3 mm", "helix_diameter": "1.1 m",
                                   "turns": 6, "pitch": "90 mm", "elevation": "0.3 m"}]
    annular["charge"]["volume"] = "2.0 m^3"
    annular["coolant"] = {"fluid": "water", "inlet_temperature": "18 degC", "flow": "12 m^3/h"}
    brine = copy.deepcopy(demo)  # R-1600: 16 m3 half pipe, cold glycol brine in laminar flow
    brine["vessel"].update(name="R-1600 half pipe, brine", diameter="2.6 m", straight_side="2.8 m")
    brine["vessel"]["agitator"] = {"impeller": "hydrofoil", "diameter": "1.1 m", "speed": "60 rpm"}
    brine["charge"]["volume"] = "14 m^3"
    brine["coolant"] = {"fluid": "ethylene_glycol", "mass_fraction": 0.4, "inlet_temperature": "-15 degC",
                        "flow": "6 m^3/h"}
    glass = copy.deepcopy(demo)  # G-400: 0.4 m3 glass-lined, retreat curve, annular jacket
    glass["vessel"].update(name="G-400 glass-lined", diameter="0.8 m", straight_side="0.7 m",
                           wall={"material": "glass_lined_steel", "thickness": "10 mm"})
    glass["vessel"]["jacket"] = {"type": "annular", "gap": "30 mm", "inlet_diameter": "32 mm"}
    glass["vessel"]["agitator"] = {"impeller": "retreat_curve", "diameter": "0.5 m", "speed": "120 rpm"}
    glass["charge"]["volume"] = "0.32 m^3"
    glass["coolant"] = {"fluid": "water", "inlet_temperature": "10 degC", "flow": "3 m^3/h"}
    for body in (annular, brine, glass):
        body["heat_release"] = {"model": "specific_power", "power_per_mass": 15.0}
    return {"demo R-201 (cooling_check_production.json)": demo, "R-250A annular + coil": annular,
            "R-1600 half pipe, laminar brine": brine, "G-400 glass-lined": glass}


def extra(plain, banded, rounds: int = 21) -> float:
    """The band's extra cost: the median over rounds of banded / plain - 1, the two called in turn and timed
    in CPU time (on a shared machine, pairs measured together drift together)."""
    plain(), banded()
    ratios = []
    for _ in range(rounds):
        start = time.process_time()
        plain()
        middle = time.process_time()
        banded()
        ratios.append((time.process_time() - middle) / (middle - start))
    return statistics.median(ratios) - 1.0


def timed(function, repeats: int = 5) -> float:
    samples = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        samples.append(time.perf_counter() - start)
    return statistics.median(samples)


def calibrated_case(body: dict) -> tuple:
    """(calibrated vessel, the check's other arguments) of a case: a measured UA of +-10 % of its jacket (else its
    coils), the forward model's at 0.8 x a, at 60 rpm with water at 50 degC and the case's coolant."""
    args = CoolingCheckRequestSchema().load(body)
    vessel = args["vessel"]
    run_vessel = replace(vessel, agitator=replace(vessel.agitator, speed=1.0),
                         correlations=replace(vessel.correlations, process_factor=0.8))
    water = Charge(LibraryLiquid("water"), volume=args["charge"].liquid_volume(args["process_temperature"]))
    surface = "jacket" if vessel.jacket is not None else "coils"
    ua, _ = measured_surface(heat_transfer(run_vessel, water, args["coolant"], 323.15), surface)
    measurement = Measurement(ua, (0.9 * ua, 1.1 * ua), 323.15, water, args["coolant"], surface=surface,
                              agitator_speed=1.0)
    calibrated = replace(vessel, correlations=vessel.correlations.calibrated(Calibration(measurement=measurement)))
    return calibrated, (args["charge"], args["coolant"], args["process_temperature"], args["heat_release"],
                        args["safety_factor"])


def backout_section(repeats: int = 9) -> None:
    """The back-out alone and a calibrated check that backs it out (nothing cached), scalar Brent path (one network
    solve at a time: the specification, and the code before the vectorised back-out) against the vectorised one."""
    print(f"single-point back-out: scalar Brent vs vectorised (median of {repeats}, one process, nothing cached; "
          "a measured UA +-10 %)")
    print(f"  {'case':<36} {'alts':>4} {'plain check':>11} {'back-out scalar':>15} {'vectorised':>10} {'ratio':>6} "
          f"{'check, scalar':>13} {'check, vector':>13} {'max rel diff':>12}")
    for name, body in cases().items():
        _backout_row(name, body, repeats)
    print("  plain check = the same check uncalibrated (band, no limits); check = a first calibrated check, back-out "
          "included; max rel diff = the factors of both paths")


def _backout_row(name: str, body: dict, repeats: int) -> None:
    """One case of :func:`backout_section`."""
    vessel, call = calibrated_case(body)
    plain_vessel = replace(vessel, correlations=replace(vessel.correlations, calibration=None))
    answers = {}
    for vectorised in (False, True):
        found = back_out(vessel, vectorised=vectorised).correlations.calibration
        answers[vectorised] = [found.factor, *found.factor_interval] + [
            f for *_, low, high in found.alternative_factors for f in (low, high)]
    alternatives = len(back_out(vessel).correlations.calibration.alternative_factors)
    # interleaved, so a busy machine slows every column alike; a first calibrated check is the back-out, then the
    # check on the resolved vessel (what resolved() remembers)
    plain, scalar, vector, check_scalar, check_vector = interleaved([
        lambda: cooling_check(plain_vessel, *call, limits=False),
        lambda: back_out(vessel, vectorised=False),
        lambda: back_out(vessel),
        lambda: cooling_check(back_out(vessel, vectorised=False), *call, limits=False),
        lambda: cooling_check(back_out(vessel), *call, limits=False)], repeats)
    diff = max(abs(a / b - 1.0) for a, b in zip(answers[True], answers[False]))
    print(f"  {name[:36]:<36} {alternatives:>4} {plain * 1e3:>8.1f} ms {scalar * 1e3:>12.1f} ms "
          f"{vector * 1e3:>7.1f} ms {scalar / vector:>5.1f}x {check_scalar * 1e3:>10.1f} ms "
          f"{check_vector * 1e3:>10.1f} ms {diff:>12.1e}")


def interleaved(functions: list, repeats: int) -> list[float]:
    """The median time of each of ``functions``, run in turn ``repeats`` times."""
    samples: list[list[float]] = [[] for _ in functions]
    for _ in range(repeats):
        for function, times in zip(functions, samples):
            start = time.perf_counter()
            function()
            times.append(time.perf_counter() - start)
    return [statistics.median(times) for times in samples]


def main() -> None:
    if sys.argv[1:] == ["backout"]:
        backout_section()
        return
    print("margin band: width and cost (CPU time, median over 21 rounds of the plain and the banded check in turn)")
    print(f"  {'case':<44} {'margin':>7} {'low':>7} {'high':>7} {'width':>7} {'members':>7} "
          f"{'cost, limits':>13} {'cost, verdict':>14}")
    for name, body in cases().items():
        args = CoolingCheckRequestSchema().load(body)
        call = (args["vessel"], args["charge"], args["coolant"], args["process_temperature"], args["heat_release"],
                args["safety_factor"])
        check = cooling_check(*call)
        band = check.margin_band
        with_limits = extra(lambda call=call: cooling_check(*call, band=False), lambda call=call: cooling_check(*call))
        verdict = extra(lambda call=call: cooling_check(*call, limits=False, band=False),
                        lambda call=call: cooling_check(*call, limits=False))
        print(f"  {name:<44} {check.margin:>7.3g} {band.low:>7.3g} {band.high:>7.3g} "
              f"{(band.high - band.low) / check.margin:>6.0%} {len(band.members):>7} "
              f"{with_limits:>+12.0%} {verdict:>+13.0%}")
        print(f"      low: {band.low_set_by}; high: {band.high_set_by}")
    print("  cost = extra time of the check with the band over the same check without it")

    print("\nsingle-point calibration (a measured UA of +-10 %, the forward model's at 0.8 x a, at 60 rpm, water at 50 degC)")
    print(f"  {'case':<44} {'factor':>7} {'low':>7} {'high':>7} {'width':>7} {'back-out':>9} {'check after':>12}")
    for name, body in cases().items():
        calibrated, call = calibrated_case(body)
        vessel = replace(calibrated, correlations=replace(calibrated.correlations, calibration=None))
        start = time.perf_counter()
        check = cooling_check(calibrated, *call, limits=False)
        first = time.perf_counter() - start
        after = timed(lambda v=calibrated, call=call: cooling_check(v, *call, limits=False))
        plain = timed(lambda v=vessel, call=call: cooling_check(v, *call, limits=False))
        band = check.margin_band
        factor = resolved(calibrated).correlations.calibration.factor
        print(f"  {name:<44} {factor:>7.4g} {band.low:>7.3g} {band.high:>7.3g} "
              f"{(band.high - band.low) / check.margin:>6.0%} {first / plain:>8.1f}x {after / plain:>11.2f}x")
    print("  back-out = the first calibrated check (backs the factors out together on the vectorised network) over a "
          "plain banded check; check after = later checks of the same vessel (the factor is cached)")

    print()
    backout_section()

    print("\nUA fit against noise (closed-form cool-down, UA = 900 W/K, M c_p = 12.5 MJ/K, 120 points over 3 h;"
          " 20 seeds each)")
    print(f"  {'noise, K':>9} {'median |error|':>15} {'worst |error|':>14} {'median 95 % half-width':>23} "
          f"{'covered':>8}")
    t = np.linspace(0.0, 3 * 3600.0, 120)
    true = 900.0
    T = 288.15 + 57.0 * np.exp(-true * t / (3000.0 * 4180.0))
    for noise in (0.02, 0.1, 0.3, 1.0):
        errors, halves, covered = [], [], 0
        for seed in range(20):
            rng = np.random.default_rng(seed)
            fit = fit_ua(t, T + rng.normal(0, noise, t.size), np.full(t.size, 288.15), 3000.0, 4180.0)
            errors.append(abs(fit.ua / true - 1))
            halves.append((fit.ua_interval[1] - fit.ua_interval[0]) / 2 / true)
            covered += fit.ua_interval[0] <= true <= fit.ua_interval[1]
        print(f"  {noise:>9g} {statistics.median(errors):>15.3%} {max(errors):>14.3%} "
              f"{statistics.median(halves):>23.3%} {covered:>5}/20")


if __name__ == "__main__":
    main()
