"""Schemas of the plant catalogue: vessel, utility and step records, their listings and revisions.

A record's content is validated by the very schemas the calculations use (``VesselSchema``,
``CoolantSchema``, ``ChargeSchema``, ``HeatReleaseSchema``, ``ThermalSafetyRequestSchema``) and stored as
sent, units and all, so it reads back exactly as the engineer wrote it.
"""
from __future__ import annotations

from marshmallow import Schema, ValidationError, fields, validate, validates_schema

from calc.vessel import geometry

from .base import StrictSchema
from .cooling import CoolingCheckRequestSchema, HeatReleaseSchema
from .heat_transfer import CalibrationSchema as FitSchema
from .safety import ThermalSafetyRequestSchema
from .units import Quantity, absolute_temperature
from .vessel import ChargeSchema, CoolantSchema, VesselSchema

TAG_PATTERN = r"^[A-Za-z0-9][A-Za-z0-9._/+-]{0,63}$"
IF_MATCH_MAX_LENGTH = 200  # an If-Match header longer than this is a 422 (a few ETags fit easily)
CALIBRATION_SOURCES = ["ua-fit", "wilson-plot", "plant-trial"]


def _tag(**kwargs) -> fields.String:
    return fields.String(validate=validate.Regexp(TAG_PATTERN, error="a tag is 1-64 letters, digits or . _ / + -, "
                                                                    "starting with a letter or digit"),
                         metadata={"description": "the plant's own name for the record, unique among live "
                                                  "records of its kind (e.g. Puffin)"}, **kwargs)


def _notes() -> fields.String:
    return fields.String(load_default=None, validate=validate.Length(max=2000),
                         metadata={"description": "free text kept with the revision"})


class CalibrationSchema(StrictSchema):
    """A measured fit attached to a vessel revision; used by default by calculations that take one."""

    source = fields.String(required=True, validate=validate.OneOf(CALIBRATION_SOURCES),
                           metadata={"description": "where the numbers come from: /v1/ua-fit, /v1/wilson-plot, "
                                                    "or a plant trial evaluated elsewhere"})
    fit = fields.Dict(keys=fields.String(), required=True,
                      metadata={"description": "the calibration object as the calculations take it: the "
                                               "`calibration` member of a /v1/wilson-plot answer (whose runs may be "
                                               "/v1/ua-fit logs at several speeds); checked when attached, and "
                                               "passed on unchanged as the request's `calibration`"})
    measured_on = fields.Date(load_default=None, metadata={"description": "date of the plant runs"})
    notes = _notes()

    @validates_schema
    def _fit(self, data, **kwargs):
        """The fit must load as a calculation's ``calibration`` now, not fail later in every check that uses it."""
        fit = data.get("fit")
        if isinstance(fit, dict):
            try:
                FitSchema().load(fit)
            except ValidationError as error:
                raise ValidationError({"fit": error.messages}) from None


class _RecordContent(StrictSchema):
    accepts_refs = False  # a record holds objects, never references to other records' objects


class VesselRecordSchema(_RecordContent):
    tag = _tag(required=True)
    vessel = fields.Nested(VesselSchema, required=True)
    utility = fields.String(load_default=None, validate=validate.Length(min=1, max=64),
                            metadata={"description": "id or tag of the utility record that serves this vessel; "
                                                     "used when a calculation names the vessel and no coolant"})
    calibration = fields.Nested(CalibrationSchema, load_default=None)
    notes = _notes()


class UtilityRecordSchema(_RecordContent):
    tag = _tag(required=True)
    coolant = fields.Nested(CoolantSchema, required=True)
    notes = _notes()


class StepRecordSchema(_RecordContent):
    """A process step: what goes into the vessel, at what temperature, releasing what heat."""

    tag = _tag(required=True)
    charge = fields.Nested(ChargeSchema, required=True)
    process_temperature = absolute_temperature(required=True)
    heat_release = fields.Nested(HeatReleaseSchema, required=True)
    safety_factor = CoolingCheckRequestSchema._declared_fields["safety_factor"]
    cooling_failure = fields.Nested(ThermalSafetyRequestSchema, load_default=None,
                                    metadata={"description": "the loss-of-cooling scenario, as a "
                                                             "/v1/thermal-safety request"})
    notes = _notes()


RECORD_SCHEMAS: dict[str, type[Schema]] = {"vessel": VesselRecordSchema, "utility": UtilityRecordSchema,
                                           "step": StepRecordSchema}
# The member of a record that stands in a calculation where {"ref": ...} names the record.
CONTENT = {"vessel": "vessel", "utility": "coolant"}


def index_of(kind: str, loaded: dict) -> dict:
    """The filterable fields of a validated record: name, wall material, jacket type, nominal volume."""
    if kind != "vessel":
        return {"name": None, "material": None, "jacket_type": None, "volume": None}
    vessel = loaded["vessel"]
    shape = vessel.shape
    return {"name": vessel.name, "material": vessel.wall.material,
            "jacket_type": vessel.jacket.type if vessel.jacket is not None else "none",
            "volume": geometry.volume_at_level(shape, geometry.brim_height(shape))}


# ---------------------------------------------------------------- responses

class RecordSchema(StrictSchema):
    """One revision of a record, with what identifies it."""

    id = fields.String(metadata={"description": "permanent identifier; a tag may later name another record"})
    kind = fields.String(validate=validate.OneOf(["vessel", "utility", "step"]))
    tag = fields.String()
    revision = fields.Integer(metadata={"description": "number of this revision (1, 2, ...)"})
    current_revision = fields.Integer()
    retired = fields.Boolean(metadata={"description": "this revision retired the record"})
    author = fields.String(metadata={"description": "name of the token that wrote the revision"})
    created_at = fields.String(metadata={"description": "when the revision was written (ISO 8601, UTC)"})
    etag = fields.String(metadata={"description": "the revision's entity tag, for If-Match"})
    content = fields.Dict(keys=fields.String(), metadata={"description": "the record as written"})


class RecordListSchema(StrictSchema):
    items = fields.List(fields.Nested(RecordSchema))
    total = fields.Integer(metadata={"description": "records matching the filters"})
    limit = fields.Integer()
    offset = fields.Integer()


class RecordQuerySchema(StrictSchema):
    """Filters and paging of a record listing (query parameters)."""

    tag = fields.String(load_default=None, validate=validate.Length(max=65),
                        metadata={"description": "exact tag, or a prefix ending in * (R-*)"})
    material = fields.String(load_default=None, validate=validate.Length(max=64),
                             metadata={"description": "vessels: wall material id"})
    jacket_type = fields.String(load_default=None, validate=validate.Length(max=32),
                                metadata={"description": "vessels: jacket type"})
    volume_min = Quantity("volume", load_default=None, minimum=0, description="vessels: smallest nominal volume")
    volume_max = Quantity("volume", load_default=None, minimum=0, description="vessels: largest nominal volume")
    retired = fields.Boolean(load_default=False, metadata={"description": "include retired records"})
    limit = fields.Integer(load_default=50, validate=validate.Range(1, 500))
    offset = fields.Integer(load_default=0, validate=validate.Range(0, 10 ** 9))


class ReferenceSchema(StrictSchema):
    """A stored record revision a result was computed from."""

    kind = fields.String()
    id = fields.String()
    tag = fields.String()
    revision = fields.Integer()
    used_as = fields.String(metadata={"description": "the request member the record stood for"})


class RecordRefSchema(StrictSchema):
    """A stored record named where its object would stand in a calculation request."""

    ref = fields.String(required=True, validate=validate.Length(min=1, max=64),
                        metadata={"description": "id or tag of a stored record; its current revision is used"})
    revision = fields.Integer(validate=validate.Range(min=1, max=2_147_483_647),
                              metadata={"description": "use this revision instead of the current one"})


# What a step record can supply to a calculation request (its own members and its cooling-failure scenario).
STEP_SUPPLIES = frozenset(set(StepRecordSchema().fields) - {"tag", "notes", "cooling_failure"}) | frozenset(
    ThermalSafetyRequestSchema().fields)


__all__ = ["CalibrationSchema", "RECORD_SCHEMAS", "RecordListSchema", "RecordQuerySchema", "RecordSchema",
           "ReferenceSchema", "StepRecordSchema", "UtilityRecordSchema", "VesselRecordSchema",
           "index_of"]
