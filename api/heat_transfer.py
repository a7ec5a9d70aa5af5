"""Heat transfer: ``/v1/heat-transfer``, ``/v1/coolant-balance``, the wall library ``/v1/materials`` and
the correlation alternatives ``/v1/correlations``."""
from flask import Blueprint

from calc.films import selection, wall
from calc.network import heat_transfer
from calc.network.coolant_balance import CoolantBalance
from schemas.heat_transfer import (CoolantBalanceRequestSchema, CoolantBalanceResultSchema,
                                   CorrelationAlternativeSchema, HeatTransferRequestSchema,
                                   HeatTransferResultSchema, MaterialSchema)

from .http import calculate, list_response

bp = Blueprint("heat_transfer", __name__, url_prefix="/v1")
_request, _result = HeatTransferRequestSchema(), HeatTransferResultSchema()
_balance_request, _balance_result = CoolantBalanceRequestSchema(), CoolantBalanceResultSchema()
_material = MaterialSchema()
_alternative = CorrelationAlternativeSchema()


def _network(args: dict) -> heat_transfer.HeatTransferResult:
    return heat_transfer.heat_transfer(args["vessel"], args["charge"], args["coolant"], args["process_temperature"])


def _balance(args: dict) -> CoolantBalance:
    return heat_transfer.coolant_balance_at_mean(args["coolant"], args["process_temperature"], args["ua"])


@bp.route("/heat-transfer", methods=["GET", "POST"])
def network():
    return calculate(_request, _network, _result)


@bp.route("/coolant-balance", methods=["GET", "POST"])
def coolant_balance():
    return calculate(_balance_request, _balance, _balance_result)


@bp.get("/materials")
def material_library():
    return list_response(wall.library(), _material)


@bp.get("/correlations")
def correlation_library():
    return list_response(selection.alternatives(), _alternative)
