"""The three things every thermal check is about: the vessel, its charge and the coolant.

These are plain descriptions in SI units, assembled by ``schemas`` from a request and consumed by
``calc.heat_transfer`` and the modules built on it. They hold no behaviour beyond resolving the
coolant's mass flow and the charge's volume.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from calc.vessel import geometry
from calc.vessel.agitation import Agitator
from calc.properties import Liquid
from calc.validity import InputError
from calc.films.wall import Fouling, WallSpec


_JACKET_LENGTHS = ("gap", "baffle_pitch", "pipe_diameter", "pipe_pitch", "inlet_diameter")


@dataclass(frozen=True)
class Vessel:
    """A jacketed, agitated vertical vessel. ``jacket`` is a ``calc.service_side.JacketSpec`` or None."""

    shape: geometry.VesselShape
    wall: WallSpec
    agitator: Agitator
    coverage: geometry.JacketCoverage = field(default_factory=geometry.JacketCoverage)
    jacket: object | None = None
    coils: tuple[geometry.HelicalCoil, ...] = ()
    fouling: Fouling = field(default_factory=Fouling)
    name: str = "vessel"

    def scaled(self, factor: float, agitator_speed: float | None = None, name: str | None = None) -> "Vessel":
        """A geometrically similar vessel: every length times ``factor``, wall thickness and fouling kept.

        The jacket's passages (gap, baffle pitch, half-pipe diameter and pitch, inlet nozzle) scale
        with the vessel, so a coolant flow scaled with the area keeps the jacket velocity roughly
        constant. The wall keeps its thickness: it is set by pressure rating, not by similarity
        (common practice, no source). The agitator diameter scales; its speed is ``agitator_speed``.
        """
        agitator = replace(self.agitator, diameter=self.agitator.diameter * factor,
                           speed=self.agitator.speed if agitator_speed is None else agitator_speed)
        jacket = self.jacket
        if jacket is not None:
            lengths = {name: getattr(jacket, name) * factor for name in _JACKET_LENGTHS
                       if getattr(jacket, name, None) is not None}
            jacket = replace(jacket, **lengths)
        return replace(
            self,
            jacket=jacket,
            shape=geometry.scale_shape(self.shape, factor),
            coverage=geometry.scale_jacket(self.coverage, factor),
            coils=tuple(geometry.scale_coil(c, factor) for c in self.coils),
            agitator=agitator,
            name=name or f"{self.name} x{factor:.3g}",
        )


@dataclass(frozen=True)
class Charge:
    """The vessel contents: a liquid and how much of it (volume, or mass converted with the density)."""

    liquid: Liquid
    volume: float | None = None  # m3
    mass: float | None = None  # kg

    def liquid_volume(self, temperature: float) -> float:
        """Liquid volume, m3; a mass is converted with the density at ``temperature``."""
        if self.volume is not None:
            return self.volume
        if self.mass is None:
            raise InputError("charge", "give the charge's volume or mass")
        return self.mass / self.liquid.at(temperature, field="process_temperature").density


@dataclass(frozen=True)
class Coolant:
    """The utility: a liquid, its inlet temperature and its flow through the jacket (and each coil).

    ``flow_kind`` is ``"mass"`` (kg/s) or ``"volume"`` (m3/s, converted with the density at the inlet).
    ``coil_flow`` is the flow through each internal coil, of the same kind; None means the same as
    the jacket flow (a separate supply of equal size).

    What limits the utility (each optional): ``available_pressure_drop`` [Pa] between supply and return
    headers, which every circuit (jacket, each coil) sees in parallel; ``maximum_velocity`` [m/s] in any
    circuit's channel; ``maximum_flow`` [kg/s] the header delivers to all circuits together.
    """

    liquid: Liquid
    inlet_temperature: float  # K
    flow: float
    flow_kind: str = "mass"
    coil_flow: float | None = None
    available_pressure_drop: float | None = None  # Pa
    maximum_velocity: float | None = None  # m/s
    maximum_flow: float | None = None  # all circuits together, of ``maximum_flow_kind``
    maximum_flow_kind: str = "mass"

    @property
    def limited(self) -> bool:
        """Whether any hydraulic limit of the utility is given."""
        return any(v is not None for v in (self.available_pressure_drop, self.maximum_velocity, self.maximum_flow))

    def _mass(self, value: float, field_name: str) -> float:
        if not (math.isfinite(value) and value > 0):
            raise InputError(field_name, f"must be a positive flow, got {value!r}")
        if self.flow_kind == "mass":
            return value
        density = self.liquid.at(self.inlet_temperature, field="coolant.inlet_temperature").density
        return value * density

    def mass_flow(self) -> float:
        """Jacket coolant mass flow, kg/s."""
        return self._mass(self.flow, "coolant.flow")

    def maximum_mass_flow(self) -> float | None:
        """The utility's largest total flow, kg/s, or None when it sets none."""
        if self.maximum_flow is None:
            return None
        return replace(self, flow_kind=self.maximum_flow_kind)._mass(self.maximum_flow, "coolant.maximum_flow")

    def coil_mass_flow(self) -> float:
        """Coolant mass flow through each coil, kg/s."""
        return self._mass(self.flow if self.coil_flow is None else self.coil_flow, "coolant.coil_flow")

    def with_mass_flow(self, mass_flow: float) -> "Coolant":
        """The same coolant at a different jacket mass flow (coil flow scaled in proportion)."""
        ratio = mass_flow / self.mass_flow()
        coil = None if self.coil_flow is None else self.coil_mass_flow() * ratio
        return replace(self, flow=mass_flow, flow_kind="mass", coil_flow=coil)
