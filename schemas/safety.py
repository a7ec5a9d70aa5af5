"""Schemas of /v1/thermal-safety, /v1/simulations and /v1/cstr-steady-states.

Requests load into the calc dataclasses (SI); results are shaped from the calc results by the
``*_dict`` functions below and dumped in API units.
"""
from __future__ import annotations

import math

import numpy as np
from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.safety import criticality as safety
from calc.safety import steady_states
from calc.safety import tank_model
from calc.properties import FLUIDS, STANDARD_PRESSURE

from .base import StrictSchema, finite_float, whole_number
from .heat_transfer import WarningSchema, warning_dicts
from .units import Quantity
from .vessel import ABSOLUTE_ZERO_C, CoolantSchema, VesselSchema, _LiquidFields, require_agitator

MAX_SPECIES = 20
MAX_REACTIONS = 20
MAX_FEED_STEPS = 50
MAX_LIMITS = 10
_PURE_FLUIDS = sorted(k for k, v in FLUIDS.items() if v.kind == "pure")


def _temperature(**kwargs) -> Quantity:
    return Quantity("temperature", minimum=ABSOLUTE_ZERO_C, exclusive_minimum=True, **kwargs)


def _positive(kind: str, **kwargs) -> Quantity:
    return Quantity(kind, minimum=0, exclusive_minimum=True, **kwargs)


def _non_negative(kind: str, **kwargs) -> Quantity:
    return Quantity(kind, minimum=0, **kwargs)


def _warnings():
    return fields.List(fields.Nested(WarningSchema))


def _amounts(description: str, **kwargs) -> fields.Dict:
    """Species name -> a plain number (mol/kg, coefficient or order)."""
    return fields.Dict(keys=fields.String(validate=validate.Length(min=1, max=40)),
                       values=finite_float(validate=validate.Range(-1e6, 1e6)),
                       validate=validate.Length(max=MAX_SPECIES),
                       metadata={"description": description}, **kwargs)


# ================================================================ thermal safety

class DecompositionSchema(StrictSchema):
    onset_power = _positive("specific power", required=True,
                            description="measured decomposition heat-release rate at onset_temperature")
    onset_temperature = _temperature(required=True)
    activation_energy = _positive("activation energy", required=True)

    @post_load
    def _make(self, data, **kwargs):
        return safety.Decomposition(**data)


class ThermalSafetyRequestSchema(StrictSchema):
    process_temperature = _temperature(required=True, description="temperature when cooling fails")
    heat_capacity = _positive("heat capacity", required=True, description="of the reaction mass")
    reaction_energy = _positive("specific energy", load_default=None,
                                description="heat released per kg of reaction mass (> 0)")
    reaction_enthalpy = Quantity("molar enthalpy", load_default=None,
                                 description="negative when exothermic; with concentration and density")
    concentration = _non_negative("concentration", load_default=None,
                                  description="of the limiting reactant in the reaction mass")
    density = _positive("density", load_default=None)
    accumulation = finite_float(load_default=1.0, validate=validate.Range(0.0, 1.0),
                                metadata={"description": "fraction of reactant unconverted when cooling fails "
                                                         "(1 = batch)"})
    maximum_technical_temperature = _temperature(load_default=None,
                                                 description="MTT; or give fluid (+ pressure) for its boiling point")
    fluid = fields.String(load_default=None, validate=validate.OneOf(_PURE_FLUIDS),
                          metadata={"description": "contents fluid whose boiling point at pressure is the MTT"})
    pressure = _positive("pressure", load_default=STANDARD_PRESSURE, description="absolute")
    decomposition = fields.Nested(DecompositionSchema, load_default=None)
    td24 = _temperature(load_default=None, description="temperature at which TMR_ad is 24 h, if known")

    @validates_schema
    def _choices(self, data, **kwargs):
        if data.get("reaction_energy") is None and data.get("reaction_enthalpy") is None:
            raise ValidationError("give reaction_energy, or reaction_enthalpy with concentration and density",
                                  "reaction_energy")
        if data.get("maximum_technical_temperature") is None and data.get("fluid") is None:
            raise ValidationError("give maximum_technical_temperature, or fluid (+ pressure) for its boiling point",
                                  "maximum_technical_temperature")
        if data.get("decomposition") is None and data.get("td24") is None:
            raise ValidationError("give decomposition data or td24", "decomposition")

    @post_load
    def _make(self, data, **kwargs):
        data = dict(data)
        data["contents_fluid"] = data.pop("fluid")
        return safety.ThermalSafetyInput(**data)


class ThermalSafetyResultSchema(StrictSchema):
    adiabatic_temperature_rise = Quantity("temperature difference")
    mtsr = Quantity("temperature", description="maximum temperature of the synthesis reaction")
    td24 = Quantity("temperature", description="temperature at which the adiabatic TMR is 24 h")
    time_to_maximum_rate = Quantity("time", allow_none=True,
                                    description="adiabatic time to maximum rate of the decomposition, from the MTSR")
    mtt = Quantity("temperature", description="maximum temperature for technical reasons")
    criticality_class = fields.Integer()
    reasoning = fields.List(fields.String())
    warnings = _warnings()
    cautions = fields.List(fields.String())


def thermal_safety_dict(result: safety.ThermalSafetyResult) -> dict:
    return {
        "adiabatic_temperature_rise": result.adiabatic_temperature_rise, "mtsr": result.mtsr,
        "td24": result.td24, "time_to_maximum_rate": result.time_to_maximum_rate, "mtt": result.mtt,
        "criticality_class": result.criticality_class, "reasoning": list(result.reasoning),
        "warnings": warning_dicts(result.warnings), "cautions": list(result.cautions),
    }


# ================================================================ simulations

class SpeciesSchema(StrictSchema):
    name = fields.String(required=True, validate=validate.Length(min=1, max=40))
    molar_mass = _positive("molar mass", required=True)
    heat_capacity = _positive("heat capacity", required=True)

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.Species(**data)


class ReactionSchema(StrictSchema):
    stoichiometry = _amounts("species -> coefficient, negative when consumed", required=True)
    orders = _amounts("species -> reaction order (>= 0)", required=True)
    rate_constant = finite_float(required=True, validate=validate.Range(0, 1e30),
                                 metadata={"description": "k at reference_temperature, SI: "
                                                          "(mol/m^3)^(1 - sum of orders)/s; at most 1e30 (beyond "
                                                          "any collision-limited rate)"})
    reference_temperature = _temperature(required=True)
    activation_energy = _non_negative("activation energy", required=True)
    enthalpy = Quantity("molar enthalpy", required=True,
                        description="per mol of extent, negative = exothermic; positive only with endothermic")
    endothermic = fields.Boolean(load_default=False,
                                 metadata={"description": "true declares a reaction that absorbs heat "
                                                          "(positive enthalpy)"})

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.Reaction(**data)


class SimulationChargeSchema(StrictSchema):
    mass = _positive("mass", required=True)
    temperature = _temperature(required=True)
    composition = _amounts("species -> mol per kg of charge; the rest is inert balance", required=True)
    density = _positive("density", required=True)
    balance_heat_capacity = _positive("heat capacity", required=True, description="of the inert balance")

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.Charge(**data)


class FeedStepSchema(StrictSchema):
    start = _non_negative("time", required=True)
    end = _positive("time", required=True)
    mass_flow = _non_negative("mass flow", required=True)

    @validates_schema
    def _order(self, data, **kwargs):
        if "start" in data and "end" in data and data["end"] <= data["start"]:
            raise ValidationError("must be later than start", "end")

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.FeedStep(**data)


class FeedSchema(StrictSchema):
    temperature = _temperature(required=True)
    composition = _amounts("species -> mol per kg of feed; the rest is inert balance", required=True)
    mass_flow = _non_negative("mass flow", load_default=None, description="constant feed; or give steps")
    start = _non_negative("time", load_default=0.0, description="start of the constant feed")
    end = _positive("time", load_default=None, description="end of the constant feed; default: never")
    steps = fields.List(fields.Nested(FeedStepSchema), load_default=None,
                        validate=validate.Length(min=1, max=MAX_FEED_STEPS))

    @validates_schema
    def _one(self, data, **kwargs):
        if (data.get("mass_flow") is None) == (data.get("steps") is None):
            raise ValidationError("give exactly one of mass_flow and steps", "mass_flow")

    @post_load
    def _make(self, data, **kwargs):
        if data.get("steps") is not None:
            return tank_model.Feed(data["temperature"], data["composition"], tuple(data["steps"]))
        end = math.inf if data.get("end") is None else data["end"]
        return tank_model.Feed.constant(data["temperature"], data["composition"], data["mass_flow"],
                                      data["start"], end)


class SimulationJacketSchema(StrictSchema):
    ua = _non_negative("thermal conductance", required=True)
    coolant_flow = _positive("mass flow", required=True)
    coolant_heat_capacity = _positive("heat capacity", required=True)
    inlet_temperature = _temperature(required=True)
    model = fields.String(load_default="single_pass", validate=validate.OneOf(["single_pass", "holdup"]))
    holdup_mass = _positive("mass", load_default=None, description="coolant in the jacket, for model holdup")
    initial_temperature = _temperature(load_default=None, description="of the jacket holdup")

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.Jacket(**data)


class ControllerSchema(StrictSchema):
    setpoint = _temperature(required=True)
    gain = finite_float(required=True, validate=validate.Range(0, 1e6),
                        metadata={"description": "K of coolant inlet per K of error; at most 1e6 (beyond any "
                                                 "controller tuning)"})
    integral_time = _positive("time", required=True)
    minimum_inlet_temperature = _temperature(required=True)
    maximum_inlet_temperature = _temperature(required=True)
    bias = _temperature(load_default=None, description="coolant inlet at zero error")

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.Controller(**data)


class FailureTime(Quantity):
    """A time, or the text "worst" to search the failure time giving the highest temperature."""

    def _deserialize(self, value, attr, data, **kwargs):
        if isinstance(value, str) and value.strip().lower() == "worst":
            return None
        return super()._deserialize(value, attr, data, **kwargs)


class CoolingFailureSchema(StrictSchema):
    time = FailureTime("time", required=True, minimum=0,
                       description='time of the cooling failure, or "worst" to search it')
    stop_feed = fields.Boolean(load_default=True)

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.CoolingFailure(**data)


class LimitSchema(StrictSchema):
    name = fields.String(required=True, validate=validate.Length(min=1, max=40))
    temperature = _temperature(required=True)
    terminal = fields.Boolean(load_default=True)
    direction = whole_number(load_default=1, validate=validate.OneOf([-1, 0, 1]))

    @post_load
    def _make(self, data, **kwargs):
        return tank_model.TemperatureLimit(**data)


class ContentsSchema(_LiquidFields):
    """The contents as a liquid, for the vessel's film coefficients (properties at the charge temperature)."""

    @post_load
    def _build(self, data, **kwargs):
        return self.liquid(data, "vessel.contents")


class SimulationVesselSchema(StrictSchema):
    vessel = fields.Nested(VesselSchema, required=True)
    contents = fields.Nested(ContentsSchema, required=True)
    coolant = fields.Nested(CoolantSchema, required=True)

    @validates_schema
    def _agitator(self, data, **kwargs):
        require_agitator(data.get("vessel"), "vessel", "required for the vessel's films and shaft power")


class SimulationRequestSchema(StrictSchema):
    mode = fields.String(required=True, validate=validate.OneOf(["batch", "semi_batch", "continuous"]))
    species = fields.List(fields.Nested(SpeciesSchema), required=True,
                          validate=validate.Length(min=1, max=MAX_SPECIES))
    reactions = fields.List(fields.Nested(ReactionSchema), required=True,
                            validate=validate.Length(min=1, max=MAX_REACTIONS))
    charge = fields.Nested(SimulationChargeSchema, required=True)
    feed = fields.Nested(FeedSchema, load_default=None)
    jacket = fields.Nested(SimulationJacketSchema, load_default=None)
    vessel = fields.Nested(SimulationVesselSchema, load_default=None,
                           metadata={"description": "instead of jacket: the vessel, its contents' properties and "
                                                    "coolant; UA and shaft power come from the heat-transfer core "
                                                    "at the charge temperature"})
    controller = fields.Nested(ControllerSchema, load_default=None)
    cooling_failure = fields.Nested(CoolingFailureSchema, load_default=None)
    limits = fields.List(fields.Nested(LimitSchema), load_default=list,
                         validate=validate.Length(max=MAX_LIMITS))
    shaft_power = _non_negative("power", load_default=None,
                                description="agitator power; default the vessel's agitator, or 0 without a vessel")
    mixture_heat_capacity = _positive("heat capacity", load_default=None,
                                      description="replaces every species' and the balance's heat capacity")
    enthalpy_reference_temperature = _temperature(load_default=298.15)
    limiting_reagent = fields.String(load_default=None, validate=validate.Length(min=1, max=40))
    method = fields.String(load_default="BDF", validate=validate.OneOf(sorted(tank_model.METHODS)))
    horizon = _positive("time", required=True, description="simulated time")
    output_points = whole_number(load_default=201, validate=validate.Range(min=2, max=100_000),
                                   metadata={"description": "points in the returned series (the service's own cap, "
                                                            "COOLMARGIN_MAX_SERIES_POINTS, may be lower)"})

    @validates_schema
    def _one_jacket(self, data, **kwargs):
        if data.get("jacket") is not None and data.get("vessel") is not None:
            raise ValidationError("give either jacket (UA given) or vessel (UA computed), not both", "vessel")

    @post_load
    def _make(self, data, **kwargs):
        """A dict of SimulationInput arguments; the API adds the budget from its configuration."""
        data = dict(data)
        data["failure"] = data.pop("cooling_failure")
        data["species"], data["reactions"] = tuple(data["species"]), tuple(data["reactions"])
        data["limits"] = tuple(data["limits"])
        return data


def simulation_input(args: dict, budget: tank_model.Budget, vessel_duty=None) -> tank_model.SimulationInput:
    """SimulationInput from the loaded request; ``vessel_duty`` (a calc.heat_transfer.JacketDuty) stands
    in for a given jacket and, unless given, the shaft power."""
    args = dict(args)
    args.pop("output_points")
    args.pop("vessel")
    if vessel_duty is not None:
        args["jacket"] = tank_model.Jacket(vessel_duty.ua, vessel_duty.coolant_flow,
                                           vessel_duty.coolant_heat_capacity, vessel_duty.inlet_temperature)
        if args["shaft_power"] is None:
            args["shaft_power"] = vessel_duty.shaft_power
    if args["shaft_power"] is None:
        args["shaft_power"] = 0.0
    return tank_model.SimulationInput(budget=budget, **args)


class LimitCrossingSchema(StrictSchema):
    name = fields.String()
    time = Quantity("time")
    temperature = Quantity("temperature")


class SimulationSummarySchema(StrictSchema):
    maximum_temperature = Quantity("temperature")
    time_of_maximum_temperature = Quantity("time")
    final_conversion = fields.Float()
    maximum_accumulation = fields.Float()
    time_of_maximum_accumulation = Quantity("time")
    peak_heat_release_rate = Quantity("power")
    peak_jacket_duty = Quantity("power")
    limits_crossed = fields.List(fields.Nested(LimitCrossingSchema))
    closure_error = fields.Float(metadata={"description": "relative enthalpy-balance closure error"})
    failure_time = Quantity("time", allow_none=True)


class SeriesSchema(StrictSchema):
    time = fields.List(Quantity("time"))
    temperature = fields.List(Quantity("temperature"))
    coolant_inlet_temperature = fields.List(Quantity("temperature", allow_none=True),
                                            metadata={"description": "null once the cooling has failed"})
    coolant_outlet_temperature = fields.List(Quantity("temperature", allow_none=True),
                                             metadata={"description": "null once the cooling has failed"})
    mass = fields.List(Quantity("mass"))
    conversion = fields.List(fields.Float())
    accumulation = fields.List(fields.Float())
    heat_release_rate = fields.List(Quantity("power"))
    jacket_duty = fields.List(Quantity("power"), metadata={"description": "heat removed from the contents"})
    feed_rate = fields.List(Quantity("mass flow"))
    concentrations = fields.Dict(keys=fields.String(), values=fields.List(Quantity("concentration")),
                                 metadata={"description": "species -> concentration series, mol/m^3"})


class FailureTrialSchema(StrictSchema):
    failure_time = Quantity("time")
    maximum_temperature = Quantity("temperature")


class SimulationResultSchema(StrictSchema):
    success = fields.Boolean()
    status = fields.Integer()
    message = fields.String()
    species = fields.List(fields.String())
    summary = fields.Nested(SimulationSummarySchema)
    series = fields.Nested(SeriesSchema)
    failure_search = fields.List(fields.Nested(FailureTrialSchema))
    warnings = _warnings()
    cautions = fields.List(fields.String())


_SERIES_FIELDS = ("time", "temperature", "coolant_inlet_temperature", "coolant_outlet_temperature", "mass",
                  "conversion", "accumulation", "heat_release_rate", "jacket_duty", "feed_rate")


def simulation_dict(result: tank_model.SimulationResult) -> dict:
    s, summary = result.series, result.summary
    series = {name: np.asarray(getattr(s, name), dtype=float).tolist() for name in _SERIES_FIELDS}
    series["concentrations"] = {name: np.asarray(row, dtype=float).tolist()
                                for name, row in zip(result.species, s.concentrations)}
    failure = summary.failure_time
    if failure is not None:  # no coolant flows after the failure: its temperatures are not reported
        for name in ("coolant_inlet_temperature", "coolant_outlet_temperature"):
            series[name] = [None if t > failure else value for t, value in zip(series["time"], series[name])]
    return {
        "success": bool(result.success), "status": int(result.status), "message": result.message,
        "species": list(result.species),
        "summary": {
            "maximum_temperature": summary.maximum_temperature,
            "time_of_maximum_temperature": summary.time_of_maximum_temperature,
            "final_conversion": summary.final_conversion, "maximum_accumulation": summary.maximum_accumulation,
            "time_of_maximum_accumulation": summary.time_of_maximum_accumulation,
            "peak_heat_release_rate": summary.peak_heat_release_rate, "peak_jacket_duty": summary.peak_jacket_duty,
            "limits_crossed": [{"name": c.name, "time": c.time, "temperature": c.temperature}
                               for c in summary.limits_crossed],
            "closure_error": summary.closure_error, "failure_time": summary.failure_time,
        },
        "series": series,
        "failure_search": [{"failure_time": t, "maximum_temperature": T} for t, T in result.failure_search],
        "warnings": warning_dicts(result.warnings), "cautions": list(result.cautions),
    }


def series_rows(payload: dict) -> tuple[list[dict], dict[str, str]]:
    """One row per time point of a dumped simulation payload, and the unit of each column."""
    series = payload["series"]
    columns = [c for c in _SERIES_FIELDS if c in series]
    concentrations = series.get("concentrations", {})
    rows = []
    for i in range(len(series["time"])):
        row = {c: series[c][i] for c in columns}
        row.update({f"concentration.{name}": values[i] for name, values in concentrations.items()})
        rows.append(row)
    units = {c: field.inner.metadata["unit"] for c, field in SeriesSchema().fields.items()
             if isinstance(field, fields.List) and isinstance(field.inner, Quantity)}
    units.update({f"concentration.{name}": "mol/m^3" for name in concentrations})
    return rows, units


# ================================================================ CSTR steady states

class CSTRRequestSchema(StrictSchema):
    volume = _positive("volume", required=True)
    flow = _positive("volume flow", required=True, description="feed = outflow")
    feed_concentration = _non_negative("concentration", required=True)
    feed_temperature = _temperature(required=True)
    density = _positive("density", required=True)
    heat_capacity = _positive("heat capacity", required=True)
    rate_constant = finite_float(required=True, validate=validate.Range(0, 1e30),
                                 metadata={"description": "k at reference_temperature, (mol/m^3)^(1-n)/s; at most "
                                                          "1e30 (beyond any collision-limited rate)"})
    reference_temperature = _temperature(required=True)
    activation_energy = _non_negative("activation energy", required=True)
    reaction_enthalpy = Quantity("molar enthalpy", required=True,
                                 description="negative = exothermic; positive only with endothermic")
    endothermic = fields.Boolean(load_default=False,
                                 metadata={"description": "true declares a reaction that absorbs heat "
                                                          "(positive reaction_enthalpy)"})
    ua = _non_negative("thermal conductance", required=True)
    coolant_temperature = _temperature(required=True)
    order = finite_float(load_default=1.0, validate=validate.Range(0.0, 5.0))
    shaft_power = _non_negative("power", load_default=0.0)
    minimum_temperature = _temperature(load_default=None, description="lower end of the scan; with maximum")
    maximum_temperature = _temperature(load_default=None, description="upper end of the scan; with minimum")
    grid_points = whole_number(load_default=4001, validate=validate.Range(11, 20001))

    @validates_schema
    def _range(self, data, **kwargs):
        low, high = data.get("minimum_temperature"), data.get("maximum_temperature")
        if (low is None) != (high is None):
            raise ValidationError("give both minimum_temperature and maximum_temperature, or neither",
                                  "maximum_temperature")
        if low is not None and high <= low:
            raise ValidationError("must be above minimum_temperature", "maximum_temperature")

    @post_load
    def _make(self, data, **kwargs):
        data = dict(data)
        low, high = data.pop("minimum_temperature"), data.pop("maximum_temperature")
        return steady_states.CSTRInput(temperature_range=None if low is None else (low, high), **data)


class SteadyStateSchema(StrictSchema):
    temperature = Quantity("temperature")
    concentration = Quantity("concentration")
    conversion = fields.Float()
    heat_generation = Quantity("power")
    generation_slope = Quantity("thermal conductance", description="dQ_g/dT")
    removal_slope = Quantity("thermal conductance", description="dQ_r/dT")
    slope_stable = fields.Boolean()
    eigenvalues = fields.List(fields.List(fields.Float()),
                              metadata={"description": "[real, imaginary] pairs, 1/s"})
    stable = fields.Boolean()
    classification = fields.String()


class CurvesSchema(StrictSchema):
    temperature = fields.List(Quantity("temperature"))
    heat_generation = fields.List(Quantity("power"))
    heat_removal = fields.List(Quantity("power"))


class CSTRResultSchema(StrictSchema):
    states = fields.List(fields.Nested(SteadyStateSchema))
    curves = fields.Nested(CurvesSchema)
    warnings = _warnings()
    cautions = fields.List(fields.String())


CURVE_POINTS = 401  # points of the returned curves; the states are found on the full scan grid


def _thinned(values) -> list[float]:
    """At most CURVE_POINTS evenly spaced points of a scan, first and last kept."""
    values = np.asarray(values, dtype=float)
    if values.size <= CURVE_POINTS:
        return values.tolist()
    return values[np.linspace(0, values.size - 1, CURVE_POINTS).round().astype(int)].tolist()


def steady_states_dict(result: steady_states.SteadyStatesResult) -> dict:
    states = []
    for s in result.states:
        states.append({
            "temperature": s.temperature, "concentration": s.concentration, "conversion": s.conversion,
            "heat_generation": s.heat_generation, "generation_slope": s.generation_slope,
            "removal_slope": s.removal_slope, "slope_stable": bool(s.slope_stable),
            "eigenvalues": [[float(complex(e).real), float(complex(e).imag)] for e in s.eigenvalues],
            "stable": bool(s.stable), "classification": s.classification,
        })
    return {
        "states": states,
        "curves": {name: _thinned(getattr(result, name)) for name in ("temperature", "heat_generation",
                                                                       "heat_removal")},
        "warnings": warning_dicts(result.warnings), "cautions": list(result.cautions),
    }
