"""Heat transfer: ``/v1/heat-transfer``, ``/v1/coolant-balance``, the wall library ``/v1/materials`` and
the correlation alternatives ``/v1/correlations``."""
from flask import Blueprint

from calc.network import heat_transfer
from calc.films import selection, wall
from schemas.heat_transfer import (CoolantBalanceRequestSchema, CoolantBalanceResultSchema,
                                   CorrelationAlternativeSchema, HeatTransferRequestSchema,
                                   HeatTransferResultSchema, MaterialSchema,
                                   coolant_balance_dict, heat_transfer_dict)

from .http import list_response, load, respond

bp = Blueprint("heat_transfer", __name__, url_prefix="/v1")
_request, _result = HeatTransferRequestSchema(), HeatTransferResultSchema()
_balance_request, _balance_result = CoolantBalanceRequestSchema(), CoolantBalanceResultSchema()
_material = MaterialSchema()
_alternative = CorrelationAlternativeSchema()


@bp.route("/heat-transfer", methods=["GET", "POST"])
def network():
    args = load(_request)
    result = heat_transfer.heat_transfer(args["vessel"], args["charge"], args["coolant"], args["process_temperature"])
    return respond(heat_transfer_dict(result), _result)


@bp.route("/coolant-balance", methods=["GET", "POST"])
def coolant_balance():
    args = load(_balance_request)
    balance, mass_flow, heat_capacity = heat_transfer.coolant_balance_at_mean(
        args["coolant"], args["process_temperature"], args["ua"])
    return respond(coolant_balance_dict(balance, mass_flow, heat_capacity), _balance_result)


@bp.get("/materials")
def material_library():
    return list_response(wall.library(), _material)


@bp.get("/correlations")
def correlation_library():
    return list_response(selection.alternatives(), _alternative)
