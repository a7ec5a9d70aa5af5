"""Vessel geometry: ``/v1/geometry``."""
from flask import Blueprint

from calc.vessel import geometry
from schemas.heat_transfer import GeometryRequestSchema, GeometryResultSchema, fill_dict

from .http import load, respond

bp = Blueprint("geometry", __name__, url_prefix="/v1")
_request, _result = GeometryRequestSchema(), GeometryResultSchema()


@bp.route("/geometry", methods=["GET", "POST"])
def vessel_geometry():
    args = load(_request)
    vessel, fill = args["vessel"], args["fill"]
    result = geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=fill["volume"], level=fill["level"])
    return respond(fill_dict(result), _result)
