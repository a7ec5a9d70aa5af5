"""Process-side film coefficients: vessel contents to the jacketed wall and to helical coils.

Both are power laws in the impeller Reynolds number, Nu = a Re^b Pr^c (mu/mu_w)^d times geometry
factors, with constants per impeller from :data:`calc.agitation.IMPELLERS`. The viscosity at the wall
``mu_wall`` is an input: the caller iterates the wall temperature across the resistance network.

Where one impeller has constants for several Reynolds bands, the switch between adjacent bands is
made where the two fits meet if their Re exponents differ (so h stays continuous and rises with
speed). Where they share the exponent and only the constant changes at a published boundary Re_s
(the disc turbine: a = 0.54 below Re = 400, 0.74 above, Coker 2001), switching there would make h jump
by 37 %; instead the two Nusselt numbers are blended over :data:`BLEND_DECADES` of Re centred on Re_s:

    Nu = (1 - w) Nu_lower + w Nu_upper,  w = smoothstep(x) = 3x^2 - 2x^3,
    x = (log10 Re - log10 Re_s) / BLEND_DECADES + 1/2, clipped to [0, 1]

(a choice of coolmargin, not a published fit: it keeps each published value outside the blend band
and h continuous and rising with speed inside it). The band limits are published in ``/v1/impellers``.

Besides the library's default constants (``calc.agitation.IMPELLERS``), :data:`WALL_ALTERNATIVES`
holds the other published constant sets for the vessel wall, each with its source; a request may
choose one (``correlations.process_wall``) and the margin band recomputes the margin with each.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from calc.vessel.agitation import (COKER, HIM, IMPELLERS, LAMINAR_REYNOLDS, MEMORY, TURBULENT_REYNOLDS,
                                   FilmConstants, ImpellerInfo, impeller_info)
from calc.properties import LiquidProperties
from calc.validity import CalcWarning, Correlation, InputError, Warnings, require_positive


def nusselt_agitated_Chilton_Drew_Jebens_1944(Re: float, Pr: float, viscosity_ratio: float, a: float,
                                              b: float, c: float, d: float, H_over_T: float = 1.0,
                                              height_exponent: float = 0.0) -> float:
    """Nusselt number of an agitated vessel's wall or coil, Chilton, Drew & Jebens (1944) form.

    Nu = h T / k = a Re^b Pr^c (mu/mu_w)^d (H/T)^e

    Parameters
    ----------
    Re : float
        Impeller Reynolds number rho N D^2 / mu, [-]
    Pr : float
        Prandtl number of the contents at bulk temperature, [-]
    viscosity_ratio : float
        Bulk to wall viscosity mu/mu_w, [-]
    a, b, c, d : float
        Constants of the impeller and surface (see :data:`calc.agitation.IMPELLERS`), [-]
    H_over_T : float
        Liquid height over tank diameter, [-]
    height_exponent : float
        Exponent e on H/T; -0.15 in the Handbook of Industrial Mixing rows, 0 in Coker's, [-]

    Returns
    -------
    Nu : float
        Nusselt number based on the tank inside diameter, [-]

    Notes
    -----
    The form (Sieder-Tate viscosity correction applied to an agitated vessel) was set by Chilton,
    Drew & Jebens for paddles; the constants and Reynolds ranges for other impellers come from later
    compilations named beside each constant set. Sources differ by 25-30 % for the same impeller.

    Examples
    --------
    Six-blade disc turbine, baffled, a = 0.74, b = 0.67, c = 0.33, d = 0.14 (Coker 2001,
    Table 7-14), Re = 1e5, Pr = 6, isothermal wall: 0.74 * 1e5**0.67 * 6**0.33 = 2992:

    >>> round(nusselt_agitated_Chilton_Drew_Jebens_1944(1e5, 6.0, 1.0, 0.74, 0.67, 0.33, 0.14))
    2992

    References
    ----------
    Chilton, T. H., Drew, T. B., Jebens, R. H., "Heat transfer coefficients in agitated vessels",
    Ind. Eng. Chem. 36 (6), 510-516 (1944).
    """
    Nu: float = a * Re ** b * Pr ** c * viscosity_ratio ** d * H_over_T ** height_exponent
    return Nu


def nusselt_coil_Oldshue_Gretton_1954(Re: float, Pr: float, viscosity_ratio: float, D_over_T: float,
                                      do_over_T: float, a: float, b: float, c: float, d: float,
                                      H_over_T: float = 1.0, height_exponent: float = 0.0) -> float:
    """Nusselt number outside a helical coil in an agitated vessel, Oldshue & Gretton (1954).

    Nu_o = h d_o / k = a Re^b Pr^c (mu/mu_w)^d (H/T)^e [(D/T)/(1/3)]^0.1 [(d_o/T)/0.04]^0.5

    Parameters
    ----------
    Re : float
        Impeller Reynolds number rho N D^2 / mu, [-]
    Pr : float
        Prandtl number of the contents at bulk temperature, [-]
    viscosity_ratio : float
        Bulk to tube-wall viscosity mu/mu_w, [-]
    D_over_T : float
        Impeller diameter over tank diameter, [-]
    do_over_T : float
        Coil tube outer diameter over tank diameter, [-]
    a, b, c, d : float
        Constants of the impeller (disc turbine 0.03, 2/3, 1/3, 0.14), [-]
    H_over_T : float
        Liquid height over tank diameter, [-]
    height_exponent : float
        Exponent e on H/T (-0.15 for the disc turbine, 0 for the propeller), [-]

    Returns
    -------
    Nu_o : float
        Nusselt number based on the tube outer diameter, [-]

    Notes
    -----
    The original paper gives, for a disc turbine, Nu_o = 0.17 Re^0.67 Pr^0.37 (D/T)^0.1 (d_o/T)^0.5
    (from memory); the Handbook of Industrial Mixing restates it about the standard geometry
    D/T = 1/3, d_o/T = 0.04 with a = 0.03: 0.17 (1/3)^0.1 0.04^0.5 = 0.0305, the same within 2 %.
    Baffled vessels; turbulent flow.

    Examples
    --------
    Disc turbine at standard geometry, Re = 1e5, Pr = 6, isothermal wall:
    0.03 * 1e5**(2/3) * 6**(1/3) = 117.5:

    >>> round(nusselt_coil_Oldshue_Gretton_1954(1e5, 6.0, 1.0, 1 / 3, 0.04, 0.03, 2 / 3, 1 / 3, 0.14), 1)
    117.5

    References
    ----------
    Oldshue, J. Y., Gretton, A. T., "Helical coil heat transfer in mixing vessels",
    Chem. Eng. Prog. 50 (12), 615-621 (1954). Restated in Penney, W. R., Atiemo-Obeng, V. A.,
    "Heat Transfer", ch. 14 in Paul, Atiemo-Obeng & Kresta (eds.), Handbook of Industrial Mixing,
    Wiley 2004.
    """
    Nu: float = (a * Re ** b * Pr ** c * viscosity_ratio ** d * H_over_T ** height_exponent
                 * (3.0 * D_over_T) ** 0.1 * (do_over_T / 0.04) ** 0.5)
    return Nu


@dataclass(frozen=True)
class FilmCorrelation(Correlation):
    """A process-side correlation: which length its Nusselt number uses and which geometry it needs."""

    length_scale: str = "tank_diameter"  # or "tube_outer_diameter"
    geometry: tuple[str, ...] = ()
    equation: str = ""  # every factor applied, in the library's symbols (published in /v1/impellers)


CORRELATIONS: dict[str, FilmCorrelation] = {
    "chilton_drew_jebens_1944": FilmCorrelation(
        "Chilton, Drew & Jebens (1944) form", nusselt_agitated_Chilton_Drew_Jebens_1944,
        "Chilton, Drew & Jebens, Ind. Eng. Chem. 36, 510 (1944); constants per impeller as cited",
        {}, "tank_diameter", (),
        "Nu = h T/k = a Re^b Pr^c (mu/mu_w)^d (H/T)^e, Re = rho N D^2/mu, H the liquid height, T the tank "
        "diameter"),
    "oldshue_gretton_1954": FilmCorrelation(
        "Oldshue & Gretton (1954)", nusselt_coil_Oldshue_Gretton_1954,
        "Oldshue & Gretton, Chem. Eng. Prog. 50, 615 (1954), as restated in the Handbook of Industrial "
        "Mixing (2004)", {}, "tube_outer_diameter", ("D_over_T", "do_over_T"),
        "Nu_o = h d_o/k = a Re^b Pr^c (mu/mu_w)^d (H/T)^e [(D/T)/(1/3)]^0.1 [(d_o/T)/0.04]^0.5, d_o the tube "
        "outside diameter"),
}


@dataclass(frozen=True)
class ProcessFilm:
    """A process-side film coefficient and how it was obtained."""

    h: float  # W/(m2 K)
    nusselt: float
    correlation: str  # the equation's name
    constant_a: float
    source: str  # where the constants come from
    constants: FilmConstants
    warnings: Warnings = field(default_factory=Warnings)
    #: What the correlation was called with, but the viscosity ratio, and the length h = Nu k / length uses:
    #: the vectorised network calls the same correlation with an array of wall viscosities.
    arguments: dict[str, float] = field(default_factory=dict, repr=False, compare=False)
    length: float = field(default=1.0, repr=False, compare=False)

    def h_at(self, viscosity_ratio: float, conductivity: float) -> float:
        """h for other bulk-to-wall viscosity ratios (a float or an array) at the same bulk state, [W/(m2 K)]."""
        function = CORRELATIONS[self.constants.correlation].function
        h: float = function(viscosity_ratio=viscosity_ratio, **self.arguments) * conductivity / self.length
        return h


#: Width, in decades of Re, of the blend between two constant sets sharing their Re exponent.
BLEND_DECADES = 1.0


def blend_weight(Re: float, Re_switch: float, decades: float = BLEND_DECADES) -> float:
    """Weight of the upper constant set: smoothstep in log10 Re over ``decades`` centred on ``Re_switch``.

    w = 3x^2 - 2x^3, x = (log10 Re - log10 Re_s)/decades + 1/2 clipped to [0, 1] (a coolmargin choice).

    >>> blend_weight(400.0, 400.0), blend_weight(100.0, 400.0), blend_weight(1500.0, 400.0)
    (0.5, 0.0, 1.0)
    """
    x = min(max((math.log10(Re) - math.log10(Re_switch)) / decades + 0.5, 0.0), 1.0)
    return x * x * (3.0 - 2.0 * x)


def blend_range(Re_switch: float, decades: float = BLEND_DECADES) -> tuple[float, float]:
    """(from, to) Reynolds numbers of the blend around ``Re_switch``."""
    half = 10.0 ** (0.5 * decades)
    return Re_switch / half, Re_switch * half


def switch_reynolds(lower: FilmConstants, upper: FilmConstants) -> tuple[float, bool]:
    """(Re where ``upper`` takes over, blended?): where the fits meet if the Re exponents differ, else
    blended around the published boundary (the two sets then differ only in a, so the blend is one
    constant: a = (1 - w) a_lower + w a_upper)."""
    if upper.b != lower.b:
        return (lower.a / upper.a) ** (1.0 / (upper.b - lower.b)), False
    if (upper.c, upper.d, upper.height_exponent) != (lower.c, lower.d, lower.height_exponent):
        raise ValueError(f"constant sets {lower.source!r} and {upper.source!r} share b but not c, d, e: "
                         "no blend of a alone joins them")  # a library error, caught by the registry test
    if upper.re_low is None:
        raise ValueError(f"constant set {upper.source!r} blends in without a published lower Reynolds number")
    return upper.re_low, True


def weighted_constants(bands: tuple[FilmConstants, ...], Re: float) -> list[tuple[float, FilmConstants]]:
    """The constant sets in force at ``Re`` with their weights (one set, or two inside a blend)."""
    for lower, upper in zip(bands, bands[1:]):
        switch, blended = switch_reynolds(lower, upper)
        if not blended:
            if Re < switch:
                return [(1.0, lower)]
            continue
        low, high = blend_range(switch)
        if Re < low:
            return [(1.0, lower)]
        if Re <= high:
            w = blend_weight(Re, switch)
            return [(1.0 - w, lower), (w, upper)]
    return [(1.0, bands[-1])]


def transitions(bands: tuple[FilmConstants, ...]) -> list[dict[str, float | str]]:
    """Where one constant set hands over to the next: the Re range and how (for the library listing)."""
    out: list[dict[str, float | str]] = []
    for lower, upper in zip(bands, bands[1:]):
        switch, blended = switch_reynolds(lower, upper)
        if blended:
            low, high = blend_range(switch)
            out.append({"re_from": low, "re_to": high, "rule": (
                f"smoothstep blend of the two Nusselt numbers in log10 Re over {BLEND_DECADES:g} decade(s) "
                f"centred on Re = {switch:g}: w = 3x^2 - 2x^3, x = (log10 Re - log10 {switch:g})/{BLEND_DECADES:g} "
                "+ 1/2 (coolmargin's choice, not a published fit)")})
        else:
            out.append({"re_from": switch, "re_to": switch, "rule": (
                f"switch where the two fits meet, Re = {switch:.4g} (different Re exponents), so h is continuous")})
    return out


def _film(info: ImpellerInfo, bands: tuple[FilmConstants, ...], surface: str, Re: float,
          props: LiquidProperties, mu_wall: float, baffled: bool, lengths: dict[str, float],
          geometry: dict[str, float],
          warnings: Warnings, factor: float = 1.0) -> ProcessFilm:
    require_positive("vessel.agitator.speed", Re)
    require_positive("charge.viscosity", mu_wall)
    weighted = weighted_constants(bands, Re)
    constants = max(weighted, key=lambda item: item[0])[1]
    correlation = CORRELATIONS[constants.correlation]
    label = f"{correlation.name}, {info.name}, {surface}"
    warnings.check(label, "Re", Re, bands[0].re_low, bands[-1].re_high)
    correlation.check(warnings, **geometry)
    if bands[0].re_low is None and Re < TURBULENT_REYNOLDS and not info.close_clearance:
        warnings.add(CalcWarning(
            "correlation_regime",
            f"{label}: constants fitted in turbulent flow (source states no Reynolds range); at Re = {Re:.3g} "
            "the coefficient is an extrapolation"))
    if Re < LAMINAR_REYNOLDS and not info.close_clearance:
        warnings.add(CalcWarning(
            "laminar_regime", f"{label}: Re = {Re:.3g} is laminar; the correlation does not cover it"))
    if constants.baffled is True and not baffled:
        warnings.add(CalcWarning(
            "baffling_basis",
            f"{label}: the constants were measured in baffled vessels; an unbaffled vessel transfers less"))
    # blended sets differ only in a (switch_reynolds), so the blend is one evaluation with the blended a
    a = sum(weight * band.a for weight, band in weighted) * factor
    arguments = dict(Re=Re, Pr=props.prandtl, viscosity_ratio=props.viscosity / mu_wall, a=a,
                     b=constants.b, c=constants.c, d=constants.d, H_over_T=geometry["H_over_T"],
                     height_exponent=constants.height_exponent)
    arguments.update({name: geometry[name] for name in correlation.geometry})
    nusselt = correlation.function(**arguments)
    length = lengths[correlation.length_scale]
    h = nusselt * props.thermal_conductivity / length
    del arguments["viscosity_ratio"]
    return ProcessFilm(h, nusselt, correlation.name, a, constants.source, constants, warnings, arguments, length)


#: The other published constant sets for the vessel wall, per impeller: {alternative id: bands}. The
#: library's constants (``IMPELLERS[...].wall``) are the alternative ``"default"``.
WALL_ALTERNATIVES: dict[str, dict[str, tuple[FilmConstants, ...]]] = {
    "rushton_turbine": {
        "handbook_mixing_2004": (FilmConstants("chilton_drew_jebens_1944", 0.74, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
        "coker_2001_high_reynolds": (FilmConstants(
            "chilton_drew_jebens_1944", 1.10, 0.62, 0.33, 0.14, f"{COKER}, 2e3 < Re < 7e5, baffled",
            re_low=2e3, re_high=7e5),),
    },
    "pitched_blade_turbine": {
        # Coker's row: 0.54 Re^0.67 Pr^0.25, then h divided by about 1.3 -> a = 0.54/1.3
        "coker_2001": (FilmConstants("chilton_drew_jebens_1944", 0.54 / 1.3, 0.67, 0.25, 0.14,
                                     f"{COKER}: 0.54 Re^0.67 Pr^0.25 Vi^0.14 divided by 1.3"),),
        "bondy_lippa_1983": (FilmConstants("chilton_drew_jebens_1944", 0.53, 2 / 3, 1 / 3, 0.14,
                                           f"Bondy & Lippa, Chem. Eng. 90 (7), 62 (1983); {MEMORY}"),),
    },
    "marine_propeller": {
        "coker_2001": (FilmConstants("chilton_drew_jebens_1944", 0.64, 0.67, 0.33, 0.14,
                                     f"{COKER}, 3-blade propeller, Re > 5000, baffled", re_low=5000.0),),
    },
    "paddle": {
        "coker_2001_transitional": (FilmConstants("chilton_drew_jebens_1944", 0.415, 0.67, 0.33, 0.14,
                                                  f"{COKER}, 20 < Re < 4000", re_low=20.0, re_high=4000.0,
                                                  baffled=None),),
    },
    "anchor": {
        "uhl_1955": (FilmConstants("chilton_drew_jebens_1944", 1.0, 0.5, 1 / 3, 0.18,
                                   f"Uhl, Chem. Eng. Prog. Symp. Ser. 51 (17), 93 (1955), 10 < Re < 300; {MEMORY}",
                                   re_low=10.0, re_high=300.0, baffled=None),
                     FilmConstants("chilton_drew_jebens_1944", 0.36, 2 / 3, 1 / 3, 0.18,
                                   f"Uhl (1955), 300 < Re < 4e4; {MEMORY}", re_low=300.0, re_high=4e4,
                                   baffled=None)),
    },
    "retreat_curve": {
        "coker_2001_alloy": (FilmConstants("chilton_drew_jebens_1944", 0.37, 0.67, 0.33, 0.14,
                                           f"{COKER}, alloy, 3 blades, baffled"),),
    },
}
#: Process-side scatter of the published constants, applied in the margin band to a surface with no
#: published alternative: a x (1 -+ 0.25) ("allow +-25-30 % on all of these": the spread between the
#: handbooks above; common practice, no source).
CONSTANT_SCATTER = 0.25


def wall_alternatives(impeller: str) -> dict[str, tuple[FilmConstants, ...]]:
    """Every wall constant set of ``impeller``: ``"default"`` (the library's) and the published others."""
    info = impeller_info(impeller)
    return {"default": info.wall} | WALL_ALTERNATIVES.get(impeller, {})


def _wall_bands(info: ImpellerInfo, alternative: str,
                field: str = "correlations.process_wall") -> tuple[FilmConstants, ...]:
    options = wall_alternatives(info.id)
    try:
        return options[alternative]
    except (KeyError, TypeError):
        raise InputError(field, f"no wall constants {alternative!r} for the {info.id}; published: "
                                f"{', '.join(options)}") from None


SURFACES = ("wall", "bottom_head")


def process_film_jacket(impeller: str, Re: float, props_bulk: LiquidProperties, mu_wall: float,
                        tank_diameter: float, liquid_height: float, baffled: bool = True,
                        surface: str = "wall", alternative: str = "default", factor: float = 1.0,
                        constants: FilmConstants | None = None) -> ProcessFilm:
    """Film coefficient from the vessel contents to the jacketed wall (or bottom head) [W/(m2 K)].

    ``surface`` is ``"wall"`` (cylindrical shell) or ``"bottom_head"``; for impellers without
    published bottom-head constants the wall constants are used, with a warning. ``alternative``
    names a wall constant set of :func:`wall_alternatives` (the bottom head keeps the library's);
    ``factor`` multiplies the constant a (the margin band's scatter members); ``constants`` replaces
    the published sets on both surfaces (a calibration: the vessel's own fitted constant).

    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(298.15, 997.0, 4180.0, 0.00089, 0.6)
    >>> r = process_film_jacket("rushton_turbine", 1e5, water, 0.00089, 1.5, 1.5)
    >>> round(r.h), r.constant_a
    (1210, 0.74)
    """
    info = impeller_info(impeller)
    require_positive("vessel.diameter", tank_diameter)
    require_positive("charge.volume", liquid_height)
    if surface not in SURFACES:
        raise InputError("surface", f"unknown surface {surface!r}; known surfaces: {', '.join(SURFACES)}")
    warnings = Warnings()
    if constants is not None:
        return _film(info, (constants,), surface.replace("_", " "), Re, props_bulk, mu_wall, baffled,
                     {"tank_diameter": tank_diameter}, {"H_over_T": liquid_height / tank_diameter}, warnings,
                     factor)
    bands = info.bottom_head if surface == "bottom_head" else _wall_bands(info, alternative)
    if not bands:
        warnings.add(CalcWarning(
            "bottom_head_uses_wall_constants",
            f"{info.name}: no published bottom-head constants; the wall constants are used"))
        bands = info.wall
    return _film(info, bands, surface.replace("_", " "), Re, props_bulk, mu_wall, baffled,
                 {"tank_diameter": tank_diameter},
                 {"H_over_T": liquid_height / tank_diameter}, warnings, factor)


#: The other published constant sets for helical coils, per impeller (after a stand-in, ``COIL_STAND_INS``):
#: {alternative id: bands}. The library's constants (``IMPELLERS[...].coil``) are the alternative ``"default"``.
#: Oldshue & Gretton's own form, 0.17 Re^0.67 Pr^0.37 (D/T)^0.1 (d_o/T)^0.5 with no viscosity or liquid-height
#: factor (constants from memory, as restated in McCabe, Smith & Harriott, Unit Operations, ch. 15), is written
#: in the library's normalised geometry factors: a = 0.17 (1/3)^0.1 0.04^0.5 = 0.03046, c = 0.37, d = 0, e = 0.
#: Against the Handbook of Industrial Mixing's restatement (the default: a = 0.03, c = 1/3, d = 0.14,
#: e = -0.15) it differs by Pr^0.037 (x1.07 at Pr = 6, x1.24 at Pr = 300), by (H/T)^0.15 and by the
#: viscosity ratio: a published spread, not a guess.
OLDSHUE_GRETTON_ORIGINAL_A = 0.17 * (1.0 / 3.0) ** 0.1 * 0.04 ** 0.5
COIL_ALTERNATIVES: dict[str, dict[str, tuple[FilmConstants, ...]]] = {
    "rushton_turbine": {
        "oldshue_gretton_1954_original": (FilmConstants(
            "oldshue_gretton_1954", OLDSHUE_GRETTON_ORIGINAL_A, 0.67, 0.37, 0.0,
            "Oldshue & Gretton, Chem. Eng. Prog. 50, 615 (1954), their own form 0.17 Re^0.67 Pr^0.37 (D/T)^0.1 "
            f"(d_o/T)^0.5, no viscosity or height factor, baffled, turbulent; {MEMORY}", 0.0),),
    },
}


def coil_alternatives(impeller: str) -> dict[str, tuple[FilmConstants, ...]]:
    """Every coil constant set of ``impeller`` (or of its stand-in): ``"default"`` and the published others.

    Empty for an impeller with neither published coil constants nor a stand-in (the anchor).
    """
    info = impeller_info(impeller)
    if not info.coil:
        stand_in = COIL_STAND_INS.get(impeller)
        if stand_in is None:
            return {}
        info = IMPELLERS[stand_in]
    return {"default": info.coil} | COIL_ALTERNATIVES.get(info.id, {})


# Impellers with no published coil constants, and the published impeller whose flow pattern is closest
# (axial-flow impellers: the propeller; a low-speed radial retreat curve: the flat paddle). The result
# carries a warning saying so. An anchor sweeps the wall and leaves no room for a coil: it has no stand-in.
COIL_STAND_INS = {"pitched_blade_turbine": "marine_propeller", "hydrofoil": "marine_propeller",
                  "retreat_curve": "paddle"}


def process_film_coil(impeller: str, Re: float, props_bulk: LiquidProperties, mu_wall: float,
                      tank_diameter: float, liquid_height: float, tube_outer_diameter: float,
                      impeller_diameter: float, baffled: bool = True, factor: float = 1.0,
                      alternative: str = "default") -> ProcessFilm:
    """Film coefficient from the vessel contents to the outside of a helical coil [W/(m2 K)].

    Published for the disc turbine and the propeller (Oldshue & Gretton 1954 form) and the paddle
    (Chilton, Drew & Jebens 1944, Nu on the tank diameter). Pitched-blade turbines, hydrofoils and
    retreat-curve impellers use the constants of the closest published impeller (``COIL_STAND_INS``)
    with a ``coil_constants_borrowed`` warning; an anchor raises :class:`InputError` on ``vessel.coils``.
    ``factor`` multiplies the constant a (the margin band's scatter members, a calibration);
    ``alternative`` names a coil constant set of :func:`coil_alternatives`.

    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(298.15, 997.0, 4180.0, 0.00089, 0.6)
    >>> r = process_film_coil("rushton_turbine", 1e5, water, 0.00089, 1.5, 1.5, 0.06, 0.5)
    >>> round(r.h)
    1187
    """
    info = impeller_info(impeller)
    require_positive("vessel.diameter", tank_diameter)
    require_positive("charge.volume", liquid_height)
    require_positive("vessel.coils.tube_outer_diameter", tube_outer_diameter)
    require_positive("vessel.agitator.diameter", impeller_diameter)
    warnings = Warnings()
    if not info.coil:
        stand_in = COIL_STAND_INS.get(impeller)
        if stand_in is None:
            known = ", ".join(sorted(i for i, entry in IMPELLERS.items() if entry.coil))
            raise InputError("vessel.coils", f"no coil correlation for impeller {impeller!r} (a close-clearance "
                                             f"impeller leaves no room for a coil); published for: {known}")
        warnings.add(CalcWarning(
            "coil_constants_borrowed",
            f"no published coil constants for the {info.name}; those of the {IMPELLERS[stand_in].name} "
            "(closest flow pattern) are used: treat the coil film coefficient as indicative"))
        info = IMPELLERS[stand_in]
    geometry = {"H_over_T": liquid_height / tank_diameter, "D_over_T": impeller_diameter / tank_diameter,
                "do_over_T": tube_outer_diameter / tank_diameter}
    options = coil_alternatives(info.id)
    if alternative not in options:
        raise InputError("correlations.process_coil", f"no coil constants {alternative!r} for the {info.id}; "
                                                      f"published: {', '.join(options)}")
    return _film(info, options[alternative], "helical coil", Re, props_bulk, mu_wall, baffled,
                 {"tank_diameter": tank_diameter, "tube_outer_diameter": tube_outer_diameter},
                 geometry, warnings, factor)

