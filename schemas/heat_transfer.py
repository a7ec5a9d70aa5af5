"""Schemas of /v1/geometry, /v1/agitation, /v1/heat-transfer, /v1/coolant-balance and the libraries."""
from __future__ import annotations

from marshmallow import ValidationError, fields, validates_schema

from .base import StrictSchema
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


class HeatTransferRequestSchema(_AgitatedVesselSchema):
    coolant = fields.Nested(CoolantSchema, required=True)


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
