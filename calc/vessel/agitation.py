"""Agitator power and the impeller library.

The impeller library holds, per impeller type, the turbulent power number (baffled and unbaffled),
the laminar constant K_p (N_p = K_p/Re) and the process-side heat-transfer constants of the jacketed
wall, the bottom head and helical coils where published. Every number carries its source; values
marked "from memory" are the trade's customary figures that could not be checked against the printed
source and deserve a vendor power curve where one exists.

The power number between the laminar and turbulent asymptotes is a blend, not a published fit:
N_p = K_p/Re + N_p,turb. It is exact in both limits, rises above either asymptote in the transition
(by at most a factor 2, at Re = K_p/N_p,turb) and so errs on the side of more agitator heat.
Power is then strictly increasing in speed, P = K_p mu N^2 D^3 + N_p,turb rho N^3 D^5.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

from scipy.optimize import brentq

from calc.properties import LiquidProperties
from calc.validity import CalcWarning, CalculationError, InputError, Warnings, require_positive

GRAVITY = 9.80665  # m/s2, standard acceleration of gravity (CGPM 1901)

LAMINAR_REYNOLDS = 10.0  # below: laminar (common practice, no source)
TURBULENT_REYNOLDS = 1.0e4  # above: turbulent, N_p constant in baffled tanks (common practice, no source)
VORTEXING_REYNOLDS = 300.0  # unbaffled N_p depends on Froude above this (Rushton, Costich & Everett 1950)

COKER = "Coker, Modeling of Chemical Kinetics and Reactor Design, Gulf 2001, Table 7-14, p. 622"
HIM = ("Penney & Atiemo-Obeng, 'Heat Transfer', ch. 14 in Paul, Atiemo-Obeng & Kresta (eds.), "
       "Handbook of Industrial Mixing, Wiley 2004")
HIM_COIL = f"Oldshue & Gretton, Chem. Eng. Prog. 50, 615 (1954), as restated by {HIM}"
CDJ = "Chilton, Drew & Jebens, Ind. Eng. Chem. 36, 510 (1944)"
RAJU = "Raju, Fluid Mechanics, Heat Transfer, and Mass Transfer: Chemical Engineering Practice, Wiley 2011, p. 166"
MEMORY = "trade handbook value, from memory (not checked against the printed source); prefer vendor data"
NAGATA = "Nagata, Mixing: Principles and Applications, Kodansha/Wiley 1975"


@dataclass(frozen=True)
class FilmConstants:
    """Constants of Nu = a Re^b Pr^c (mu/mu_w)^d (H/T)^e for one impeller, surface and Re band.

    ``correlation`` is the key of the equation in :data:`calc.process_side.CORRELATIONS`.
    ``re_low``/``re_high`` are the published Reynolds range (None = not stated by the source).
    ``baffled`` is the basis of the fit: True, False, or None for "either".
    """

    correlation: str
    a: float
    b: float
    c: float
    d: float
    source: str
    height_exponent: float = 0.0
    re_low: float | None = None
    re_high: float | None = None
    baffled: bool | None = True


@dataclass(frozen=True)
class ImpellerInfo:
    """One entry of the impeller library; ``id`` is what requests use."""

    id: str
    name: str
    power_number: float  # turbulent, fully baffled
    power_number_source: str
    unbaffled_power_number: float  # turbulent, no baffles (before any Froude correction)
    unbaffled_power_number_source: str
    laminar_constant: float  # K_p in N_p = K_p / Re
    laminar_constant_source: str
    diameter_ratio_basis: tuple[float, float]  # D/T range of the constants
    wall: tuple[FilmConstants, ...]
    bottom_head: tuple[FilmConstants, ...] = ()
    coil: tuple[FilmConstants, ...] = ()
    close_clearance: bool = False  # anchors: meant for laminar duty

    @property
    def wall_source(self) -> str:
        return self.wall[0].source


_TURBINE_BASIS = (0.25, 0.5)  # D/T around the 1/3 of the fits (common practice, no source)

IMPELLERS: dict[str, ImpellerInfo] = {i.id: i for i in [
    ImpellerInfo(
        "rushton_turbine", "Six-blade disc turbine (Rushton), W/D = 0.2",
        5.0, f"{RAJU} (about 5; 5.0-5.5 typical)",
        1.1, f"about 1/4-1/5 of the baffled value; {MEMORY}",
        70.0, f"Rushton, Costich & Everett, Chem. Eng. Prog. 46, 395 (1950): 65-71; {MEMORY}",
        _TURBINE_BASIS,
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.54, 0.67, 0.33, 0.14, f"{COKER}, Re < 400, baffled or not",
                            re_low=None, re_high=400.0, baffled=None),
              FilmConstants("chilton_drew_jebens_1944", 0.74, 0.67, 0.33, 0.14, f"{COKER}, Re > 400, baffled",
                            re_low=400.0, re_high=None, baffled=True)),
        bottom_head=(FilmConstants("chilton_drew_jebens_1944", 0.50, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
        coil=(FilmConstants("oldshue_gretton_1954", 0.03, 2 / 3, 1 / 3, 0.14, HIM_COIL, -0.15),),
    ),
    ImpellerInfo(
        "pitched_blade_turbine", "Four-blade 45 degree pitched-blade turbine, W/D = 0.2",
        1.27, f"1.1-1.5 depending on clearance and blade thickness; {MEMORY}",
        0.6, f"roughly half the baffled value; {MEMORY}",
        45.0, f"40-50; {MEMORY}",
        _TURBINE_BASIS,
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.45, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
        bottom_head=(FilmConstants("chilton_drew_jebens_1944", 1.08, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
    ),
    ImpellerInfo(
        "hydrofoil", "Narrow-blade hydrofoil, three blades",
        0.3, f"{RAJU} (about 0.3)",
        0.2, f"{MEMORY}",
        40.0, "no published value at hand; taken as the propeller's (Raju 2011); laminar use is indicative only",
        _TURBINE_BASIS,
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.31, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
        bottom_head=(FilmConstants("chilton_drew_jebens_1944", 0.90, 2 / 3, 1 / 3, 0.14, HIM, -0.15),),
    ),
    ImpellerInfo(
        "marine_propeller", "Three-blade marine propeller, pitch = diameter",
        0.34, f"0.32-0.35; {MEMORY}",
        0.25, f"{MEMORY}",
        41.0, f"{RAJU} (K = 41 for pitch = diameter)",
        _TURBINE_BASIS,
        # HIM's pitch factor 1.29(P/D)/(0.29 + P/D) is exactly 1 at P/D = 1.
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.50, 2 / 3, 1 / 3, 0.14, f"{HIM}; pitch factor 1 at P/D = 1", -0.15),),
        coil=(FilmConstants("oldshue_gretton_1954", 0.016, 0.67, 0.37, 0.14, HIM, 0.0),),
    ),
    ImpellerInfo(
        "paddle", "Two-blade flat paddle",
        1.7, f"{MEMORY}",
        0.3, f"consistent with {NAGATA} for D/T = 0.5, b/T = 0.1 (0.28, derived)",
        33.0, f"{NAGATA}: A = 14 + (b/T)[670(D/T - 0.6)^2 + 185] = 33 for D/T = 0.5, b/T = 0.1 (derived)",
        (0.3, 0.7),
        # Coker's 20-4000 row (a = 0.415) is 15 % higher than this one; using one row keeps h continuous
        # and errs low (conservative for cooling) below Re = 4000, where a range warning is issued.
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.36, 0.67, 0.33, 0.14, f"{CDJ}, as tabulated by {COKER}, Re > 4000",
                            re_low=4000.0, baffled=None),),
        coil=(FilmConstants("chilton_drew_jebens_1944", 0.87, 0.62, 1 / 3, 0.14, f"{CDJ}; {MEMORY}; Nu based on tank diameter",
                            baffled=None),),
    ),
    ImpellerInfo(
        "anchor", "Anchor",
        0.35, f"{MEMORY}",
        0.35, f"{MEMORY}; anchors are normally run without baffles",
        350.0, f"300-420 depending on wall clearance; {MEMORY}",
        (0.85, 0.98),
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.69, 0.5, 1 / 3, 0.14, f"{HIM}, 12 <= Re < 100",
                            re_low=12.0, re_high=100.0, baffled=None),
              FilmConstants("chilton_drew_jebens_1944", 0.32, 2 / 3, 1 / 3, 0.14, f"{HIM}, Re >= 100",
                            re_low=100.0, baffled=None)),
        close_clearance=True,
    ),
    ImpellerInfo(
        "retreat_curve", "Three-blade retreat-curve impeller (glass-lined type)",
        0.7, f"0.3-0.8 depending on baffling (one beavertail baffle assumed); {MEMORY}",
        0.35, f"{MEMORY}",
        70.0, "no published value at hand; taken as the disc turbine's; laminar use is indicative only",
        (0.5, 0.75),
        wall=(FilmConstants("chilton_drew_jebens_1944", 0.33, 0.67, 0.33, 0.14, f"{COKER}, glassed steel, 3 blades, baffled"),),
    ),
]}


def impeller_info(impeller: str, field: str = "vessel.agitator.impeller") -> ImpellerInfo:
    """Look up an impeller by id; an unknown id is an :class:`InputError` listing the known ones."""
    try:
        return IMPELLERS[impeller]
    except (KeyError, TypeError):
        raise InputError(field, f"unknown impeller {impeller!r}; known impellers: "
                                f"{', '.join(sorted(IMPELLERS))}") from None


def impellers() -> list[ImpellerInfo]:
    """The built-in impellers, in a stable order."""
    return list(IMPELLERS.values())


@dataclass(frozen=True)
class Agitator:
    """An agitator: impeller id, diameter [m], speed [rev/s], impellers on the shaft, baffling.

    ``power_number`` given by the user replaces the library's turbulent value.
    """

    impeller: str
    diameter: float
    speed: float
    count: int = 1
    baffled: bool = True
    power_number: float | None = None

    def validate(self) -> ImpellerInfo:
        info = impeller_info(self.impeller)
        require_positive("vessel.agitator.diameter", self.diameter)
        require_positive("vessel.agitator.speed", self.speed)
        if isinstance(self.count, bool) or not isinstance(self.count, int) or self.count < 1:
            raise InputError("vessel.agitator.count", f"must be a whole number >= 1, got {self.count!r}")
        if self.power_number is not None:
            require_positive("vessel.agitator.power_number", self.power_number)
        return info


def reynolds_impeller(rho: float, N: float, D: float, mu: float) -> float:
    """Impeller Reynolds number.

    Re = rho N D^2 / mu

    Parameters
    ----------
    rho : float
        Liquid density, [kg/m^3]
    N : float
        Rotational speed, [rev/s]
    D : float
        Impeller diameter, [m]
    mu : float
        Liquid viscosity, [Pa*s]

    Returns
    -------
    Re : float
        Impeller Reynolds number, [-]

    Examples
    --------
    Water (1000 kg/m3, 1 mPa s), 0.5 m impeller at 2 rev/s:

    >>> reynolds_impeller(1000.0, 2.0, 0.5, 1e-3)
    500000.0
    """
    return rho * N * D ** 2 / mu


def power_number_blend(Re: float, Kp: float, Np_turbulent: float) -> float:
    """Power number from the laminar and turbulent asymptotes (a blend, not a published fit).

    N_p = K_p / Re + N_p,turb

    Parameters
    ----------
    Re : float
        Impeller Reynolds number, [-]
    Kp : float
        Laminar constant, N_p Re in creeping flow, [-]
    Np_turbulent : float
        Turbulent power number, [-]

    Returns
    -------
    Np : float
        Power number, [-]

    Notes
    -----
    Exact as Re -> 0 and Re -> infinity; in between it lies above both asymptotes, at most twice the
    larger one (at Re = K_p/N_p,turb). Published transitional curves of baffled turbines dip below
    the turbulent value near Re ~ 100; the blend overstates power there, which is the safe side for
    an agitator heat input.

    Examples
    --------
    Disc turbine (K_p = 70, N_p = 5) at Re = 1e5:

    >>> power_number_blend(1e5, 70.0, 5.0)
    5.0007
    """
    return Kp / Re + Np_turbulent


def flow_regime(Re: float) -> str:
    """'laminar' (Re < 10), 'transitional' or 'turbulent' (Re > 1e4); common practice, no source."""
    if Re < LAMINAR_REYNOLDS:
        return "laminar"
    if Re > TURBULENT_REYNOLDS:
        return "turbulent"
    return "transitional"


def _turbulent_power_number(info: ImpellerInfo, agitator: Agitator) -> tuple[float, str]:
    if agitator.power_number is not None:
        return agitator.power_number, "given by the user"
    if agitator.baffled:
        return info.power_number, info.power_number_source
    return info.unbaffled_power_number, info.unbaffled_power_number_source


def power_number(agitator: Agitator, Re: float) -> float:
    """Power number of one impeller of ``agitator`` at impeller Reynolds number ``Re``."""
    info = impeller_info(agitator.impeller)
    return power_number_blend(Re, info.laminar_constant, _turbulent_power_number(info, agitator)[0])


@dataclass(frozen=True)
class AgitationResult:
    """Agitator hydraulics at one state (SI units)."""

    impeller: str
    reynolds: float
    power_number: float  # per impeller
    power: float  # W, all impellers on the shaft
    power_per_volume: float  # W/m3
    tip_speed: float  # m/s
    froude: float
    regime: str
    warnings: Warnings = field(default_factory=Warnings)
    sources: dict[str, str] = field(default_factory=dict)


def agitation(agitator: Agitator, liquid_props: LiquidProperties, liquid_volume: float,
              tank_diameter: float) -> AgitationResult:
    """Reynolds number, power number, power, power per volume, tip speed and Froude number.

    P = count N_p rho N^3 D^5; tip speed pi N D; Fr = N^2 D / g. Impellers on one shaft are taken
    to draw power independently (additive), which holds when they are at least about one impeller
    diameter apart (Bates, Fondy & Corpstein, I&EC Process Des. Dev. 2, 310, 1963; common practice).

    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(298.15, 997.0, 4180.0, 0.00089, 0.6)
    >>> r = agitation(Agitator("rushton_turbine", 0.5, 2.0), water, 2.0, 1.5)
    >>> r.regime, round(r.power)
    ('turbulent', 1246)
    """
    info = agitator.validate()
    require_positive("vessel.diameter", tank_diameter)
    require_positive("charge.volume", liquid_volume)
    if agitator.diameter >= tank_diameter:
        raise InputError("vessel.agitator.diameter",
                         f"impeller diameter {agitator.diameter:.4g} m does not fit a vessel of "
                         f"{tank_diameter:.4g} m inside diameter")
    rho, mu = liquid_props.density, liquid_props.viscosity
    N, D = agitator.speed, agitator.diameter
    Re = reynolds_impeller(rho, N, D, mu)
    Np_turb, turb_source = _turbulent_power_number(info, agitator)
    Np = power_number_blend(Re, info.laminar_constant, Np_turb)
    power = agitator.count * Np * rho * N ** 3 * D ** 5
    froude = N ** 2 * D / GRAVITY
    regime = flow_regime(Re)

    warnings = Warnings()
    ratio = D / tank_diameter
    low, high = info.diameter_ratio_basis
    if not low <= ratio <= high:
        warnings.add(CalcWarning(
            "impeller_diameter_ratio",
            f"{info.name}: D/T = {ratio:.3g} is outside {low:g}-{high:g}, the geometry behind its power "
            "number and heat-transfer constants; treat both as estimates"))
    if regime == "laminar" and not info.close_clearance:
        warnings.add(CalcWarning(
            "laminar_regime",
            f"Re = {Re:.3g}: laminar flow around a {info.name.lower()}; mixing and wall heat transfer are "
            "poor and the turbulent-flow constants do not apply; consider a close-clearance impeller"))
    elif regime == "transitional":
        warnings.add(CalcWarning(
            "transitional_regime",
            f"Re = {Re:.3g}: transitional flow; the power number is a blend of the laminar and turbulent "
            "asymptotes (not a published curve) and may be overstated by up to a factor of 2"))
    if not agitator.baffled and Re > VORTEXING_REYNOLDS and not info.close_clearance:
        warnings.add(CalcWarning(
            "unbaffled_vortexing",
            "unbaffled vessel: the liquid swirls and forms a surface vortex, the power number then depends "
            "on the Froude number (Rushton, Costich & Everett 1950) and the unbaffled value used is a rough "
            "estimate; check for air entrainment and uncovered heat-transfer area"))
    if agitator.count > 1:
        warnings.add(CalcWarning(
            "multiple_impellers",
            f"{agitator.count} impellers: power taken as additive, valid when they are at least about one "
            "impeller diameter apart (common practice); closer spacing draws less"))
    sources = {
        "power_number": turb_source,
        "laminar_constant": info.laminar_constant_source,
        "transition": "blend N_p = K_p/Re + N_p,turb (coolmargin, not a published fit)",
    }
    return AgitationResult(info.id, Re, Np, power, power / liquid_volume, math.pi * N * D, froude, regime,
                           warnings, sources)


# --- scale-up under geometric similarity -----------------------------------------------------------

def _specific_power_group(agitator: Agitator, props: LiquidProperties, N: float, D: float) -> float:
    """N_p N^3 D^2, proportional to P/V for geometrically similar vessels (V ~ D^3)."""
    Re = reynolds_impeller(props.density, N, D, props.viscosity)
    return power_number(agitator, Re) * N ** 3 * D ** 2


def _constant_power_per_volume(agitator: Agitator, factor: float, props: LiquidProperties) -> float:
    D2 = agitator.diameter * factor
    target = _specific_power_group(agitator, props, agitator.speed, agitator.diameter)
    # N^3 D^2 N_p(Re) rises strictly with N (see module notes): bracket the turbulent estimate.
    guess = agitator.speed * factor ** (-2.0 / 3.0)

    def residual(N: float) -> float:
        return math.log(_specific_power_group(agitator, props, N, D2) / target)

    try:
        return float(brentq(residual, guess * 1e-3, guess * 1e3, xtol=1e-14, rtol=1e-12))
    except ValueError as exc:  # pragma: no cover - the bracket spans a factor 1e6 of a monotonic function
        raise CalculationError(f"no speed gives the reference power per volume: {exc}") from None


SCALE_UP_RULES: dict[str, Callable[[Agitator, float, LiquidProperties], float]] = {
    "constant_power_per_volume": _constant_power_per_volume,
    "constant_tip_speed": lambda agitator, factor, props: agitator.speed / factor,
    "constant_speed": lambda agitator, factor, props: agitator.speed,
    "constant_reynolds": lambda agitator, factor, props: agitator.speed / factor ** 2,
}


def scaled_speed(rule: str, agitator: Agitator, factor: float, props: LiquidProperties,
                 field: str = "rule") -> float:
    """Speed [rev/s] of a geometrically similar agitator scaled by ``factor`` (D2/D1) under ``rule``.

    Rules: ``constant_power_per_volume`` (solved on the power curve; N ~ D^-2/3 in turbulent flow),
    ``constant_tip_speed`` (N ~ 1/D), ``constant_speed``, ``constant_reynolds`` (N ~ D^-2, same liquid).

    >>> from calc.properties import LiquidProperties
    >>> water = LiquidProperties(298.15, 997.0, 4180.0, 0.00089, 0.6)
    >>> a = Agitator("rushton_turbine", 0.1, 5.0)
    >>> round(scaled_speed("constant_tip_speed", a, 10.0, water), 6)
    0.5
    >>> round(scaled_speed("constant_power_per_volume", a, 10.0, water) / (5.0 * 10 ** (-2 / 3)), 3)
    1.0
    """
    try:
        rule_function = SCALE_UP_RULES[rule]
    except (KeyError, TypeError):
        raise InputError(field, f"unknown scale-up rule {rule!r}; known rules: "
                                f"{', '.join(sorted(SCALE_UP_RULES))}") from None
    agitator.validate()
    require_positive("scale_factor", factor)
    return rule_function(agitator, factor, props)
