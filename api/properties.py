"""Fluid properties: ``/v1/properties`` (one state) and ``/v1/fluids`` (the library)."""
from __future__ import annotations

from flask import Blueprint

from calc import properties
from schemas.properties import FluidSchema, PropertiesQuerySchema, PropertiesResultSchema

from .http import calculate, list_response

bp = Blueprint("properties", __name__, url_prefix="/v1")
_query = PropertiesQuerySchema()
_result = PropertiesResultSchema()
_fluid = FluidSchema()


def _report(args: dict) -> properties.PropertyReport:
    return properties.property_report(args["fluid"], args["temperature"], args["mass_fraction"], args["pressure"])


@bp.route("/properties", methods=["GET", "POST"])
def get_properties():
    return calculate(_query, _report, _result)


@bp.get("/fluids")
def get_fluids():
    return list_response(properties.library(), _fluid)
