"""Vessel geometry: ``/v1/geometry``."""
from flask import Blueprint

from calc.vessel import geometry
from schemas.heat_transfer import GeometryRequestSchema, GeometryResultSchema

from .http import calculate

bp = Blueprint("geometry", __name__, url_prefix="/v1")
_request, _result = GeometryRequestSchema(), GeometryResultSchema()


def _fill(args: dict) -> geometry.FillGeometry:
    vessel, fill = args["vessel"], args["fill"]
    return geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=fill["volume"], level=fill["level"])


@bp.route("/geometry", methods=["GET", "POST"])
def vessel_geometry():
    return calculate(_request, _fill, _result)
