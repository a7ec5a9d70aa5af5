"""Agitation: ``/v1/agitation`` and the impeller library ``/v1/impellers``."""
from flask import Blueprint

from calc.vessel import agitation
from calc.vessel.model import stirred
from schemas.heat_transfer import AgitationRequestSchema, AgitationResultSchema, ImpellerSchema

from .http import calculate, list_response

bp = Blueprint("agitation", __name__, url_prefix="/v1")
_request, _result, _impeller = AgitationRequestSchema(), AgitationResultSchema(), ImpellerSchema()


def _stirred(args: dict) -> agitation.AgitationResult:
    return stirred(args["vessel"], args["charge"], args["process_temperature"])


@bp.route("/agitation", methods=["GET", "POST"])
def agitator_power():
    return calculate(_request, _stirred, _result)


@bp.get("/impellers")
def impeller_library():
    return list_response(agitation.impellers(), _impeller)
