"""Vessel and coil walls: materials, conduction through cylindrical layers, fouling, overall U.

Every resistance is referred to the process-side surface (the area the geometry module reports:
the wetted inside area of a jacketed vessel, the outside area of an internal coil), so that
1/U = sum of the resistances and U A uses that one area. A layer between radii a < b, conductivity k,
referred to the area at radius r_ref is R = r_ref ln(b/a) / k; a film or fouling layer at radius r
is R = (1/h or R_f) r_ref / r (Incropera & DeWitt, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
2007, eqs. 3.28 and 11.1-11.5). A flat wall is the limit r -> infinity (``math.inf``).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import NamedTuple, cast

from calc import arrays
from calc.validity import CalcWarning, InputError, Warnings, require_positive

#: Largest Biot number h' t / k of the wall between half-pipe turns for which the one-dimensional fin treatment
#: (:func:`half_pipe_surface_efficiency`) is within 5 % of two-dimensional conduction in the wall. The textbook
#: criterion for a one-dimensional fin is about 0.1 (Incropera & DeWitt, section 3.6, from memory); this limit is set
#: from a finite-difference solution of the conduction across and along the wall (tests/test_wall.py): over NPS 1-1/2
#: to 4 schedule-40 half pipes at 1.25-2 diameters pitch, 316L walls 4-20 mm, h' 200-4000 and coolant films
#: 500-8000 W/(m2 K) (1260 cases), the treatment's U was within -4.1/+4.8 % of the 2-D one up to Bi = 0.15 and
#: first off by more than 5 % at Bi = 0.18; above, it is conservative (U low by up to 26 %: the fins' heat, which
#: already flows along the whole thickness, crosses the wall under the channel again) and never more than 4.8 %
#: optimistic.
FIN_BIOT_LIMIT = 0.15
FIN_BIOT_WARNING = "fin_biot_high"  # one per jacket, whichever of its surfaces exceeds the limit
#: The half-pipe treatment's sources (:func:`half_pipe_surface_efficiency`).
HALF_PIPE_SOURCE = ("Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., 2007, Table 3.4 (straight fin, "
                    "adiabatic tip) and eq. 11.3 (overall surface efficiency), from memory; the fin treatment of the "
                    "wall between half-pipe turns as in Bondy & Lippa, Chem. Eng. 90(7), 62 (1983), from memory")
#: Order of the resistances from the process to the coolant.
LAYERS = ("process_film", "process_fouling", "lining", "wall", "service_fouling", "service_film")


@dataclass(frozen=True)
class Material:
    """A wall material of the built-in library; conductivities at about room temperature."""

    id: str
    name: str
    conductivity: float  # W/(m K)
    source: str
    lining_thickness: float | None = None  # m, default lining on the process side
    lining_conductivity: float | None = None  # W/(m K)
    lining_source: str | None = None


MATERIALS: dict[str, Material] = {m.id: m for m in [
    Material("stainless_316l", "Stainless steel 316L", 13.4,
             "Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., Table A.1, AISI 316 at 300 K "
             "(from memory); the lower of the published values (DIN EN 12524 via the VDI Heat Atlas gives 17), "
             "so the wall resistance errs on the safe side"),
    Material("stainless_304", "Stainless steel 304", 14.9,
             "Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., Table A.1, AISI 304 at 300 K "
             "(from memory)"),
    Material("carbon_steel", "Carbon steel (pressure-vessel grade)", 50.0,
             "DIN EN 12524 (2000), steel, as tabulated in the VDI Heat Atlas, 2nd ed., 2010; pressure-vessel "
             "grades 45-52 W/(m K) (from memory)"),
    Material("alloy_c276", "Nickel alloy C-276 (UNS N10276)", 10.0,
             "producer data sheet for alloy C-276, about 10 W/(m K) at room temperature, 9.8-11 over "
             "20-200 degC (from memory)"),
    Material("nickel_200", "Nickel 200", 70.0,
             "producer data sheet for commercially pure nickel 200, about 70 W/(m K) at room temperature "
             "(from memory; pure nickel is 90.7 at 300 K, Incropera & DeWitt Table A.1)"),
    Material("glass_lined_steel", "Glass-lined carbon steel", 50.0,
             "carbon steel as above (DIN EN 12524 via the VDI Heat Atlas, 2010)",
             lining_thickness=1.5e-3, lining_conductivity=1.0,
             lining_source="enamel 1.0-2.0 mm thick, 1.5 mm typical (from memory); conductivity of soda-lime "
                           "glass 1.0 W/(m K), DIN EN 12524 via the VDI Heat Atlas (2010); published enamel "
                           "values range 0.9-1.2 W/(m K)"),
]}


#: Former ids still accepted for one release, each with a warning: old id -> current id.
DEPRECATED_MATERIAL_IDS = {"hastelloy_c276": "alloy_c276"}


def material(material_id: str, field_name: str = "vessel.wall.material") -> Material:
    """Look up a wall material by id (or a deprecated id); unknown ids are an :class:`InputError`."""
    try:
        return MATERIALS[DEPRECATED_MATERIAL_IDS.get(material_id, material_id)]
    except KeyError:
        raise InputError(field_name, f"unknown material {material_id!r}; known materials: "
                                     f"{', '.join(sorted(MATERIALS))}") from None


@dataclass(frozen=True)
class WallSpec:
    """A wall as the request gives it; None means 'take the library value of the material'.

    ``lining_thickness = 0`` removes the lining of a lined material; a lining on any other material
    needs its conductivity.
    """

    thickness: float  # m, metal only
    material: str = "stainless_316l"
    conductivity: float | None = None  # W/(m K), overrides the library value
    lining_thickness: float | None = None  # m, on the process side
    lining_conductivity: float | None = None  # W/(m K)


@dataclass(frozen=True)
class Fouling:
    """Fouling resistances on each side, each referred to its own surface, m2 K/W."""

    process: float = 0.0
    service: float = 0.0


@dataclass(frozen=True)
class OverallResult:
    """Overall coefficient on the process-side area and its resistances (m2 K/W, same basis)."""

    U: float  # W/(m2 K), referred to the process-side surface
    resistances: dict[str, float]  # name -> m2 K/W, in the order of LAYERS
    controlling: str  # name of the largest resistance
    reference_radius: float  # m, radius of the process-side surface (inf for a flat wall)
    service_radius: float  # m, radius of the service-side surface
    warnings: Warnings = field(default_factory=Warnings)
    #: Half-pipe jackets (:func:`half_pipe_surface_efficiency`): the share of the process-side area the coolant
    #: channel covers, the fin efficiency of the land between turns and the overall surface efficiency; 1 for a
    #: wall the coolant wets all over. The resistances above already include them.
    channel_coverage: float = 1.0
    fin_efficiency: float = 1.0
    surface_efficiency: float = 1.0


@dataclass(frozen=True)
class WallTemperatures:
    """Steady temperatures through the wall for given bulk temperatures on each side."""

    heat_flux: float  # W/m2 on the process-side area, positive from process to coolant
    process_surface: float  # K, surface the process film sees (fouling surface if fouled)
    service_surface: float  # K, surface the service film sees
    interfaces: tuple[tuple[str, float], ...]  # ((name of the layer just crossed, K), ...) from process to coolant


def layer_resistance(inner_radius: float, thickness: float, conductivity: float,
                     reference_radius: float) -> float:
    """Conduction resistance of a cylindrical layer referred to the area at ``reference_radius``.

    R = r_ref ln(1 + t / r_i) / k, tending to t/k for a flat wall (r_i = r_ref -> inf)

    Parameters
    ----------
    inner_radius : float
        Inner radius of the layer, [m]; ``math.inf`` for a flat wall
    thickness : float
        Thickness of the layer, [m]
    conductivity : float
        Thermal conductivity of the layer, [W/(m K)]
    reference_radius : float
        Radius of the surface the resistance is referred to, [m]; ``math.inf`` for a flat wall

    Returns
    -------
    R : float
        Resistance per unit reference area, [m2 K/W]

    Examples
    --------
    3 mm of 316L on a 1 m inside radius, referred to the inside: 0.003/13.4 (1 - 0.0015) m2K/W

    >>> round(layer_resistance(1.0, 0.003, 13.4, 1.0) * 1e4, 4)
    2.2355

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007, eq. 3.28.
    """
    if thickness == 0.0:
        return 0.0
    if math.isinf(inner_radius):
        return thickness / conductivity
    # r_ref ln(1 + t/r_i)/k, written with log1p so that thin walls on large radii stay exact
    return reference_radius * math.log1p(thickness / inner_radius) / conductivity


def _resolve(wall: WallSpec, field_name: str) -> tuple[float, float, float, float, Warnings]:
    """Metal thickness and conductivity, lining thickness and conductivity, with library defaults."""
    mat = material(wall.material, f"{field_name}.material")
    warnings = Warnings()
    if wall.material in DEPRECATED_MATERIAL_IDS:
        warnings.add(CalcWarning("deprecated_material_id",
                                 f"{field_name}.material: {wall.material!r} is the former id of {mat.id!r} and will "
                                 f"be refused in a later release; use {mat.id!r}"))
    require_positive(f"{field_name}.thickness", wall.thickness)
    k = mat.conductivity if wall.conductivity is None else require_positive(f"{field_name}.conductivity",
                                                                            wall.conductivity)
    if wall.conductivity is not None and not 0.5 * mat.conductivity <= k <= 2.0 * mat.conductivity:
        warnings.add(CalcWarning("conductivity_unusual",
                                 f"wall conductivity {k:.4g} W/(m K) differs by more than a factor of 2 from "
                                 f"the library value for {mat.name} ({mat.conductivity:g}); check the unit"))
    t_lining = mat.lining_thickness if wall.lining_thickness is None else wall.lining_thickness
    t_lining = 0.0 if t_lining is None else t_lining
    if not (math.isfinite(t_lining) and t_lining >= 0):
        raise InputError(f"{field_name}.lining_thickness", f"must be a number >= 0, got {t_lining!r}")
    k_lining = mat.lining_conductivity if wall.lining_conductivity is None else wall.lining_conductivity
    if t_lining > 0:
        if k_lining is None:
            raise InputError(f"{field_name}.lining_conductivity",
                             f"{mat.name} has no library lining; give the lining's conductivity")
        require_positive(f"{field_name}.lining_conductivity", k_lining)
    return wall.thickness, k, t_lining, (k_lining or 1.0), warnings


def overall_coefficient(h_process: float, h_service: float, wall: WallSpec, fouling: Fouling | None = None,
                        process_radius: float = math.inf, process_side: str = "inside",
                        field_name: str = "vessel.wall", channel: tuple[float, float] | None = None) -> OverallResult:
    """Overall heat-transfer coefficient through films, fouling, lining and wall (series resistances).

    1/U = 1/h_p + R_f,p + R_lining + R_wall + R_f,s r_p/r_s + (1/h_s) r_p/r_s, each layer term
    r_p ln(b/a)/k, all on the process-side area at radius r_p

    Parameters
    ----------
    h_process : float
        Process-side film coefficient, [W/(m2 K)]
    h_service : float
        Coolant-side film coefficient, [W/(m2 K)]
    wall : WallSpec
        Wall material, thickness and optional lining (the lining faces the process), [-]
    fouling : Fouling, optional
        Fouling resistances on each side, each on its own surface, [m2 K/W]
    process_radius : float
        Radius of the process-side surface: vessel inside radius, or coil tube outside radius, [m];
        ``math.inf`` (default) for a flat wall
    process_side : str
        ``"inside"`` for a jacketed vessel (process inside the cylinder), ``"outside"`` for a coil
        (process outside the tube, coolant inside), [-]
    field_name : str
        Request path of the wall, used in error messages, [-]
    channel : (float, float), optional
        Wetted width and pitch of half-pipe channels on the service side, [m]
        (:func:`half_pipe_surface_efficiency`); None: the coolant wets the whole wall

    Returns
    -------
    OverallResult

    Notes
    -----
    The glass lining alone of a glass-lined vessel (1.5 mm at 1.0 W/(m K)) is 0.0015 m2K/W, so U never
    exceeds about 670 W/(m2 K) whatever the films.

    Examples
    --------
    Flat 316L wall 6 mm, films 1000 and 3000 W/(m2 K), no fouling: 1/U = 1e-3 + 4.478e-4 + 3.333e-4

    >>> r = overall_coefficient(1000.0, 3000.0, WallSpec(0.006, "stainless_316l"))
    >>> round(r.U, 1), r.controlling
    (561.5, 'process_film')

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007,
    section 11.2 (overall coefficient with fouling, eq. 11.5).
    """
    require_positive("process_film", h_process)
    require_positive("service_film", h_service)
    layers, warnings = wall_layers(wall, fouling, process_radius, process_side, field_name, channel)
    return overall_from_layers(h_process, h_service, layers, warnings)


class WallLayers(NamedTuple):
    """What lies between the two films, each on the process-side area (m2 K/W); floats or arrays."""

    process_fouling: float
    lining: float
    wall: float
    service_fouling: float  # already times area_ratio
    area_ratio: float  # process-side over service-side radius (1 for a flat wall)
    reference_radius: float  # m
    service_radius: float  # m
    # half-pipe channels welded on the wall (:func:`half_pipe_surface_efficiency`); defaults: wetted all over
    channel_coverage: float = 1.0  # share of the process-side area under the coolant channel
    land: float = 0.0  # m, half the width of the wall between neighbouring channels (the fin's length)
    fin_conductance: float = 1.0  # W/K, conductivity x thickness of the metal wall (the fin's k t)


def wall_layers(wall: WallSpec, fouling: Fouling | None = None, process_radius: float = math.inf,
                process_side: str = "inside", field_name: str = "vessel.wall",
                channel: tuple[float, float] | None = None) -> tuple[WallLayers, Warnings]:
    """The fixed resistances of :func:`overall_coefficient` (checked once), and the wall's warnings.

    ``channel`` = (wetted width, pitch) [m] of a half-pipe channel welded on the wall (the coolant wets
    only that width of every pitch; :func:`half_pipe_surface_efficiency`); None: wetted all over.
    """
    fouling = Fouling() if fouling is None else fouling
    for side, value in (("process", fouling.process), ("service", fouling.service)):
        if not (math.isfinite(value) and value >= 0):
            raise InputError(f"vessel.fouling.{side}", f"must be a number >= 0, got {value!r}")
    if not (process_radius > 0 and not math.isnan(process_radius)):
        raise InputError("vessel.diameter", f"must be a positive number, got {process_radius!r}")
    thickness, k, t_lining, k_lining, warnings = _resolve(wall, field_name)

    r_p = process_radius
    if process_side == "inside":
        r_lining_end = r_p + t_lining
        r_s = r_lining_end + thickness
        lining = layer_resistance(r_p, t_lining, k_lining, r_p)
        metal = layer_resistance(r_lining_end, thickness, k, r_p)
    elif process_side == "outside":
        r_lining_end = r_p - t_lining
        r_s = r_lining_end - thickness
        if not r_s > 0:
            raise InputError(f"{field_name}.thickness", "wall and lining are thicker than the tube radius")
        lining = layer_resistance(r_lining_end, t_lining, k_lining, r_p)
        metal = layer_resistance(r_s, thickness, k, r_p)
    else:
        raise InputError("process_side", f"unknown option {process_side!r}; known: inside, outside")
    area_ratio = 1.0 if math.isinf(r_p) else r_p / r_s  # service surface to process surface, per area
    coverage, land = 1.0, 0.0
    if channel is not None:
        width, pitch = channel
        coverage, land = min(width / pitch, 1.0), max(pitch - width, 0.0) / 2.0
    return WallLayers(fouling.process, lining, metal, fouling.service * area_ratio, area_ratio, r_p, r_s,
                      coverage, land, k * thickness), warnings


def fin_efficiency_straight(mL: float) -> float:
    """Efficiency of a straight fin of uniform section with an adiabatic tip (floats or arrays).

    eta_f = tanh(mL) / (mL),  m = (h P / (k A_c))^0.5;  eta_f -> 1 as mL -> 0

    Parameters
    ----------
    mL : float
        Fin parameter m times the fin length, [-]

    Returns
    -------
    eta_f : float
        Heat the fin transfers over what it would transfer were it all at its base temperature, [-]

    Notes
    -----
    One-dimensional conduction along the fin: valid while the fin's Biot number h t / k is small
    (below about 0.1, Incropera & DeWitt section 3.6, from memory); beyond that the temperature across the
    fin's thickness varies and the result is approximate (for the wall between half-pipe turns see
    :data:`FIN_BIOT_LIMIT`, checked against two-dimensional conduction; reported by :func:`overall_from_layers`).

    Examples
    --------
    >>> round(fin_efficiency_straight(1.0), 6), fin_efficiency_straight(0.0)
    (0.761594, 1.0)

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007, Table 3.4
    (case B, adiabatic tip) and eq. 3.89 (from memory).
    """
    if arrays.is_array(mL):
        import numpy as np

        x = np.asarray(mL, dtype=float)
        small = x < 1e-6
        return cast(float, np.where(small, 1.0 - x * x / 3.0, np.tanh(x) / np.where(small, 1.0, x)))
    return 1.0 - mL * mL / 3.0 if mL < 1e-6 else math.tanh(mL) / mL


def half_pipe_surface_efficiency(face_resistance: float, layers: WallLayers) -> tuple[float, float]:
    """(fin efficiency of the land, overall surface efficiency) of a wall under half-pipe channels.

    A half-pipe jacket wets only the width w under each turn of pitch p: the coolant film acts on the
    share w/p of the jacketed area, and the wall between turns (the land, p - w wide) passes its heat
    sideways to the channels as a straight fin of the wall's thickness t, fed on its process face and
    adiabatic at mid-land (symmetry between two turns):

        L = (p - w)/2,  m = [h' / (k t)]^0.5,  h' = 1/(1/h_p + R_f,p + R_lining),
        eta_f = tanh(mL)/(mL),  eta_o = w/p + (1 - w/p) eta_f,

    and, referred to the jacketed (process-side) area, the process-face resistances divide by eta_o and the
    wall, the service fouling and the coolant film by w/p (the overall coefficient of a finned wall with
    the overall surface efficiency, Incropera & DeWitt eq. 11.3; the channel's base is the wall under it):

        1/U = (1/h_p + R_f,p + R_lining)/eta_o + (R_wall + R_f,s + 1/h_s)/(w/p).

    :func:`overall_from_layers` reports the process film, fouling and lining at their own values (the
    film's flux then meets the face's mean temperature) and adds the fins' share,
    (1/eta_o - 1)(1/h_p + R_f,p + R_lining), to the wall's resistance: conduction along the wall.

    ``face_resistance`` = 1/h' (floats or arrays). Smooth in the pitch; at p = w (turns touching) eta_o
    = 1 and w/p = 1: the wall is wetted all over. The half pipe's own walls, which also conduct heat into
    the coolant, and conduction along the lining are left out (conservative).

    Examples
    --------
    100 mm wide channels at 140 mm pitch on a 12 mm 316L wall (k t = 0.1608 W/K), h' = 500 W/(m2 K):
    m = (500 / 0.1608)^0.5 = 55.76 1/m, L = 0.02 m, mL = 1.1152, tanh(mL) = 0.8059, eta_f = 0.7226,
    eta_o = 100/140 + (40/140) 0.7226 = 0.9208

    >>> layers = WallLayers(0.0, 0.0, 0.0, 0.0, 1.0, math.inf, math.inf, 100 / 140, 0.02, 13.4 * 0.012)
    >>> [round(x, 4) for x in half_pipe_surface_efficiency(1 / 500, layers)]
    [0.7226, 0.9208]

    References
    ----------
    Incropera, F. P.; DeWitt, D. P. *Fundamentals of Heat and Mass Transfer*, 6th ed. Wiley, 2007, Table 3.4
    and section 11.2, eq. 11.3 (from memory). The fin treatment of the wall between half-pipe turns is
    the one described for half-pipe jackets by Bondy, F.; Lippa, S. "Heat transfer in agitated vessels".
    Chem. Eng. 90(7), 62-71 (1983) (from memory; their chart is not reproduced here).
    """
    fin = fin_efficiency_straight(layers.land * (1.0 / (face_resistance * layers.fin_conductance)) ** 0.5)
    return fin, layers.channel_coverage + (1.0 - layers.channel_coverage) * fin


def overall_from_layers(h_process: float, h_service: float, layers: WallLayers,
                        warnings: Warnings | None = None) -> OverallResult:
    """U from the two films and the fixed layers: 1/U = the sum of the resistances in the order of LAYERS.

    Takes floats (one surface) or arrays (many states at once, ``controlling`` then left empty).
    """
    warnings = Warnings() if warnings is None else warnings
    resistances = {
        "process_film": 1.0 / h_process,
        "process_fouling": layers.process_fouling,
        "lining": layers.lining,
        "wall": layers.wall,
        "service_fouling": layers.service_fouling,
        "service_film": layers.area_ratio / h_service,
    }
    coverage, fin, efficiency = layers.channel_coverage, 1.0, 1.0
    if arrays.is_array(coverage) or coverage < 1.0:  # half-pipe channels: the wall between turns as fins
        face = resistances["process_film"] + layers.process_fouling + layers.lining
        fin, efficiency = half_pipe_surface_efficiency(face, layers)
        # the films and fouling keep their own resistance (the process film's is on the mean surface temperature
        # of the face); the conduction along the lands (fins) joins the wall's, through the covered share
        resistances["wall"] = layers.wall / coverage + (1.0 / efficiency - 1.0) * face
        for name in LAYERS[4:]:
            resistances[name] = resistances[name] / coverage
        biot = layers.wall / face  # h' t / k of the land (t/k is the wall's resistance)
        if not arrays.is_array(biot) and biot > FIN_BIOT_LIMIT and layers.land > 0:
            warnings.add(CalcWarning(FIN_BIOT_WARNING,
                                     f"half-pipe jacket: wall between turns at Biot h t/k above {FIN_BIOT_LIMIT:g}: "
                                     "the one-dimensional fin understates U (by up to about 25 % against "
                                     "two-dimensional conduction: conservative)"))
    total = sum(resistances.values())
    controlling = ""
    if not arrays.is_array(total):
        controlling = max(resistances, key=lambda layer: resistances[layer])
        if controlling in ("lining", "wall"):
            warnings.add(CalcWarning("wall_controlling",
                                     f"the {controlling} is the largest resistance: better films or colder coolant "
                                     "gain little"))
    return OverallResult(1.0 / total, resistances, controlling, layers.reference_radius, layers.service_radius,
                         warnings, coverage, fin, efficiency)


def with_remaining_resistance(result: OverallResult, remaining: float) -> OverallResult:
    """``result`` with the resistances beyond the process film set to a measured total ``remaining`` (m2 K/W).

    A calibration measures the sum only; it is shared over process fouling, lining, wall, service fouling
    and service film in the proportions the published values give, so the wall temperatures stay
    plausible. 1/U = 1/h_process + remaining.
    """
    others = {k: v for k, v in result.resistances.items() if k != "process_film"}
    total = sum(others.values())
    if arrays.is_array(remaining, total):  # many states: NaN marks the surfaces without a calibration
        import numpy as np

        scale = cast(float, np.where(np.isnan(remaining), 1.0, remaining / total))  # an array on this path
        share = {k: v * scale for k, v in others.items()}
    else:
        share = {k: (v / total * remaining if total > 0 else (remaining if k == "wall" else 0.0))
                 for k, v in others.items()}
    resistances = {"process_film": result.resistances["process_film"]} | share
    controlling = "" if arrays.is_array(remaining, total) else max(resistances, key=lambda k: float(resistances[k]))
    return replace(result, U=1.0 / sum(resistances.values()), resistances=resistances, controlling=controlling)


def interface_temperatures(result: OverallResult, process_temperature: float,
                           coolant_temperature: float) -> WallTemperatures:
    """Temperatures at each interface for bulk process and coolant temperatures (steady series conduction).

    q = U (T_p - T_c);  T after each layer = T_p - q (sum of the resistances crossed so far)

    Parameters
    ----------
    result : OverallResult
        From :func:`overall_coefficient`, [-]
    process_temperature : float
        Bulk temperature of the contents, [K]
    coolant_temperature : float
        Bulk (mean) coolant temperature, [K]

    Returns
    -------
    WallTemperatures
        ``process_surface`` and ``service_surface`` are the temperatures at which the wall viscosity of
        each film is evaluated.

    Examples
    --------
    >>> r = overall_coefficient(1000.0, 3000.0, WallSpec(0.006, "stainless_316l"))
    >>> t = interface_temperatures(r, 353.15, 303.15)
    >>> round(t.process_surface - 273.15, 2), round(t.service_surface - 273.15, 2)
    (51.93, 39.36)
    """
    if not arrays.is_array(process_temperature, coolant_temperature):  # arrays: states the network computed
        for name, value in (("process_temperature", process_temperature),
                            ("coolant.temperature", coolant_temperature)):
            if not (math.isfinite(value) and value > 0):
                raise InputError(name, f"must be an absolute temperature above 0 K, got {value!r}")
    flux = result.U * (process_temperature - coolant_temperature)
    crossed = 0.0
    interfaces = []
    for name in LAYERS:
        crossed += result.resistances[name]
        interfaces.append((name, process_temperature - flux * crossed))
    by_name = dict(interfaces)
    return WallTemperatures(flux, by_name["process_film"], by_name["service_fouling"], tuple(interfaces))


def library() -> list[Material]:
    """The built-in materials, in a stable order."""
    return list(MATERIALS.values())
