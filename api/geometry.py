"""Vessel geometry: ``/v1/geometry``."""
from flask import Blueprint

from calc.vessel import geometry
from schemas.heat_transfer import GeometryRequestSchema, GeometryResultSchema, fill_dict

from .http import guarded, load, respond

bp = Blueprint("geometry", __name__, url_prefix="/v1")
_request, _result = GeometryRequestSchema(), GeometryResultSchema()


@bp.route("/geometry", methods=["GET", "POST"])
def vessel_geometry():
    return respond(fill_dict(guarded(_fill, load(_request))), _result)


def _fill(args: dict):
    vessel, fill = args["vessel"], args["fill"]
    return geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=fill["volume"], level=fill["level"])
