"""Schemas of /v1/properties and /v1/fluids."""
from __future__ import annotations

from marshmallow import fields, validate, validates_schema, ValidationError

from calc import properties

from .base import StrictSchema, finite_float
from .units import Quantity, absolute_temperature

FLUID_IDS = sorted(properties.FLUIDS)


class PropertiesQuerySchema(StrictSchema):
    fluid = fields.String(required=True, validate=validate.OneOf(FLUID_IDS),
                          metadata={"description": "fluid id from /v1/fluids"})
    temperature = absolute_temperature(required=True)
    mass_fraction = finite_float(validate=validate.Range(0, 1), load_default=None,
                                 metadata={"unit": "", "description": "glycol mass fraction, 0-1"})
    pressure = Quantity("pressure", load_default=properties.STANDARD_PRESSURE, minimum=0,
                        exclusive_minimum=True, description="absolute pressure")

    @validates_schema
    def _fraction_matches_fluid(self, data, **kwargs):
        info = properties.FLUIDS.get(data.get("fluid"))
        if info is not None and info.mass_fraction_range is not None and data.get("mass_fraction") is None:
            low, high = info.mass_fraction_range
            raise ValidationError(f"{info.name} needs a mass fraction between {low} and {high}", "mass_fraction")


class PropertiesResultSchema(StrictSchema):
    fluid = fields.String()
    name = fields.String()
    temperature = Quantity("temperature", attribute="state.temperature")
    pressure = Quantity("pressure")
    mass_fraction = fields.Float(allow_none=True)
    density = Quantity("density", attribute="state.density")
    heat_capacity = Quantity("heat capacity", attribute="state.heat_capacity")
    viscosity = Quantity("viscosity", attribute="state.viscosity")
    thermal_conductivity = Quantity("thermal conductivity", attribute="state.thermal_conductivity")
    prandtl = fields.Float(attribute="state.prandtl")
    freezing_point = Quantity("temperature", metadata={"description": "lower end of the liquid range"})
    boiling_point = Quantity("temperature",
                             metadata={"description": "upper end of the liquid range at the pressure"})
    source = fields.String()


class FluidSchema(StrictSchema):
    id = fields.String()
    name = fields.String()
    kind = fields.String()
    mass_fraction_range = fields.List(fields.Float(), allow_none=True)
    source = fields.String()
