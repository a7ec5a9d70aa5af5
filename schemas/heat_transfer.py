"""Schemas of /v1/geometry, /v1/agitation, /v1/heat-transfer, /v1/coolant-balance and the libraries."""
from __future__ import annotations

from dataclasses import replace

from marshmallow import ValidationError, fields, post_load, pre_dump, validate, validates_schema

from calc.films import coil_side, jacket_side, process_side
from calc.films.selection import MEASURED_SURFACES, Calibration, CorrelationChoice, Measurement

from .base import StrictSchema, finite_float
from .units import Quantity, absolute_temperature
from .vessel import ChargeSchema, CoolantSchema, VesselSchema, require_agitator


class WarningSchema(StrictSchema):
    code = fields.String()
    message = fields.String()


def warning_list() -> fields.List:
    """The ``warnings`` field of every result: [{code, message}]."""
    return fields.List(fields.Nested(WarningSchema))


# ---------------------------------------------------------------- requests

class FillSchema(StrictSchema):
    volume = Quantity("volume", minimum=0, exclusive_minimum=True, load_default=None)
    level = Quantity("length", minimum=0, exclusive_minimum=True, load_default=None,
                     description="liquid height above the lowest inside point")

    @validates_schema
    def _one(self, data, **kwargs):
        if (data.get("volume") is None) == (data.get("level") is None):
            raise ValidationError("give exactly one of volume and level", "volume")


class GeometryRequestSchema(StrictSchema):
    vessel = fields.Nested(VesselSchema, required=True)
    fill = fields.Nested(FillSchema, required=True)


class _AgitatedVesselSchema(StrictSchema):
    vessel = fields.Nested(VesselSchema, required=True)
    charge = fields.Nested(ChargeSchema, required=True)
    process_temperature = absolute_temperature(required=True)

    @validates_schema
    def _agitator(self, data, **kwargs):
        require_agitator(data.get("vessel"), "vessel")


class AgitationRequestSchema(_AgitatedVesselSchema):
    pass


class CorrelationsSchema(StrictSchema):
    """The correlation of each resistance (GET /v1/correlations lists the options); defaults: the library's."""

    process_wall = fields.String(load_default="default", validate=validate.Length(min=1, max=60), metadata={
        "description": "wall constant set of the impeller: an id of /v1/impellers wall_alternatives"})
    process_coil = fields.String(load_default="default", validate=validate.Length(min=1, max=60), metadata={
        "description": "coil constant set of the impeller: an id of /v1/impellers coil_alternatives"})
    annular_jacket = fields.String(load_default="lehrer_1970",
                                   validate=validate.OneOf(jacket_side.ANNULAR_CORRELATIONS),
                                   metadata={"description": "plain annular jacket film"})
    channel = fields.String(load_default="curved", validate=validate.OneOf(jacket_side.CHANNEL_TREATMENTS),
                            metadata={"description": "half-pipe and spiral-baffle channels: curved (coil-tube "
                                                     "treatment) or straight (with curvature factor)"})
    coil_tube = fields.String(load_default="schmidt_1967", validate=validate.OneOf(coil_side.COIL_CORRELATIONS),
                              metadata={"description": "turbulent film inside coil tubes (and curved channels)"})

    @post_load
    def _build(self, data, **kwargs):
        return CorrelationChoice(**data)


class MeasurementSchema(StrictSchema):
    """One measured UA (or U) of the vessel at stated conditions (e.g. /v1/ua-fit of a water run)."""

    ua = Quantity("thermal conductance", load_default=None, minimum=0, exclusive_minimum=True,
                  description="measured UA of the surface (give this or overall_coefficient)")
    ua_interval = fields.List(Quantity("thermal conductance", minimum=0, exclusive_minimum=True), load_default=None,
                              validate=validate.Length(equal=2),
                              metadata={"description": "95 % interval of ua, e.g. /v1/ua-fit's ua_interval"})
    overall_coefficient = Quantity("heat-transfer coefficient", load_default=None, minimum=0, exclusive_minimum=True,
                                   description="measured U on the surface's process-side area at the measured fill")
    overall_coefficient_interval = fields.List(
        Quantity("heat-transfer coefficient", minimum=0, exclusive_minimum=True), load_default=None,
        validate=validate.Length(equal=2), metadata={"description": "95 % interval of overall_coefficient"})
    relative_uncertainty = finite_float(load_default=None, validate=validate.Range(0, 1, min_inclusive=True,
                                                                                   max_inclusive=False),
                                        metadata={"description": "instead of an interval: the 95 % half-width "
                                                                 "as a fraction of the value (0.1 = +-10 %)"})
    surface = fields.String(load_default="jacket", validate=validate.OneOf(sorted(MEASURED_SURFACES)),
                            metadata={"description": "what was measured: the jacket, or the coils together"})
    agitator_speed = Quantity("agitator speed", load_default=None, minimum=0, exclusive_minimum=True,
                              description="during the measurement (default: the vessel's speed)")
    process_temperature = absolute_temperature(required=True, description="contents' temperature during the "
                                                                          "measurement")
    charge = fields.Nested(ChargeSchema, required=True, metadata={"description": "the charge measured (often water)"})
    coolant = fields.Nested(CoolantSchema, required=True, metadata={
        "description": "coolant during the measurement: fluid, inlet temperature, flow"})

    @validates_schema
    def _one(self, data, **kwargs):
        quantities = [name for name in ("ua", "overall_coefficient") if data.get(name) is not None]
        if len(quantities) != 1:
            raise ValidationError("give exactly one of ua and overall_coefficient", "ua")
        name = quantities[0]
        other = "overall_coefficient" if name == "ua" else "ua"
        if data.get(f"{other}_interval") is not None:
            raise ValidationError(f"the interval must be of {name}", f"{other}_interval")
        interval = data.get(f"{name}_interval")
        if (interval is None) == (data.get("relative_uncertainty") is None):
            raise ValidationError(f"state the measurement's uncertainty: give exactly one of {name}_interval and "
                                  "relative_uncertainty", f"{name}_interval")
        if interval is not None and not interval[0] <= data[name] <= interval[1]:
            raise ValidationError(f"must be [low, high] around {name}", f"{name}_interval")

    @post_load
    def _build(self, data, **kwargs):
        quantity = "ua" if data["ua"] is not None else "overall_coefficient"
        value = data[quantity]
        interval = data[f"{quantity}_interval"]
        if interval is None:
            interval = (value * (1.0 - data["relative_uncertainty"]), value * (1.0 + data["relative_uncertainty"]))
        return Measurement(value, tuple(interval), data["process_temperature"], data["charge"], data["coolant"],
                           quantity, data["surface"], data["agitator_speed"])


class CalibrationSchema(StrictSchema):
    """A vessel's own measured heat transfer: the calibration object of /v1/wilson-plot, or one measured UA."""

    process_constant = finite_float(load_default=None, validate=validate.Range(0, 100, min_inclusive=False),
                                    metadata={"description": "a of Nu = a Re^b Pr^c (mu/mu_w)^0.14 at the wall "
                                                             "(give this or measurement)"})
    process_constant_interval = fields.List(finite_float(allow_none=True), load_default=None,
                                            validate=validate.Length(equal=2))
    exponent = finite_float(load_default=2.0 / 3.0, validate=validate.Range(0.3, 1.0))
    prandtl_exponent = finite_float(load_default=1.0 / 3.0, validate=validate.Range(0.2, 0.5))
    remaining_resistance = Quantity("fouling resistance", load_default=None, minimum=0,
                                    description="measured wall + fouling + coolant film of the jacket")
    remaining_resistance_interval = fields.List(Quantity("fouling resistance"), load_default=None,
                                                validate=validate.Length(equal=2))
    measurement = fields.Nested(MeasurementSchema, load_default=None, metadata={
        "description": "one measured UA (or U) at stated conditions: the multiplier on the published process-side "
                       "constant that reproduces it is backed out, and the margin band spans the measurement's "
                       "interval (instead of process_constant)"})

    @validates_schema
    def _one(self, data, **kwargs):
        if (data.get("process_constant") is None) == (data.get("measurement") is None):
            raise ValidationError("give exactly one of process_constant (a Wilson plot) and measurement",
                                  "process_constant")
        if data.get("measurement") is not None:
            for name in ("process_constant_interval", "remaining_resistance", "remaining_resistance_interval"):
                if data.get(name) is not None:
                    raise ValidationError("belongs to a Wilson plot's calibration, not to a measurement", name)

    @post_load
    def _build(self, data, **kwargs):
        if data["measurement"] is not None:
            return Calibration(measurement=data["measurement"])
        interval = data["process_constant_interval"]
        if interval is not None:
            interval = tuple(float("inf") if v is None else v for v in interval)
        remaining = data["remaining_resistance_interval"]
        return Calibration(data["process_constant"], interval, data["exponent"], data["prandtl_exponent"],
                           data["remaining_resistance"], None if remaining is None else tuple(remaining))


def with_correlations(vessel, choice, calibration=None, remaining=True):
    """The vessel carrying the request's correlation choice and calibration (kept by scale-up's similar vessels)."""
    if vessel is None or (choice is None and calibration is None):
        return vessel
    choice = (choice or vessel.correlations).calibrated(calibration, remaining)
    return replace(vessel, correlations=choice)


class HeatTransferRequestSchema(_AgitatedVesselSchema):
    coolant = fields.Nested(CoolantSchema, required=True)
    correlations = fields.Nested(CorrelationsSchema, load_default=None)
    calibration = fields.Nested(CalibrationSchema, load_default=None, metadata={
        "description": "the vessel's own measured constants (from /v1/wilson-plot) or one measured UA at stated "
                       "conditions: results say calibrated and the margin band spans the fit's or the measurement's "
                       "interval. A stored vessel ({\"ref\": ...}) with a calibration attached uses it by default "
                       "(records names the vessel revision); send null to use the published correlations instead"})

    @post_load
    def _choose(self, data, **kwargs):
        data["vessel"] = with_correlations(data["vessel"], data.pop("correlations", None),
                                           data.pop("calibration", None))
        return data


class CoolantBalanceRequestSchema(StrictSchema):
    process_temperature = absolute_temperature(required=True)
    coolant = fields.Nested(CoolantSchema, required=True)
    ua = Quantity("thermal conductance", required=True, minimum=0,
                  description="overall coefficient times area of the exchanging surface")


# ---------------------------------------------------------------- results

class GeometryResultSchema(StrictSchema):
    volume = Quantity("volume", metadata={"description": "liquid volume"})
    liquid_level = Quantity("length")
    wetted_area = Quantity("area")
    jacketed_area = Quantity("area")
    coil_area = Quantity("area")
    heat_transfer_area = Quantity("area")
    area_per_volume = Quantity("area per volume")
    displaced_volume = Quantity("volume", metadata={"description": "liquid displaced by the coils"})
    brim_volume = Quantity("volume", metadata={"description": "volume up to the top of the straight side"})
    warnings = warning_list()


class AgitationResultSchema(StrictSchema):
    impeller = fields.String()
    reynolds = fields.Float()
    power_number = fields.Float()
    power = Quantity("power")
    power_per_volume = Quantity("power per volume")
    tip_speed = Quantity("velocity")
    froude = fields.Float()
    regime = fields.String()
    sources = fields.Dict(keys=fields.String(), values=fields.String())
    warnings = warning_list()


class FilmCoefficientsSchema(StrictSchema):
    process_jacket = Quantity("heat-transfer coefficient", allow_none=True)
    process_bottom_head = Quantity("heat-transfer coefficient", allow_none=True)
    process_coil = Quantity("heat-transfer coefficient", allow_none=True,
                            description="area-weighted mean over every wetted coil")
    service_jacket = Quantity("heat-transfer coefficient", allow_none=True)
    service_coil = Quantity("heat-transfer coefficient", allow_none=True,
                            description="area-weighted mean over every wetted coil")


def _resistance(name: str) -> Quantity:
    return Quantity("fouling resistance", attribute=f"resistances.{name}")


class ResistancesSchema(StrictSchema):
    """Dumps a calc.films.wall.OverallResult: its resistances by layer and the controlling one."""

    process_film = _resistance("process_film")
    process_fouling = _resistance("process_fouling")
    lining = _resistance("lining")
    wall = _resistance("wall")
    service_fouling = _resistance("service_fouling")
    service_film = _resistance("service_film")
    controlling = fields.String()
    channel_coverage = fields.Float(metadata={
        "description": "half-pipe jackets: share of the jacketed wall under the coolant channel (wetted width / "
                       "pitch); the wall, service fouling and coolant film above are referred to the jacketed area "
                       "through it (GET /v1/correlations, half_pipe_wall). 1: wetted all over"})
    fin_efficiency = fields.Float(metadata={
        "description": "half-pipe jackets: tanh(mL)/(mL) of the wall between turns as a straight fin, "
                       "L = (pitch - width)/2, m = (h'/(k t))^0.5, h' the process film, fouling and lining in series "
                       "(Incropera & DeWitt, Table 3.4). 1 without lands"})
    surface_efficiency = fields.Float(metadata={
        "description": "half-pipe jackets: coverage + (1 - coverage) x fin_efficiency; the conduction along the "
                       "lands, (1/surface_efficiency - 1)(1/h' ), is in the wall resistance above"})


class StreamSchema(StrictSchema):
    """Dumps a calc.network.heat_transfer.Stream."""

    name = fields.String()
    mass_flow = Quantity("mass flow")
    ua = Quantity("thermal conductance")
    inlet_temperature = Quantity("temperature", attribute="balance.inlet_temperature")
    outlet_temperature = Quantity("temperature", attribute="balance.outlet_temperature")
    duty = Quantity("power", attribute="balance.duty")
    log_mean_temperature_difference = Quantity("temperature difference",
                                               attribute="balance.log_mean_temperature_difference")
    service_velocity = Quantity("velocity", allow_none=True)
    service_reynolds = fields.Float(allow_none=True)
    pressure_drop = Quantity("pressure", allow_none=True,
                             description="supply-to-return pressure drop of the circuit (one zone of a jacket "
                                         "in parallel zones): channel friction plus nozzle and fitting losses")
    velocity = Quantity("velocity", allow_none=True, description="mean coolant velocity in the channel")
    path_length = Quantity("length", allow_none=True, description="length of the coolant's path through one zone")


class HeatTransferResultSchema(StrictSchema):
    process_temperature = Quantity("temperature")
    film_coefficients = fields.Nested(FilmCoefficientsSchema)
    resistances = fields.Nested(ResistancesSchema, allow_none=True, attribute="controlling_overall",
                                metadata={"description": "of the surface carrying most of the UA"})
    overall_coefficient = Quantity("heat-transfer coefficient")
    ua = Quantity("thermal conductance")
    heat_transfer_area = Quantity("area", attribute="area")
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    duty = Quantity("power", metadata={"description": "heat the coolant removes at the process temperature"})
    streams = fields.List(fields.Nested(StreamSchema))
    correlations = fields.Dict(keys=fields.String(), values=fields.String())
    geometry = fields.Nested(GeometryResultSchema, attribute="fill")
    agitation = fields.Nested(AgitationResultSchema)
    warnings = warning_list()
    cautions = fields.List(fields.String())


class CoolantBalanceResultSchema(StrictSchema):
    process_temperature = Quantity("temperature")
    inlet_temperature = Quantity("temperature")
    outlet_temperature = Quantity("temperature")
    duty = Quantity("power")
    log_mean_temperature_difference = Quantity("temperature difference")
    ntu = fields.Float()
    effectiveness = fields.Float()
    mass_flow = Quantity("mass flow")
    heat_capacity = Quantity("heat capacity")
    warnings = warning_list()


class FilmConstantsSchema(StrictSchema):
    correlation = fields.String()
    equation = fields.String(metadata={"description": "the equation with every factor applied"})
    a = fields.Float()
    b = fields.Float()
    c = fields.Float()
    d = fields.Float()
    e = fields.Float(attribute="height_exponent",
                     metadata={"description": "exponent on the liquid height over tank diameter H/T"})
    re_low = fields.Float(allow_none=True)
    re_high = fields.Float(allow_none=True)
    baffled = fields.Boolean(allow_none=True, metadata={"description": "basis of the fit; null: either"})
    source = fields.String()

    @pre_dump
    def _equation(self, constants, **kwargs):
        shaped = {name: getattr(constants, name) for name in (
            "correlation", "a", "b", "c", "d", "height_exponent", "re_low", "re_high", "baffled", "source")}
        return shaped | {"equation": process_side.CORRELATIONS[constants.correlation].equation}


class TransitionSchema(StrictSchema):
    re_from = fields.Float()
    re_to = fields.Float()
    rule = fields.String()


class WallAlternativeSchema(StrictSchema):
    id = fields.String(metadata={"description": "what correlations.process_wall (coil_alternatives: process_coil) "
                                                "takes"})
    constants = fields.List(fields.Nested(FilmConstantsSchema))
    transitions = fields.List(fields.Nested(TransitionSchema))


class ImpellerSchema(StrictSchema):
    id = fields.String()
    name = fields.String()
    power_number = fields.Float()
    power_number_source = fields.String()
    unbaffled_power_number = fields.Float()
    unbaffled_power_number_source = fields.String()
    laminar_constant = fields.Float()
    laminar_constant_source = fields.String()
    wall = fields.List(fields.Nested(FilmConstantsSchema))
    wall_transitions = fields.List(fields.Nested(TransitionSchema),
                                   metadata={"description": "how one wall constant set hands over to the next"})
    wall_alternatives = fields.List(fields.Nested(WallAlternativeSchema), metadata={
        "description": "every published wall constant set ('default' is the wall's); correlations.process_wall "
                       "chooses one"})
    bottom_head = fields.List(fields.Nested(FilmConstantsSchema))
    coil = fields.List(fields.Nested(FilmConstantsSchema))
    coil_alternatives = fields.List(fields.Nested(WallAlternativeSchema), metadata={
        "description": "every published helical-coil constant set ('default' is the coil's, or its stand-in's); "
                       "correlations.process_coil chooses one"})
    source = fields.String(attribute="wall_source")

    @pre_dump
    def _alternatives(self, info, **kwargs):
        shaped = {name: getattr(info, name) for name in (
            "id", "name", "power_number", "power_number_source", "unbaffled_power_number",
            "unbaffled_power_number_source", "laminar_constant", "laminar_constant_source", "wall",
            "bottom_head", "coil", "wall_source")}
        return shaped | {
            "wall_transitions": process_side.transitions(info.wall),
            "wall_alternatives": [{"id": key, "constants": bands, "transitions": process_side.transitions(bands)}
                                  for key, bands in process_side.wall_alternatives(info.id).items()],
            "coil_alternatives": [{"id": key, "constants": bands, "transitions": process_side.transitions(bands)}
                                  for key, bands in process_side.coil_alternatives(info.id).items()]}


class CorrelationAlternativeSchema(StrictSchema):
    resistance = fields.String(metadata={"description": "the field of the request's correlations object"})
    id = fields.String(metadata={"description": "what that field takes"})
    name = fields.String()
    default = fields.Boolean()
    applies_to = fields.String()
    source = fields.String()
    validity = fields.Dict(keys=fields.String(), values=fields.Raw(),
                           metadata={"description": "published range per quantity, [low, high] (null = open)"})
    constants = fields.Dict(keys=fields.String(), values=fields.Raw(), metadata={"description": "constants used"})


class MaterialSchema(StrictSchema):
    id = fields.String()
    name = fields.String()
    conductivity = Quantity("thermal conductivity")
    source = fields.String()
    lining_thickness = Quantity("length", allow_none=True)
    lining_conductivity = Quantity("thermal conductivity", allow_none=True)
    lining_source = fields.String(allow_none=True)
