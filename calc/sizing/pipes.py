"""Standard pipe sizes for half-pipe jackets, coils and nozzles.

Outside diameters and wall thicknesses of the nominal pipe sizes (NPS) in ASME B36.10M (welded and
seamless wrought steel pipe, schedule 40) and ASME B36.19M (stainless steel pipe, schedule 10S), in
metres. The values are from memory (the tables in the standards, as commonly reproduced) and are
checked in the tests against the pipe tables of the `fluids` library.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from calc.validity import InputError

SOURCE = "ASME B36.10M (schedule 40) and ASME B36.19M (schedule 10S), from memory"
SCHEDULES = ("40", "10S")


@dataclass(frozen=True)
class PipeSize:
    """One nominal pipe size: outside diameter and wall by schedule, all in m."""

    nps: str
    outer_diameter: float
    walls: dict[str, float]  # schedule -> wall thickness, m

    def wall(self, schedule: str) -> float:
        return self.walls[schedule]

    def inner_diameter(self, schedule: str) -> float:
        return self.outer_diameter - 2.0 * self.walls[schedule]


def _size(nps: str, od_mm: float, sch40_mm: float, sch10s_mm: float) -> PipeSize:
    return PipeSize(nps, od_mm / 1e3, {"40": sch40_mm / 1e3, "10S": sch10s_mm / 1e3})


#: NPS -> size. OD and walls in mm: ASME B36.10M (Sch 40) and B36.19M (Sch 10S), from memory.
PIPE_SIZES: dict[str, PipeSize] = {s.nps: s for s in (
    _size("1/2", 21.3, 2.77, 2.11),
    _size("3/4", 26.7, 2.87, 2.11),
    _size("1", 33.4, 3.38, 2.77),
    _size("1-1/4", 42.2, 3.56, 2.77),
    _size("1-1/2", 48.3, 3.68, 2.77),
    _size("2", 60.3, 3.91, 2.77),
    _size("2-1/2", 73.0, 5.16, 3.05),
    _size("3", 88.9, 5.49, 3.05),
    _size("4", 114.3, 6.02, 3.05),
    _size("5", 141.3, 6.55, 3.40),
    _size("6", 168.3, 7.11, 3.40),
    _size("8", 219.1, 8.18, 3.76),
)}


def pipe_size(nps: str, field: str = "nps") -> PipeSize:
    """The size ``nps`` ("2", "2-1/2", ...), or an :class:`InputError` naming ``field``.

    >>> pipe_size("2").inner_diameter("40")
    0.05248
    """
    try:
        return PIPE_SIZES[nps]
    except KeyError:
        raise InputError(field, f"unknown nominal pipe size {nps!r}; known: {', '.join(PIPE_SIZES)}") from None


def nozzle_for(volume_flow: float, velocity: float) -> PipeSize:
    """The smallest schedule-40 size whose bore carries ``volume_flow`` [m3/s] at no more than ``velocity``
    [m/s] (the largest size when none does)."""
    for size in PIPE_SIZES.values():
        if volume_flow / (math.pi / 4.0 * size.inner_diameter("40") ** 2) <= velocity:
            return size
    return list(PIPE_SIZES.values())[-1]
