"""Agitation: ``/v1/agitation`` and the impeller library ``/v1/impellers``."""
from flask import Blueprint

from calc.vessel import agitation
from calc.vessel import geometry
from schemas.heat_transfer import AgitationRequestSchema, AgitationResultSchema, ImpellerSchema, agitation_dict

from .http import guarded, list_response, load, respond

bp = Blueprint("agitation", __name__, url_prefix="/v1")
_request, _result, _impeller = AgitationRequestSchema(), AgitationResultSchema(), ImpellerSchema()


@bp.route("/agitation", methods=["GET", "POST"])
def agitator_power():
    return respond(agitation_dict(guarded(_agitation, load(_request))), _result)


def _agitation(args: dict):
    vessel, charge, temperature = args["vessel"], args["charge"], args["process_temperature"]
    props = charge.liquid.at(temperature, field="process_temperature")
    filled = geometry.fill(vessel.shape, vessel.coverage, vessel.coils, volume=charge.liquid_volume(temperature),
                           field="charge.volume" if charge.volume is not None else "charge.mass")
    return agitation.agitation(vessel.agitator, props, filled.volume, vessel.shape.diameter)


@bp.get("/impellers")
def impeller_library():
    return list_response(agitation.impellers(), _impeller)
