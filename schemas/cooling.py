"""Schemas of /v1/cooling-check and /v1/scale-up: the verdict, its margin, limits and scales."""
from __future__ import annotations

from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.vessel import agitation
from calc.checks import heat_load
from calc.checks import scaleup

from .base import StrictSchema, finite_float
from .candidates import SizedDesignSchema
from .heat_transfer import (HeatTransferRequestSchema, HeatTransferResultSchema, WarningSchema,
                            heat_transfer_dict, warning_dicts)
from .units import Quantity
from .vessel import ABSOLUTE_ZERO_C, CoolantSchema, VesselSchema, require_agitator

DEFAULT_SAFETY_FACTOR = 1.3
SCALE_RULES = sorted(agitation.SCALE_UP_RULES) + ["as_given"]


class HeatReleaseSchema(StrictSchema):
    model = fields.String(required=True, validate=validate.OneOf(sorted(heat_load.MODELS)))
    power_per_mass = Quantity("specific power", load_default=None, minimum=0,
                              description="specific_power: heat release per kg of charge (e.g. a calorimeter peak)")
    power = Quantity("power", load_default=None, minimum=0, description="total_power: heat release")
    reaction_enthalpy = Quantity("molar enthalpy", load_default=None,
                                 description="dosing: J per mol of dosed reagent, negative = exothermic; a "
                                             "positive value is refused unless endothermic is true")
    endothermic = fields.Boolean(load_default=None,
                                 metadata={"description": "dosing: true declares a step that absorbs heat "
                                                          "(positive reaction_enthalpy); default false"})
    dosed_amount = Quantity("amount of substance", load_default=None, minimum=0, exclusive_minimum=True)
    dosing_time = Quantity("time", load_default=None, minimum=0, exclusive_minimum=True)
    feed_mass = Quantity("mass", load_default=None, minimum=0)
    feed_temperature = Quantity("temperature", load_default=None, minimum=ABSOLUTE_ZERO_C, exclusive_minimum=True)
    feed_heat_capacity = Quantity("heat capacity", load_default=None, minimum=0, exclusive_minimum=True)

    _FIELDS = {"specific_power": ("power_per_mass",), "total_power": ("power",),
               "dosing": ("reaction_enthalpy", "dosed_amount", "dosing_time", "feed_mass", "feed_temperature",
                          "feed_heat_capacity", "endothermic")}
    _REQUIRED = {"specific_power": ("power_per_mass",), "total_power": ("power",),
                 "dosing": ("reaction_enthalpy", "dosed_amount", "dosing_time")}

    @validates_schema
    def _fields_of_model(self, data, **kwargs):
        model = data.get("model")
        if model not in self._FIELDS:
            return
        for name in self._REQUIRED[model]:
            if data.get(name) is None:
                raise ValidationError(f"required for the {model} model", name)
        for name, value in data.items():
            if name != "model" and value is not None and name not in self._FIELDS[model]:
                raise ValidationError(f"does not apply to the {model} model", name)

    @post_load
    def _build(self, data, **kwargs):
        model = data.pop("model")
        return heat_load.heat_release_model(model, **{k: v for k, v in data.items() if v is not None})


class CoolingCheckRequestSchema(HeatTransferRequestSchema):
    heat_release = fields.Nested(HeatReleaseSchema, required=True)
    safety_factor = finite_float(load_default=DEFAULT_SAFETY_FACTOR, validate=validate.Range(1.0, 10.0),
                                 metadata={"description": "required capacity / load; default 1.3 "
                                                          "(a conservative engineering choice)"})


class TargetSchema(StrictSchema):
    """A scale-up target: an explicit vessel, or a volume for a geometrically similar vessel."""

    volume = Quantity("volume", load_default=None, minimum=0, exclusive_minimum=True,
                      description="nominal vessel volume (to the brim) of a similar vessel")
    vessel = fields.Nested(VesselSchema, load_default=None)
    coolant = fields.Nested(CoolantSchema, load_default=None,
                            metadata={"description": "this vessel's own utility; default: the reference coolant "
                                                     "under coolant_flow_rule"})

    @validates_schema
    def _one(self, data, **kwargs):
        if (data.get("volume") is None) == (data.get("vessel") is None):
            raise ValidationError("give exactly one of volume and vessel", "volume")
        if data.get("coolant") is not None and data.get("vessel") is None:
            raise ValidationError("a coolant of its own needs an explicit vessel", "coolant")
        require_agitator(data.get("vessel"), "vessel")

    @post_load
    def _build(self, data, **kwargs):
        if data["vessel"] is None:
            return data["volume"]
        return data["vessel"] if data["coolant"] is None else (data["vessel"], data["coolant"])


class ScaleUpRequestSchema(StrictSchema):
    reference = fields.Nested(VesselSchema, required=True)
    targets = fields.List(fields.Nested(TargetSchema), required=True, validate=validate.Length(min=1, max=20))
    rule = fields.String(load_default="constant_power_per_volume", validate=validate.OneOf(SCALE_RULES))
    charge = HeatTransferRequestSchema._declared_fields["charge"]
    coolant = HeatTransferRequestSchema._declared_fields["coolant"]
    process_temperature = HeatTransferRequestSchema._declared_fields["process_temperature"]
    heat_release = fields.Nested(HeatReleaseSchema, required=True)
    safety_factor = CoolingCheckRequestSchema._declared_fields["safety_factor"]
    size_jacket = fields.Boolean(load_default=False,
                                 metadata={"description": "design the smallest feasible jacket or coil for each "
                                                          "generated scale (as /v1/jacket-sizing with its defaults)"})
    coolant_flow_rule = fields.String(load_default="scale_with_area",
                                      validate=validate.OneOf(["scale_with_area", "as_given"]),
                                      metadata={"description": "coolant flow at each scale: in proportion to the "
                                                               "heat-transfer area, or as given"})

    @validates_schema
    def _agitator(self, data, **kwargs):
        require_agitator(data.get("reference"), "reference")


# ---------------------------------------------------------------- results

class HeatLoadSchema(StrictSchema):
    total = Quantity("power")
    reaction = Quantity("power")
    agitator = Quantity("power")
    feed_sensible = Quantity("power", metadata={"description": "heat taken up by feed colder than the contents"})


class LimitsSchema(StrictSchema):
    minimum_dosing_time = Quantity("time", allow_none=True)
    minimum_dosing_time_note = fields.String()
    maximum_coolant_inlet_temperature = Quantity("temperature", allow_none=True)
    maximum_coolant_inlet_temperature_note = fields.String()
    required_coolant_flow = Quantity("mass flow", allow_none=True)
    required_coolant_flow_note = fields.String()


class CoolingCheckResultSchema(StrictSchema):
    adequate = fields.Boolean()
    margin = fields.Float(allow_none=True, metadata={"description": "cooling capacity / heat load; null when "
                                                                     "there is no load to remove"})
    safety_factor = fields.Float()
    heat_load = fields.Nested(HeatLoadSchema)
    cooling_capacity = Quantity("power")
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    limits = fields.Nested(LimitsSchema)
    heat_transfer = fields.Nested(HeatTransferResultSchema)
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())


class ScaleSchema(CoolingCheckResultSchema):
    name = fields.String()
    volume = Quantity("volume", metadata={"description": "nominal vessel volume (to the top of the straight side)"})
    charge_volume = Quantity("volume", metadata={"description": "liquid volume at this scale"})
    scale_factor = fields.Float(metadata={"description": "length ratio to the reference vessel"})
    generated = fields.Boolean(metadata={"description": "geometrically similar vessel made from the reference"})
    diameter = Quantity("length")
    impeller_diameter = Quantity("length")
    agitator_speed = Quantity("agitator speed")
    area_per_volume = Quantity("area per volume")
    overall_coefficient = Quantity("heat-transfer coefficient")
    controlling = fields.String()
    jacket_design = fields.Nested(SizedDesignSchema, allow_none=True,
                                  metadata={"description": "with size_jacket: the design sized for this scale"})


class ControllingSwitchSchema(StrictSchema):
    volume = Quantity("volume")
    below = fields.String()
    above = fields.String()


class ScaleUpResultSchema(StrictSchema):
    rule = fields.String()
    coolant_flow_rule = fields.String()
    safety_factor = fields.Float()
    scales = fields.List(fields.Nested(ScaleSchema))
    largest_adequate_volume = Quantity("volume", allow_none=True,
                                       metadata={"description": "largest similar vessel (nominal volume) still "
                                                                "adequate, solved on the continuous family"})
    adequate_beyond_search = fields.Boolean()
    search_upper_volume = Quantity("volume")
    largest_adequate_volume_note = fields.String()
    controlling_switches = fields.List(fields.Nested(ControllingSwitchSchema))
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())


def _limit(limit, key: str) -> tuple:
    if limit is None:
        return None, "applies to the dosing model only"
    value = getattr(limit, key, None)
    return (value if limit.reachable else None), limit.message


def cooling_check_dict(check) -> dict:
    """Shape a calc.cooling.CoolingCheck for CoolingCheckResultSchema."""
    load = check.heat_load
    limits = check.limits
    if limits is None:
        skipped = "not solved for this result"
        dosing, dosing_note, inlet, inlet_note, flow, flow_note = None, skipped, None, skipped, None, skipped
    else:
        dosing, dosing_note = _limit(limits.minimum_dosing_time, "value")
        inlet, inlet_note = _limit(limits.maximum_coolant_inlet_temperature, "value")
        flow, flow_note = _limit(limits.required_coolant_flow, "value")
    return {
        "adequate": check.adequate, "margin": check.margin, "safety_factor": check.safety_factor,
        "heat_load": {"total": load.total, "reaction": load.reaction, "agitator": load.agitator,
                      "feed_sensible": load.feed_sensible},
        "cooling_capacity": check.cooling_capacity, "coolant_outlet_temperature": check.coolant_outlet_temperature,
        "limits": {"minimum_dosing_time": dosing, "minimum_dosing_time_note": dosing_note,
                   "maximum_coolant_inlet_temperature": inlet, "maximum_coolant_inlet_temperature_note": inlet_note,
                   "required_coolant_flow": flow, "required_coolant_flow_note": flow_note},
        "heat_transfer": heat_transfer_dict(check.heat_transfer),
        "warnings": warning_dicts(check.warnings), "cautions": list(check.cautions),
    }


def scale_up_dict(result) -> dict:
    """Shape a calc.scaleup.ScaleUp for ScaleUpResultSchema."""
    scales = []
    for scale in result.scales:
        check = scale.check
        heat = check.heat_transfer
        scales.append(cooling_check_dict(check) | {
            "name": scale.name, "volume": scale.volume, "charge_volume": scale.charge_volume,
            "scale_factor": scale.scale_factor, "generated": scale.generated,
            "diameter": scale.vessel.shape.diameter, "impeller_diameter": scale.vessel.agitator.diameter,
            "agitator_speed": scale.agitator_speed, "area_per_volume": heat.fill.area_per_volume,
            "overall_coefficient": heat.overall_coefficient, "controlling": heat.controlling,
            "jacket_design": scale.jacket_design,
        })
    return {
        "rule": result.rule, "coolant_flow_rule": result.coolant_flow_rule, "safety_factor": result.safety_factor,
        "scales": scales, "largest_adequate_volume": result.largest_adequate_volume,
        "adequate_beyond_search": result.adequate_beyond_search, "search_upper_volume": result.search_upper_volume,
        "largest_adequate_volume_note": result.largest_adequate_message,
        "controlling_switches": [{"volume": s.volume, "below": s.below, "above": s.above}
                                 for s in result.controlling_switch_volumes],
        "warnings": warning_dicts(result.warnings), "cautions": list(result.cautions),
    }
