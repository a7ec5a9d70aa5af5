"""Result shapes of sized designs, shared by /v1/jacket-sizing and the scale-up's ``size_jacket`` option."""
from __future__ import annotations

from marshmallow import fields

from .base import StrictSchema
from .units import Quantity


class JacketGeometrySchema(StrictSchema):
    type = fields.String()
    gap = Quantity("length", allow_none=True)
    baffle_pitch = Quantity("length", allow_none=True)
    pipe_diameter = Quantity("length", allow_none=True, metadata={"description": "inside diameter of the halved pipe"})
    pipe_pitch = Quantity("length", allow_none=True)
    passes = fields.Integer(metadata={"description": "parallel zones"})
    inlet_diameter = Quantity("length", allow_none=True, metadata={"description": "nozzle bore (annular jackets)"})
    covers_bottom_head = fields.Boolean()
    top = Quantity("length", allow_none=True)


class CoilGeometrySchema(StrictSchema):
    tube_outer_diameter = Quantity("length")
    tube_wall = Quantity("length")
    helix_diameter = Quantity("length")
    turns = fields.Float()
    pitch = Quantity("length")


class CandidateSchema(StrictSchema):
    index = fields.Integer()
    type = fields.String()
    description = fields.String()
    feasible = fields.Boolean(metadata={"description": "meets the heat load times the safety factor within the "
                                                       "utility's limits"})
    reason = fields.String()
    margin = fields.Float(allow_none=True, metadata={"description": "cooling capacity / heat load"})
    cooling_capacity = Quantity("power")
    heat_transfer_area = Quantity("area")
    overall_coefficient = Quantity("heat-transfer coefficient", metadata={"description": "area-weighted U"})
    coolant_flow = Quantity("mass flow", metadata={"description": "flow of the first circuit (the jacket's, else the "
                                                                  "coil's): coolant.flow to check this design again"})
    total_coolant_flow = Quantity("mass flow", metadata={"description": "all circuits together"})
    flow_limited = fields.Boolean(metadata={"description": "the utility's flow was cut back to its hydraulic limit"})
    velocity = Quantity("velocity", metadata={"description": "largest channel velocity over the circuits"})
    pressure_drop = Quantity("pressure", metadata={"description": "largest circuit pressure drop"})
    path_length = Quantity("length", metadata={"description": "coolant path of the circuit with that pressure drop"})
    pipe_size = fields.String(allow_none=True, metadata={"description": "nominal size of the half pipe or coil tube"})
    jacket = fields.Nested(JacketGeometrySchema, attribute="jacket_geometry", allow_none=True)
    coil = fields.Nested(CoilGeometrySchema, allow_none=True)
    displaced_volume = Quantity("volume", metadata={"description": "liquid displaced by the coil"})
    holdup_volume = Quantity("volume", metadata={"description": "coolant held in the channels"})
    process_film_jacket = Quantity("heat-transfer coefficient", allow_none=True)
    process_film_coil = Quantity("heat-transfer coefficient", allow_none=True)
    warning_codes = fields.List(fields.String())
    surface_efficiency = fields.Float(allow_none=True, metadata={
        "description": "half-pipe jackets: overall surface efficiency of the jacketed wall (channel coverage plus "
                       "the wall between turns as fins; resistances.surface_efficiency of the cooling check)"})
    # by name: schemas.cooling (which defines it) imports this module
    margin_band = fields.Nested("MarginBandSchema", allow_none=True, metadata={
        "description": "the margin over the published alternatives of every resistance, as the cooling check "
                       "gives it; computed for every feasible design (every evaluated one with "
                       "options.margin_bands = all; with = recommendation, the feasible ones in the ranking up to the "
                       "recommended one), null for the others"})
    verdict_not_robust = fields.Boolean(allow_none=True, metadata={
        "description": "the verdict (feasible or not) changes within the margin band; null without a band"})


class RecommendationSchema(StrictSchema):
    index = fields.Integer(allow_none=True, metadata={"description": "index of the recommended candidate"})
    type = fields.String(allow_none=True)
    description = fields.String()
    reasoning = fields.String()


class SizedDesignSchema(StrictSchema):
    recommendation = fields.Nested(RecommendationSchema)
    candidate = fields.Nested(CandidateSchema, allow_none=True,
                              metadata={"description": "the recommended design; null when none is feasible"})
    candidates_evaluated = fields.Integer()
