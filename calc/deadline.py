"""The clock every calculation runs on: a deadline passed down into the loops that can take long.

A caller (the API, a script) makes one :class:`Deadline` per piece of work and passes it to the
calculation; the loops that repeat expensive steps (the scales of a scale-up, the family search, the
solved limits of a cooling check, the right-hand side of a simulation) call :meth:`Deadline.check`,
which raises :class:`OutOfTime` once the time is up or the caller has gone away. A simulation's own
wall-time budget (``calc.safety.tank_model.Budget.wall_time``) is this same clock, cut shorter with
:meth:`Deadline.within`. No deadline (:data:`NEVER`) is the default, so library use is unchanged.
"""
from __future__ import annotations

import math
import time
from typing import Callable

#: Seconds between two calls of a deadline's ``cancelled`` probe (it may cost a system call).
PROBE_INTERVAL = 0.25


class OutOfTime(Exception):
    """The work's deadline passed, or its caller went away, before the work was done."""

    def __init__(self, cancelled: bool = False):
        super().__init__("the caller went away" if cancelled else "the time budget was used up")
        self.cancelled = cancelled


class Deadline:
    """A point in monotonic time, and optionally a probe that says the caller has gone away.

    >>> d = Deadline.after(60.0)
    >>> d.expired(), 59.0 < d.remaining() <= 60.0
    (False, True)
    >>> Deadline.after(0.0).expired(), NEVER.remaining()
    (True, inf)
    >>> Deadline.after(60.0).within(1.0).remaining() <= 1.0
    True
    """

    __slots__ = ("at", "_cancelled", "_next_probe", "_gone")

    def __init__(self, at: float = math.inf, cancelled: Callable[[], bool] | None = None):
        self.at = at  # time.monotonic() value
        self._cancelled = cancelled
        self._next_probe = 0.0
        self._gone = False

    @classmethod
    def after(cls, seconds: float, cancelled: Callable[[], bool] | None = None) -> "Deadline":
        return cls(time.monotonic() + seconds, cancelled)

    def within(self, seconds: float) -> "Deadline":
        """This deadline, or ``seconds`` from now if that comes sooner; the same caller probe."""
        sooner = Deadline(min(self.at, time.monotonic() + seconds), self._cancelled)
        sooner._gone = self._gone
        return sooner

    def remaining(self) -> float:
        """Seconds left (negative once passed; inf without a deadline)."""
        return self.at - time.monotonic() if math.isfinite(self.at) else math.inf

    def gone(self) -> bool:
        """True once the probe has said the caller went away (asked at most every PROBE_INTERVAL s)."""
        if self._gone or self._cancelled is None:
            return self._gone
        now = time.monotonic()
        if now >= self._next_probe:
            self._next_probe = now + PROBE_INTERVAL
            self._gone = bool(self._cancelled())
        return self._gone

    def expired(self) -> bool:
        return time.monotonic() >= self.at or self.gone()

    def check(self) -> None:
        """Raise :class:`OutOfTime` when the time is up or the caller has gone away."""
        if time.monotonic() >= self.at:
            raise OutOfTime(False)
        if self.gone():
            raise OutOfTime(True)


#: No deadline: the work runs to its end.
NEVER = Deadline()
