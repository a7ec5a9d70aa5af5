"""Fluid properties: ``/v1/properties`` (one state) and ``/v1/fluids`` (the library)."""
from __future__ import annotations

from flask import Blueprint

from calc import properties
from schemas.properties import FluidSchema, PropertiesQuerySchema, PropertiesResultSchema, report_to_dict

from .http import list_response, load, respond

bp = Blueprint("properties", __name__, url_prefix="/v1")
_query = PropertiesQuerySchema()
_result = PropertiesResultSchema()
_fluid = FluidSchema()


@bp.route("/properties", methods=["GET", "POST"])
def get_properties():
    args = load(_query)
    report = properties.property_report(args["fluid"], args["temperature"], args["mass_fraction"], args["pressure"])
    return respond(report_to_dict(report), _result)


@bp.get("/fluids")
def get_fluids():
    return list_response(properties.library(), _fluid)
