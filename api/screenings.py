"""Fleet screening: one process step against many stored vessels (placeholder until the routes land)."""
from flask import Blueprint

bp = Blueprint("screenings", __name__, url_prefix="/v1")
