"""Schemas of /v1/jacket-sizing: the shell, the duty and the utility in; ranked candidate designs out."""
from __future__ import annotations

from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.sizing import jacket_sizing as sizing
from calc.sizing.pipes import PIPE_SIZES

from .base import StrictSchema
from .candidates import CandidateSchema, RecommendationSchema
from .cooling import CoolingCheckRequestSchema, HeatLoadSchema
from .heat_transfer import WarningSchema
from .units import Quantity

_SIZES = validate.OneOf(list(PIPE_SIZES))


def _lengths(description: str) -> fields.List:
    return fields.List(Quantity("length", minimum=0, exclusive_minimum=True), load_default=None,
                       validate=validate.Length(1, 10), metadata={"description": description})


class SizingOptionsSchema(StrictSchema):
    types = fields.List(fields.String(validate=validate.OneOf(sizing.TYPES)), load_default=None,
                        validate=validate.Length(1, len(sizing.TYPES)),
                        metadata={"description": "designs to enumerate; default all"})
    gaps = _lengths("annular gaps; default 25, 38, 50, 75 and 100 mm")
    baffle_pitches = _lengths("spiral-baffle pitches; default 100, 150, 200, 300 and 400 mm")
    pipe_sizes = fields.List(fields.String(validate=_SIZES), load_default=None, validate=validate.Length(1, 10),
                             metadata={"description": "half-pipe nominal pipe sizes (ASME B36.10M, schedule 40); "
                                                      "default 1-1/2, 2, 2-1/2, 3 and 4"})
    pipe_pitches = _lengths("half-pipe pitches, each at least the widest half pipe's outside diameter; default "
                            "1.25, 1.5 and 2 outside diameters of each size")
    zones = fields.List(fields.Integer(validate=validate.Range(1, 20)), load_default=None,
                        validate=validate.Length(1, 10),
                        metadata={"description": "numbers of parallel half-pipe zones; default 1 to 4"})
    coil_tube_sizes = fields.List(fields.String(validate=_SIZES), load_default=None, validate=validate.Length(1, 10),
                                  metadata={"description": "coil tube nominal sizes (ASME B36.19M, schedule 10S); "
                                                           "default 1, 1-1/2, 2 and 3"})
    coil_turns = fields.List(fields.Integer(validate=validate.Range(1, 500)), load_default=None,
                             validate=validate.Length(1, 10),
                             metadata={"description": "numbers of coil turns; default a quarter to all of the turns "
                                                      "that fit below the liquid level"})
    coil_helix_diameter = Quantity("length", minimum=0, exclusive_minimum=True, load_default=None,
                                   description="coil centreline diameter; default midway between impeller tip and wall")
    covers_bottom_head = fields.Boolean(load_default=True, metadata={"description": "the jacket covers the bottom head"})
    jacket_top = Quantity("length", minimum=0, load_default=None,
                          description="height of the jacket's top edge above the lowest inside point; default the "
                                      "top of the straight side")
    margin_bands = fields.String(validate=validate.OneOf(sizing.BAND_SCOPES), load_default=None, metadata={
        "description": "which candidates carry the margin band: feasible (default; the recommendation is chosen "
                       "among them), all (every evaluated candidate; three to four times the time of a sizing), or "
                       "recommendation (only the feasible designs, in the order of the ranking, up to the first whose "
                       "verdict holds across its band: the same recommendation, fastest)"})

    @post_load
    def _build(self, data, **kwargs):
        given = {k: (tuple(v) if isinstance(v, list) else v) for k, v in data.items() if v is not None}
        return sizing.SizingOptions(**given)


class JacketSizingRequestSchema(CoolingCheckRequestSchema):
    options = fields.Nested(SizingOptionsSchema, load_default=None)

    @validates_schema
    def _bare_shell(self, data, **kwargs):
        vessel = data.get("vessel")
        if vessel is not None and (vessel.jacket is not None or vessel.coils):
            raise ValidationError({"vessel": {"jacket" if vessel.jacket is not None else "coils": [
                "the sizing designs the jacket and coils: give the bare shell (the jacket's coverage goes in "
                "options.covers_bottom_head and options.jacket_top)"]}})

    @post_load
    def _default_options(self, data, **kwargs):
        data["options"] = data["options"] or sizing.SizingOptions()
        return data


# ---------------------------------------------------------------- results

class SmallestFeasibleSchema(StrictSchema):
    type = fields.String()
    index = fields.Integer(allow_none=True, metadata={"description": "null when no design of this type is feasible"})


class JacketSizingResultSchema(StrictSchema):
    recommendation = fields.Nested(RecommendationSchema)
    smallest_feasible = fields.List(fields.Nested(SmallestFeasibleSchema), attribute="smallest_feasible_by_type")
    candidates_evaluated = fields.Integer()
    duty = Quantity("power", metadata={"description": "heat load times the safety factor"})
    safety_factor = fields.Float()
    heat_load = fields.Nested(HeatLoadSchema, allow_none=True)
    candidates = fields.List(fields.Nested(CandidateSchema))
    warnings = fields.List(fields.Nested(WarningSchema))
    cautions = fields.List(fields.String())

