"""Fleet screening: one process step checked in many vessels, each with its own coolant, ranked.

The question a plant engineer asks most: which of my vessels can run this step, and at what dosing time?
Each candidate gets the full cooling check (``calc.checks.cooling_check``, many vessels at once); candidates that cannot take
the step at all (the charge does not fit, a correlation's input is impossible) keep their reason instead of
a verdict. Ranking: adequate before inadequate, then by margin, largest first (no net load = unbounded
margin first); candidates without a verdict come last, in the order given.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Callable

from calc.checks.cooling_check import CheckCase, CoolingCheck, cooling_checks
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
#: Vessels checked together (one batch of :func:`calc.checks.cooling_check.cooling_checks`); the time budget is
#: looked at between batches, and a batch it stops is reported as not evaluated.
BATCH = 50


def _alone(case: CheckCase, safety_factor: float, deadline: Deadline) -> Any:
    try:
        return cooling_checks([case], safety_factor, deadline=deadline)[0]
    except CalculationError as error:
        return error


def screen(candidates: list[Candidate], charge: Charge, process_temperature: float, heat_release: HeatRelease,
           safety_factor: float, deadline: Deadline = NEVER,
           progress: Callable[[int, int], None] | None = None) -> Screening:
    """Cooling check of the step in every candidate; once ``deadline`` passes, the rest are not evaluated.

    The checks run in batches of :data:`BATCH` vessels (``cooling_checks``: the limit searches and margin
    bands of a batch on the vectorised network together); each row equals the cooling check of its
    vessel alone. ``progress(done, total)`` is called after each batch (a job reports it).
    """
    rows: list[ScreeningRow | None] = [None] * len(candidates)
    ready = []
    for index, candidate in enumerate(candidates):
        if candidate.problem is not None or candidate.vessel is None or candidate.coolant is None:
            rows[index] = ScreeningRow(candidate.key, None, candidate.problem or ("vessel", "incomplete"), True)
        else:
            ready.append(index)
    complete = True
    for start in range(0, len(ready), BATCH):
        batch = ready[start:start + BATCH]
        answers: list[CoolingCheck | InputError | CalculationError] = []
        cases = [CheckCase(candidates[i].vessel, charge, candidates[i].coolant,  # type: ignore[arg-type]
                           process_temperature, heat_release) for i in batch]
        if complete and not deadline.expired():
            try:
                try:
                    answers = cooling_checks(cases, safety_factor, deadline=deadline)
                except CalculationError:  # a search that failed the batch: each vessel alone, its own error kept
                    answers = [_alone(case, safety_factor, deadline) for case in cases]
            except OutOfTime:
                answers = []
        if not answers:
            complete = False
            for i in batch:
                rows[i] = ScreeningRow(candidates[i].key, None, NOT_EVALUATED, False)
            continue
        for i, answer in zip(batch, answers):
            if isinstance(answer, InputError):
                rows[i] = ScreeningRow(candidates[i].key, None, (answer.field, answer.message), True)
            elif isinstance(answer, CalculationError):
                rows[i] = ScreeningRow(candidates[i].key, None, ("(calculation)", str(answer)), True)
            else:
                rows[i] = ScreeningRow(candidates[i].key, answer, None, True)
        if progress is not None:
            progress(min(start + BATCH, len(ready)), len(ready))
    return Screening(tuple(rank([row for row in rows if row is not None])), safety_factor, complete)
