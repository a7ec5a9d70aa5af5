"""The main job: ``/v1/cooling-check`` for one vessel and ``/v1/scale-up`` along a scale-up path."""
from flask import Blueprint, current_app

from calc.checks import cooling_check as cooling
from calc.checks import scaleup
from schemas.cooling import (CoolingCheckRequestSchema, CoolingCheckResultSchema, ScaleUpRequestSchema,
                             ScaleUpResultSchema, cooling_check_dict, scale_up_dict)

from . import charts
from .errors import ProblemError
from .http import calculate
from .runtime import deadline

bp = Blueprint("cooling", __name__, url_prefix="/v1")
_request, _result = CoolingCheckRequestSchema(), CoolingCheckResultSchema()


def _check(args: dict) -> dict:
    check = cooling.cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                                  args["heat_release"], args["safety_factor"], deadline=deadline())
    return cooling_check_dict(check)


@bp.route("/cooling-check", methods=["GET", "POST"])
def cooling_check():
    return calculate(_request, _check, _result)


_scale_request, _scale_result = ScaleUpRequestSchema(), ScaleUpResultSchema()


def _scale_up(args: dict) -> dict:
    limit = current_app.config["MAX_SCALES"]
    if len(args["targets"]) > limit:
        raise ProblemError(413, f"at most {limit} targets per scale-up",
                           [{"field": "targets", "message": f"at most {limit} targets"}])
    result = scaleup.scale_up(args["reference"], args["targets"], args["rule"], args["charge"], args["coolant"],
                              args["process_temperature"], args["heat_release"], args["safety_factor"],
                              args["coolant_flow_rule"], deadline=deadline())
    return scale_up_dict(result)


def scale_up_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """Heat load and cooling capacity against volume (log axes), and the margin of each scale."""
    fig, (top, bottom) = charts.figure(2)
    scales = sorted(payload["scales"], key=lambda s: s["volume"])
    volumes = [s["volume"] for s in scales]
    volume_unit = units["scales.volume"]
    load, power_unit = charts.readable([s["heat_load"]["total"] for s in scales], units["scales.heat_load.total"])
    capacity, _ = charts.readable([s["cooling_capacity"] for s in scales], units["scales.cooling_capacity"])
    factor = payload["safety_factor"]
    top.plot(volumes, load, marker="o", label="heat load")
    top.plot(volumes, capacity, marker="s", label="cooling capacity")
    top.plot(volumes, [c / factor for c in capacity], linestyle="--", linewidth=0.9,
             label=f"capacity / safety factor {factor:g}")
    top.set_xscale("log")
    top.set_yscale("log")
    top.set_ylabel(power_unit)
    margins = [s["margin"] if s["margin"] is not None else float("nan") for s in scales]
    colours = [charts.COLOURS[2] if s["adequate"] else charts.COLOURS[1] for s in scales]
    bottom.scatter(volumes, margins, c=colours, zorder=3)
    for volume, margin, scale in zip(volumes, margins, scales):
        label = f"{volume:.3g} {volume_unit}" if scale["generated"] else scale["name"].split(",")[0][:24]
        bottom.annotate(label, (volume, margin), textcoords="offset points", xytext=(4, 4), fontsize=7)
    bottom.axhline(factor, color="#555555", linestyle="--", linewidth=0.9, label="safety factor")
    bottom.set_xscale("log")
    bottom.set_yscale("log")
    bottom.set_ylabel("margin (capacity / load)")
    bottom.set_xlabel(f"vessel volume, {volume_unit}")
    largest = payload.get("largest_adequate_volume")
    if largest is not None:
        for axis in (top, bottom):
            axis.axvline(largest, color=charts.COLOURS[3], linewidth=1.0, linestyle=":")
        text = ("similar vessels adequate beyond" if payload.get("adequate_beyond_search")
                else "largest adequate similar vessel")
        top.annotate(f"{text} {largest:.3g} {units['largest_adequate_volume']}", (largest, min(load)), fontsize=7,
                     ha="right", textcoords="offset points", xytext=(-4, 0))
    top.legend(fontsize=7, frameon=False)
    bottom.legend(fontsize=7, frameon=False)
    top.set_title(f"Cooling margin along the scale-up ({payload['rule'].replace('_', ' ')})", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/scale-up", methods=["GET", "POST"])
def scale_up():
    return calculate(_scale_request, _scale_up, _scale_result, rows="scales", chart=scale_up_chart,
                     lead=("name", "volume", "charge_volume", "scale_factor", "generated", "adequate", "margin"))
