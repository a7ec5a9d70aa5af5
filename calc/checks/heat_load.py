"""Heat released in the vessel: reaction models and the total heat load the cooling must remove.

A heat-release model says how much heat the reaction gives off at the process temperature. Three
models are kept in one registry, :data:`MODELS`, keyed by the name requests use:

* ``specific_power``: a heat release per kilogram of contents, q [W/kg], as measured in a reaction
  calorimeter; Q_r = q m_charge.
* ``total_power``: the reaction's heat release for the whole charge, Q_r [W].
* ``dosing``: a semi-batch step in which the feed reacts as it is added (dosing-controlled, no
  accumulation). With reaction enthalpy dH [J/mol, negative = exothermic], amount dosed n [mol] over
  the dosing time t [s]:

      Q_r = -dH n / t_dose                                          (reaction power)
      Q_f = (m_feed / t_dose) c_p,feed (T_r - T_feed)               (sensible heat taken up by the feed)

  Q_f is positive when the feed is colder than the contents (it absorbs heat) and negative when it
  is hotter (it brings heat in). Both are steady-state rates over the dosing period (definition of
  a constant feed rate; Stoessel, *Thermal Safety of Chemical Processes*, Wiley-VCH 2008, ch. 7,
  dosing-controlled semi-batch reactions).

The heat load on the cooling system is then

    Q_load = Q_r + P_agitator - Q_f

The agitator's shaft power ends up as heat in the contents and always adds (definition: shaft work
term of the stirred-tank energy balance). Reaction heat released on top of this because dosed feed
accumulates unreacted is NOT covered; that belongs to the thermal-safety assessment (MTSR).
"""
from __future__ import annotations

from dataclasses import MISSING, dataclass, field, fields, replace

from calc.validity import (CalcWarning, InputError, Warnings, require_finite, require_non_negative,
                           require_positive, require_sign)





@dataclass(frozen=True)
class SpecificPower:
    """Heat release per kilogram of contents, W/kg (negative: the reaction absorbs heat)."""

    power_per_mass: float
    model = "specific_power"

    def validate(self) -> None:
        require_finite("heat_release.power_per_mass", self.power_per_mass)

    def reaction_power(self, charge_mass: float) -> float:
        """Q_r = q m_charge, W."""
        return self.power_per_mass * charge_mass

    def feed_sensible(self, process_temperature: float) -> float:
        return 0.0

    def scaled(self, mass_ratio: float) -> "SpecificPower":
        """The same reaction in a charge ``mass_ratio`` times heavier: the release per kg stays."""
        return self


@dataclass(frozen=True)
class TotalPower:
    """Heat release of the whole charge, W (negative: the reaction absorbs heat)."""

    power: float
    model = "total_power"

    def validate(self) -> None:
        require_finite("heat_release.power", self.power)

    def reaction_power(self, charge_mass: float) -> float:
        return self.power

    def feed_sensible(self, process_temperature: float) -> float:
        return 0.0

    def scaled(self, mass_ratio: float) -> "TotalPower":
        """The same reaction in a charge ``mass_ratio`` times heavier: the power scales with the mass."""
        return replace(self, power=self.power * mass_ratio)


@dataclass(frozen=True)
class Dosing:
    """A dosing-controlled semi-batch step: the feed reacts as it is added.

    ``reaction_enthalpy`` J/mol (negative = exothermic), ``dosed_amount`` mol, ``dosing_time`` s,
    ``feed_mass`` kg (0: the feed's sensible heat is ignored), ``feed_temperature`` K,
    ``feed_heat_capacity`` J/(kg K); the last two are needed only when ``feed_mass`` > 0.
    A positive enthalpy is refused unless ``endothermic`` is true (see :func:`calc.validity.require_sign`).
    """

    reaction_enthalpy: float
    dosed_amount: float
    dosing_time: float
    feed_mass: float = 0.0
    feed_temperature: float | None = None
    feed_heat_capacity: float | None = None
    endothermic: bool = False  # the request says explicitly that the step absorbs heat (dH > 0)
    model = "dosing"

    def validate(self) -> None:
        require_sign("heat_release.reaction_enthalpy", self.reaction_enthalpy, self.endothermic,
                     "heat_release.endothermic")
        require_positive("heat_release.dosed_amount", self.dosed_amount)
        require_positive("heat_release.dosing_time", self.dosing_time)
        if require_non_negative("heat_release.feed_mass", self.feed_mass) > 0.0:
            if self.feed_temperature is None:
                raise InputError("heat_release.feed_temperature", "is needed when a feed mass is given")
            if self.feed_heat_capacity is None:
                raise InputError("heat_release.feed_heat_capacity", "is needed when a feed mass is given")
            require_positive("heat_release.feed_temperature", self.feed_temperature)
            require_positive("heat_release.feed_heat_capacity", self.feed_heat_capacity)

    @property
    def reaction_energy(self) -> float:
        """Heat released by the whole dose, -dH n, J."""
        return -self.reaction_enthalpy * self.dosed_amount

    def feed_energy(self, process_temperature: float) -> float:
        """Heat taken up by the whole feed warming to T_r, m_feed c_p (T_r - T_feed), J."""
        if self.feed_mass == 0.0 or self.feed_heat_capacity is None or self.feed_temperature is None:
            return 0.0  # (both are required with a feed mass, see __post_init__)
        return self.feed_mass * self.feed_heat_capacity * (process_temperature - self.feed_temperature)

    def net_energy(self, process_temperature: float) -> float:
        """A in Q_load(t) = A / t_dose + P_agitator: reaction energy less the feed's sensible heat, J."""
        return self.reaction_energy - self.feed_energy(process_temperature)

    def reaction_power(self, charge_mass: float) -> float:
        """Q_r = -dH n / t_dose, W."""
        return self.reaction_energy / self.dosing_time

    def feed_sensible(self, process_temperature: float) -> float:
        """Q_f = (m_feed / t_dose) c_p (T_r - T_feed), W; positive when the feed is colder."""
        return self.feed_energy(process_temperature) / self.dosing_time

    def scaled(self, mass_ratio: float) -> "Dosing":
        """The same recipe in a charge ``mass_ratio`` times heavier, dosed over the same time."""
        return replace(self, dosed_amount=self.dosed_amount * mass_ratio, feed_mass=self.feed_mass * mass_ratio)


#: The heat-release models, keyed by the name requests use.
MODELS: dict[str, type] = {cls.model: cls for cls in (SpecificPower, TotalPower, Dosing)}

HeatRelease = SpecificPower | TotalPower | Dosing


def heat_release_model(model: str, **parameters: float) -> HeatRelease:
    """Build and validate a heat-release model from its registry name and parameters.

    >>> heat_release_model("specific_power", power_per_mass=25.0)
    SpecificPower(power_per_mass=25.0)
    >>> heat_release_model("stirring", power=1.0)
    Traceback (most recent call last):
    ...
    calc.validity.InputError: heat_release.model: unknown model 'stirring'; known models: dosing, specific_power, total_power
    """
    try:
        cls = MODELS[model]
    except (KeyError, TypeError):
        raise InputError("heat_release.model", f"unknown model {model!r}; known models: "
                                               f"{', '.join(sorted(MODELS))}") from None
    names = {f.name for f in fields(cls)}
    for name in parameters:
        if name not in names:
            raise InputError(f"heat_release.{name}", f"not a parameter of the {model!r} model")
    required = [f.name for f in fields(cls) if f.default is MISSING and f.default_factory is MISSING]
    for name in required:
        if parameters.get(name) is None:
            raise InputError(f"heat_release.{name}", f"is required by the {model!r} model")
    instance: HeatRelease = cls(**parameters)
    instance.validate()
    return instance


@dataclass(frozen=True)
class HeatLoad:
    """The heat the cooling system must remove, W, and its parts (total = reaction + agitator - feed)."""

    total: float
    reaction: float
    agitator: float
    feed_sensible: float  # positive: a cold feed absorbs heat; negative: a hot feed brings heat in
    warnings: Warnings = field(default_factory=Warnings)


def heat_load(model: HeatRelease, charge_mass: float, process_temperature: float,
              agitator_power: float) -> HeatLoad:
    """Heat load on the cooling: Q_load = Q_r + P_agitator - Q_f (see the module notes), W.

    A dosing step of -120 kJ/mol x 50 mol over one hour releases 1667 W (definition); 80 kg of feed
    at 20 degC, c_p 2000 J/(kg K), warming to 60 degC, takes up 80 x 2000 x 40 / 3600 = 1778 W:

    >>> d = Dosing(-120e3, 50.0, 3600.0, 80.0, 293.15, 2000.0)
    >>> r = heat_load(d, 1000.0, 333.15, 500.0)
    >>> round(r.reaction, 3), round(r.feed_sensible, 3), round(r.total, 3)
    (1666.667, 1777.778, 388.889)
    """
    if not isinstance(model, tuple(MODELS.values())):
        raise InputError("heat_release", f"not a heat-release model: {model!r}")
    model.validate()
    require_non_negative("charge.mass", charge_mass)
    require_positive("process_temperature", process_temperature)
    require_non_negative("agitator_power", agitator_power)
    warnings = Warnings()
    reaction = model.reaction_power(charge_mass)
    feed = model.feed_sensible(process_temperature)
    if getattr(model, "endothermic", False):
        warnings.add(CalcWarning("endothermic_step",
                                 f"the request declares a heat-absorbing step (heat_release.endothermic = true): the "
                                 f"reaction takes up {-reaction:.4g} W. The verdict only says that cooling does not "
                                 "limit this step; heating needed to hold the process temperature is not checked"))
    elif reaction <= 0.0:
        what = "is endothermic" if reaction < 0.0 else "releases no heat"
        warnings.add(CalcWarning("no_reaction_heat",
                                 f"the reaction {what} ({reaction:.4g} W): check the sign of the heat release "
                                 "(exothermic reaction enthalpy is negative, heat release per mass positive)"))
    if feed < 0.0:
        warnings.add(CalcWarning("feed_hotter_than_contents",
                                 f"the feed is warmer than the contents and brings in {-feed:.4g} W of sensible "
                                 "heat (reported as a negative feed_sensible)"))
    total = reaction + agitator_power - feed
    return HeatLoad(total, reaction, agitator_power, feed, warnings)
