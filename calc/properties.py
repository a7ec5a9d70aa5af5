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
"""
from __future__ import annotations

import math
import threading
from dataclasses import dataclass
from functools import lru_cache

import CoolProp.CoolProp as CP

from calc.validity import InputError

STANDARD_PRESSURE = 101325.0  # Pa
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
def _state(backend: str, name: str, mass_fraction: float | None):
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
                 pressure: float = STANDARD_PRESSURE) -> tuple[float, float]:
    """Temperatures (K) between which ``fluid`` is a liquid at ``pressure``: (freezing, boiling).

    For pure fluids the lower bound is the triple point and the upper the saturation temperature
    at the pressure (or the critical temperature above the critical pressure). For aqueous
    solutions the lower bound is the solution's freezing point and the upper the table's limit.
    """
    info = fluid_info(fluid)
    with _lock:
        state = _state(info.backend, info.coolprop_name, mass_fraction)
        if info.kind == "pure":
            low = state.Ttriple()
            if pressure >= state.p_critical():
                high = state.T_critical()
            else:
                try:
                    state.update(CP.PQ_INPUTS, pressure, 0.0)
                except ValueError:  # below the triple-point pressure there is no saturated liquid
                    raise InputError("pressure", f"{pressure:.4g} Pa is below the lowest pressure at which "
                                                 f"{info.name} can be liquid") from None
                high = state.T()
        else:
            state.update(CP.PT_INPUTS, pressure, 0.5 * (state.Tmin() + state.Tmax()))
            low = max(state.keyed_output(CP.iT_freeze), state.Tmin())
            high = state.Tmax()
    return low, high


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
    if not (math.isfinite(pressure) and pressure > 0):
        raise InputError("pressure", f"must be a positive number, got {pressure!r}")
    low, high = liquid_range(info.id, mass_fraction, pressure)
    # The boiling point itself is excluded: CoolProp's PT flash is ill-posed on the saturation line.
    if not (low <= temperature < high - 1e-6):
        raise InputError(
            field,
            f"{temperature - 273.15:.2f} degC is outside the liquid range of {info.name} at "
            f"{pressure / 1e5:.4g} bar: {low - 273.15:.2f} to {high - 273.15:.2f} degC",
        )


@lru_cache(maxsize=65536)
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
    """A liquid whose properties are known as a function of temperature (K)."""

    name: str = "liquid"

    def at(self, temperature: float, field: str = "temperature") -> LiquidProperties:  # pragma: no cover
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
        return liquid_properties(self.fluid, temperature, self.mass_fraction, self.pressure,
                                 field=field, fraction_field=self.fraction_field)

    def liquid_range(self) -> tuple[float, float]:
        return liquid_range(self.fluid, self.mass_fraction, self.pressure)


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
        if self.reference_temperature is None or self.viscosity_temperature_coefficient == 0.0:
            return self.viscosity
        exponent = self.viscosity_temperature_coefficient * (1.0 / temperature - 1.0 / self.reference_temperature)
        return self.viscosity * math.exp(max(min(exponent, 50.0), -50.0))

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
