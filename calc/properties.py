"""Liquid properties of coolants and vessel contents, from CoolProp or from the caller's own values.

Water uses CoolProp's Helmholtz-energy backend, which implements IAPWS-95 (density, heat capacity),
IAPWS 2008 (viscosity) and IAPWS 2011 (thermal conductivity). Aqueous glycols use CoolProp's
incompressible-liquid tables (MEG, MPG; after Melinder, *Properties of Secondary Working Fluids for
Indirect Systems*, IIR 2010). Pure solvents use CoolProp's reference equations of state and transport
models; only solvents for which CoolProp has all four properties are offered.

Every state is checked against the liquid range before CoolProp is called: below the freezing
(or triple) point, at or above the boiling point at the pressure, or outside a table's mass-fraction
range is an :class:`~calc.validity.InputError` naming the field and the valid range.

Look-ups go through CoolProp's low-level ``AbstractState`` (one per fluid and composition, reused)
and a bounded memo of recent states, because a cooling check evaluates the same few states many times.

Calculations (``Liquid.at`` and ``Liquid.states``, used by the heat-transfer network) read a
:class:`PropertyTable` instead: built on first use from CoolProp over the liquid's whole range, then
interpolated linearly (density, heat capacity and conductivity in T; ln viscosity in -1/T, the Andrade
form, so that viscosity is near-linear on the grid). The grid starts at 0.5 K and halves every interval
whose midpoint, interpolated, differs from CoolProp by more than :data:`TABLE_TOLERANCE` (relative) in
any of the four properties, so the table is accurate to about that everywhere (tests check 1e-4
against CoolProp point by point). The same table serves one state or a numpy array of states, so the
scalar and the vectorised network see identical properties. ``liquid_properties`` (the properties
resource) still answers from CoolProp directly.

Memory is bounded: a table holds at most :data:`TABLE_MAX_POINTS` temperatures (typically 300-1,500)
x 6 float64 arrays, i.e. under 100 kB for a typical liquid, and at most :data:`TABLE_CACHE_SIZE`
tables are kept (least recently used dropped), a few MB in all.
"""
from __future__ import annotations

import math
import threading
from bisect import bisect_right
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any, Sequence

import CoolProp.CoolProp as CP
import numpy as np
import numpy.typing as npt

from calc import arrays
from calc.validity import InputError

STANDARD_PRESSURE = 101325.0  # Pa
#: Relative interpolation error allowed at every interval midpoint of a property table.
TABLE_TOLERANCE = 1e-5
#: Starting grid step of a property table, K.
TABLE_STEP = 0.5
#: Most temperatures one table may hold (bounds memory: 6 arrays of this many float64).
TABLE_MAX_POINTS = 8192
#: A state this close (K) beyond a table's first or last temperature takes the end value.
TABLE_END_HOLD = 0.02
#: Most tables kept at once (least recently used dropped).
TABLE_CACHE_SIZE = 48
#: Most single CoolProp states kept at once (least recently used dropped). An entry (key and
#: LiquidProperties) takes about 390 bytes (measured with tracemalloc), so the cache stays below
#: about 26 MB per worker process.
STATE_CACHE_SIZE = 65_536
GAS_CONSTANT = 8.314462618  # J/(mol K), CODATA 2018 exact value


@dataclass(frozen=True)
class LiquidProperties:
    """Properties of a liquid at one state, SI units."""

    temperature: float  # K
    density: float  # kg/m3
    heat_capacity: float  # J/(kg K)
    viscosity: float  # Pa s
    thermal_conductivity: float  # W/(m K)

    @property
    def prandtl(self) -> float:
        """Prandtl number c_p mu / k, [-]."""
        return self.heat_capacity * self.viscosity / self.thermal_conductivity


@dataclass(frozen=True)
class FluidInfo:
    """One entry of the built-in fluid library."""

    id: str
    name: str
    kind: str  # "pure" or "aqueous_solution"
    backend: str  # CoolProp backend
    coolprop_name: str
    source: str
    mass_fraction_range: tuple[float, float] | None = None


_EOS = "CoolProp reference equation of state and transport models (Bell et al., Ind. Eng. Chem. Res. 53, 2498, 2014)"
_SOLUTION = ("CoolProp incompressible-liquid table after Melinder, Properties of Secondary Working Fluids "
             "for Indirect Systems, IIR 2010")

FLUIDS: dict[str, FluidInfo] = {f.id: f for f in [
    FluidInfo("water", "Water", "pure", "HEOS", "Water",
              "IAPWS-95 (density, heat capacity), IAPWS 2008 (viscosity), IAPWS 2011 (thermal conductivity), "
              "as implemented in CoolProp"),
    FluidInfo("ethylene_glycol", "Aqueous ethylene glycol (MEG)", "aqueous_solution", "INCOMP", "MEG",
              _SOLUTION, (0.0, 0.6)),
    FluidInfo("propylene_glycol", "Aqueous propylene glycol (MPG)", "aqueous_solution", "INCOMP", "MPG",
              _SOLUTION, (0.0, 0.6)),
    FluidInfo("toluene", "Toluene", "pure", "HEOS", "Toluene", _EOS),
    FluidInfo("methanol", "Methanol", "pure", "HEOS", "Methanol", _EOS),
    FluidInfo("ethanol", "Ethanol", "pure", "HEOS", "Ethanol", _EOS),
    FluidInfo("n_heptane", "n-Heptane", "pure", "HEOS", "n-Heptane", _EOS),
    FluidInfo("n_hexane", "n-Hexane", "pure", "HEOS", "Hexane", _EOS),
    FluidInfo("n_octane", "n-Octane", "pure", "HEOS", "n-Octane", _EOS),
    FluidInfo("benzene", "Benzene", "pure", "HEOS", "Benzene", _EOS),
    FluidInfo("o_xylene", "o-Xylene", "pure", "HEOS", "o-Xylene", _EOS),
    FluidInfo("m_xylene", "m-Xylene", "pure", "HEOS", "m-Xylene", _EOS),
    FluidInfo("p_xylene", "p-Xylene", "pure", "HEOS", "p-Xylene", _EOS),
    FluidInfo("ethylbenzene", "Ethylbenzene", "pure", "HEOS", "EthylBenzene", _EOS),
]}

_lock = threading.Lock()


@lru_cache(maxsize=64)
def _state(backend: str, name: str, mass_fraction: float | None) -> Any:  # a CoolProp AbstractState
    state = CP.AbstractState(backend, name)
    if mass_fraction is not None:
        state.set_mass_fractions([mass_fraction])
    return state


def fluid_info(fluid: str, field: str = "fluid") -> FluidInfo:
    """Look up a library fluid by id; unknown ids are an :class:`InputError` listing the known ones."""
    try:
        return FLUIDS[fluid]
    except KeyError:
        raise InputError(field, f"unknown fluid {fluid!r}; known fluids: {', '.join(sorted(FLUIDS))}") from None


@lru_cache(maxsize=256)
def liquid_range(fluid: str, mass_fraction: float | None = None,
                 pressure: float = STANDARD_PRESSURE, pressure_field: str = "pressure") -> tuple[float, float]:
    """Temperatures (K) between which ``fluid`` is a liquid at ``pressure``: (freezing, boiling).

    For pure fluids the lower bound is the triple point and the upper the saturation temperature
    at the pressure (or the critical temperature above the critical pressure). For aqueous
    solutions the lower bound is the solution's freezing point and the upper the table's limit.
    """
    info = fluid_info(fluid)
    with _lock:
        state = _state(info.backend, info.coolprop_name, mass_fraction)
        try:
            if info.kind == "pure":
                low = state.Ttriple()
                if pressure >= state.p_critical():
                    high = state.T_critical()
                else:
                    state.update(CP.PQ_INPUTS, pressure, 0.0)
                    high = state.T()
            else:
                # Probe at the table's upper end, which is liquid for every mass fraction (at the middle of
                # the table, plain water (mass fraction 0) is already frozen).
                state.update(CP.PT_INPUTS, pressure, state.Tmax())
                low = max(state.keyed_output(CP.iT_freeze), state.Tmin())
                high = state.Tmax()
        except ValueError as exc:  # CoolProp: no saturation or table state at this pressure
            raise InputError(pressure_field, f"{info.name} has no liquid range at {pressure:.6g} Pa ({exc})") from None
    if not high > low:
        raise InputError(pressure_field, f"{info.name} has no liquid at {pressure:.6g} Pa: it boils at "
                                         f"{high - 273.15:.2f} degC, below its triple point ({low - 273.15:.2f} degC)")
    return low, high


def _sibling(field: str, name: str) -> str:
    """The request path of ``name`` beside ``field``: ``coolant.mass_fraction`` -> ``coolant.pressure``."""
    return f"{field.rpartition('.')[0]}.{name}" if "." in field else name


def _check_state(info: FluidInfo, temperature: float, mass_fraction: float | None, pressure: float,
                 field: str, fraction_field: str) -> None:
    if info.mass_fraction_range is not None:
        lo, hi = info.mass_fraction_range
        if mass_fraction is None:
            raise InputError(fraction_field, f"{info.name} needs a mass fraction between {lo} and {hi}")
        if not lo <= mass_fraction <= hi:
            raise InputError(fraction_field,
                             f"mass fraction {mass_fraction:g} is outside the table for {info.name}: {lo} to {hi}")
    elif mass_fraction is not None:
        raise InputError(fraction_field, f"{info.name} is a pure fluid; a mass fraction does not apply")
    pressure_field = _sibling(fraction_field, "pressure")
    if not (math.isfinite(pressure) and pressure > 0):
        raise InputError(pressure_field, f"must be a positive number in Pa, got {pressure!r}")
    low, high = liquid_range(info.id, mass_fraction, pressure, pressure_field)
    # The boiling point itself is excluded: CoolProp's PT flash is ill-posed on the saturation line.
    if not (low <= temperature < high - 1e-6):
        raise InputError(
            field,
            f"{temperature - 273.15:.2f} degC is outside the liquid range of {info.name} at "
            f"{pressure / 1e5:.4g} bar: {low - 273.15:.2f} to {high - 273.15:.2f} degC",
        )


def _sample(state: Any, pressure: float, temperature: float) -> tuple[float, float, float, float] | None:
    """Density, heat capacity, viscosity, conductivity from CoolProp at (T, p); None where CoolProp refuses."""
    try:
        state.update(CP.PT_INPUTS, pressure, temperature)
        return state.rhomass(), state.cpmass(), state.viscosity(), state.conductivity()
    except ValueError:
        return None


def _between(t0: float, v0: Sequence[float], t1: float, v1: Sequence[float], t: float
             ) -> tuple[float, float, float, float]:
    """The table's interpolation between two neighbouring points, at ``t`` (the rule :class:`PropertyTable` uses)."""
    w = (t - t0) / (t1 - t0)
    u = (-1.0 / t + 1.0 / t0) / (-1.0 / t1 + 1.0 / t0)
    return (v0[0] + w * (v1[0] - v0[0]), v0[1] + w * (v1[1] - v0[1]),
            math.exp(math.log(v0[2]) + u * (math.log(v1[2]) - math.log(v0[2]))), v0[3] + w * (v1[3] - v0[3]))


@dataclass(frozen=True, eq=False)
class PropertyTable:
    """Liquid properties tabulated over a temperature range, for interpolation (see the module notes)."""

    temperature: np.ndarray  # K, increasing
    density: np.ndarray  # kg/m3
    heat_capacity: np.ndarray  # J/(kg K)
    log_viscosity: np.ndarray  # ln(Pa s)
    conductivity: np.ndarray  # W/(m K)
    inverse_temperature: np.ndarray  # -1/T, 1/K, increasing (the abscissa of ln viscosity)
    _lists: tuple[list[float], ...] | None = field(default=None, repr=False)  # the arrays as lists, for one-state look-ups

    @property
    def span(self) -> tuple[float, float]:
        """First and last tabulated temperature, K."""
        return float(self.temperature[0]), float(self.temperature[-1])

    def states(self, temperature: npt.ArrayLike) -> LiquidProperties:
        """Properties at an array of temperatures (K), as a :class:`LiquidProperties` of arrays.

        Outside the span the end values are held (callers clamp or check first).
        """
        T = np.asarray(temperature, dtype=float)
        # LiquidProperties of arrays, one element per state (its fields are annotated as the scalar case)
        fields: tuple[Any, ...] = (T, self.densities(T), np.interp(T, self.temperature, self.heat_capacity),
                                   self.viscosities(T), np.interp(T, self.temperature, self.conductivity))
        return LiquidProperties(*fields)

    def viscosities(self, temperature: np.ndarray) -> np.ndarray:
        """Viscosity alone at an array of temperatures (K), as in :meth:`states`."""
        return np.asarray(np.exp(np.interp(-1.0 / temperature, self.inverse_temperature, self.log_viscosity)))

    def densities(self, temperature: np.ndarray) -> np.ndarray:
        """Density alone at an array of temperatures (K), as in :meth:`states`."""
        return np.asarray(np.interp(temperature, self.temperature, self.density))

    def state(self, temperature: float) -> LiquidProperties:
        """Properties at one temperature (K), floats: the arithmetic of ``numpy.interp`` (which :meth:`states`
        uses) done in plain Python, which is several times faster for one value."""
        T = float(temperature)
        if self._lists is None:
            object.__setattr__(self, "_lists", tuple(a.tolist() for a in (
                self.temperature, self.density, self.heat_capacity, self.conductivity, self.inverse_temperature,
                self.log_viscosity)))
        assert self._lists is not None
        grid, density, heat_capacity, conductivity, inverse, log_viscosity = self._lists
        return LiquidProperties(T, _interp(T, grid, density), _interp(T, grid, heat_capacity),
                                math.exp(_interp(-1.0 / T, inverse, log_viscosity)), _interp(T, grid, conductivity))


def _interp(x: float, xp: list[float], fp: list[float]) -> float:
    """``numpy.interp(x, xp, fp)`` for one float x (same end rules, same formula)."""
    if x <= xp[0]:
        return fp[0]
    last = len(xp) - 1
    if x >= xp[last]:
        return fp[last]
    j = bisect_right(xp, x) - 1
    if xp[j] == x:
        return fp[j]
    slope = (fp[j + 1] - fp[j]) / (xp[j + 1] - xp[j])
    return slope * (x - xp[j]) + fp[j]


@lru_cache(maxsize=TABLE_CACHE_SIZE)
def property_table(fluid: str, mass_fraction: float | None = None,
                   pressure: float = STANDARD_PRESSURE) -> PropertyTable:
    """The table of a library liquid over its liquid range at ``pressure``, built from CoolProp on first use.

    Starts on a :data:`TABLE_STEP` grid from just above the freezing point to just below the boiling
    point, then halves each interval whose interpolated midpoint is off by more than
    :data:`TABLE_TOLERANCE` (relative, any property), until none is or the table holds
    :data:`TABLE_MAX_POINTS`. States CoolProp refuses (e.g. just above a triple point below the
    melting line) are left out of the table.
    """
    info = fluid_info(fluid)
    low, high = liquid_range(fluid, mass_fraction, pressure)
    a, b = low + 1e-3, high - 1e-2
    grid = np.linspace(a, b, max(int(math.ceil((b - a) / TABLE_STEP)), 1) + 1)
    with _lock:
        state = _state(info.backend, info.coolprop_name, mass_fraction)
        points = {float(t): v for t in grid if (v := _sample(state, pressure, float(t))) is not None}
        ordered = sorted(points)
        pending = list(zip(ordered, ordered[1:]))
        while pending and len(points) < TABLE_MAX_POINTS:
            refine = []
            for t0, t1 in pending:
                mid = 0.5 * (t0 + t1)
                exact = _sample(state, pressure, mid)
                if exact is None or len(points) >= TABLE_MAX_POINTS:
                    continue
                guess = _between(t0, points[t0], t1, points[t1], mid)
                points[mid] = exact
                if max(abs(g / e - 1.0) for g, e in zip(guess, exact)) > TABLE_TOLERANCE:
                    refine += [(t0, mid), (mid, t1)]
            pending = refine
    if len(points) < 2:  # pragma: no cover - every library liquid has a liquid range wider than a step
        raise InputError("fluid", f"{info.name}: CoolProp gives no liquid states at {pressure / 1e5:.4g} bar")
    T = np.array(sorted(points))
    values = np.array([points[t] for t in T])
    for array in (T, values):
        array.flags.writeable = False
    return PropertyTable(T, values[:, 0], values[:, 1], np.log(values[:, 2]), values[:, 3], -1.0 / T)


@lru_cache(maxsize=STATE_CACHE_SIZE)
def _lookup(fluid: str, temperature: float, mass_fraction: float | None, pressure: float) -> LiquidProperties:
    info = FLUIDS[fluid]
    with _lock:
        state = _state(info.backend, info.coolprop_name, mass_fraction)
        state.update(CP.PT_INPUTS, pressure, temperature)
        return LiquidProperties(
            temperature=temperature,
            density=state.rhomass(),
            heat_capacity=state.cpmass(),
            viscosity=state.viscosity(),
            thermal_conductivity=state.conductivity(),
        )


def liquid_properties(fluid: str, temperature: float, mass_fraction: float | None = None,
                      pressure: float = STANDARD_PRESSURE, field: str = "temperature",
                      fraction_field: str = "mass_fraction") -> LiquidProperties:
    """Density, heat capacity, viscosity and conductivity of a library liquid at (T, p).

    Parameters
    ----------
    fluid : str
        Library id (see :data:`FLUIDS`), [-]
    temperature : float
        Temperature, [K]
    mass_fraction : float, optional
        Glycol mass fraction for aqueous solutions, [-]
    pressure : float
        Absolute pressure, [Pa]
    field, fraction_field : str
        Request field names used in an :class:`InputError`.

    Examples
    --------
    Water at 25 degC and 1 atm (IAPWS-95: 997.05 kg/m3):

    >>> round(liquid_properties("water", 298.15).density, 2)
    997.05
    """
    info = fluid_info(fluid)
    if not math.isfinite(temperature):
        raise InputError(field, "must be a finite temperature")
    _check_state(info, temperature, mass_fraction, pressure, field, fraction_field)
    try:
        return _lookup(fluid, float(temperature), mass_fraction, float(pressure))
    except ValueError as exc:  # CoolProp refused a state that passed the range check
        raise InputError(field, f"{info.name}: no liquid properties at this state ({exc})") from None


class Liquid:
    """A liquid whose properties are known as a function of temperature (K).

    ``at`` checks one state and answers with floats; ``states`` answers for an array of temperatures
    already known to be valid (the vectorised network clamps them first), with the same numbers.
    """

    @property
    def name(self) -> str:
        return "liquid"

    def at(self, temperature: float, field: str = "temperature") -> LiquidProperties:  # pragma: no cover
        raise NotImplementedError

    def states(self, temperature: npt.ArrayLike) -> LiquidProperties:  # pragma: no cover
        raise NotImplementedError


@dataclass(frozen=True)
class LibraryLiquid(Liquid):
    """A liquid from the built-in library (CoolProp)."""

    fluid: str
    mass_fraction: float | None = None
    pressure: float = STANDARD_PRESSURE
    fraction_field: str = "mass_fraction"

    @property
    def name(self) -> str:
        info = fluid_info(self.fluid)
        if self.mass_fraction is None:
            return info.name
        return f"{info.name}, {100 * self.mass_fraction:g} % by mass"

    def at(self, temperature: float, field: str = "temperature") -> LiquidProperties:
        """Properties at one state from the liquid's :class:`PropertyTable` (checked against the liquid range)."""
        info = fluid_info(self.fluid)
        if not math.isfinite(temperature):
            raise InputError(field, "must be a finite temperature")
        _check_state(info, temperature, self.mass_fraction, self.pressure, field, self.fraction_field)
        table = self.table()
        low, high = table.span
        # within TABLE_END_HOLD of its ends the table's end values stand (its ends sit 1e-3 K above the
        # freezing and 1e-2 K below the boiling point); further out CoolProp itself gave no state
        if not low - TABLE_END_HOLD <= temperature <= high + TABLE_END_HOLD:
            raise InputError(field, f"{info.name}: no liquid properties at {temperature - 273.15:.2f} degC "
                                    f"(CoolProp's liquid states span {low - 273.15:.2f} to {high - 273.15:.2f} degC)")
        return table.state(temperature)

    def states(self, temperature: npt.ArrayLike) -> LiquidProperties:
        return self.table().states(temperature)

    def table(self) -> PropertyTable:
        return property_table(self.fluid, self.mass_fraction, self.pressure)

    def liquid_range(self) -> tuple[float, float]:
        return liquid_range(self.fluid, self.mass_fraction, self.pressure, _sibling(self.fraction_field, "pressure"))


@dataclass(frozen=True)
class ExplicitLiquid(Liquid):
    """A liquid described by the caller: constant properties, viscosity optionally temperature-dependent.

    Viscosity follows the Andrade form mu(T) = mu_ref * exp[B (1/T - 1/T_ref)] when
    ``viscosity_temperature_coefficient`` (B, in K) and ``reference_temperature`` are given
    (Andrade, Nature 125, 309, 1930). B > 0 means viscosity falls as the liquid warms.
    """

    density: float
    heat_capacity: float
    viscosity: float
    thermal_conductivity: float
    reference_temperature: float | None = None
    viscosity_temperature_coefficient: float = 0.0
    name: str = "liquid (given properties)"

    def viscosity_at(self, temperature: float) -> float:
        """Viscosity at ``temperature`` (K; a float or an array), Pa s."""
        if self.reference_temperature is None or self.viscosity_temperature_coefficient == 0.0:
            return self.viscosity + 0.0 * temperature
        exponent = self.viscosity_temperature_coefficient * (1.0 / temperature - 1.0 / self.reference_temperature)
        return self.viscosity * arrays.exp(arrays.clip(exponent, -50.0, 50.0))

    def states(self, temperature: npt.ArrayLike) -> LiquidProperties:
        T = np.asarray(temperature, dtype=float)
        constant = np.ones_like(T)
        return LiquidProperties(T, self.density * constant, self.heat_capacity * constant,  # type: ignore[arg-type]
                                self.viscosity_at(T), self.thermal_conductivity * constant)  # type: ignore[arg-type]

    def at(self, temperature: float, field: str = "temperature") -> LiquidProperties:
        if not (math.isfinite(temperature) and temperature > 0):
            raise InputError(field, f"must be an absolute temperature above 0 K, got {temperature!r}")
        return LiquidProperties(temperature, self.density, self.heat_capacity,
                                self.viscosity_at(temperature), self.thermal_conductivity)


@dataclass(frozen=True)
class PropertyReport:
    """One state of a library liquid with its liquid range, for the properties resource."""

    fluid: str
    name: str
    pressure: float  # Pa
    mass_fraction: float | None
    state: LiquidProperties
    freezing_point: float  # K, lower end of the liquid range
    boiling_point: float  # K, upper end of the liquid range at the pressure
    source: str


def property_report(fluid: str, temperature: float, mass_fraction: float | None = None,
                    pressure: float = STANDARD_PRESSURE) -> PropertyReport:
    """Properties of ``fluid`` at (T, p) together with its liquid range and source."""
    info = fluid_info(fluid)
    state = liquid_properties(fluid, temperature, mass_fraction, pressure)
    low, high = liquid_range(fluid, mass_fraction, pressure)
    return PropertyReport(fluid, info.name, pressure, mass_fraction, state, low, high, info.source)


def library() -> list[FluidInfo]:
    """The built-in fluids, in a stable order."""
    return list(FLUIDS.values())
