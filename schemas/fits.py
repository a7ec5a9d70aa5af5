"""Schemas of /v1/ua-fit and /v1/wilson-plot: logged series in, fitted UA or Wilson line out."""
from __future__ import annotations


from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.fits.plant_runs import RunCharge, RunCoolant, RunLiquid

from .base import StrictSchema
from .heat_transfer import WarningSchema
from .units import KINDS, Quantity, absolute_temperature, parse_quantity
from .vessel import Flow, VesselSchema, _LiquidFields, require_agitator

#: Most points one logged series may hold (a day at one point every 5 s).
MAX_SERIES_POINTS = 20000



class QuantitySeries(fields.Field):
    """A list of one quantity: numbers in the default unit, strings with units, or {"unit", "values"}."""

    def __init__(self, kind: str, **kwargs):
        self.kind = kind
        metadata = dict(kwargs.pop("metadata", {}))
        metadata.setdefault("description", "")
        metadata["description"] = (metadata["description"] + " A list of numbers in the default unit, of strings "
                                   "with units, or {\"unit\": \"min\", \"values\": [...]}").strip()
        metadata.update(unit=KINDS[kind].api_unit, kind=kind)
        super().__init__(metadata=metadata, **kwargs)

    def _deserialize(self, value, attr, data, **kwargs):
        unit = None
        if isinstance(value, dict):
            if set(value) != {"unit", "values"} or not isinstance(value["unit"], str):
                raise ValidationError('give {"unit": "<unit>", "values": [numbers]}')
            unit, value = value["unit"], value["values"]
        if not isinstance(value, list) or not value:
            raise ValidationError("must be a non-empty list")
        if len(value) > MAX_SERIES_POINTS:
            raise ValidationError(f"at most {MAX_SERIES_POINTS} points per series")
        out = []
        for index, item in enumerate(value):
            try:
                if unit is not None:
                    if isinstance(item, bool) or not isinstance(item, (int, float)):
                        raise ValidationError("must be a number (the unit is given once)")
                    try:
                        item = f"{float(item)!r} {unit}"
                    except OverflowError:
                        raise ValidationError("must be a finite number") from None
                out.append(parse_quantity(self.kind, item))
            except ValidationError as error:
                raise ValidationError({index: error.messages}) from None
        return out


class LoggedSeriesSchema(StrictSchema):
    time = QuantitySeries("time", required=True, metadata={"description": "clock of the log"})
    contents_temperature = QuantitySeries("temperature", required=True)
    coolant_inlet_temperature = QuantitySeries("temperature", required=True)
    coolant_outlet_temperature = QuantitySeries("temperature", load_default=None)


def _run_liquid(schema: _LiquidFields, data: dict, prefix: str) -> RunLiquid:
    if data.get("fluid") is not None:
        return RunLiquid(schema.liquid(data, prefix))
    return RunLiquid(None, data.get("heat_capacity"), data.get("density"), data.get("viscosity"),
                     data.get("thermal_conductivity"))


class FitChargeSchema(_LiquidFields):
    """The charge of the run: its mass (or volume with a library fluid) and heat capacity (or a library fluid)."""

    _EXPLICIT = ()
    mass = Quantity("mass", minimum=0, exclusive_minimum=True, load_default=None)
    volume = Quantity("volume", minimum=0, exclusive_minimum=True, load_default=None,
                      description="with a library fluid: the mass follows from its density")

    @validates_schema
    def _amount(self, data, **kwargs):
        if (data.get("volume") is None) == (data.get("mass") is None):
            raise ValidationError("give exactly one of volume and mass", "mass")
        if data.get("fluid") is None:
            if data.get("heat_capacity") is None:
                raise ValidationError("required unless a library fluid is given", "heat_capacity")
            if data.get("mass") is None and data.get("density") is None:
                raise ValidationError("a volume needs the density (or a library fluid)", "density")

    @post_load
    def _build(self, data, **kwargs):
        return RunCharge(_run_liquid(self, data, "charge"), data.get("mass"), data.get("volume"))


class FitCoolantSchema(_LiquidFields):
    _EXPLICIT = ()
    flow = Flow(required=True)

    @validates_schema
    def _properties(self, data, **kwargs):
        if data.get("fluid") is None and data.get("heat_capacity") is None:
            raise ValidationError("give the coolant's fluid or its heat_capacity", "heat_capacity")
        if data.get("fluid") is None and data.get("flow", ("mass",))[0] == "volume" and data.get("density") is None:
            raise ValidationError("a volume flow needs the density (or a library fluid)", "density")

    @post_load
    def _build(self, data, **kwargs):
        kind, flow = data["flow"]
        return RunCoolant(_run_liquid(self, data, "coolant"), flow, kind)


class UAFitRequestSchema(StrictSchema):
    mode = fields.String(required=True, validate=validate.OneOf(["cooling", "heating"]),
                         metadata={"description": "cooling: coolant colder than the contents; heating: warmer"})
    series = fields.Nested(LoggedSeriesSchema, required=True)
    charge = fields.Nested(FitChargeSchema, required=True)
    coolant = fields.Nested(FitCoolantSchema, load_default=None, metadata={
        "description": "with the flow, the single-pass coolant balance is used (and the outlet, when logged)"})
    vessel = fields.Nested(VesselSchema, load_default=None, metadata={
        "description": "optional: the heat-transfer area at the charge's fill turns UA into U"})
    shaft_power = Quantity("power", load_default=0.0, minimum=0, description="agitator power into the contents")
    heat_loss = Quantity("power", load_default=0.0, minimum=0, description="heat lost to the surroundings")


class UAFitResultSchema(StrictSchema):
    """Dumps a :class:`calc.fits.plant_runs.RunFit`."""

    ua = Quantity("thermal conductance", attribute="fit.ua")
    ua_interval = fields.List(Quantity("thermal conductance"), attribute="fit.ua_interval",
                              metadata={"description": "95 % interval [low, high]"})
    standard_error = Quantity("thermal conductance", attribute="fit.standard_error")
    overall_coefficient = Quantity("heat-transfer coefficient", allow_none=True,
                                   metadata={"description": "UA / heat-transfer area (with a vessel)"})
    overall_coefficient_interval = fields.List(Quantity("heat-transfer coefficient"), allow_none=True)
    heat_transfer_area = Quantity("area", allow_none=True, attribute="area")
    initial_temperature = Quantity("temperature", attribute="fit.initial_temperature",
                                   metadata={"description": "fitted contents temperature at the start"})
    time_constant = Quantity("time", attribute="fit.time_constant", metadata={"description": "M c_p / UA_eff"})
    rms = Quantity("temperature difference", attribute="fit.rms", metadata={"description": "root-mean-square residual"})
    points = fields.Integer(attribute="fit.points")
    degrees_of_freedom = fields.Integer(attribute="fit.degrees_of_freedom")
    uses_coolant_balance = fields.Boolean(attribute="fit.uses_coolant_balance")
    effective = fields.Boolean(attribute="fit.effective",
                               metadata={"description": "no coolant flow given: UA includes the coolant's warming"})
    time = fields.List(Quantity("time"), attribute="fit.time")
    contents_temperature = fields.List(Quantity("temperature"), attribute="fit.contents")
    fitted_temperature = fields.List(Quantity("temperature"), attribute="fit.fitted")
    residuals = fields.List(Quantity("temperature difference"), attribute="fit.residuals",
                            metadata={"description": "measured - fitted"})
    outlet_residuals = fields.List(Quantity("temperature difference"), allow_none=True, attribute="fit.outlet_residuals")
    warnings = fields.List(fields.Nested(WarningSchema), attribute="fit.warnings")
    cautions = fields.List(fields.String())


class WilsonRunSchema(StrictSchema):
    speed = Quantity("agitator speed", required=True, minimum=0, exclusive_minimum=True)
    overall_coefficient = Quantity("heat-transfer coefficient", load_default=None, minimum=0, exclusive_minimum=True)
    ua = Quantity("thermal conductance", load_default=None, minimum=0, exclusive_minimum=True)
    series = fields.Nested(LoggedSeriesSchema, load_default=None)
    mode = fields.String(load_default="cooling", validate=validate.OneOf(["cooling", "heating"]))

    @validates_schema
    def _one(self, data, **kwargs):
        given = [k for k in ("overall_coefficient", "ua", "series") if data.get(k) is not None]
        if len(given) != 1:
            raise ValidationError("give exactly one of overall_coefficient, ua and series", "overall_coefficient")


class WilsonRequestSchema(StrictSchema):
    vessel = fields.Nested(VesselSchema, required=True)
    charge = fields.Nested(FitChargeSchema, required=True)
    process_temperature = absolute_temperature(required=True,
                                   description="mean contents temperature of the runs (properties)")
    runs = fields.List(fields.Nested(WilsonRunSchema), required=True, validate=validate.Length(min=1, max=50))
    coolant = fields.Nested(FitCoolantSchema, load_default=None)
    exponent = fields.Float(load_default=2.0 / 3.0, validate=validate.Range(0.3, 1.0),
                            metadata={"description": "Reynolds exponent b of the process film (assumed)"})
    prandtl_exponent = fields.Float(load_default=1.0 / 3.0, validate=validate.Range(0.2, 0.5))

    @validates_schema
    def _vessel(self, data, **kwargs):
        require_agitator(data.get("vessel"), "vessel")


class WilsonResultSchema(StrictSchema):
    """Dumps a :class:`calc.fits.plant_runs.WilsonRuns`."""

    process_constant = fields.Float(attribute="plot.process_constant", metadata={
        "description": "a in Nu = a Re^b Pr^c (mu/mu_w)^0.14 (Nu = hT/k)"})
    process_constant_interval = fields.List(fields.Float(allow_none=True), attribute="plot.process_constant_interval",
                                            metadata={"description": "95 %"})
    remaining_resistance = Quantity("fouling resistance", attribute="plot.remaining_resistance", metadata={
        "description": "wall + fouling + service film, on the process-side area"})
    remaining_resistance_interval = fields.List(Quantity("fouling resistance"),
                                                attribute="plot.remaining_resistance_interval",
                                                metadata={"description": "95 %"})
    exponent = fields.Float(attribute="plot.exponent")
    prandtl_exponent = fields.Float(attribute="plot.prandtl_exponent")
    r_squared = fields.Float(attribute="plot.r_squared")
    reynolds = fields.List(fields.Float(), attribute="plot.reynolds")
    overall_coefficient = fields.List(Quantity("heat-transfer coefficient"), attribute="overall_coefficients")
    x = fields.List(fields.Float(), attribute="plot.x", metadata={"description": "Re^-b of each run"})
    inverse_u = fields.List(Quantity("fouling resistance"), attribute="plot.inverse_u",
                            metadata={"description": "1/U of each run"})
    fitted_inverse_u = fields.List(Quantity("fouling resistance"), attribute="plot.fitted_inverse_u")
    calibration = fields.Dict(metadata={"description": "ready to paste as a request's calibration: in the API's "
                                                       "default units whatever output_units asks"})
    warnings = fields.List(fields.Nested(WarningSchema), attribute="plot.warnings")
    cautions = fields.List(fields.String())


SERIES_COLUMNS = tuple(LoggedSeriesSchema().fields)
