"""Schemas of /v1/screenings: one step against many stored vessels, ranked."""
from __future__ import annotations

from marshmallow import ValidationError, fields, validate

from calc import cautions

from .base import StrictSchema
from .cooling import CoolingCheckRequestSchema, HeatReleaseSchema, MarginBandSchema
from .heat_transfer import WarningSchema
from .records import RecordQuerySchema, ReferenceSchema, TAG_PATTERN
from .units import Quantity, absolute_temperature
from .vessel import ChargeSchema, CoolantSchema

MAX_LISTED_VESSELS = 500


class ScreeningStepSchema(StrictSchema):
    """The step to place: stored (``{"ref": ...}``) or given inline."""

    record_kind = "step"
    charge = fields.Nested(ChargeSchema, required=True)
    process_temperature = absolute_temperature(required=True)
    heat_release = fields.Nested(HeatReleaseSchema, required=True)
    safety_factor = CoolingCheckRequestSchema._declared_fields["safety_factor"]


class VesselFilterSchema(StrictSchema):
    """Which stored vessels to screen: every filter given must match (the listing's filters)."""

    tag = RecordQuerySchema._declared_fields["tag"]
    material = RecordQuerySchema._declared_fields["material"]
    jacket_type = RecordQuerySchema._declared_fields["jacket_type"]
    volume_min = RecordQuerySchema._declared_fields["volume_min"]
    volume_max = RecordQuerySchema._declared_fields["volume_max"]


class VesselSelection(fields.Field):
    """A list of vessel ids or tags, or a filter object; absent: every live vessel."""

    item_pattern = TAG_PATTERN

    def _deserialize(self, value, attr, data, **kwargs):
        if isinstance(value, list):
            if not 1 <= len(value) <= MAX_LISTED_VESSELS:
                raise ValidationError(f"list 1 to {MAX_LISTED_VESSELS} vessel ids or tags")
            errors = {i: ["must be a vessel id or tag"] for i, item in enumerate(value)
                      if not isinstance(item, str) or not 1 <= len(item) <= 64}
            if errors:
                raise ValidationError(errors)
            return ("list", list(dict.fromkeys(value)))
        if isinstance(value, dict):
            return ("filter", VesselFilterSchema().load(value))
        raise ValidationError("give a list of vessel ids or tags, or a filter object")


class ScreeningRequestSchema(StrictSchema):
    step = fields.Nested(ScreeningStepSchema, required=True)
    vessels = VesselSelection(load_default=None, metadata={
        "description": "a list of vessel ids or tags, or a filter {tag, material, jacket_type, volume_min, "
                       "volume_max}; default: every live vessel"})
    coolant = fields.Nested(CoolantSchema, load_default=None, metadata={
        "description": "one coolant for every vessel; default: each vessel's own utility"})


# ---------------------------------------------------------------- results

class ProblemItemSchema(StrictSchema):
    field = fields.String()
    message = fields.String()


class ScreeningRowSchema(StrictSchema):
    rank = fields.Integer(metadata={"description": "1 = best: adequate first, then by margin"})
    tag = fields.String()
    name = fields.String()
    vessel = fields.Nested(ReferenceSchema)
    utility = fields.Nested(ReferenceSchema, allow_none=True,
                            metadata={"description": "the vessel's utility used; null when the request gave a coolant"})
    volume = Quantity("volume", allow_none=True, metadata={"description": "nominal vessel volume"})
    verdict = fields.String(validate=validate.OneOf(["adequate", "not adequate", "no verdict", "not evaluated"]))
    adequate = fields.Boolean(allow_none=True)
    margin = fields.Float(allow_none=True, metadata={"description": "cooling capacity / heat load"})
    margin_band = fields.Nested(MarginBandSchema(exclude=("members",)), allow_none=True, metadata={
        "description": "the margin over the published alternatives of each resistance (or the calibration's "
                       "intervals), as the cooling check gives it; members are left out (the check of the vessel "
                       "lists them); null without a verdict or without a net load"})
    verdict_not_robust = fields.Boolean(allow_none=True, metadata={
        "description": "true when the band crosses the safety factor: the verdict rests on the choice of "
                       "correlation (a measured UA would settle it); null without a verdict"})
    heat_load = Quantity("power", allow_none=True)
    cooling_capacity = Quantity("power", allow_none=True)
    minimum_dosing_time = Quantity("time", allow_none=True,
                                   metadata={"description": "shortest dosing time with the safety factor"})
    maximum_coolant_inlet_temperature = Quantity("temperature", allow_none=True,
                                                 metadata={"description": "warmest coolant inlet with the safety "
                                                                          "factor"})
    required_coolant_flow = Quantity("mass flow", allow_none=True)
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    overall_coefficient = Quantity("heat-transfer coefficient", allow_none=True)
    controlling = fields.String(allow_none=True, metadata={"description": "the controlling resistance"})
    warnings = fields.List(fields.Nested(WarningSchema))
    problem = fields.Nested(ProblemItemSchema, allow_none=True,
                            metadata={"description": "why there is no verdict (e.g. the charge does not fit)"})


class CountsSchema(StrictSchema):
    screened = fields.Integer()
    adequate = fields.Integer()
    not_adequate = fields.Integer()
    no_verdict = fields.Integer()
    not_evaluated = fields.Integer()


class ChangeSchema(StrictSchema):
    tag = fields.String()
    vessel_id = fields.String()
    change = fields.String(validate=validate.OneOf(["added", "removed", "changed"]))
    details = fields.List(fields.String())
    verdict_before = fields.String(allow_none=True)
    verdict_after = fields.String(allow_none=True)
    margin_before = fields.Float(allow_none=True)
    margin_after = fields.Float(allow_none=True)


class ChangesSchema(StrictSchema):
    previous_id = fields.String()
    previous_created_at = fields.String()
    items = fields.List(fields.Nested(ChangeSchema), metadata={"description": "only vessels whose inputs or result "
                                                                                "changed"})


SCREENING_STATES = ["queued", "running", "complete", "partial", "failed"]


class ProgressSchema(StrictSchema):
    done = fields.Integer(metadata={"description": "vessels screened so far"})
    total = fields.Integer(metadata={"description": "vessels selected"})


class ScreeningResultSchema(StrictSchema):
    id = fields.String()
    created_at = fields.String()
    author = fields.String()
    status = fields.String(validate=validate.OneOf(SCREENING_STATES), metadata={
        "description": "complete; partial: the time budget ran out, rows not evaluated say so; a screening run as "
                       "a job (202) is first queued, then running (only id, created_at, author, status and "
                       "progress are given until it is finished), and failed says why in `failure`"})
    progress = fields.Nested(ProgressSchema, metadata={"description": "vessels done of the total"})
    failure = fields.String(metadata={"description": "why the job failed (status failed only)"})
    step = fields.Nested(ReferenceSchema, allow_none=True, metadata={"description": "null for an inline step"})
    safety_factor = fields.Float()
    counts = fields.Nested(CountsSchema)
    rows = fields.List(fields.Nested(ScreeningRowSchema))
    changes = fields.Nested(ChangesSchema, allow_none=True,
                            metadata={"description": "against the previous run of the same request; null on the "
                                                     "first"})
    records = fields.List(fields.Nested(ReferenceSchema))
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())


class ScreeningSummarySchema(StrictSchema):
    id = fields.String()
    created_at = fields.String()
    author = fields.String()
    status = fields.String(validate=validate.OneOf(SCREENING_STATES))
    step = fields.Nested(ReferenceSchema, allow_none=True)
    counts = fields.Nested(CountsSchema, allow_none=True, metadata={"description": "null until it is finished"})
    progress = fields.Nested(ProgressSchema)


class ScreeningListSchema(StrictSchema):
    items = fields.List(fields.Nested(ScreeningSummarySchema))
    total = fields.Integer()
    limit = fields.Integer()
    offset = fields.Integer()


SCREENING_CAUTIONS = cautions.COOLING_CHECK + (
    "A ranking of screening estimates: the vessel chosen still needs its own check with the plant's data.",)


def _limit(check, name: str):
    if check.limits is None:
        return None
    limit = getattr(check.limits, name)
    return limit.value if limit is not None and limit.reachable else None


def screening_row(row, info: dict) -> dict:
    """Shape one calc.checks.screening.ScreeningRow; ``info`` holds what the catalogue knows of the vessel."""
    check = row.check
    out = dict(info, rank=row.rank, warnings=[], problem=None)
    if check is None:
        field, message = row.problem
        return out | {"verdict": "no verdict" if row.evaluated else "not evaluated", "adequate": None,
                      "margin": None, "margin_band": None, "verdict_not_robust": None,
                      "problem": {"field": field, "message": message}}
    heat = check.heat_transfer
    band = check.margin_band
    return out | {
        "verdict": "adequate" if check.adequate else "not adequate", "adequate": check.adequate,
        "margin": check.margin, "margin_band": band if band is None or band.low is not None else None,
        "verdict_not_robust": None if band is None else not band.holds_across_band, "heat_load": check.heat_load.total, "cooling_capacity": check.cooling_capacity,
        "minimum_dosing_time": _limit(check, "minimum_dosing_time"),
        "maximum_coolant_inlet_temperature": _limit(check, "maximum_coolant_inlet_temperature"),
        "required_coolant_flow": _limit(check, "required_coolant_flow"),
        "coolant_outlet_temperature": check.coolant_outlet_temperature,
        "overall_coefficient": heat.overall_coefficient, "controlling": heat.controlling,
        "warnings": [{"code": w.code, "message": w.message} for w in check.warnings],
    }
