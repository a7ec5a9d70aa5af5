"""Which published correlation computes each resistance: the request's ``correlations`` object.

Every resistance of the network has more than one published treatment, and they disagree by more
than the trade's +-25-30 %: for an annular jacket Stein & Schmidt (1993) gives 0.8-2.5 times Lehrer
(1970); a half pipe in laminar glycol flow differs about threefold between the straight-channel and
curved-channel treatments. :class:`CorrelationChoice` names the one used for each resistance (the
defaults are the library's), the margin band (:mod:`calc.checks.margin_band`) recomputes the margin
with each alternative, and :func:`alternatives` lists them all with source, validity range and
constants (``GET /v1/correlations``).

``process_factor`` and ``coil_process_factor`` multiply the process-side constant a (the band's
scatter members where no published alternative exists); ``process_constants`` replaces the wall's
constant set with a vessel's own fitted one (a calibration, :mod:`calc.fits`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from calc.films import coil_side, jacket_side, process_side, wall
from calc.films.jacket_side import JacketSpec
from calc.validity import Correlation, InputError
from calc.vessel.agitation import IMPELLERS, FilmConstants


#: Surfaces a single-point measurement can calibrate, and the factor of CorrelationChoice each one sets.
MEASURED_SURFACES = {"jacket": "process_factor", "coils": "coil_process_factor"}


@dataclass(frozen=True)
class Measurement:
    """A measured UA (or U) of one surface at stated conditions: the single-point calibration's input.

    ``value`` and ``interval`` (95 %, the measurement's stated uncertainty) are W/K for ``quantity = "ua"``
    and W/(m2 K) on the surface's process-side area for ``"overall_coefficient"``. The conditions are those of
    the measurement: the charge (often water), the contents' temperature (K), the coolant (fluid, inlet
    temperature, flow) and the agitator speed (rev/s; None: the vessel's own). ``calc.fits.single_point``
    backs out what the measurement implies.
    """

    value: float
    interval: tuple[float, float]
    process_temperature: float
    charge: Any
    coolant: Any
    quantity: str = "ua"  # or "overall_coefficient"
    surface: str = "jacket"  # a key of MEASURED_SURFACES
    agitator_speed: float | None = None

    @property
    def factor_field(self) -> str:
        """The field of :class:`CorrelationChoice` the backed-out multiplier sets."""
        return MEASURED_SURFACES[self.surface]


@dataclass(frozen=True)
class Calibration:
    """A vessel's own measured heat transfer, with its 95 % intervals.

    Either a Wilson plot (``calc.fits.wilson``): ``process_constant`` is a of Nu = a Re^b Pr^c
    (mu/mu_w)^0.14 at the wall (Nu = h T/k, no H/T factor: the vessel's own fill) and
    ``remaining_resistance`` (m2 K/W, optional) the wall + fouling + coolant film of the surface it was
    measured on (the jacket). Or a single measured UA at stated conditions (``measurement``): the multiplier
    on the published process-side constant that reproduces it (``factor``, with ``factor_interval`` from the
    measurement's interval) is backed out by :func:`calc.fits.single_point.resolved` (``basis`` says how).
    """

    process_constant: float | None = None
    process_constant_interval: tuple[float, float] | None = None
    exponent: float = 2.0 / 3.0
    prandtl_exponent: float = 1.0 / 3.0
    remaining_resistance: float | None = None
    remaining_resistance_interval: tuple[float, float] | None = None
    measurement: Measurement | None = None
    factor: float | None = None  # backed out from ``measurement`` (None until resolved)
    factor_interval: tuple[float, float] | None = None
    #: (field of CorrelationChoice, option, factor at the interval's low end, at its high end): the back-out redone
    #: under each coolant-side alternative of the measured surface (the measurement fixes U at its state; under
    #: another service-side correlation another process factor reproduces it)
    alternative_factors: tuple[tuple[str, str, float, float], ...] = ()
    basis: str = ""

    def constants(self, a: float | None = None) -> FilmConstants:
        value = self.process_constant if a is None else a
        if value is None:
            raise ValueError("a calibration by a measured UA has no fitted constant set")
        return FilmConstants("chilton_drew_jebens_1944", value, self.exponent,
                             self.prandtl_exponent, 0.14, "calibration: the vessel's own Wilson plot",
                             baffled=None)

    @property
    def pending(self) -> bool:
        """A measurement whose factor has not been backed out yet."""
        return self.measurement is not None and self.factor is None

    @property
    def summary(self) -> str:
        """What the calibration changes, for the ``calibrated`` warnings."""
        if self.measurement is not None:
            return self.basis or "a measured UA (not yet evaluated)"
        return f"the vessel's own process constant a = {self.process_constant:.4g} (Wilson plot)"


@dataclass(frozen=True)
class CorrelationChoice:
    """The correlation of each resistance; every default is the library's (the behaviour without a choice)."""

    process_wall: str = "default"  # a key of calc.films.process_side.wall_alternatives(impeller)
    annular_jacket: str = "lehrer_1970"  # calc.films.jacket_side.ANNULAR_CORRELATIONS
    channel: str = "curved"  # half pipe and spiral baffle: calc.films.jacket_side.CHANNEL_TREATMENTS
    coil_tube: str = "schmidt_1967"  # coil tubes and curved channels above 2.2e4: coil_side.COIL_CORRELATIONS
    process_coil: str = "default"  # a key of calc.films.process_side.coil_alternatives(impeller)
    process_factor: float = 1.0  # multiplies the wall's (and bottom head's) process constant a
    coil_process_factor: float = 1.0  # multiplies the coil's process constant a
    process_fouling_factor: float = 1.0  # multiplies the stated process-side fouling (band: 0 clean, 2 doubled)
    process_constants: FilmConstants | None = None  # a vessel's own fitted wall constants (calibration)
    remaining_resistance: float | None = None  # m2 K/W, jacket wall + fouling + coolant film (calibration)
    calibration: Calibration | None = None  # where the two above come from, with their intervals

    def calibrated(self, calibration: Calibration | None, remaining: bool = True) -> "CorrelationChoice":
        """This choice with ``calibration`` applied (``remaining=False``: the process constant only)."""
        from dataclasses import replace

        if calibration is None:
            return self
        if calibration.measurement is not None:  # the factor is backed out where the vessel is known
            chosen = replace(self, calibration=calibration)
            if calibration.factor is None:
                return chosen
            return chosen.with_factor(calibration.measurement.factor_field, calibration.factor)
        return replace(self, process_constants=calibration.constants(), calibration=calibration,
                       remaining_resistance=calibration.remaining_resistance if remaining else None)

    def with_factor(self, name: str, value: float) -> "CorrelationChoice":
        """This choice with ``name`` (``process_factor`` or ``coil_process_factor``) set to ``value``."""
        from dataclasses import replace

        if name == "coil_process_factor":
            return replace(self, coil_process_factor=value)
        return replace(self, process_factor=value)

    def with_service_option(self, name: str, option: str) -> "CorrelationChoice":
        """This choice with the coolant-side field ``name`` (annular_jacket, channel or coil_tube) set to ``option``."""
        from dataclasses import replace

        if name == "annular_jacket":
            return replace(self, annular_jacket=option)
        if name == "channel":
            return replace(self, channel=option)
        if name == "coil_tube":
            return replace(self, coil_tube=option)
        raise ValueError(f"{name!r} is not a coolant-side choice")

    def validate(self, impeller: str | None = None) -> "CorrelationChoice":
        """Raise :class:`InputError` naming ``correlations.<field>`` for an unknown option."""
        for name, value, options in (("annular_jacket", self.annular_jacket, jacket_side.ANNULAR_CORRELATIONS),
                                     ("channel", self.channel, jacket_side.CHANNEL_TREATMENTS),
                                     ("coil_tube", self.coil_tube, coil_side.COIL_CORRELATIONS)):
            if value not in options:
                raise InputError(f"correlations.{name}", f"unknown option {value!r}; known: {', '.join(options)}")
        for name in ("process_factor", "coil_process_factor", "process_fouling_factor"):
            value = getattr(self, name)
            if not (math.isfinite(value) and (value > 0 or (value == 0 and name == "process_fouling_factor"))):
                raise InputError(f"correlations.{name}", f"must be a positive number, got {value!r}")
        if impeller is not None and impeller in IMPELLERS:
            walls = process_side.wall_alternatives(impeller)
            if self.process_wall not in walls:
                raise InputError("correlations.process_wall", f"no wall constants {self.process_wall!r} for the "
                                                              f"{impeller}; published: {', '.join(walls)}")
            coils = process_side.coil_alternatives(impeller)
            if coils and self.process_coil not in coils:
                raise InputError("correlations.process_coil", f"no coil constants {self.process_coil!r} for the "
                                                              f"{impeller}; published: {', '.join(coils)}")
        return self

    def jacket(self, spec: JacketSpec) -> JacketSpec:
        """The jacket spec with this choice's service-side options applied."""
        from dataclasses import replace

        return replace(spec, correlation=self.annular_jacket, channel=self.channel, channel_turbulent=self.coil_tube)


@dataclass(frozen=True)
class Alternative:
    """One option of one resistance, as ``GET /v1/correlations`` lists it."""

    resistance: str  # the field of CorrelationChoice
    id: str
    name: str
    default: bool
    applies_to: str
    source: str
    validity: dict[str, list[float | str | None]]
    constants: dict[str, Any]


def _validity(entry: Correlation) -> dict[str, list[float | str | None]]:
    return {k: [v[0], v[1]] for k, v in (entry.validity or {}).items()}


def alternatives() -> list[Alternative]:
    """Every choosable alternative of every resistance, with its source, validity range and constants."""
    out: list[Alternative] = []
    for impeller, info in IMPELLERS.items():
        for key, bands in process_side.wall_alternatives(impeller).items():
            constants = {f"band_{i}": {"a": c.a, "b": c.b, "c": c.c, "d": c.d, "e": c.height_exponent,
                                       "re_low": c.re_low, "re_high": c.re_high} for i, c in enumerate(bands)}
            out.append(Alternative(
                "process_wall", key, f"{info.name}: " + ("library constants" if key == "default" else key),
                key == "default", f"vessel wall, impeller {impeller}", "; ".join(dict.fromkeys(c.source for c in bands)),
                {"Re": [bands[0].re_low, bands[-1].re_high]}, constants))
    for impeller, info in IMPELLERS.items():
        for key, bands in process_side.coil_alternatives(impeller).items():
            coil_constants: dict[str, dict[str, object]] = {
                f"band_{i}": {"a": c.a, "b": c.b, "c": c.c, "d": c.d, "e": c.height_exponent, "re_low": c.re_low,
                              "re_high": c.re_high, "equation": process_side.CORRELATIONS[c.correlation].equation}
                for i, c in enumerate(bands)}
            out.append(Alternative(
                "process_coil", key, f"{info.name}, helical coil: " + ("library constants" if key == "default" else key),
                key == "default", f"outside helical coils, impeller {impeller}",
                "; ".join(dict.fromkeys(c.source for c in bands)), {"Re": [bands[0].re_low, bands[-1].re_high]},
                coil_constants))
    for key in jacket_side.ANNULAR_CORRELATIONS:
        entry = jacket_side.CORRELATIONS[key]
        out.append(Alternative("annular_jacket", key, entry.name, key == CorrelationChoice.annular_jacket,
                               "plain annular jacket", entry.source, _validity(entry),
                               dict(jacket_side.ANNULAR_CONSTANTS[key])))
    curved = [coil_side.CORRELATIONS[k] for k in ("schmidt_1967_laminar", "gnielinski_coil_transition")]
    straight = [jacket_side.CORRELATIONS[k] for k in ("sieder_tate_1936_laminar", "gnielinski_2013",
                                                      "sieder_tate_1936_turbulent")]
    out.append(Alternative(
        "channel", "curved", "curved channel (coil-tube treatment on De, r = De/D_c)", True,
        "half-pipe and spiral-baffle jackets", "; ".join(e.source for e in curved),
        {"Re_crit": ["2300 (1 + 8.6 r^0.45)", None]},
        {"laminar": "Nu = 3.66 + 0.08 [1 + 0.8 r^0.9] Re^m Pr^(1/3), m = 0.5 + 0.2903 r^0.194",
         "transition": "linear in Re from Re_crit to 2.2e4", "turbulent": "the coil_tube choice"}))
    out.append(Alternative(
        "channel", "straight", "straight channel with curvature factor", False,
        "half-pipe and spiral-baffle jackets", "; ".join(e.source for e in straight),
        {"Re_laminar": [None, jacket_side.LAMINAR_LIMIT], "Re_turbulent": [jacket_side.TURBULENT_LIMIT, None]},
        {"laminar": "Nu = max[1.86 (Re Pr De/L)^(1/3), 3.66]", "transition": "linear in Re from 2100 to 1e4",
         "turbulent": "Nu = 0.027 Re^0.8 Pr^(1/3) (1 + 3.5 De/D_c)"}))
    out.append(Alternative(
        "half_pipe_wall", "fins", "the wall between half-pipe turns as straight fins (the one treatment)", True,
        "half-pipe jackets: the jacketed wall's resistances", wall.HALF_PIPE_SOURCE,
        {"Biot": [None, wall.FIN_BIOT_LIMIT]},
        {"coverage": "w/p (w the half pipe's wetted width, p the pitch)",
         "fin_efficiency": "tanh(mL)/(mL), L = (p - w)/2, m = (h'/(k t))^0.5, h' = 1/(1/h_p + R_f,p + R_lining)",
         "surface_efficiency": "w/p + (1 - w/p) fin_efficiency",
         "overall": "1/U = (1/h_p + R_f,p + R_lining)/surface_efficiency + (R_wall + R_f,s + 1/h_s)/(w/p)"}))
    for key in coil_side.COIL_CORRELATIONS:
        entry = coil_side.CORRELATIONS[key]
        out.append(Alternative("coil_tube", key, entry.name, key == CorrelationChoice.coil_tube,
                               "inside coil tubes, and curved channels above Re = 2.2e4", entry.source,
                               _validity(entry), {}))
    return out
