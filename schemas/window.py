"""Schemas of /v1/operating-window: the cooling check's body plus two axes; the margin over the grid."""
from __future__ import annotations

import math

import numpy as np
from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.checks.operating_window import AXES, Axis, WindowPoint

from .base import StrictSchema
from .cooling import CoolingCheckRequestSchema
from .heat_transfer import WarningSchema
from .units import Quantity, from_si, parse_quantity
from .vessel import Flow

#: The quantity kind of each axis (coolant.flow: a mass or a volume flow, as the coolant's own flow).
AXIS_KINDS = {"heat_release.dosing_time": "time", "coolant.inlet_temperature": "temperature",
              "coolant.flow": "flow", "process_temperature": "temperature",
              "vessel.agitator.speed": "agitator speed"}
#: The field of a result point that holds each axis's value.
POINT_FIELDS = {"heat_release.dosing_time": "dosing_time", "coolant.inlet_temperature": "coolant_inlet_temperature",
                "coolant.flow": "coolant_flow", "process_temperature": "process_temperature",
                "vessel.agitator.speed": "agitator_speed"}
MAX_AXIS_POINTS = 200


class AxisSchema(StrictSchema):
    quantity = fields.String(required=True, validate=validate.OneOf(AXES),
                             metadata={"description": "dotted request path of the quantity varied"})
    start = fields.Raw(required=True, data_key="from",
                       metadata={"description": "first value, in the quantity's unit or a string with a unit"})
    stop = fields.Raw(required=True, data_key="to", metadata={"description": "last value (may be below 'from')"})
    points = fields.Integer(required=True, strict=True, validate=validate.Range(2, MAX_AXIS_POINTS),
                            metadata={"description": "values on this axis, evenly spaced, ends included"})

    @post_load
    def _build(self, data, **kwargs):
        kind = AXIS_KINDS[data["quantity"]]
        values, kinds = [], set()
        for name, key in (("start", "from"), ("stop", "to")):
            raw = data[name]
            if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
                raise ValidationError("must be a number or a string with a unit", key)
            try:
                if kind == "flow":
                    flow_kind, value = Flow()._deserialize(raw, key, data)
                    kinds.add(flow_kind)
                else:
                    value = parse_quantity(kind, raw)
            except ValidationError as exc:
                raise ValidationError(exc.messages, key) from None
            if not value > 0:
                raise ValidationError("must be a positive value (an absolute temperature above 0 K)", key)
            values.append(value)
        if len(kinds) > 1:
            raise ValidationError("give 'from' and 'to' as the same kind of flow (mass or volume)", "to")
        if values[0] == values[1]:
            raise ValidationError("must differ from 'from'", "to")
        grid = tuple(float(v) for v in np.linspace(values[0], values[1], data["points"]))
        return Axis(data["quantity"], grid, kinds.pop() if kinds else "mass")


class OperatingWindowRequestSchema(CoolingCheckRequestSchema):
    axes = fields.List(fields.Nested(AxisSchema), required=True, validate=validate.Length(equal=2),
                       metadata={"description": "the two quantities varied, each over a range of evenly spaced "
                                                "values; every other input as in the cooling check"})

    @validates_schema
    def _different(self, data, **kwargs):
        axes = data.get("axes") or []
        if len(axes) == 2 and axes[0].quantity == axes[1].quantity:
            raise ValidationError({1: {"quantity": ["must differ from the first axis's quantity"]}}, "axes")


# ---------------------------------------------------------------- results

class WindowPointSchema(StrictSchema):
    dosing_time = Quantity("time", metadata={"description": "axis value, when an axis varies it"})
    coolant_inlet_temperature = Quantity("temperature", metadata={"description": "axis value"})
    coolant_flow = Quantity("mass flow", metadata={"description": "axis value: jacket flow given as mass flow"})
    coolant_volume_flow = Quantity("volume flow", metadata={"description": "axis value: jacket flow given as "
                                                                           "volume flow"})
    process_temperature = Quantity("temperature", metadata={"description": "axis value"})
    agitator_speed = Quantity("agitator speed", metadata={"description": "axis value"})
    margin = fields.Float(allow_none=True, metadata={"description": "cooling capacity / heat load; null where "
                                                                     "there is no load or no cooling state"})
    adequate = fields.Boolean(allow_none=True, metadata={"description": "margin >= safety factor; null where the "
                                                                         "point is not a cooling state"})
    cooling_capacity = Quantity("power", allow_none=True)
    heat_load = Quantity("power", allow_none=True)
    coolant_outlet_temperature = Quantity("temperature", allow_none=True)
    note = fields.String()


def axis_field(axis: Axis) -> str:
    """The field of a result point that holds ``axis``'s value (a volume flow axis: ``coolant_volume_flow``)."""
    if axis.quantity == "coolant.flow" and axis.flow_kind == "volume":
        return "coolant_volume_flow"
    return POINT_FIELDS[axis.quantity]


_POINT_ORDER = tuple(WindowPointSchema().fields)
_POINT_KINDS = {name: field.kind for name, field in WindowPointSchema().fields.items() if isinstance(field, Quantity)}


def _point_row(point: WindowPoint, names: list[str]) -> dict:
    """One :class:`calc.checks.operating_window.WindowPoint` as :class:`WindowPointSchema` dumps it: SI to each
    field's API unit, non-finite to null, the axis values under their fields, ``note`` only when there is one."""
    row = dict(zip(names, point.values))
    row.update(margin=point.margin, adequate=point.adequate, cooling_capacity=point.cooling_capacity,
               heat_load=point.heat_load, coolant_outlet_temperature=point.coolant_outlet_temperature)
    if point.note:
        row["note"] = point.note
    for name, value in row.items():
        kind = _POINT_KINDS.get(name)
        if kind is not None and value is not None:
            value = from_si(kind, float(value))
            row[name] = value if math.isfinite(value) else None
    return row


class PointList(fields.List):
    """A list of window points (:class:`WindowPointSchema`) dumped in one tight loop, the axis values named
    after the window's axes (the dumped object's ``axes``).

    Kept by measurement (``python -m tests.benchmarks.window_dump``): a 50 x 50 window (2,570 points with its
    boundary) dumps in 18-22 ms this way against 144-168 ms through ``fields.Nested(WindowPointSchema)``
    per point, 32-39 % more on a whole in-process request of 380-390 ms; the issue's bar for the plain
    schema path was 10 %. marshmallow's per-field machinery, not the conversion, is the cost. The
    conversion is the schema's own: each Quantity field's unit, non-finite to null.
    """

    def _serialize(self, value, attr, obj, **kwargs):
        if value is None:
            return None
        names = [axis_field(axis) for axis in obj.axes]
        return [_point_row(point, names) for point in value]


class PointField(fields.Nested):
    """One window point, dumped as :class:`PointList` dumps each (fields in the schema's order)."""

    def __init__(self, **kwargs):
        super().__init__(WindowPointSchema, **kwargs)

    def _serialize(self, nested_obj, attr, obj, **kwargs):
        if nested_obj is None:
            return None
        row = _point_row(nested_obj, [axis_field(axis) for axis in obj.axes])
        return {name: row[name] for name in _POINT_ORDER if name in row}


class WindowAxisResultSchema(StrictSchema):
    """Dumps a :class:`calc.checks.operating_window.Axis`."""

    quantity = fields.String()
    field = fields.Function(axis_field, metadata={"description": "the field of each point that holds this axis's "
                                                                 "value"})
    points = fields.Integer()


class OperatingWindowResultSchema(StrictSchema):
    """Dumps a :class:`calc.checks.operating_window.OperatingWindow`."""

    safety_factor = fields.Float()
    axes = fields.List(fields.Nested(WindowAxisResultSchema))
    points = PointList(fields.Nested(WindowPointSchema),
                       metadata={"description": "one per grid point, the first axis outer, the second inner"})
    boundary = PointList(fields.Nested(WindowPointSchema),
                         metadata={"description": "points where the margin equals the safety factor, solved on "
                                                    "each grid line where the verdict changes"})
    current = PointField(metadata={"description": "the request's own operating point"})
    adequate_share = fields.Float(metadata={"description": "share of the computed grid points that are adequate"})
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())
