"""The coolant's path through each jacket and coil, and its pressure drop (Darcy-Weisbach plus fittings).

    dp = f (L / d_h) rho v^2 / 2  +  sum(K) rho v_K^2 / 2

f from :mod:`calc.hydraulics.friction` (straight channels: Colebrook; coiled channels: Schmidt), L the
path length of one branch, d_h = 4 A / P its hydraulic diameter, v the mean channel velocity; the
fittings (K from :data:`calc.hydraulics.friction.LOSS_COEFFICIENTS`) act on the nozzle velocity where a
nozzle is named, else on the channel velocity. Parallel zones (``passes``) each carry their share of the
flow over their share of the height; the stream's pressure drop is that of one zone. The pressure
drop is between the supply and return connections; elevation cancels in a closed circuit and is left
out. The friction factor is for isothermal flow (no wall-viscosity correction), at the coolant's
mean temperature.

Paths by jacket type:

- ``annular``: the annulus as a straight channel, d_h = 2 gap, L = zone height, axial velocity
  Q / (pi (D_o + gap) gap); the inlet nozzle discharges into the jacket (exit loss, K = 1) and the outlet
  nozzle draws from it (sharp entrance, K = 0.5), both on the nozzle velocity (nozzle = ``inlet_diameter``,
  default the gap, as the film assumes).
- ``annular_spiral_baffle``: a coiled channel pitch x gap (the share of the flow that follows the baffle:
  1 - bypass), L = turns x (pi D_c, pitch) helix length, D_c = D_o + gap; nozzles as above.
- ``half_pipe``: a coiled circular-segment channel (section angle theta), D_c = D_o, per zone; fittings on
  the channel velocity: entrance from the supply header, a 90 degree elbow into and out of the half pipe,
  exit into the return header.
- coils: the tube as a coiled channel, D_c corrected for the pitch; fittings as the half pipe.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from calc.films.jacket_side import DEFAULT_BYPASS_FRACTION, JacketSpec
from calc.hydraulics import friction
from calc.properties import LiquidProperties
from calc.validity import CalcWarning, InputError, Warnings, require_positive
from calc.vessel.geometry import HelicalCoil

HEADER_FITTINGS = ("entrance_sharp", "elbow_90", "elbow_90", "exit")
NOZZLE_FITTINGS = ("exit", "entrance_sharp")


@dataclass(frozen=True)
class FlowPath:
    """One coolant circuit's route, all lengths in m."""

    kind: str  # annular | annular_spiral_baffle | half_pipe | coil
    area: float  # m2, flow section of one branch's channel
    hydraulic_diameter: float  # m
    length: float  # m, path length of one branch
    branches: int = 1  # parallel zones sharing the flow
    curvature_diameter: float | None = None  # m; None for a straight channel
    channel_share: float = 1.0  # share of a branch's flow that follows the channel (spiral baffle: 1 - bypass)
    nozzle_diameter: float | None = None  # m; None: the fittings act on the channel velocity
    fittings: tuple[str, ...] = HEADER_FITTINGS
    roughness: float = 0.0  # m


@dataclass(frozen=True)
class Hydraulics:
    """The pressure drop of one stream with the numbers behind it."""

    pressure_drop: float  # Pa, supply to return
    velocity: float  # m/s, mean channel velocity
    path_length: float  # m, one branch
    reynolds: float  # -, on the hydraulic diameter
    friction_factor: float  # -, Darcy
    friction_loss: float  # Pa
    fittings_loss: float  # Pa
    nozzle_velocity: float | None  # m/s
    regime: str
    correlation: str
    warnings: Warnings = field(default_factory=Warnings)


def velocity_factor(path: FlowPath) -> float:
    """Channel velocity per unit volume flow of the whole stream, 1/m2 (v = factor x Q)."""
    return path.channel_share / (path.branches * path.area)


def pressure_drop(path: FlowPath, mass_flow: float, props: LiquidProperties) -> Hydraulics:
    """Pressure drop [Pa] of ``mass_flow`` [kg/s] of coolant with ``props`` along ``path``.

    Examples
    --------
    Water at 20 degC, 1 kg/s through a 50 mm straight tube 10 m long, no fittings (Darcy-Weisbach):

    >>> water = LiquidProperties(293.15, 998.2, 4184.0, 1.0016e-3, 0.5984)
    >>> tube = FlowPath("coil", math.pi / 4 * 0.05 ** 2, 0.05, 10.0, fittings=())
    >>> r = pressure_drop(tube, 1.0, water)
    >>> round(r.velocity, 4), round(r.reynolds), round(r.pressure_drop)
    (0.5102, 25424, 635)
    """
    rho, mu = props.density, props.viscosity
    volume_flow = mass_flow / rho
    velocity = velocity_factor(path) * volume_flow
    d = path.hydraulic_diameter
    Re = rho * velocity * d / mu
    relative_roughness = path.roughness / d
    warnings = Warnings()
    if path.curvature_diameter is None:
        result = friction.friction_straight(Re, relative_roughness)
    else:
        result = friction.friction_coiled(Re, d / path.curvature_diameter, relative_roughness)
    friction.CORRELATIONS[result.correlation].check(warnings, Re=Re)
    head = 0.5 * rho * velocity ** 2
    friction_loss = result.factor * path.length / d * head
    K = sum(friction.LOSS_COEFFICIENTS[name].K for name in path.fittings)
    nozzle_velocity = None
    if path.nozzle_diameter is not None:
        nozzle_velocity = volume_flow / path.branches / (math.pi / 4.0 * path.nozzle_diameter ** 2)
        fittings_loss = K * 0.5 * rho * nozzle_velocity ** 2
    else:
        fittings_loss = K * head
    return Hydraulics(friction_loss + fittings_loss, velocity, path.length, Re, result.factor, friction_loss,
                      fittings_loss, nozzle_velocity, result.regime,
                      friction.CORRELATIONS[result.correlation].name, warnings)


def jacket_path(jacket: JacketSpec, outer_diameter: float, jacket_height: float) -> FlowPath:
    """The path of a jacket (``calc.films.jacket_side.JacketSpec``) on a shell of ``outer_diameter`` [m]
    covering ``jacket_height`` [m] (split into ``jacket.passes`` zones)."""
    n = jacket.passes
    zone = jacket_height / n
    D_o = outer_diameter
    if jacket.type == "annular":
        gap = require_positive("vessel.jacket.gap", jacket.gap)
        nozzle = jacket.inlet_diameter if jacket.inlet_diameter is not None else gap
        return FlowPath("annular", math.pi * (D_o + gap) * gap, 2.0 * gap, zone, n, None, 1.0, nozzle,
                        NOZZLE_FITTINGS, jacket.roughness)
    if jacket.type == "annular_spiral_baffle":
        gap = require_positive("vessel.jacket.gap", jacket.gap)
        pitch = require_positive("vessel.jacket.baffle_pitch", jacket.baffle_pitch)
        bypass = DEFAULT_BYPASS_FRACTION if jacket.bypass_fraction is None else jacket.bypass_fraction
        d_curve = D_o + gap
        length = zone / pitch * math.hypot(math.pi * d_curve, pitch)
        nozzle = jacket.inlet_diameter if jacket.inlet_diameter is not None else gap
        return FlowPath("annular_spiral_baffle", pitch * gap, 2.0 * pitch * gap / (pitch + gap), length, n,
                        d_curve, 1.0 - bypass, nozzle, NOZZLE_FITTINGS, jacket.roughness)
    if jacket.type == "half_pipe":
        d = require_positive("vessel.jacket.pipe_diameter", jacket.pipe_diameter)
        pitch = require_positive("vessel.jacket.pipe_pitch", jacket.pipe_pitch)
        theta = jacket.pipe_section_angle
        area = d * d / 8.0 * (theta - math.sin(theta))
        perimeter = d * theta / 2.0 + d * math.sin(theta / 2.0)
        length = zone / pitch * math.hypot(math.pi * D_o, pitch)
        return FlowPath("half_pipe", area, 4.0 * area / perimeter, length, n, D_o, 1.0, None, HEADER_FITTINGS,
                        jacket.roughness)
    raise InputError("vessel.jacket.type", f"no coolant path for a jacket of type {jacket.type!r}")


def coil_path(coil: HelicalCoil, roughness: float = 0.0) -> FlowPath:
    """The path of a helical coil (``calc.vessel.geometry.HelicalCoil``): its tube, pitch-corrected curvature
    D_c [1 + (p / (pi D_c))^2] (VDI Heat Atlas, Gc)."""
    d = coil.tube_inner_diameter
    D_c = coil.helix_diameter * (1.0 + (coil.pitch / (math.pi * coil.helix_diameter)) ** 2)
    length = coil.turns * math.hypot(math.pi * coil.helix_diameter, coil.pitch)
    return FlowPath("coil", math.pi / 4.0 * d * d, d, length, 1, D_c, 1.0, None, HEADER_FITTINGS, roughness)


def limit_warnings(hydraulics: Hydraulics, name: str, available_pressure_drop: float | None,
                   maximum_velocity: float | None) -> Warnings:
    """Warnings when a stream's pressure drop or velocity exceeds what the utility allows."""
    warnings = Warnings()
    if available_pressure_drop is not None and hydraulics.pressure_drop > available_pressure_drop * (1 + 1e-9):
        warnings.add(CalcWarning("pressure_drop_exceeds_available",
                                 f"{name}: pressure drop {hydraulics.pressure_drop / 1e5:.3g} bar exceeds the "
                                 f"utility's available {available_pressure_drop / 1e5:.3g} bar: the header cannot "
                                 "push this flow"))
    if maximum_velocity is not None and hydraulics.velocity > maximum_velocity * (1 + 1e-9):
        warnings.add(CalcWarning("velocity_exceeds_maximum",
                                 f"{name}: coolant velocity {hydraulics.velocity:.3g} m/s exceeds the utility's "
                                 f"maximum {maximum_velocity:.3g} m/s"))
    return warnings
