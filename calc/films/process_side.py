"""Process-side film coefficients: vessel contents to the jacketed wall and to helical coils.

Both are power laws in the impeller Reynolds number, Nu = a Re^b Pr^c (mu/mu_w)^d times geometry
factors, with constants per impeller from :data:`calc.agitation.IMPELLERS`. The viscosity at the wall
``mu_wall`` is an input: the caller iterates the wall temperature across the resistance network.

Where one impeller has constants for several Reynolds bands, the switch between adjacent bands is
made where the two fits meet if their Re exponents differ (so h stays continuous and rises with
speed), otherwise at the published boundary.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from calc.vessel.agitation import IMPELLERS, LAMINAR_REYNOLDS, TURBULENT_REYNOLDS, FilmConstants, ImpellerInfo, impeller_info
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
    return a * Re ** b * Pr ** c * viscosity_ratio ** d * H_over_T ** height_exponent


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
    return (a * Re ** b * Pr ** c * viscosity_ratio ** d * H_over_T ** height_exponent
            * (3.0 * D_over_T) ** 0.1 * (do_over_T / 0.04) ** 0.5)


@dataclass(frozen=True)
class FilmCorrelation(Correlation):
    """A process-side correlation: which length its Nusselt number uses and which geometry it needs."""

    length_scale: str = "tank_diameter"  # or "tube_outer_diameter"
    geometry: tuple[str, ...] = ()


CORRELATIONS: dict[str, FilmCorrelation] = {
    "chilton_drew_jebens_1944": FilmCorrelation(
        "Chilton, Drew & Jebens (1944) form", nusselt_agitated_Chilton_Drew_Jebens_1944,
        "Chilton, Drew & Jebens, Ind. Eng. Chem. 36, 510 (1944); constants per impeller as cited",
        {}, "tank_diameter", ()),
    "oldshue_gretton_1954": FilmCorrelation(
        "Oldshue & Gretton (1954)", nusselt_coil_Oldshue_Gretton_1954,
        "Oldshue & Gretton, Chem. Eng. Prog. 50, 615 (1954), as restated in the Handbook of Industrial "
        "Mixing (2004)", {}, "tube_outer_diameter", ("D_over_T", "do_over_T")),
}


@dataclass(frozen=True)
class FilmResult:
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
    arguments: dict = field(default_factory=dict, repr=False, compare=False)
    length: float = field(default=1.0, repr=False, compare=False)

    def h_at(self, viscosity_ratio, conductivity: float):
        """h for other bulk-to-wall viscosity ratios (a float or an array) at the same bulk state, [W/(m2 K)]."""
        function = CORRELATIONS[self.constants.correlation].function
        return function(viscosity_ratio=viscosity_ratio, **self.arguments) * conductivity / self.length


def _band(bands: tuple[FilmConstants, ...], Re: float) -> FilmConstants:
    """The constant set for ``Re``: switch where adjacent fits meet when their exponents differ."""
    for lower, upper in zip(bands, bands[1:]):
        if upper.b != lower.b:
            switch = (lower.a / upper.a) ** (1.0 / (upper.b - lower.b))
        else:
            switch = upper.re_low
        if Re < switch:
            return lower
    return bands[-1]


def _film(info: ImpellerInfo, bands: tuple[FilmConstants, ...], surface: str, Re: float,
          props: LiquidProperties, mu_wall: float, baffled: bool, lengths: dict, geometry: dict,
          warnings: Warnings) -> FilmResult:
    require_positive("vessel.agitator.speed", Re)
    require_positive("charge.viscosity", mu_wall)
    constants = _band(bands, Re)
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
    arguments = dict(Re=Re, Pr=props.prandtl, viscosity_ratio=props.viscosity / mu_wall, a=constants.a,
                     b=constants.b, c=constants.c, d=constants.d, H_over_T=geometry["H_over_T"],
                     height_exponent=constants.height_exponent)
    arguments.update({name: geometry[name] for name in correlation.geometry})
    nusselt = correlation.function(**arguments)
    length = lengths[correlation.length_scale]
    h = nusselt * props.thermal_conductivity / length
    del arguments["viscosity_ratio"]
    return FilmResult(h, nusselt, correlation.name, constants.a, constants.source, constants, warnings,
                      arguments, length)


SURFACES = ("wall", "bottom_head")


def process_film_jacket(impeller: str, Re: float, props_bulk: LiquidProperties, mu_wall: float,
                        tank_diameter: float, liquid_height: float, baffled: bool = True,
                        surface: str = "wall") -> FilmResult:
    """Film coefficient from the vessel contents to the jacketed wall (or bottom head) [W/(m2 K)].

    ``surface`` is ``"wall"`` (cylindrical shell) or ``"bottom_head"``; for impellers without
    published bottom-head constants the wall constants are used, with a warning.

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
    bands = info.bottom_head if surface == "bottom_head" else info.wall
    if not bands:
        warnings.add(CalcWarning(
            "bottom_head_uses_wall_constants",
            f"{info.name}: no published bottom-head constants; the wall constants are used"))
        bands = info.wall
    return _film(info, bands, surface.replace("_", " "), Re, props_bulk, mu_wall, baffled,
                 {"tank_diameter": tank_diameter},
                 {"H_over_T": liquid_height / tank_diameter}, warnings)


# Impellers with no published coil constants, and the published impeller whose flow pattern is closest
# (axial-flow impellers: the propeller; a low-speed radial retreat curve: the flat paddle). The result
# carries a warning saying so. An anchor sweeps the wall and leaves no room for a coil: it has no stand-in.
COIL_STAND_INS = {"pitched_blade_turbine": "marine_propeller", "hydrofoil": "marine_propeller",
                  "retreat_curve": "paddle"}


def process_film_coil(impeller: str, Re: float, props_bulk: LiquidProperties, mu_wall: float,
                      tank_diameter: float, liquid_height: float, tube_outer_diameter: float,
                      impeller_diameter: float, baffled: bool = True) -> FilmResult:
    """Film coefficient from the vessel contents to the outside of a helical coil [W/(m2 K)].

    Published for the disc turbine and the propeller (Oldshue & Gretton 1954 form) and the paddle
    (Chilton, Drew & Jebens 1944, Nu on the tank diameter). Pitched-blade turbines, hydrofoils and
    retreat-curve impellers use the constants of the closest published impeller (``COIL_STAND_INS``)
    with a ``coil_constants_borrowed`` warning; an anchor raises :class:`InputError` on ``vessel.coils``.

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
    return _film(info, info.coil, "helical coil", Re, props_bulk, mu_wall, baffled,
                 {"tank_diameter": tank_diameter, "tube_outer_diameter": tube_outer_diameter},
                 geometry, warnings)

