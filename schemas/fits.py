"""Schemas of /v1/ua-fit and /v1/wilson-plot: logged series in, fitted UA or Wilson line out."""
from __future__ import annotations

import math

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
    ua = Quantity("thermal conductance")
    ua_interval = fields.List(Quantity("thermal conductance"), metadata={"description": "95 % interval [low, high]"})
    standard_error = Quantity("thermal conductance")
    overall_coefficient = Quantity("heat-transfer coefficient", allow_none=True,
                                   metadata={"description": "UA / heat-transfer area (with a vessel)"})
    overall_coefficient_interval = fields.List(Quantity("heat-transfer coefficient"), allow_none=True)
    heat_transfer_area = Quantity("area", allow_none=True)
    initial_temperature = Quantity("temperature", metadata={"description": "fitted contents temperature at the start"})
    time_constant = Quantity("time", metadata={"description": "M c_p / UA_eff"})
    rms = Quantity("temperature difference", metadata={"description": "root-mean-square residual"})
    points = fields.Integer()
    degrees_of_freedom = fields.Integer()
    uses_coolant_balance = fields.Boolean()
    effective = fields.Boolean(metadata={"description": "no coolant flow given: UA includes the coolant's warming"})
    time = fields.List(Quantity("time"))
    contents_temperature = fields.List(Quantity("temperature"))
    fitted_temperature = fields.List(Quantity("temperature"))
    residuals = fields.List(Quantity("temperature difference"), metadata={"description": "measured - fitted"})
    outlet_residuals = fields.List(Quantity("temperature difference"), allow_none=True)
    warnings = fields.List(fields.Nested(WarningSchema))
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
    process_constant = fields.Float(metadata={"description": "a in Nu = a Re^b Pr^c (mu/mu_w)^0.14 (Nu = hT/k)"})
    process_constant_interval = fields.List(fields.Float(allow_none=True), metadata={"description": "95 %"})
    remaining_resistance = Quantity("fouling resistance", metadata={
        "description": "wall + fouling + service film, on the process-side area"})
    remaining_resistance_interval = fields.List(Quantity("fouling resistance"), metadata={"description": "95 %"})
    exponent = fields.Float()
    prandtl_exponent = fields.Float()
    r_squared = fields.Float()
    reynolds = fields.List(fields.Float())
    overall_coefficient = fields.List(Quantity("heat-transfer coefficient"))
    x = fields.List(fields.Float(), metadata={"description": "Re^-b of each run"})
    inverse_u = fields.List(Quantity("fouling resistance"), metadata={"description": "1/U of each run"})
    fitted_inverse_u = fields.List(Quantity("fouling resistance"))
    calibration = fields.Dict(metadata={"description": "ready to paste as a request's calibration"})
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())


def finite(values) -> list:
    return [v if math.isfinite(v) else None for v in values]


SERIES_COLUMNS = tuple(LoggedSeriesSchema().fields)


def ua_fit_dict(run, cautions) -> dict:
    """Shape a calc.fits.plant_runs.RunFit for UAFitResultSchema."""
    fit = run.fit
    return {
        "ua": fit.ua, "ua_interval": list(fit.ua_interval), "standard_error": fit.standard_error,
        "overall_coefficient": run.overall_coefficient,
        "overall_coefficient_interval": None if run.overall_coefficient_interval is None
        else list(run.overall_coefficient_interval),
        "heat_transfer_area": run.area, "initial_temperature": fit.initial_temperature,
        "time_constant": fit.time_constant, "rms": fit.rms, "points": fit.points,
        "degrees_of_freedom": fit.degrees_of_freedom, "uses_coolant_balance": fit.uses_coolant_balance,
        "effective": fit.effective, "time": fit.time.tolist(), "contents_temperature": fit.contents.tolist(),
        "fitted_temperature": fit.fitted.tolist(), "residuals": fit.residuals.tolist(),
        "outlet_residuals": None if fit.outlet_residuals is None else fit.outlet_residuals.tolist(),
        "warnings": [{"code": w.code, "message": w.message} for w in fit.warnings], "cautions": list(cautions),
    }


def wilson_dict(runs, cautions) -> dict:
    """Shape a calc.fits.plant_runs.WilsonRuns for WilsonResultSchema."""
    plot = runs.plot
    low, high = plot.process_constant_interval
    return {
        "process_constant": plot.process_constant, "process_constant_interval": finite([low, high]),
        "remaining_resistance": plot.remaining_resistance,
        "remaining_resistance_interval": list(plot.remaining_resistance_interval),
        "exponent": plot.exponent, "prandtl_exponent": plot.prandtl_exponent, "r_squared": plot.r_squared,
        "reynolds": plot.reynolds.tolist(), "overall_coefficient": runs.overall_coefficients.tolist(),
        "x": plot.x.tolist(), "inverse_u": plot.inverse_u.tolist(), "fitted_inverse_u": plot.fitted_inverse_u.tolist(),
        "calibration": {"process_constant": plot.process_constant,
                        "process_constant_interval": finite([low, high]),
                        "exponent": plot.exponent, "prandtl_exponent": plot.prandtl_exponent,
                        "remaining_resistance": plot.remaining_resistance,
                        "remaining_resistance_interval": list(plot.remaining_resistance_interval)},
        "warnings": [{"code": w.code, "message": w.message} for w in plot.warnings], "cautions": list(cautions),
    }
