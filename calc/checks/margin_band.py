"""Margin band: the cooling margin recomputed over the published alternatives of every resistance.

The nominal margin uses one correlation per resistance. The published alternatives disagree by more
than the safety factor usually allows for (``calc.films.selection``), so every check also reports the
spread of the margin over them: an ensemble, each member one solve of the heat-transfer network
(all members in one pass of ``calc.network.vectorised.solve_many``, with the contents, fill and
agitation of the nominal network; the joint members in a second; the bands of many checks together:
``margin_bands``) with one resistance's correlation replaced:

* process side at the wall: every other published constant set of the impeller
  (``calc.films.process_side.wall_alternatives``); where none is published, the constant a times
  1 -+ CONSTANT_SCATTER (the spread between handbooks, common practice, no source);
* process side at coils: a times 1 -+ CONSTANT_SCATTER (one published constant set per impeller);
* service side: the other annular-jacket correlation; the other channel treatment (half pipe, spiral
  baffle); the other coil-tube turbulent correlation (coils, curved channels);
* two joint members: the alternatives that lowered the margin most for each resistance, all together,
  and those that raised it most (only when more than one resistance moved that way).

``low`` and ``high`` are the extremes over the members and the nominal margin, so the band always
contains the nominal margin; ``low_set_by``/``high_set_by`` name the alternatives. The verdict keeps its
meaning (nominal margin >= safety factor); the band is reported beside it, and ``statement`` says
plainly when the verdict holds at the nominal margin but not across the band.

With a calibration (a vessel's own fitted process constant and remaining resistance, or a measured UA)
the members are the ends of the fit's 95 % intervals instead (``basis = "calibration"``).

The heat load does not depend on the correlations (the agitator's power does not), so each member's
margin is its duty over the nominal load. Members' warnings are not repeated: each alternative's range
warnings appear when it is chosen alone.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from calc.films import process_side
from calc.films.selection import CorrelationChoice
from calc.network.heat_transfer import HeatTransferResult, Network, assemble
from calc.network.vectorised import solve_many

#: Cooling-check margins of members are capacity / load; these name the resistance a member varies.
RESISTANCES = ("process_wall", "process_coil", "annular_jacket", "channel", "coil_tube",
               "calibrated_process_constant", "calibrated_remaining_resistance")


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


def published_members(result: HeatTransferResult, vessel) -> list[tuple[str, str, CorrelationChoice]]:
    """(resistance, alternative, choice) for every single-resistance member that applies to this vessel."""
    base = vessel.correlations
    members: list[tuple[str, str, CorrelationChoice]] = []
    jacket = result.stream("jacket") is not None
    coils = any(stream.name.startswith("coil") for stream in result.streams)
    calibration = base.calibration
    if jacket and calibration is not None:
        if calibration.process_constant_interval is not None:
            members += [("calibrated_process_constant", f"a={a:.4g}", replace(base, process_constants=calibration.constants(a)))
                        for a in calibration.process_constant_interval if math.isfinite(a) and a > 0]
        if base.remaining_resistance is not None and calibration.remaining_resistance_interval is not None:
            members += [("calibrated_remaining_resistance", f"R={r:.4g}", replace(base, remaining_resistance=r))
                        for r in calibration.remaining_resistance_interval if r >= 0]
    if jacket and calibration is None:
        options = [key for key in process_side.wall_alternatives(vessel.agitator.impeller) if key != base.process_wall]
        if options:
            members += [("process_wall", key, replace(base, process_wall=key)) for key in options]
        else:
            members += _scatter("process_factor", base, "process_wall")
    if jacket and base.remaining_resistance is None:
        kind = vessel.jacket.type
        if kind == "annular":
            from calc.films.jacket_side import ANNULAR_CORRELATIONS
            members += [("annular_jacket", key, replace(base, annular_jacket=key))
                        for key in ANNULAR_CORRELATIONS if key != base.annular_jacket]
        elif kind in ("half_pipe", "annular_spiral_baffle"):
            from calc.films.jacket_side import CHANNEL_TREATMENTS
            members += [("channel", key, replace(base, channel=key)) for key in CHANNEL_TREATMENTS
                        if key != base.channel]
    if coils:
        members += _scatter("coil_process_factor", base, "process_coil")
    if coils or (jacket and vessel.jacket.type in ("half_pipe", "annular_spiral_baffle") and base.channel == "curved"):
        from calc.films.coil_side import COIL_CORRELATIONS
        members += [("coil_tube", key, replace(base, coil_tube=key)) for key in COIL_CORRELATIONS
                    if key != base.coil_tube]
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


@dataclass(frozen=True)
class BandCase:
    """What :func:`margin_band` takes, for one case of :func:`margin_bands`."""

    vessel: Any
    charge: Any
    coolant: Any
    process_temperature: float
    result: HeatTransferResult
    load_total: float
    nominal: float | None
    safety_factor: float
    members: list[tuple[str, str, CorrelationChoice]] | None = None


def margin_band(vessel, charge, coolant, process_temperature: float, result: HeatTransferResult, load_total: float,
                nominal: float | None, safety_factor: float,
                members: list[tuple[str, str, CorrelationChoice]] | None = None) -> MarginBand:
    """The band around ``nominal`` (capacity/load of ``result``); ``members`` default: :func:`published_members`."""
    return margin_bands([BandCase(vessel, charge, coolant, process_temperature, result, load_total, nominal,
                                  safety_factor, members)])[0]


def _solve(batch: list[tuple[BandCase, str, str, CorrelationChoice]]) -> list[BandMember]:
    """Every member of ``batch`` (of any cases) in one pass of the vectorised network."""
    if not batch:
        return []
    networks: list[Network] = []
    seen: dict = {}
    index = []
    for case, _, _, choice in batch:  # each distinct member once; contents, fill and agitation from the nominal
        vessel = replace(case.vessel, correlations=choice)
        key = (vessel, case.charge, case.coolant, case.process_temperature)
        if key not in seen:
            seen[key] = len(networks)
            networks.append(assemble(vessel, case.charge, case.coolant, case.process_temperature, like=case.result))
        index.append(seen[key])
    duty = solve_many(networks, np.array(index, dtype=int)).duty
    return [BandMember(resistance, alternative, float(d) / case.load_total, choice)
            for (case, resistance, alternative, choice), d in zip(batch, duty)]


def _joints(base: CorrelationChoice, solved: list[BandMember], nominal: float) -> list[tuple[str, str, CorrelationChoice]]:
    """The joint members: the alternatives that lowered the margin most for each resistance, all together, and
    those that raised it most (each only when more than one resistance moved that way)."""
    joints = []
    for direction in (min, max):
        picks = []
        for resistance in dict.fromkeys(m.resistance for m in solved):
            group = [m for m in solved if m.resistance == resistance]
            best = direction(group, key=lambda m: m.margin)
            if (best.margin < nominal) if direction is min else (best.margin > nominal):
                picks.append(best)
        if len(picks) > 1:
            label = " + ".join(f"{m.resistance}={m.alternative}" for m in picks)
            joints.append(("joint", label, _joint(base, picks)))
    return joints


def margin_bands(cases: list[BandCase]) -> list[MarginBand]:
    """The band of every case (any mix of vessels): the single members of all cases in one pass of the
    vectorised network, their joint members in a second; each band as :func:`margin_band` gives it alone."""
    members = [published_members(case.result, case.vessel) if case.members is None else case.members
               for case in cases]
    live = [i for i, case in enumerate(cases) if case.nominal is not None and case.load_total > 0.0]
    singles = _solve([(cases[i], *member) for i in live for member in members[i]])
    solved: dict[int, list[BandMember]] = {}
    for i in live:
        solved[i], singles = singles[:len(members[i])], singles[len(members[i]):]
    joints = {i: _joints(cases[i].vessel.correlations, solved[i], float(cases[i].nominal or 0.0)) for i in live}
    together = _solve([(cases[i], *joint) for i in live for joint in joints[i]])
    for i in live:
        solved[i] = solved[i] + together[:len(joints[i])]
        together = together[len(joints[i]):]
    return [_band(case, solved.get(i)) for i, case in enumerate(cases)]


def _band(case: BandCase, solved: list[BandMember] | None) -> MarginBand:
    basis = "published_alternatives" if case.vessel.correlations.calibration is None else "calibration"
    if solved is None or case.nominal is None:
        return MarginBand(None, None, basis, "", "", True, "no net heat load: nothing needs removing, no band",
                          ())
    nominal_margin: float = case.nominal
    safety_factor = case.safety_factor
    margins = [nominal_margin] + [m.margin for m in solved]
    low, high = min(margins), max(margins)

    def named(value: float) -> str:
        member = next((m for m in solved if m.margin == value), None)
        return "the nominal correlations" if member is None else (
            member.alternative if member.resistance == "joint" else f"{member.resistance}={member.alternative}")

    adequate = nominal_margin >= safety_factor
    holds = (low >= safety_factor) if adequate else (high < safety_factor)
    what = "the fit's 95 % intervals" if basis == "calibration" else "the published alternatives"
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
