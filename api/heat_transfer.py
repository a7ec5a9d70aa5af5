"""Heat transfer: ``/v1/heat-transfer``, ``/v1/coolant-balance`` and the wall library ``/v1/materials``."""
from flask import Blueprint

from calc.network import heat_transfer
from calc.films import wall
from schemas.heat_transfer import (CoolantBalanceRequestSchema, CoolantBalanceResultSchema,
                                   HeatTransferRequestSchema, HeatTransferResultSchema, MaterialSchema,
                                   coolant_balance_dict, heat_transfer_dict)

from .http import guarded, list_response, load, respond

bp = Blueprint("heat_transfer", __name__, url_prefix="/v1")
_request, _result = HeatTransferRequestSchema(), HeatTransferResultSchema()
_balance_request, _balance_result = CoolantBalanceRequestSchema(), CoolantBalanceResultSchema()
_material = MaterialSchema()


@bp.route("/heat-transfer", methods=["GET", "POST"])
def network():
    result = guarded(lambda a: heat_transfer.heat_transfer(a["vessel"], a["charge"], a["coolant"],
                                                           a["process_temperature"]), load(_request))
    return respond(heat_transfer_dict(result), _result)


@bp.route("/coolant-balance", methods=["GET", "POST"])
def coolant_balance():
    balance, mass_flow, heat_capacity = guarded(
        lambda a: heat_transfer.coolant_balance_at_mean(a["coolant"], a["process_temperature"], a["ua"]),
        load(_balance_request))
    return respond(coolant_balance_dict(balance, mass_flow, heat_capacity), _balance_result)


@bp.get("/materials")
def material_library():
    return list_response(wall.library(), _material)
