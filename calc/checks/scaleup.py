"""Scale-up: the cooling check repeated on larger vessels, and the largest vessel that still cools.

Under geometric similarity every length grows by the factor f = (V_target / V_reference)^(1/3), so
the heat-transfer area grows as f^2 while the volume and the heat release grow as f^3: area per
volume falls as V^(-1/3) (common practice). The process film coefficient changes with the
agitation rule: with Nu = h T/k ~ Re^b, Re = rho N D^2/mu and N ~ D^(-x), h ~ N^b D^(2b - 1) =
D^(2b - 1 - b x) (derived here from those definitions); at constant power per volume (x = 2/3) and
b = 2/3 this is D^(-1/9).

Conventions (the caller's choices are named in brackets):

* A vessel's ``volume`` is its nominal volume, to the top of the straight side. Every scale holds
  the same fraction of it as the reference does, so the charge (volume or mass, whichever the
  reference charge gives) scales with the vessel volume.
* The heat release is scaled with the charge mass (``HeatRelease.scaled``): a release per kg stays,
  a total power grows with the mass, a dosing step doses proportionally more over the same time.
* Target vessels are given explicitly (``Vessel``: their own geometry, jacket and agitator) or as
  volumes (m3), for which a geometrically similar vessel is generated from the reference with
  ``Vessel.scaled`` (wall thickness, fouling and the jacket's flow passages kept, see there).
* Agitator speed [``rule``]: one of ``calc.agitation.SCALE_UP_RULES`` or ``as_given``. Explicit
  targets keep their own speed under ``as_given``; for a generated vessel ``as_given`` means
  constant speed. Under a rule, an explicit target's speed follows from the reference speed and the
  impeller diameter ratio; constant power per volume is solved on the target's own power curve
  and liquid volume (it need not be similar).
* Coolant [``coolant_flow_rule``]: the same liquid and inlet temperature; the flow is scaled with
  the heat-transfer area (``scale_with_area``, default: about the same flow per square metre;
  a jacket's velocity is then kept only roughly, since its passages are not scaled) or kept as
  given (``as_given``).

The scales reported are the reference itself (first, factor 1) followed by the targets in order.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from functools import partial
from typing import Callable, Iterable, Union

from scipy.optimize import brentq

from calc.deadline import NEVER, Deadline
from calc.vessel import agitation
from calc.vessel import geometry
from calc.cautions import COOLING_CHECK
from calc.checks.cooling_check import (DEFAULT_SAFETY_FACTOR, CoolingCheck, PendingCheck, _check_safety_factor,
                                       begin_check, check_cautions, evaluate, finish_checks, margin_of)
from calc.checks.heat_load import HeatRelease, heat_load
from calc.fits.single_point import carried
from calc.network import vectorised
from calc.network.heat_transfer import calibrated
from calc.properties import LiquidProperties
from calc.sizing.jacket_sizing import SizedDesign, SizingOptions, jacket_sizing
from calc.validity import CalcWarning, CalculationError, InputError, TooLarge, Warnings, fields_renamed
from calc.vessel.model import Charge, Coolant, Vessel

RULES = tuple(sorted(agitation.SCALE_UP_RULES)) + ("as_given",)
COOLANT_FLOW_RULES = ("scale_with_area", "as_given")
#: Default largest number of target vessels in one scale-up (keeps a request's work bounded); the
#: service's COOLMARGIN_MAX_SCALES setting replaces it.
MAX_TARGETS = 20
#: A target: a nominal volume (m3) of a similar vessel, a vessel, or a vessel with a coolant of its own.
Target = Union[float, Vessel, tuple[Vessel, Coolant]]
#: The continuous family is searched from the reference volume up to this multiple of it (or 10x the
#: largest target volume, whichever is larger).
SEARCH_RATIO = 1000.0
#: Scan points per decade of volume in the family search (for the first crossing and switches).
SCAN_POINTS_PER_DECADE = 3
#: Relative precision in volume of a controlling-resistance switch (bisection).
SWITCH_TOLERANCE = 1e-3


@dataclass(frozen=True)
class ScaleResult:
    """One scale: its vessel (generated or given), what it holds, its coolant and its cooling check."""

    name: str
    volume: float  # m3, nominal (to the top of the straight side)
    charge_volume: float  # m3 of liquid at the process temperature
    scale_factor: float  # length ratio to the reference; (V / V_ref)^(1/3) for a given vessel
    generated: bool  # True: geometrically similar vessel made from the reference
    agitator_speed: float  # rev/s
    vessel: Vessel
    coolant: Coolant
    check: CoolingCheck
    jacket_design: SizedDesign | None = None  # when sizing was asked for

    @property
    def diameter(self) -> float:
        """Inside diameter of this scale's vessel, m."""
        return self.vessel.shape.diameter

    @property
    def impeller_diameter(self) -> float:
        return self.vessel.agitator.diameter

    @property
    def area_per_volume(self) -> float:
        """Heat-transfer area per liquid volume at this scale, 1/m."""
        return self.check.heat_transfer.fill.area_per_volume

    @property
    def overall_coefficient(self) -> float:
        return self.check.heat_transfer.overall_coefficient

    @property
    def controlling(self) -> str:
        return self.check.heat_transfer.controlling


@dataclass(frozen=True)
class ControllingSwitch:
    """Where, along the similar family, the largest resistance changes from ``below`` to ``above``."""

    volume: float  # m3, nominal
    below: str
    above: str


@dataclass(frozen=True)
class ScaleUp:
    """The scales, the largest adequate similar vessel and where the controlling resistance switches.

    ``largest_adequate_volume`` is the nominal volume (m3) of the largest geometrically similar vessel
    whose margin still reaches the safety factor; None when the reference itself falls short. When
    every volume up to ``search_upper_volume`` is adequate it is that bound and
    ``adequate_beyond_search`` is True.
    """

    scales: tuple[ScaleResult, ...]
    largest_adequate_volume: float | None
    adequate_beyond_search: bool
    search_upper_volume: float
    largest_adequate_message: str
    controlling_switch_volumes: tuple[ControllingSwitch, ...]
    rule: str
    coolant_flow_rule: str
    safety_factor: float
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = COOLING_CHECK


@dataclass(frozen=True)
class _Reference:
    vessel: Vessel
    charge: Charge
    coolant: Coolant
    heat_release: HeatRelease
    process_temperature: float
    volume: float  # nominal, m3
    charge_volume: float  # m3
    area: float  # heat-transfer area, m2
    props: LiquidProperties
    power_per_volume: float  # W/m3


@dataclass(frozen=True)
class _ScaledCase:
    """What one scale is checked with: its vessel, charge, coolant and heat release, and its size."""

    vessel: Vessel
    charge: Charge
    charge_volume: float  # m3 of liquid at the process temperature
    coolant: Coolant
    heat_release: HeatRelease
    scale_factor: float  # length ratio to the reference
    volume: float  # m3, nominal


def _scaled_case(reference: _Reference, vessel: Vessel, ratio: float, coolant_rule: str) -> _ScaledCase:
    """``vessel`` holding the reference charge scaled by the volume ``ratio``, with its coolant and load."""
    charge_volume = reference.charge_volume * ratio
    return _ScaledCase(vessel, _scaled_charge(reference.charge, ratio), charge_volume,
                       _scaled_coolant(reference, vessel, charge_volume, coolant_rule),
                       reference.heat_release.scaled(ratio), ratio ** (1.0 / 3.0), reference.volume * ratio)


def _scaled_charge(charge: Charge, ratio: float) -> Charge:
    if charge.volume is not None:
        return replace(charge, volume=charge.volume * ratio)
    assert charge.mass is not None  # a charge is given by its volume or its mass
    return replace(charge, mass=charge.mass * ratio)


def _scaled_coolant(reference: _Reference, vessel: Vessel, charge_volume: float, rule: str) -> Coolant:
    coolant = reference.coolant
    if rule == "as_given":
        return coolant
    area = geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=charge_volume).heat_transfer_area
    ratio = area / reference.area
    if not ratio > 0.0:
        raise InputError("targets", f"vessel {vessel.name!r} has no heat-transfer area at this fill; "
                                    "the coolant flow cannot be scaled with the area")
    return replace(coolant, flow=coolant.flow * ratio,
                   coil_flow=None if coolant.coil_flow is None else coolant.coil_flow * ratio)


def _similar(reference: _Reference, volume: float, rule: str, coolant_rule: str,
             name: str | None = None) -> _ScaledCase:
    """The geometrically similar vessel of nominal ``volume`` with its charge, coolant and heat release."""
    ratio = volume / reference.volume
    factor = ratio ** (1.0 / 3.0)
    agitator = reference.vessel.agitator
    speed = agitator.speed if rule == "as_given" else \
        agitation.scaled_speed(rule, agitator, factor, reference.props)
    vessel = reference.vessel.scaled(factor, speed, name or f"{reference.vessel.name} at {volume:.4g} m3")
    return replace(_scaled_case(reference, vessel, ratio, coolant_rule), scale_factor=factor, volume=volume)


def _speed_for_power_per_volume(vessel: Vessel, props: LiquidProperties, volume: float, target: float) -> float:
    """Speed [rev/s] at which ``vessel``'s agitator draws ``target`` W/m3 in ``volume`` m3 (Brent's method).

    Power rises strictly with speed (``calc.agitation`` module notes), so the root is unique.
    """
    def residual(log_speed: float) -> float:
        stirred = replace(vessel.agitator, speed=math.exp(log_speed))
        return math.log(agitation.agitation(stirred, props, volume, vessel.shape.diameter).power_per_volume
                        / target)

    guess = math.log(vessel.agitator.speed)
    try:
        return math.exp(brentq(residual, guess - 15.0, guess + 15.0, xtol=1e-12, rtol=1e-12))
    except ValueError as exc:  # pragma: no cover - power spans many decades over the bracket
        raise CalculationError(f"no agitator speed gives the reference power per volume: {exc}") from None


def _given(reference: _Reference, vessel: Vessel, index: int, rule: str, coolant_rule: str,
           warnings: Warnings) -> _ScaledCase:
    """An explicit target vessel: its charge, coolant, heat release and agitator speed under ``rule``."""
    field_name = f"targets[{index}]"
    if vessel.agitator is None:
        raise InputError(f"{field_name}.vessel.agitator", "an explicit target vessel needs its agitator")
    vessel.agitator.validate()
    nominal = geometry.volume_at_level(vessel.shape, geometry.brim_height(vessel.shape))
    ratio = nominal / reference.volume
    charge_volume = reference.charge_volume * ratio
    if rule != "as_given":
        if vessel.agitator.impeller != reference.vessel.agitator.impeller:
            warnings.add(CalcWarning(
                "scale_up_rule_across_impellers",
                f"{field_name}: the {rule} rule is applied from a {reference.vessel.agitator.impeller} to a "
                f"{vessel.agitator.impeller}; similarity does not hold, treat the speed as indicative"))
        if rule == "constant_power_per_volume":
            speed = _speed_for_power_per_volume(vessel, reference.props, charge_volume, reference.power_per_volume)
        else:
            speed = agitation.scaled_speed(rule, reference.vessel.agitator,
                                                  vessel.agitator.diameter / reference.vessel.agitator.diameter,
                                                  reference.props)
        vessel = replace(vessel, agitator=replace(vessel.agitator, speed=speed))
    return replace(_scaled_case(reference, vessel, ratio, coolant_rule), volume=nominal)


def _check_targets(targets: Iterable[Target], max_targets: int) -> list[Target]:
    if isinstance(targets, (str, bytes)) or not hasattr(targets, "__iter__"):
        raise InputError("targets", "must be a list of vessels, (vessel, coolant) pairs or volumes")
    given = list(targets)
    if len(given) > max_targets:
        raise TooLarge("targets", f"at most {max_targets} targets per scale-up, got {len(given)}")
    for i, target in enumerate(given):
        if isinstance(target, Vessel) or (isinstance(target, tuple) and len(target) == 2
                                          and isinstance(target[0], Vessel) and isinstance(target[1], Coolant)):
            continue
        if isinstance(target, bool) or not isinstance(target, (int, float)) or not math.isfinite(target) \
                or target <= 0:
            raise InputError(f"targets[{i}].volume", f"must be a positive volume or a vessel, got {target!r}")
    return given


def _scan(reference: _Reference, rule: str, coolant_rule: str, safety_factor: float, grid: list[float],
          memo: dict[float, tuple[float, str]], deadline: Deadline) -> None:
    """The family's scan points solved together on the vectorised network, into ``memo`` as ``state`` would."""
    if not grid:
        return
    deadline.check()
    similar = [_similar(reference, math.exp(x), rule, coolant_rule) for x in grid]
    solved = vectorised.heat_transfer_many([(case.vessel, case.charge, case.coolant, reference.process_temperature)
                                            for case in similar])
    for i, (x, case) in enumerate(zip(grid, similar)):
        network = solved.networks[solved.network_index[i]]
        load = heat_load(case.heat_release, network.fill.volume * network.process_properties.density,
                         reference.process_temperature, network.agitation.power)
        margin = margin_of(float(solved.duty[i]), load.total)
        value = 10.0 if margin is None else (math.log(margin / safety_factor) if margin > 0 else -50.0)
        memo[x] = (value, solved.controlling[i])


def _target_scale(ref: _Reference, target: float | Vessel, own_coolant: Coolant | None, i: int, rule: str, coolant_flow_rule: str,
                  process_temperature: float, safety_factor: float, limits: bool, deadline: Deadline,
                  warnings: Warnings, size_jacket: bool = False) -> tuple[PendingCheck, Callable[..., ScaleResult]]:
    """The cooling check of target ``i`` (an explicit vessel, with its own coolant if given, or a volume) up to
    its limits and band, and the scale's result waiting for its finished ``check``."""
    generated = not isinstance(target, Vessel)
    if not isinstance(target, Vessel):
        case = _similar(ref, float(target), rule, coolant_flow_rule)
    else:
        case = _given(ref, target, i, rule, coolant_flow_rule, warnings)
        if own_coolant is not None:
            case = replace(case, coolant=own_coolant)
    check = begin_check(case.vessel, case.charge, case.coolant, process_temperature, case.heat_release, safety_factor,
                   limits, True)
    design = None
    if size_jacket and generated:
        design = jacket_sizing(case.vessel, case.charge, case.coolant, process_temperature, case.heat_release,
                               safety_factor, SizingOptions(margin_bands="recommendation"),
                               deadline=deadline).recommended
    return check, partial(ScaleResult, case.vessel.name, case.volume, case.charge_volume, case.scale_factor,
                          generated, case.vessel.agitator.speed, case.vessel, case.coolant, jacket_design=design)


def _family_search(reference: _Reference, rule: str, coolant_rule: str, safety_factor: float, upper: float,
                   reference_check: CoolingCheck, warnings: Warnings, deadline: Deadline = NEVER
                   ) -> tuple[float | None, bool, str, tuple[ControllingSwitch, ...]]:
    """Largest adequate volume (Brent's method on log V) and controlling switches (scan, then bisection)."""
    memo: dict[float, tuple[float, str]] = {}

    def state(log_volume: float) -> tuple[float, str]:
        """(log(margin / SF), controlling resistance) of the similar vessel of volume exp(log_volume)."""
        if log_volume not in memo:
            deadline.check()
            case = _similar(reference, math.exp(log_volume), rule, coolant_rule)
            result, load = evaluate(case.vessel, case.charge, case.coolant, reference.process_temperature,
                                    case.heat_release)
            margin = margin_of(result.duty, load.total)
            # no net load: unbounded margin; a finite positive stand-in keeps the sign for the search
            value = 10.0 if margin is None else (math.log(margin / safety_factor) if margin > 0 else -50.0)
            memo[log_volume] = (value, result.controlling)
        return memo[log_volume]

    low, high = math.log(reference.volume), math.log(upper)
    ref_margin = reference_check.margin
    memo[low] = (10.0 if ref_margin is None else (math.log(ref_margin / safety_factor) if ref_margin > 0 else -50.0),
                 reference_check.heat_transfer.controlling)
    count = max(2, int(math.ceil((high - low) / math.log(10.0) * SCAN_POINTS_PER_DECADE)))
    grid = [low + (high - low) * i / count for i in range(count + 1)]
    _scan(reference, rule, coolant_rule, safety_factor, [x for x in grid if x not in memo], memo, deadline)
    states = [state(x) for x in grid]

    switches = []
    for (a, (_, ca)), (b, (_, cb)) in zip(zip(grid, states), zip(grid[1:], states[1:])):
        if ca == cb:
            continue
        while b - a > SWITCH_TOLERANCE:
            mid = 0.5 * (a + b)
            if state(mid)[1] == ca:
                a = mid
            else:
                b = mid
        switches.append(ControllingSwitch(math.exp(0.5 * (a + b)), ca, state(b)[1]))

    if states[0][0] < 0.0:
        return None, False, ("the reference vessel itself falls short of the safety factor: no similar vessel "
                             "from it is adequate"), tuple(switches)
    crossing = next((i for i, (value, _) in enumerate(states) if value < 0.0), None)
    if crossing is None:
        return upper, True, (f"adequate at every similar volume searched, up to {upper:.4g} m3; "
                             "the largest adequate volume lies beyond"), tuple(switches)
    if any(value >= 0.0 for value, _ in states[crossing:]):
        warnings.add(CalcWarning("margin_not_monotonic",
                                 "along the similar family the margin recovers the safety factor at a larger "
                                 "volume again; the first crossing is reported"))
    try:
        root = brentq(lambda x: state(x)[0], grid[crossing - 1], grid[crossing], xtol=1e-12, rtol=1e-13)
    except (ValueError, RuntimeError) as exc:  # pragma: no cover - the scan bracket changes sign
        raise CalculationError(f"largest adequate volume: {exc}") from None
    return math.exp(root), False, ("largest geometrically similar vessel (nominal volume) whose margin reaches "
                                   "the safety factor"), tuple(switches)


def scale_up(reference: Vessel, targets: Iterable[Target], rule: str, charge: Charge, coolant: Coolant, process_temperature: float,
             heat_release: HeatRelease, safety_factor: float = DEFAULT_SAFETY_FACTOR,
             coolant_flow_rule: str = "scale_with_area", limits: bool = True,
             deadline: Deadline = NEVER, size_jacket: bool = False, max_targets: int = MAX_TARGETS) -> ScaleUp:
    """Cooling checks of the reference and each target, and the largest adequate similar vessel.

    ``charge``, ``coolant`` and ``heat_release`` describe the reference scale; see the module notes
    for how each is carried to the targets. ``limits`` is passed to each scale's cooling check.
    Every scale and every step of the family search first checks ``deadline``
    (:class:`calc.deadline.OutOfTime` once it has passed). More than ``max_targets`` targets raise
    :class:`calc.validity.TooLarge`.
    ``size_jacket``: each generated scale also gets the smallest feasible jacket or coil designed for it
    (:func:`calc.sizing.jacket_sizing.jacket_sizing` on its shell, with its coolant and heat release, default
    candidates), beside the check of the reference's jacket scaled by similarity.
    """
    if rule not in RULES:
        raise InputError("rule", f"unknown scale-up rule {rule!r}; known rules: {', '.join(RULES)}")
    if coolant_flow_rule not in COOLANT_FLOW_RULES:
        raise InputError("coolant_flow_rule", f"unknown rule {coolant_flow_rule!r}; known rules: "
                                              f"{', '.join(COOLANT_FLOW_RULES)}")
    safety_factor = _check_safety_factor(safety_factor)
    targets = _check_targets(targets, max_targets)
    warnings = Warnings()

    with fields_renamed({"vessel": "reference"}):
        reference = calibrated(reference, deadline)  # a measured UA is backed out on the reference, where it was measured
    targets = [(carried(t[0], reference), t[1]) if isinstance(t, tuple) else
               carried(t, reference) if isinstance(t, Vessel) else t for t in targets]
    calibration = reference.correlations.calibration
    if calibration is not None:
        what = (f"multiplier {calibration.factor:.4g} on the published process-side constant (backed out from its "
                "measured UA)" if calibration.measurement is not None else
                f"process constant a = {calibration.process_constant:.4g} (its own Wilson plot)")
        warnings.add(CalcWarning(
            "calibration_carried",
            f"the reference vessel's calibrated {what} is carried to the larger similar vessels, which share "
            "impeller and geometry ratios; their wall, fouling and coolant film are computed from the published "
            "correlations"))
    with fields_renamed({"vessel": "reference"}):
        pending = begin_check(reference, charge, coolant, process_temperature, heat_release, safety_factor, limits,
                              True)
    result = pending.result
    ref = _Reference(reference, charge, coolant, heat_release, process_temperature, result.fill.brim_volume,
                     result.fill.volume, result.fill.heat_transfer_area, result.process_properties,
                     result.agitation.power_per_volume)
    if not ref.area > 0.0 and coolant_flow_rule == "scale_with_area":
        raise InputError("reference", "the reference vessel has no heat-transfer area at its fill; "
                                   "the coolant flow cannot be scaled with the area")
    scales: list[tuple[PendingCheck, Callable[..., ScaleResult]]] = [
        (pending, partial(ScaleResult, reference.name, ref.volume, ref.charge_volume, 1.0, False,
                          reference.agitator.speed, reference, coolant))]
    for i, target in enumerate(targets):
        deadline.check()
        own_coolant = None
        if isinstance(target, tuple):  # (vessel, its own utility)
            target, own_coolant = target
        # the request's own paths: an explicit target is targets[i].vessel (+ .coolant), a generated one its volume
        renamed = ({"vessel": f"targets[{i}].vessel"}
                   | ({"coolant": f"targets[{i}].coolant"} if own_coolant is not None else {})
                   if isinstance(target, Vessel) else {"vessel": f"targets[{i}].volume"})
        with fields_renamed(renamed):
            scales.append(_target_scale(ref, target, own_coolant, i, rule, coolant_flow_rule, process_temperature,
                                        safety_factor, limits, deadline, warnings, size_jacket))

    # the limit searches and margin bands of every scale together: one vectorised pass serves all scales
    results = [make(check=check) for (_, make), check in zip(scales, finish_checks([p for p, _ in scales], deadline))]
    first = results[0].check
    largest_target = max((s.volume for s in results), default=ref.volume)
    upper = max(ref.volume * SEARCH_RATIO, 10.0 * largest_target)
    family_rule = "constant_speed" if rule == "as_given" else rule
    largest, beyond, message, switches = _family_search(ref, family_rule, coolant_flow_rule, safety_factor, upper,
                                                        first, warnings, deadline)
    return ScaleUp(tuple(results), largest, beyond, upper, message, switches, rule, coolant_flow_rule, safety_factor,
                   warnings, check_cautions(heat_release))
