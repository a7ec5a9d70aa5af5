"""Request objects shared by the heat-transfer resources: ``vessel``, ``charge``, ``coolant``.

Each schema validates one JSON object (units converted to SI by the Quantity fields) and builds the
calc description from it (``calc.vessel.Vessel``, ``Charge``, ``Coolant``).
"""
from __future__ import annotations

from marshmallow import ValidationError, fields, post_load, validate, validates_schema

from calc.vessel import agitation
from calc.vessel import geometry
from calc.vessel import heads
from calc import properties
from calc.films import jacket_side
from calc.films import wall
from calc.vessel.model import Charge, Coolant, Vessel

from .base import StrictSchema, finite_float, whole_number
from .units import BOUNDS, Quantity, absolute_temperature, hint_for, parse_quantity

JACKET_TYPES = ["annular", "annular_spiral_baffle", "half_pipe", "none"]


def _length(description: str, **kwargs) -> Quantity:
    return Quantity("length", minimum=0, exclusive_minimum=True, description=description, **kwargs)


class WallSchema(StrictSchema):
    material = fields.String(load_default="stainless_316l",
                             validate=validate.OneOf(sorted(wall.MATERIALS) + sorted(wall.DEPRECATED_MATERIAL_IDS)),
                             metadata={"description": "material id from /v1/materials (hastelloy_c276, the former "
                                                      "id of alloy_c276, is accepted with a warning)"})
    thickness = _length("metal wall thickness", required=True)
    conductivity = Quantity("thermal conductivity", minimum=0, exclusive_minimum=True, load_default=None,
                            description="overrides the library value")
    lining_thickness = Quantity("length", minimum=0, load_default=None,
                                description="enamel/lining on the process side; 0 removes a library lining")
    lining_conductivity = Quantity("thermal conductivity", minimum=0, exclusive_minimum=True, load_default=None)

    @post_load
    def _build(self, data, **kwargs):
        return wall.WallSpec(**data)


class JacketSchema(StrictSchema):
    type = fields.String(required=True, validate=validate.OneOf(JACKET_TYPES))
    covers_bottom_head = fields.Boolean(load_default=True)
    top = Quantity("length", minimum=0, load_default=None,
                   description="height of the jacket's top edge above the lowest inside point; default the brim")
    gap = _length("annular gap between vessel wall and jacket", load_default=None)
    baffle_pitch = _length("pitch of the spiral baffle", load_default=None)
    pipe_diameter = _length("inside diameter of the half-pipe", load_default=None)
    pipe_pitch = _length("centre-to-centre pitch of the half-pipe turns", load_default=None)
    passes = whole_number(load_default=1, validate=validate.Range(1, 50),
                            metadata={"description": "parallel zones/passes sharing the coolant flow"})
    inlet_diameter = _length("coolant inlet nozzle diameter", load_default=None)
    bypass_fraction = finite_float(load_default=None, validate=validate.Range(0, 0.9),
                                   metadata={"description": "spiral-baffle leakage fraction of the flow"})

    @post_load
    def _build(self, data, **kwargs):
        coverage = geometry.JacketCoverage(covers_bottom_head=data.pop("covers_bottom_head"), top=data.pop("top"))
        if data["type"] == "none":
            return coverage, None
        return coverage, jacket_side.JacketSpec(**data)


class CoilSchema(StrictSchema):
    tube_outer_diameter = _length("coil tube outside diameter", required=True)
    tube_wall = _length("coil tube wall thickness", required=True)
    helix_diameter = _length("diameter of the helix (tube centreline)", required=True)
    turns = finite_float(required=True, validate=validate.Range(0, 500, min_inclusive=False))
    pitch = _length("vertical distance between turns", required=True)
    elevation = Quantity("length", minimum=0, load_default=None,
                         description="height of the lowest turn's centre above the lowest inside point")

    @post_load
    def _build(self, data, **kwargs):
        return geometry.HelicalCoil(**data)


class AgitatorSchema(StrictSchema):
    impeller = fields.String(required=True, validate=validate.OneOf(sorted(agitation.IMPELLERS)),
                             metadata={"description": "impeller id from /v1/impellers"})
    diameter = _length("impeller diameter", required=True)
    speed = Quantity("agitator speed", required=True, minimum=0, exclusive_minimum=True)
    count = whole_number(load_default=1, validate=validate.Range(1, 6))
    baffles = fields.Boolean(load_default=True, metadata={"description": "fully baffled vessel"})
    power_number = finite_float(load_default=None, validate=validate.Range(0, 100, min_inclusive=False),
                                metadata={"description": "turbulent power number overriding the library"})

    @post_load
    def _build(self, data, **kwargs):
        baffled = data.pop("baffles")
        return agitation.Agitator(baffled=baffled, **data)


class FoulingSchema(StrictSchema):
    process = Quantity("fouling resistance", minimum=0, load_default=0.0)
    service = Quantity("fouling resistance", minimum=0, load_default=0.0)

    @post_load
    def _build(self, data, **kwargs):
        return wall.Fouling(**data)


class VesselSchema(StrictSchema):
    record_kind = "vessel"  # a calculation may name a stored vessel here: {"ref": "<id or tag>"}
    name = fields.String(load_default="vessel", validate=validate.Length(max=120))
    diameter = _length("inside diameter", required=True)
    straight_side = _length("tangent-to-tangent height of the cylindrical shell", required=True)
    bottom_head = fields.String(required=True, validate=validate.OneOf(sorted(heads.HEADS)))
    cone_angle = Quantity("angle", load_default=None, minimum=0, exclusive_minimum=True, maximum=180,
                          description="included apex angle of a conical bottom; 90 = 45 degrees from vertical")
    wall = fields.Nested(WallSchema, load_default=None)
    jacket = fields.Nested(JacketSchema, load_default=None)
    coils = fields.List(fields.Nested(CoilSchema), load_default=list, validate=validate.Length(max=6))
    agitator = fields.Nested(AgitatorSchema, load_default=None)
    fouling = fields.Nested(FoulingSchema, load_default=None)

    @post_load
    def _build(self, data, **kwargs):
        coverage, jacket = data["jacket"] if data["jacket"] is not None else (geometry.JacketCoverage(), None)
        return Vessel(
            shape=geometry.VesselShape(data["diameter"], data["straight_side"], data["bottom_head"],
                                       data["cone_angle"]),
            wall=data["wall"] or wall.WallSpec(thickness=0.01),
            agitator=data["agitator"], coverage=coverage, jacket=jacket, coils=tuple(data["coils"]),
            fouling=data["fouling"] or wall.Fouling(), name=data["name"],
        )


def require_agitator(vessel: Vessel | None, field: str, why: str = "required for this calculation") -> None:
    """The agitator is optional for geometry only; calculations with films or power need it."""
    if vessel is not None and vessel.agitator is None:
        raise ValidationError({field: {"agitator": [why]}})


class _LiquidFields(StrictSchema):
    """A liquid: a library ``fluid`` (+ ``mass_fraction``), or its properties given explicitly."""

    fluid = fields.String(load_default=None, validate=validate.OneOf(sorted(properties.FLUIDS)),
                          metadata={"description": "fluid id from /v1/fluids"})
    mass_fraction = finite_float(load_default=None, validate=validate.Range(0, 1))
    pressure = Quantity("pressure", minimum=0, exclusive_minimum=True, load_default=properties.STANDARD_PRESSURE)
    density = Quantity("density", minimum=0, exclusive_minimum=True, load_default=None)
    heat_capacity = Quantity("heat capacity", minimum=0, exclusive_minimum=True, load_default=None)
    viscosity = Quantity("viscosity", minimum=0, exclusive_minimum=True, load_default=None)
    thermal_conductivity = Quantity("thermal conductivity", minimum=0, exclusive_minimum=True, load_default=None)
    viscosity_reference_temperature = absolute_temperature(
                                               load_default=None,
                                               description="temperature at which `viscosity` applies")
    viscosity_temperature_coefficient = Quantity("temperature difference", load_default=None,
                                                 description="Andrade B: mu = mu_ref exp[B (1/T - 1/T_ref)]")

    _EXPLICIT = ("density", "heat_capacity", "viscosity", "thermal_conductivity")

    @validates_schema
    def _one_description(self, data, **kwargs):
        given = [name for name in self._EXPLICIT if data.get(name) is not None]
        if data.get("fluid") is not None:
            if given:
                raise ValidationError("give either a library fluid or explicit properties, not both", given[0])
            info = properties.FLUIDS[data["fluid"]]
            if info.mass_fraction_range is not None and data.get("mass_fraction") is None:
                low, high = info.mass_fraction_range
                raise ValidationError(f"{info.name} needs a mass fraction between {low} and {high}", "mass_fraction")
        else:
            missing = [name for name in self._EXPLICIT if data.get(name) is None]
            if missing:
                raise ValidationError(
                    "required unless a library fluid is given", missing[0])
        if (data.get("viscosity_temperature_coefficient") is None) != (data.get("viscosity_reference_temperature") is None):
            raise ValidationError("give both viscosity_reference_temperature and viscosity_temperature_coefficient",
                                  "viscosity_temperature_coefficient")

    def liquid(self, data: dict, prefix: str) -> properties.Liquid:
        if data.get("fluid") is not None:
            return properties.LibraryLiquid(data["fluid"], data.get("mass_fraction"), data["pressure"],
                                            fraction_field=f"{prefix}.mass_fraction")
        return properties.ExplicitLiquid(
            density=data["density"], heat_capacity=data["heat_capacity"], viscosity=data["viscosity"],
            thermal_conductivity=data["thermal_conductivity"],
            reference_temperature=data.get("viscosity_reference_temperature"),
            viscosity_temperature_coefficient=data.get("viscosity_temperature_coefficient") or 0.0,
        )


class ChargeSchema(_LiquidFields):
    volume = Quantity("volume", minimum=0, exclusive_minimum=True, load_default=None)
    mass = Quantity("mass", minimum=0, exclusive_minimum=True, load_default=None)

    @validates_schema
    def _amount(self, data, **kwargs):
        if (data.get("volume") is None) == (data.get("mass") is None):
            raise ValidationError("give exactly one of volume and mass", "volume")

    @post_load
    def _build(self, data, **kwargs):
        return Charge(self.liquid(data, "charge"), data.get("volume"), data.get("mass"))


class Flow(fields.Field):
    """A coolant flow: mass/time (default kg/s) or volume/time ("20 m^3/h"), kept with its kind."""

    minimum = BOUNDS["mass flow"].smallest
    maximum = BOUNDS["mass flow"].largest

    def __init__(self, **kwargs):
        metadata = dict(kwargs.pop("metadata", {}))
        metadata.update(unit="kg/s", kind="mass flow", bounds_reason=BOUNDS["mass flow"].reason,
                        description="mass flow (kg/s by default) or a volume flow with its unit, e.g. '20 m^3/h'")
        super().__init__(metadata=metadata, **kwargs)

    def _deserialize(self, value, attr, data, **kwargs):
        try:
            kind, si = "mass", parse_quantity("mass flow", value)
        except ValidationError as mass_error:
            if not isinstance(value, str):
                raise mass_error
            try:
                kind, si = "volume", parse_quantity("volume flow", value)
            except ValidationError:
                message = "expected a mass flow (e.g. '2 kg/s') or a volume flow (e.g. '20 m^3/h')"
                hint = hint_for("volume flow", value)
                raise ValidationError(f"{message}; {hint}" if hint else message) from None
        bounds = BOUNDS[f"{kind} flow"]
        unit = "kg/s" if kind == "mass" else "m^3/s"
        if not bounds.smallest <= si <= bounds.largest:
            raise ValidationError(f"must be from {bounds.smallest:g} to {bounds.largest:g} {unit} ({bounds.reason})")
        return kind, si


class CoolantSchema(_LiquidFields):
    record_kind = "utility"  # a calculation may name a stored utility here: {"ref": "<id or tag>"}
    inlet_temperature = absolute_temperature(required=True)
    flow = Flow(required=True)
    coil_flow = Flow(load_default=None, metadata={"description": "flow through each coil; default the jacket flow"})
    available_pressure_drop = Quantity("pressure", minimum=0, exclusive_minimum=True, load_default=None,
                                       description="pressure difference between the utility's supply and return "
                                                   "headers, seen by every circuit (jacket, each coil) in parallel")
    maximum_velocity = Quantity("velocity", minimum=0, exclusive_minimum=True, load_default=None,
                                description="largest coolant velocity allowed in any jacket or coil channel")
    maximum_flow = Flow(load_default=None, metadata={"description": "largest flow the utility delivers to all "
                                                                    "circuits together"})

    @validates_schema
    def _same_kind(self, data, **kwargs):
        if data.get("coil_flow") is not None and data.get("flow") is not None and data["coil_flow"][0] != data["flow"][0]:
            raise ValidationError("give coil_flow as the same kind of flow (mass or volume) as flow", "coil_flow")

    @post_load
    def _build(self, data, **kwargs):
        kind, flow = data["flow"]
        coil = data.get("coil_flow")
        maximum_kind, maximum = data.get("maximum_flow") or ("mass", None)
        return Coolant(self.liquid(data, "coolant"), data["inlet_temperature"], flow, kind,
                       None if coil is None else coil[1], data.get("available_pressure_drop"),
                       data.get("maximum_velocity"), maximum, maximum_kind)
