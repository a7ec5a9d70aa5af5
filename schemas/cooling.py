"""Schemas of /v1/cooling-check and /v1/scale-up: the verdict, its margin, limits and scales."""
from __future__ import annotations

from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.checks import cooling_check, heat_load
from calc.checks import scaleup

from .base import StrictSchema, finite_float
from .candidates import SizedDesignSchema
from .heat_transfer import (HeatTransferRequestSchema, HeatTransferResultSchema, WarningSchema,
                            with_correlations)
from .units import Quantity, absolute_temperature
from .vessel import CoolantSchema, VesselSchema, require_agitator



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
    feed_temperature = absolute_temperature(load_default=None)
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
    safety_factor = finite_float(load_default=cooling_check.DEFAULT_SAFETY_FACTOR, validate=validate.Range(1.0, 10.0),
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
    targets = fields.List(fields.Nested(TargetSchema), required=True, validate=validate.Length(min=1),
                          metadata={"description": "at most the server's COOLMARGIN_MAX_SCALES (413 above)"})
    rule = fields.String(load_default="constant_power_per_volume", validate=validate.OneOf(scaleup.RULES))
    charge = HeatTransferRequestSchema._declared_fields["charge"]
    coolant = HeatTransferRequestSchema._declared_fields["coolant"]
    process_temperature = HeatTransferRequestSchema._declared_fields["process_temperature"]
    heat_release = fields.Nested(HeatReleaseSchema, required=True)
    safety_factor = CoolingCheckRequestSchema._declared_fields["safety_factor"]
    correlations = HeatTransferRequestSchema._declared_fields["correlations"]
    calibration = HeatTransferRequestSchema._declared_fields["calibration"]
    size_jacket = fields.Boolean(load_default=False,
                                 metadata={"description": "design the smallest feasible jacket or coil for each "
                                                          "generated scale (as /v1/jacket-sizing with its defaults)"})
    coolant_flow_rule = fields.String(load_default="scale_with_area",
                                      validate=validate.OneOf(scaleup.COOLANT_FLOW_RULES),
                                      metadata={"description": "coolant flow at each scale: in proportion to the "
                                                               "heat-transfer area, or as given"})

    @validates_schema
    def _agitator(self, data, **kwargs):
        require_agitator(data.get("reference"), "reference")

    @post_load
    def _choose(self, data, **kwargs):
        """The correlation choice holds at every scale: on the reference and on explicit targets."""
        choice, calibration = data.pop("correlations", None), data.pop("calibration", None)
        data["reference"] = with_correlations(data["reference"], choice, calibration)
        targets = []
        for target in data["targets"]:  # the calibrated process constant carries; the remaining resistance not
            if isinstance(target, tuple):
                target = (with_correlations(target[0], choice, calibration, remaining=False), target[1])
            elif not isinstance(target, (int, float)):
                target = with_correlations(target, choice, calibration, remaining=False)
            targets.append(target)
        data["targets"] = targets
        return data


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


class BandMemberSchema(StrictSchema):
    resistance = fields.String(metadata={"description": "the resistance whose correlation this member replaces "
                                                        "(a field of correlations), calibration, or joint"})
    alternative = fields.String()
    margin = fields.Float(allow_none=True)


class MarginBandSchema(StrictSchema):
    low = fields.Float(allow_none=True, metadata={"description": "lowest margin over the members and the nominal"})
    high = fields.Float(allow_none=True, metadata={"description": "highest margin over the members and the nominal"})
    basis = fields.String(metadata={"description": "published_alternatives, or calibration (the fit's intervals)"})
    low_set_by = fields.String(metadata={"description": "the alternative that gives the low end"})
    high_set_by = fields.String(metadata={"description": "the alternative that gives the high end"})
    holds_across_band = fields.Boolean(metadata={"description": "the verdict is the same at every member"})
    statement = fields.String()
    members = fields.List(fields.Nested(BandMemberSchema))


class CoolingCheckResultSchema(StrictSchema):
    adequate = fields.Boolean()
    calibrated = fields.Boolean(metadata={"description": "the heat transfer uses the vessel's own measured "
                                                         "constants (a calibration), not only published ones"})
    calibration_basis = fields.String(allow_none=True, metadata={
        "description": "what the calibration changes and where it comes from (a Wilson plot's constant, or the "
                       "multiplier backed out from a measured UA with its interval); null when not calibrated"})
    margin_band = fields.Nested(MarginBandSchema, allow_none=True, metadata={
        "description": "the margin recomputed over the published alternatives of each resistance (or the "
                       "calibration's intervals); the verdict stays nominal margin >= safety_factor"})
    margin = fields.Float(allow_none=True, metadata={"description": "cooling capacity / heat load; null when "
                                                                     "there is no load to remove"})
    safety_factor = fields.Float()
    heat_load = fields.Nested(HeatLoadSchema)
    cooling_capacity = Quantity("power")
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    limits = fields.Nested(LimitsSchema, attribute="limit_values")
    heat_transfer = fields.Nested(HeatTransferResultSchema)
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())


_CHECK_ATTRIBUTES = {field.attribute or name for name, field in CoolingCheckResultSchema._declared_fields.items()}


class ScaleSchema(CoolingCheckResultSchema):
    """Dumps a calc.checks.scaleup.ScaleResult: the scale's own fields, then its cooling check's."""

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

    def get_attribute(self, obj, attr, default):
        if attr in _CHECK_ATTRIBUTES:
            return super().get_attribute(obj.check, attr, default)
        return super().get_attribute(obj, attr, default)


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
    largest_adequate_volume_note = fields.String(attribute="largest_adequate_message")
    controlling_switches = fields.List(fields.Nested(ControllingSwitchSchema), attribute="controlling_switch_volumes")
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())
