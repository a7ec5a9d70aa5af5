"""Schemas of /v1/geometry, /v1/agitation, /v1/heat-transfer, /v1/coolant-balance and the libraries."""
from __future__ import annotations

from marshmallow import ValidationError, fields, post_load, validates_schema

from .base import StrictSchema, finite_float
from .units import Quantity
from .vessel import ABSOLUTE_ZERO_C, ChargeSchema, CoolantSchema, VesselSchema, require_agitator

CAUTIONS = (
    "Screening estimate from published correlations that scatter by about +-25-30 %.",
    "Confirm heat release with reaction calorimetry and heat transfer with plant data before relying on it.",
    "Local codes, site process-safety procedures and a licensed engineer's review govern.",
)


def _temperature(**kwargs) -> Quantity:
    return Quantity("temperature", minimum=ABSOLUTE_ZERO_C, exclusive_minimum=True, **kwargs)


class WarningSchema(StrictSchema):
    code = fields.String()
    message = fields.String()


def _warnings():
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
    process_temperature = _temperature(required=True)

    @validates_schema
    def _agitator(self, data, **kwargs):
        require_agitator(data.get("vessel"), "vessel")


class AgitationRequestSchema(_AgitatedVesselSchema):
    pass


class HeatTransferRequestSchema(_AgitatedVesselSchema):
    coolant = fields.Nested(CoolantSchema, required=True)


class CoolantBalanceRequestSchema(StrictSchema):
    process_temperature = _temperature(required=True)
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
    warnings = _warnings()


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
    warnings = _warnings()


class FilmCoefficientsSchema(StrictSchema):
    process_jacket = Quantity("heat-transfer coefficient", allow_none=True)
    process_bottom_head = Quantity("heat-transfer coefficient", allow_none=True)
    process_coil = Quantity("heat-transfer coefficient", allow_none=True)
    service_jacket = Quantity("heat-transfer coefficient", allow_none=True)
    service_coil = Quantity("heat-transfer coefficient", allow_none=True)


class ResistancesSchema(StrictSchema):
    process_film = Quantity("fouling resistance")
    process_fouling = Quantity("fouling resistance")
    lining = Quantity("fouling resistance")
    wall = Quantity("fouling resistance")
    service_fouling = Quantity("fouling resistance")
    service_film = Quantity("fouling resistance")
    controlling = fields.String()


class StreamSchema(StrictSchema):
    name = fields.String()
    mass_flow = Quantity("mass flow")
    ua = Quantity("thermal conductance")
    inlet_temperature = Quantity("temperature")
    outlet_temperature = Quantity("temperature")
    duty = Quantity("power")
    log_mean_temperature_difference = Quantity("temperature difference")
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
    resistances = fields.Nested(ResistancesSchema, allow_none=True)
    overall_coefficient = Quantity("heat-transfer coefficient")
    ua = Quantity("thermal conductance")
    heat_transfer_area = Quantity("area")
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    duty = Quantity("power", metadata={"description": "heat the coolant removes at the process temperature"})
    streams = fields.List(fields.Nested(StreamSchema))
    correlations = fields.Dict(keys=fields.String(), values=fields.String())
    geometry = fields.Nested(GeometryResultSchema)
    agitation = fields.Nested(AgitationResultSchema)
    warnings = _warnings()
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
    warnings = _warnings()


class FilmConstantsSchema(StrictSchema):
    correlation = fields.String()
    a = fields.Float()
    b = fields.Float()
    c = fields.Float()
    d = fields.Float()
    re_low = fields.Float(allow_none=True)
    re_high = fields.Float(allow_none=True)
    source = fields.String()


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
    bottom_head = fields.List(fields.Nested(FilmConstantsSchema))
    coil = fields.List(fields.Nested(FilmConstantsSchema))
    source = fields.String(attribute="wall_source")


class MaterialSchema(StrictSchema):
    id = fields.String()
    name = fields.String()
    conductivity = Quantity("thermal conductivity")
    source = fields.String()
    lining_thickness = Quantity("length", allow_none=True)
    lining_conductivity = Quantity("thermal conductivity", allow_none=True)
    lining_source = fields.String(allow_none=True)


# ---------------------------------------------------------------- calc results -> response shapes

def warning_dicts(warnings) -> list[dict]:
    return [{"code": w.code, "message": w.message} for w in warnings]


def fill_dict(fill) -> dict:
    return {name: getattr(fill, name) for name in (
        "volume", "liquid_level", "wetted_area", "jacketed_area", "coil_area", "heat_transfer_area",
        "area_per_volume", "displaced_volume", "brim_volume")} | {"warnings": warning_dicts(fill.warnings)}


def agitation_dict(result) -> dict:
    keys = ("impeller", "reynolds", "power_number", "power", "power_per_volume", "tip_speed", "froude", "regime")
    return {k: getattr(result, k) for k in keys} | {"sources": dict(result.sources),
                                                    "warnings": warning_dicts(result.warnings)}


def heat_transfer_dict(result) -> dict:
    """Shape a calc.heat_transfer.HeatTransferResult for HeatTransferResultSchema."""
    films: dict = {k: None for k in FilmCoefficientsSchema().fields}
    correlations: dict = {}
    for stream in result.streams:
        for surface in stream.surfaces:
            if surface.name == "jacket_shell":
                films["process_jacket"], films["service_jacket"] = surface.process_film.h, surface.service_film.h
                correlations["process_jacket"] = f"{surface.process_film.correlation}, a = {surface.process_film.constant_a:g} ({surface.process_film.source})"
                correlations["service_jacket"] = surface.service_film.correlation
            elif surface.name == "jacket_bottom_head":
                films["process_bottom_head"] = surface.process_film.h
                films["service_jacket"] = films["service_jacket"] or surface.service_film.h
                correlations["process_bottom_head"] = f"{surface.process_film.correlation}, a = {surface.process_film.constant_a:g} ({surface.process_film.source})"
                correlations.setdefault("service_jacket", surface.service_film.correlation)
            elif films["process_coil"] is None:
                films["process_coil"], films["service_coil"] = surface.process_film.h, surface.service_film.h
                correlations["process_coil"] = f"{surface.process_film.correlation} ({surface.process_film.source})"
                correlations["service_coil"] = surface.service_film.correlation
    surfaces = [s for stream in result.streams for s in stream.surfaces]
    resistances = None
    if surfaces:
        main = max(surfaces, key=lambda s: s.ua)
        resistances = dict(main.overall.resistances) | {"controlling": main.overall.controlling}
    jacket = result.stream("jacket")
    streams = []
    for stream in result.streams:
        first = stream.surfaces[0].service_film if stream.surfaces else None
        streams.append({
            "name": stream.name, "mass_flow": stream.mass_flow, "ua": stream.ua,
            "inlet_temperature": stream.balance.inlet_temperature,
            "outlet_temperature": stream.balance.outlet_temperature, "duty": stream.balance.duty,
            "log_mean_temperature_difference": stream.balance.log_mean_temperature_difference,
            "service_velocity": None if first is None else first.velocity,
            "service_reynolds": None if first is None else first.reynolds,
            "pressure_drop": stream.pressure_drop, "velocity": stream.velocity, "path_length": stream.path_length,
        })
    return {
        "process_temperature": result.process_temperature, "film_coefficients": films,
        "resistances": resistances, "overall_coefficient": result.overall_coefficient, "ua": result.ua,
        "heat_transfer_area": result.area,
        "coolant_outlet_temperature": None if jacket is None else jacket.balance.outlet_temperature,
        "duty": result.duty, "streams": streams, "correlations": correlations,
        "geometry": fill_dict(result.fill), "agitation": agitation_dict(result.agitation),
        "warnings": warning_dicts(result.warnings), "cautions": list(CAUTIONS),
    }


def coolant_balance_dict(balance, mass_flow: float, heat_capacity: float) -> dict:
    keys = ("process_temperature", "inlet_temperature", "outlet_temperature", "duty",
            "log_mean_temperature_difference", "ntu", "effectiveness")
    return {k: getattr(balance, k) for k in keys} | {
        "mass_flow": mass_flow, "heat_capacity": heat_capacity, "warnings": warning_dicts(balance.warnings)}
