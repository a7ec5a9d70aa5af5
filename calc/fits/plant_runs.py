"""Plant runs as the requests describe them: the charge and coolant of a logged run, its UA and U.

Glue between a request and :mod:`calc.fits.ua_fit` / :mod:`calc.fits.wilson`: properties of a library
fluid at the run's mean temperature (CoolProp, via :mod:`calc.properties`), the charge mass from its
volume, the coolant mass flow from a volume flow, and U = UA / A with the heat-transfer area of the
vessel at the run's fill (:mod:`calc.vessel.geometry`).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from calc.cautions import FITS
from calc.fits.ua_fit import UAFit, fit_ua
from calc.fits.wilson import WilsonPlot, wilson_plot
from calc.validity import InputError
from calc.vessel import geometry
from calc.vessel.agitation import reynolds_impeller
from calc.vessel.model import Vessel


@dataclass(frozen=True)
class RunLiquid:
    """A liquid of a run: a library liquid (``calc.properties``) or explicit numbers (SI, may be None)."""

    liquid: Any = None  # a calc.properties liquid (anything with .at(temperature, field=...)) or None
    heat_capacity: float | None = None
    density: float | None = None
    viscosity: float | None = None
    thermal_conductivity: float | None = None

    def properties(self, temperature: float, field: str) -> dict[str, Any]:
        """Properties by name, SI; an explicit liquid's missing ones are None (the schemas require what a use needs)."""
        if self.liquid is not None:
            props = self.liquid.at(temperature, field=field)
            return {"heat_capacity": props.heat_capacity, "density": props.density, "viscosity": props.viscosity,
                    "thermal_conductivity": props.thermal_conductivity}
        return {"heat_capacity": self.heat_capacity, "density": self.density, "viscosity": self.viscosity,
                "thermal_conductivity": self.thermal_conductivity}


@dataclass(frozen=True)
class RunCharge:
    liquid: RunLiquid
    mass: float | None = None  # kg
    volume: float | None = None  # m3

    def mass_and_heat_capacity(self, temperature: float) -> tuple[float, float]:
        props = self.liquid.properties(temperature, "charge.fluid")
        mass = self.mass if self.mass is not None else self.volume * props["density"]
        return mass, props["heat_capacity"]

    def volume_at(self, temperature: float) -> float:
        if self.volume is not None:
            return self.volume
        density: float | None = self.liquid.properties(temperature, "charge.fluid")["density"]
        if density is None:
            raise InputError("charge.density", "needed to find the fill (and the area) from the charge's mass")
        assert self.mass is not None  # a charge gives its volume or its mass (the schema requires one)
        return self.mass / density


@dataclass(frozen=True)
class RunCoolant:
    liquid: RunLiquid
    flow: float
    flow_kind: str = "mass"  # or "volume"

    def rate(self, temperature: float) -> tuple[float, float]:
        """(mass flow kg/s, heat capacity J/(kg K)) at ``temperature``."""
        props = self.liquid.properties(temperature, "coolant.fluid")
        mass_flow = self.flow if self.flow_kind == "mass" else self.flow * props["density"]
        return mass_flow, props["heat_capacity"]


@dataclass(frozen=True)
class RunFit:
    """A logged run's UA fit, and U where the vessel gives the heat-transfer area at the run's fill."""

    fit: UAFit
    area: float | None  # m2
    overall_coefficient: float | None  # W/(m2 K)
    overall_coefficient_interval: tuple[float, float] | None
    cautions: tuple[str, ...] = FITS


def fit_run(time: Sequence[float], contents: Sequence[float], inlet: Sequence[float], charge: RunCharge, mode: str,
            outlet: Sequence[float] | None = None, coolant: RunCoolant | None = None, vessel: Vessel | None = None,
            shaft_power: float = 0.0, heat_loss: float = 0.0) -> RunFit:
    """UA of a logged run (:func:`calc.fits.ua_fit.fit_ua`), and U when the vessel is given."""
    mean = float(np.mean(contents))
    mass, heat_capacity = charge.mass_and_heat_capacity(mean)
    flow = coolant_cp = None
    if coolant is not None:
        flow, coolant_cp = coolant.rate(float(np.mean(inlet)))
    fit = fit_ua(time, contents, inlet, mass, heat_capacity, mode, outlet, flow, coolant_cp, shaft_power, heat_loss)
    if vessel is None:
        return RunFit(fit, None, None, None)
    area = geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=charge.volume_at(mean)).heat_transfer_area
    if not area > 0:
        raise InputError("vessel", "the charge wets no heat-transfer area of this vessel")
    return RunFit(fit, area, fit.ua / area, (fit.ua_interval[0] / area, fit.ua_interval[1] / area))


@dataclass(frozen=True)
class WilsonRuns:
    """A Wilson plot of runs at several speeds, with each run's U and the area it refers to."""

    plot: WilsonPlot
    overall_coefficients: np.ndarray
    area: float
    cautions: tuple[str, ...] = FITS

    @property
    def calibration(self) -> dict[str, Any]:
        """The plot's constants as a request's ``calibration`` takes them (SI, the API's default units)."""
        plot = self.plot
        return {"process_constant": plot.process_constant,
                "process_constant_interval": list(plot.process_constant_interval),
                "exponent": plot.exponent, "prandtl_exponent": plot.prandtl_exponent,
                "remaining_resistance": plot.remaining_resistance,
                "remaining_resistance_interval": list(plot.remaining_resistance_interval)}


def wilson_from_runs(vessel: Vessel, charge: RunCharge, process_temperature: float, runs: list[dict[str, Any]],
                     coolant: RunCoolant | None = None, exponent: float = 2.0 / 3.0,
                     prandtl_exponent: float = 1.0 / 3.0) -> WilsonRuns:
    """Wilson plot of runs given as U, UA or logged series at several speeds (rev/s)."""
    props = charge.liquid.properties(process_temperature, "charge.fluid")
    for name in ("density", "viscosity", "thermal_conductivity", "heat_capacity"):
        if props[name] is None:
            raise InputError(f"charge.{name}", "needed for the Reynolds and Prandtl numbers of the runs")
    area = geometry.fill(vessel.shape, vessel.coverage, vessel.coils,
                         volume=charge.volume_at(process_temperature)).heat_transfer_area
    U = []
    for index, run in enumerate(runs):
        if run.get("overall_coefficient") is not None:
            U.append(run["overall_coefficient"])
        elif run.get("ua") is not None:
            U.append(run["ua"] / area)
        else:
            series = run["series"]
            try:
                fitted = fit_run(series["time"], series["contents_temperature"], series["coolant_inlet_temperature"],
                                 charge, run.get("mode", "cooling"), series.get("coolant_outlet_temperature"),
                                 coolant, vessel)
            except InputError as error:
                raise InputError(f"runs[{index}].{error.field}", error.message) from None
            U.append(fitted.overall_coefficient)
    Re = [reynolds_impeller(props["density"], run["speed"], vessel.agitator.diameter, props["viscosity"])
          for run in runs]
    prandtl = props["heat_capacity"] * props["viscosity"] / props["thermal_conductivity"]
    plot = wilson_plot(Re, U, vessel.shape.diameter, props["thermal_conductivity"], prandtl, exponent,
                       prandtl_exponent)
    return WilsonRuns(plot, np.asarray(U), area)
