"""The largest coolant flow a utility can push through a vessel's circuits.

A utility is limited by the pressure difference between its supply and return headers (every circuit,
the jacket and each coil, sees it in parallel), by a maximum velocity in any channel and by the total
flow it can deliver. The circuits keep their flow ratios (coil flows in proportion to the jacket flow),
so the limit is one number: the largest ``coolant.flow`` (as a mass flow) meeting all three.

The pressure drop rises monotonically with the flow (:mod:`calc.hydraulics.friction` joins the regimes
without jumps), so its limit is the root of dp(m) = available (Brent's method on log m). Properties are
taken at the coolant's inlet temperature: the coldest, most viscous state, so the flow found never
exceeds what the header pushes at the solved mean temperature (conservative).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol, Sequence

from scipy.optimize import brentq

from calc.hydraulics import paths
from calc.properties import LiquidProperties
from calc.vessel.model import Coolant

LIMIT_NAMES = {"available_pressure_drop": "the available pressure difference",
               "maximum_velocity": "the maximum velocity", "maximum_flow": "the maximum flow"}


@dataclass(frozen=True)
class FlowLimit:
    """The largest ``coolant.flow`` [kg/s] within the utility's limits; None when it sets no limit."""

    mass_flow: float | None
    binding: str | None  # which limit binds: a key of LIMIT_NAMES
    stream: str | None  # the circuit where it binds ("jacket", "coil_0"; None for the total flow)

    @property
    def reason(self) -> str:
        """Words for the binding limit: 'the available pressure difference (jacket)'."""
        if self.binding is None:
            return "no utility limit"
        where = f" ({self.stream.replace('_', ' ')})" if self.stream else ""
        return LIMIT_NAMES[self.binding] + where


def _pressure_limit(path: paths.FlowPath, props: LiquidProperties, ratio: float, available: float) -> float:
    def excess(log_flow: float) -> float:
        return math.log(paths.pressure_drop(path, ratio * math.exp(log_flow), props).pressure_drop / available)

    low, high = math.log(1e-9), math.log(1.0)
    while excess(high) < 0.0:  # pressure drop grows at least linearly with the flow: this ends
        low, high = high, high + math.log(10.0)
    while excess(low) > 0.0:
        high, low = low, low - math.log(10.0)
    return math.exp(brentq(excess, low, high, xtol=1e-12, rtol=1e-12))


class _Flowing(Protocol):
    """What the limits read of a stream: a solved :class:`Stream` or an assembled ``StreamModel``."""

    @property
    def name(self) -> str: ...
    @property
    def mass_flow(self) -> float: ...
    @property
    def path(self) -> paths.FlowPath | None: ...


def flow_limit(streams: Sequence[_Flowing], coolant: Coolant) -> FlowLimit:
    """The largest ``coolant.flow`` [kg/s] that keeps every stream (``calc.heat_transfer.Stream``, with its
    path and flow at the given ``coolant.flow``) within the utility's limits.

    >>> from calc.properties import LiquidProperties, ExplicitLiquid
    >>> from calc.network.heat_transfer import Stream
    >>> water = ExplicitLiquid(998.2, 4184.0, 1.0016e-3, 0.5984)
    >>> tube = paths.FlowPath("coil", math.pi / 4 * 0.05 ** 2, 0.05, 10.0, fittings=())
    >>> stream = Stream("coil_0", 1.0, (), None, 293.15, 1, None, tube)
    >>> limit = flow_limit([stream], Coolant(water, 293.15, 1.0, available_pressure_drop=635.0))
    >>> round(limit.mass_flow, 3), limit.binding
    (1.0, 'available_pressure_drop')
    """
    given = coolant.mass_flow()
    best: tuple[float, str, str | None] | None = None

    def consider(flow: float, binding: str, stream: str | None) -> None:
        nonlocal best
        if best is None or flow < best[0]:
            best = (flow, binding, stream)

    maximum = coolant.maximum_mass_flow()
    if maximum is not None:
        total = sum(s.mass_flow for s in streams) or given
        consider(maximum * given / total, "maximum_flow", None)
    if coolant.available_pressure_drop is not None or coolant.maximum_velocity is not None:
        props = coolant.liquid.at(coolant.inlet_temperature, field="coolant.inlet_temperature")
        for stream in streams:
            if stream.path is None:
                continue
            ratio = stream.mass_flow / given
            if coolant.maximum_velocity is not None:
                per_flow = paths.velocity_factor(stream.path) * ratio / props.density
                consider(coolant.maximum_velocity / per_flow, "maximum_velocity", stream.name)
            if coolant.available_pressure_drop is not None:
                consider(_pressure_limit(stream.path, props, ratio, coolant.available_pressure_drop),
                         "available_pressure_drop", stream.name)
    if best is None:
        return FlowLimit(None, None, None)
    return FlowLimit(*best)


def within_limits(streams: Sequence[_Flowing], coolant: Coolant) -> bool:
    """True when the given ``coolant.flow`` keeps every stream within the utility's limits, judged as
    :func:`flow_limit` judges (properties at the inlet temperature): its limit is then at least the given
    flow, and a caller that only cuts flows back need not search for it."""
    maximum = coolant.maximum_mass_flow()
    if maximum is not None and sum(s.mass_flow for s in streams) > maximum:
        return False
    if coolant.available_pressure_drop is None and coolant.maximum_velocity is None:
        return True
    props = coolant.liquid.at(coolant.inlet_temperature, field="coolant.inlet_temperature")
    for stream in streams:
        if stream.path is None:
            continue
        hydraulics = paths.pressure_drop(stream.path, stream.mass_flow, props)
        if coolant.maximum_velocity is not None and hydraulics.velocity > coolant.maximum_velocity:
            return False
        if coolant.available_pressure_drop is not None and hydraulics.pressure_drop > coolant.available_pressure_drop:
            return False
    return True
