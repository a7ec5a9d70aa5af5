"""The main job: ``/v1/cooling-check`` for one vessel and ``/v1/scale-up`` along a scale-up path."""
from flask import Blueprint

from calc import cooling
from schemas.cooling import CoolingCheckRequestSchema, CoolingCheckResultSchema, cooling_check_dict

from .http import calculate

bp = Blueprint("cooling", __name__, url_prefix="/v1")
_request, _result = CoolingCheckRequestSchema(), CoolingCheckResultSchema()


def _check(args: dict) -> dict:
    check = cooling.cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                                  args["heat_release"], args["safety_factor"])
    return cooling_check_dict(check)


@bp.route("/cooling-check", methods=["GET", "POST"])
def cooling_check():
    return calculate(_request, _check, _result)
