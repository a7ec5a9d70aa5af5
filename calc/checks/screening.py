"""Fleet screening: one process step checked in many vessels, each with its own coolant, ranked.

The question a plant engineer asks most: which of my vessels can run this step, and at what dosing time?
Each candidate gets the full cooling check (``calc.checks.cooling_check``); candidates that cannot take
the step at all (the charge does not fit, a correlation's input is impossible) keep their reason instead of
a verdict. Ranking: adequate before inadequate, then by margin, largest first (no net load = unbounded
margin first); candidates without a verdict come last, in the order given.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from calc.checks.cooling_check import CoolingCheck, cooling_check
from calc.checks.heat_load import HeatRelease
from calc.deadline import NEVER, Deadline, OutOfTime
from calc.validity import CalculationError, InputError
from calc.vessel.model import Charge, Coolant, Vessel


@dataclass(frozen=True)
class Candidate:
    """One vessel to screen: ``key`` identifies it to the caller; ``vessel``/``coolant`` may be None when the
    caller could not build them, with ``problem`` saying why."""

    key: Any
    vessel: Vessel | None
    coolant: Coolant | None
    problem: tuple[str, str] | None = None  # (field, message)


@dataclass(frozen=True)
class ScreeningRow:
    key: Any
    check: CoolingCheck | None
    problem: tuple[str, str] | None  # (field, message) when there is no verdict
    evaluated: bool  # False: not reached within the time budget
    rank: int = 0


@dataclass(frozen=True)
class Screening:
    rows: tuple[ScreeningRow, ...]
    safety_factor: float
    complete: bool  # every candidate evaluated within the budget


def _order(row: ScreeningRow) -> tuple[int, float]:
    if row.check is None:
        return (2, 0.0)
    margin = math.inf if row.check.margin is None else row.check.margin
    return (0 if row.check.adequate else 1, -margin)


def rank(rows: list[ScreeningRow]) -> list[ScreeningRow]:
    """Rows in ranking order with ``rank`` 1, 2, ... (stable: ties keep the given order)."""
    ordered = sorted(rows, key=_order)
    return [ScreeningRow(r.key, r.check, r.problem, r.evaluated, index + 1) for index, r in enumerate(ordered)]


NOT_EVALUATED = ("(budget)", "not evaluated: the screening's time budget was spent before this vessel")


def screen(candidates: list[Candidate], charge: Charge, process_temperature: float, heat_release: HeatRelease,
           safety_factor: float, deadline: Deadline = NEVER) -> Screening:
    """Cooling check of the step in every candidate; once ``deadline`` passes, the rest are not evaluated."""
    rows: list[ScreeningRow] = []
    complete = True
    for candidate in candidates:
        if candidate.problem is not None or candidate.vessel is None or candidate.coolant is None:
            rows.append(ScreeningRow(candidate.key, None, candidate.problem or ("vessel", "incomplete"), True))
            continue
        if not complete or deadline.expired():
            complete = False
            rows.append(ScreeningRow(candidate.key, None, NOT_EVALUATED, False))
            continue
        try:
            check = cooling_check(candidate.vessel, charge, candidate.coolant, process_temperature, heat_release,
                                  safety_factor, deadline=deadline)
        except OutOfTime:
            complete = False
            rows.append(ScreeningRow(candidate.key, None, NOT_EVALUATED, False))
            continue
        except InputError as error:
            rows.append(ScreeningRow(candidate.key, None, (error.field, error.message), True))
            continue
        except CalculationError as error:
            rows.append(ScreeningRow(candidate.key, None, ("(calculation)", str(error)), True))
            continue
        rows.append(ScreeningRow(candidate.key, check, None, True))
    return Screening(tuple(rank(rows)), safety_factor, complete)
