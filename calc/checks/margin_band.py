"""Margin band: the cooling margin recomputed over the published alternatives of every resistance.

The nominal margin uses one correlation per resistance. The published alternatives disagree by more
than the safety factor usually allows for (``calc.films.selection``), so every check also reports the
spread of the margin over them: an ensemble, each member one solve of the heat-transfer network
(all members in one pass of ``calc.network.vectorised.solve_many``, the network's public ensemble entry,
or in the limit searches' passes of a check; the joint members in the next) with one resistance's
correlation replaced. A member's network is the nominal one with its correlations swapped
(``calc.network.heat_transfer.with_correlations``: the contents' properties, fill and agitation do not
depend on them):

* process side at the wall: every other published constant set of the impeller
  (``calc.films.process_side.wall_alternatives``); where none is published, the constant a times
  1 -+ CONSTANT_SCATTER (the spread between handbooks, common practice, no source);
* process side at coils: every other published constant set (``calc.films.process_side.coil_alternatives``);
  where none is published, a times 1 -+ CONSTANT_SCATTER;
* service side: the other annular-jacket correlation; the other channel treatment (half pipe, spiral
  baffle); the other coil-tube turbulent correlation (coils, curved channels);
* process-side fouling: the stated resistance doubled and a clean wall (``FOULING_MEMBERS``), labelled
  ``process_fouling``. Fouling is an input, not a correlation, but its uncertainty is of the same size
  (a stated 0.0002 m2 K/W is 20 % of 1/U at U = 1000 W/(m2 K)) and it moves with the product, not the
  vessel: a margin that vanishes when the wall fouls twice as much as assumed is not one to defend. Only when
  the stated process fouling is above zero (a clean wall stated has nothing to vary: state the fouling you
  expect), and not with a calibration (the measurement includes the fouling of its day);
* two joint members: the alternatives that lowered the margin most for each resistance, all together,
  and those that raised it most (only when more than one resistance moved that way).

``low`` and ``high`` are the extremes over the members and the nominal margin, so the band always
contains the nominal margin; ``low_set_by``/``high_set_by`` name the alternatives. The verdict keeps its
meaning (nominal margin >= safety factor); the band is reported beside it, and ``statement`` says
plainly when the verdict holds at the nominal margin but not across the band.

With a calibration (a vessel's own fitted process constant and remaining resistance, or a measured UA)
the members are the ends of the fit's 95 % intervals instead (``basis = "calibration"``); for a measured UA,
the ends of the measurement's interval under each coolant-side correlation of the measured surface, each
with the process factor backed out under it (``calc.fits.single_point``).

The heat load does not depend on the correlations (the agitator's power does not), so each member's
margin is its duty over the nominal load. Members' warnings are not repeated: each alternative's range
warnings appear when it is chosen alone.
"""
from __future__ import annotations

import math
from collections.abc import Generator
from dataclasses import dataclass, replace

import numpy as np

from calc.films import process_side
from calc.films.selection import CorrelationChoice
from calc.network.heat_transfer import HeatTransferResult, Network, assemble, with_correlations
from calc.network.vectorised import solve_many
from calc.vessel.model import Charge, Coolant, Vessel

#: The fouling members: the stated process-side fouling resistance doubled, and a clean wall (factor 0).
FOULING_MEMBERS = (("doubled", 2.0), ("clean", 0.0))
#: Cooling-check margins of members are capacity / load; these name the resistance a member varies.
RESISTANCES = ("process_wall", "process_coil", "annular_jacket", "channel", "coil_tube", "process_fouling",
               "calibrated_process_constant", "calibrated_remaining_resistance", "calibrated_process_factor")


@dataclass(frozen=True)
class BandMember:
    """One member of the ensemble: which resistance, which alternative, the margin it gives."""

    resistance: str  # one of RESISTANCES, or "joint"
    alternative: str  # the alternative's id; for joint members, the combination
    margin: float  # duty / nominal load (the band is only built for a positive load)
    choice: CorrelationChoice


@dataclass(frozen=True)
class MarginBand:
    """The spread of the margin over the members (None when there is no net load to remove)."""

    low: float | None
    high: float | None
    basis: str  # "published_alternatives" or "calibration"
    low_set_by: str
    high_set_by: str
    holds_across_band: bool  # the verdict is the same at every member
    statement: str
    members: tuple[BandMember, ...]


def _scatter(field: str, base: CorrelationChoice, resistance: str) -> list[tuple[str, str, CorrelationChoice]]:
    value = getattr(base, field)
    return [(resistance, f"constant_x{1 + sign * process_side.CONSTANT_SCATTER:g}",
             replace(base, **{field: value * (1 + sign * process_side.CONSTANT_SCATTER)})) for sign in (-1, 1)]


def published_members(result: HeatTransferResult, vessel: Vessel) -> list[tuple[str, str, CorrelationChoice]]:
    """(resistance, alternative, choice) for every single-resistance member that applies to this vessel."""
    base = vessel.correlations
    members: list[tuple[str, str, CorrelationChoice]] = []
    jacket = result.stream("jacket") is not None
    coils = any(stream.name.startswith("coil") for stream in result.streams)
    jacket_type = vessel.jacket.type if vessel.jacket is not None else None
    calibration = base.calibration
    measured = None if calibration is None or calibration.measurement is None else calibration.measurement.surface
    if measured is not None and calibration is not None and calibration.factor_interval is not None:
        # a measured UA: the factor backed out at each end of the measurement's interval, under the nominal and
        # under each coolant-side alternative of the measured surface (calc.fits.single_point); the measured
        # surface's published alternatives are replaced by these (each reproduces the same measurement)
        name = calibration.measurement.factor_field if calibration.measurement is not None else "process_factor"
        members += [("calibrated_process_factor", f"factor={f:.4g}", base.with_factor(name, f))
                    for f in calibration.factor_interval]
        members += [("calibrated_process_factor", f"factor={f:.4g} with {field}={option}",
                     base.with_factor(name, f).with_service_option(field, option))
                    for field, option, *ends in calibration.alternative_factors for f in ends]
        if measured == "jacket":
            jacket = False
        else:
            coils = False
    if jacket and calibration is not None and measured is None:
        if calibration.process_constant_interval is not None:
            members += [("calibrated_process_constant", f"a={a:.4g}", replace(base, process_constants=calibration.constants(a)))
                        for a in calibration.process_constant_interval if math.isfinite(a) and a > 0]
        if base.remaining_resistance is not None and calibration.remaining_resistance_interval is not None:
            members += [("calibrated_remaining_resistance", f"R={r:.4g}", replace(base, remaining_resistance=r))
                        for r in calibration.remaining_resistance_interval if r >= 0]
    if jacket and (calibration is None or measured is not None):
        options = [key for key in process_side.wall_alternatives(vessel.agitator.impeller) if key != base.process_wall]
        if options:
            members += [("process_wall", key, replace(base, process_wall=key)) for key in options]
        else:
            members += _scatter("process_factor", base, "process_wall")
    if jacket and base.remaining_resistance is None:
        if jacket_type == "annular":
            from calc.films.jacket_side import ANNULAR_CORRELATIONS
            members += [("annular_jacket", key, replace(base, annular_jacket=key))
                        for key in ANNULAR_CORRELATIONS if key != base.annular_jacket]
        elif jacket_type in ("half_pipe", "annular_spiral_baffle"):
            from calc.films.jacket_side import CHANNEL_TREATMENTS
            members += [("channel", key, replace(base, channel=key)) for key in CHANNEL_TREATMENTS
                        if key != base.channel]
    if coils:
        coil_options = [key for key in process_side.coil_alternatives(vessel.agitator.impeller)
                        if key != base.process_coil]
        if coil_options:
            members += [("process_coil", key, replace(base, process_coil=key)) for key in coil_options]
        else:
            members += _scatter("coil_process_factor", base, "process_coil")
    if coils or (jacket and jacket_type in ("half_pipe", "annular_spiral_baffle") and base.channel == "curved"):
        from calc.films.coil_side import COIL_CORRELATIONS
        members += [("coil_tube", key, replace(base, coil_tube=key)) for key in COIL_CORRELATIONS
                    if key != base.coil_tube]
    if (jacket or coils) and calibration is None and vessel.fouling.process > 0.0:
        members += [("process_fouling", label, replace(base, process_fouling_factor=factor))
                    for label, factor in FOULING_MEMBERS]
    return members


def _joint(base: CorrelationChoice, picks: list[BandMember]) -> CorrelationChoice:
    """``base`` with every field each picked member changed (their choices differ from base in one field each)."""
    changes = {}
    for member in picks:
        for name in CorrelationChoice.__dataclass_fields__:
            value = getattr(member.choice, name)
            if value != getattr(base, name):
                changes[name] = value
    return replace(base, **changes)


def margin_band(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float,
                result: HeatTransferResult, load_total: float,
                nominal: float | None, safety_factor: float,
                members: list[tuple[str, str, CorrelationChoice]] | None = None,
                network: Network | None = None) -> MarginBand:
    """The band around ``nominal`` (capacity/load of ``result``); ``members`` default: :func:`published_members`.
    ``network``: the assembled network of ``result`` when the caller has it (the members are built from it)."""
    return margin_bands([band_steps(vessel, charge, coolant, process_temperature, result, load_total, nominal,
                                    safety_factor, members, network)])[0]


#: The steps of one band: yields the member networks of a pass, receives their duties, returns the band.
BandSteps = Generator[list[Network], np.ndarray, MarginBand]


def margin_bands(steps: list[BandSteps]) -> list[MarginBand]:
    """Run several bands together: each pass solves the members of every band in one vectorised call."""
    bands: list[MarginBand | None] = [None] * len(steps)
    asked = band_start(steps, bands)
    while asked:
        networks = [network for batch in asked.values() for network in batch]
        asked = band_step(steps, bands, asked, solve_many(networks).duty if networks else np.zeros(0))
    return [band for band in bands if band is not None]


def band_start(steps: list[BandSteps], bands: list[MarginBand | None]) -> dict[int, list[Network]]:
    """The first networks each band asks for, by band; a band that needs no solve goes straight into ``bands``."""
    return band_step(steps, bands, {i: [] for i in range(len(steps))}, None)


def band_step(steps: list[BandSteps], bands: list[MarginBand | None], asked: dict[int, list[Network]],
              duty: np.ndarray | None) -> dict[int, list[Network]]:
    """Hand each band the duties of the networks it ``asked`` for (in order, concatenated; None to start them) and
    collect what each asks for next; finished bands go into ``bands``."""
    following: dict[int, list[Network]] = {}
    start = 0
    for i, batch in asked.items():
        try:
            following[i] = next(steps[i]) if duty is None else steps[i].send(duty[start:start + len(batch)])
        except StopIteration as done:
            bands[i] = done.value
        start += len(batch)
    return following


def band_steps(vessel: Vessel, charge: Charge, coolant: Coolant, process_temperature: float, result: HeatTransferResult, load_total: float,
               nominal: float | None, safety_factor: float,
               members: list[tuple[str, str, CorrelationChoice]] | None = None,
               network: Network | None = None) -> BandSteps:
    """:func:`margin_band` as steps for :func:`margin_bands` (the members of several checks in one pass).

    Each member's network is ``network`` (assembled here when not given) with the member's correlations
    (:func:`calc.network.heat_transfer.with_correlations`: the state's properties, fill and agitation are the
    nominal network's, the same as assembling the member's vessel)."""
    basis = "published_alternatives" if vessel.correlations.calibration is None else "calibration"
    if members is None:
        members = published_members(result, vessel)
    if nominal is None or load_total <= 0.0:
        return MarginBand(None, None, basis, "", "", True, "no net heat load: nothing needs removing, no band",
                          ())
    nominal_margin: float = nominal

    nominal_network = network

    def cases(batch: list[tuple[str, str, CorrelationChoice]]) -> list[Network]:
        """The networks of ``batch``: solved in one pass of the vectorised network (the ensemble entry)."""
        nonlocal nominal_network
        if nominal_network is None:
            nominal_network = assemble(vessel, charge, coolant, process_temperature)
        return [with_correlations(nominal_network, choice) for _, _, choice in batch]

    def solved_members(batch: list[tuple[str, str, CorrelationChoice]], duty: np.ndarray) -> list[BandMember]:
        return [BandMember(resistance, alternative, float(d) / load_total, choice)
                for (resistance, alternative, choice), d in zip(batch, duty)]

    solved = solved_members(members, (yield cases(members)) if members else np.zeros(0))
    base = vessel.correlations
    joints = []
    for direction in (min, max):
        picks = []
        for resistance in dict.fromkeys(m.resistance for m in solved):
            group = [m for m in solved if m.resistance == resistance]
            best = direction(group, key=lambda m: m.margin)
            if (best.margin < nominal_margin) if direction is min else (best.margin > nominal_margin):
                picks.append(best)
        if len(picks) > 1:
            label = " + ".join(f"{m.resistance}={m.alternative}" for m in picks)
            joints.append(("joint", label, _joint(base, picks)))
    solved += solved_members(joints, (yield cases(joints)) if joints else np.zeros(0))
    margins = [nominal_margin] + [m.margin for m in solved]
    low, high = min(margins), max(margins)

    def named(value: float) -> str:
        member = next((m for m in solved if m.margin == value), None)
        return "the nominal correlations" if member is None else (
            member.alternative if member.resistance == "joint" else f"{member.resistance}={member.alternative}")

    adequate = nominal_margin >= safety_factor
    holds = (low >= safety_factor) if adequate else (high < safety_factor)
    calibration = vessel.correlations.calibration
    what = ("the published alternatives and the fouling range" if basis != "calibration" else
            "the measurement's 95 % interval" if calibration is not None and calibration.measurement is not None
            else "the fit's 95 % intervals")
    if adequate and holds:
        statement = (f"the verdict holds across the band: over {what} the margin stays between {low:.3g} and "
                     f"{high:.3g}, at least the safety factor {safety_factor:g}")
    elif adequate:
        statement = (f"adequate at the nominal margin {nominal_margin:.3g}, but NOT across the band: with "
                     f"{named(low)} the "
                     f"margin is {low:.3g}, below the safety factor {safety_factor:g}. The verdict rests on the "
                     "choice of correlation: measure the vessel's UA (water run, /v1/ua-fit) before relying on it")
    elif holds:
        statement = (f"not adequate at the nominal margin {nominal_margin:.3g}, nor with any of {what} "
                     "(highest "
                     f"{high:.3g} with {named(high)})")
    else:
        statement = (f"not adequate at the nominal margin {nominal_margin:.3g}; with {named(high)} the margin "
                     "would reach "
                     f"{high:.3g}: the verdict rests on the choice of correlation, a measured UA would settle it")
    return MarginBand(low, high, basis, named(low), named(high), holds, statement, tuple(solved))
