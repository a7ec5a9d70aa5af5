"""The main job: ``/v1/cooling-check`` for one vessel and ``/v1/scale-up`` along a scale-up path."""
from flask import Blueprint, current_app

from calc.checks import cooling_check
from calc.checks import scaleup
from schemas.cooling import (CoolingCheckRequestSchema, CoolingCheckResultSchema, ScaleUpRequestSchema,
                             ScaleUpResultSchema)

from . import charts
from .http import calculate
from .runtime import deadline

bp = Blueprint("cooling", __name__, url_prefix="/v1")
_request, _result = CoolingCheckRequestSchema(), CoolingCheckResultSchema()


def _check(args: dict) -> cooling_check.CoolingCheck:
    return cooling_check.cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                                 args["heat_release"], args["safety_factor"], deadline=deadline())


@bp.route("/cooling-check", methods=["GET", "POST"])
def check_cooling():
    return calculate(_request, _check, _result, batch=True)


_scale_request, _scale_result = ScaleUpRequestSchema(), ScaleUpResultSchema()


def _scale_up(args: dict) -> scaleup.ScaleUp:
    return scaleup.scale_up(args["reference"], args["targets"], args["rule"], args["charge"], args["coolant"],
                            args["process_temperature"], args["heat_release"], args["safety_factor"],
                            args["coolant_flow_rule"], deadline=deadline(), size_jacket=args["size_jacket"],
                            max_targets=int(current_app.config["MAX_SCALES"]))


def scale_up_chart(payload: dict, fmt: str) -> bytes:
    """Heat load and cooling capacity against volume (log axes), and the margin of each scale."""
    fig, (top, bottom) = charts.figure(2)
    scales = sorted(payload["scales"], key=lambda s: s["volume"])
    volumes = [s["volume"] for s in scales]
    load = [s["heat_load"]["total"] / 1e3 for s in scales]
    capacity = [s["cooling_capacity"] / 1e3 for s in scales]
    factor = payload["safety_factor"]
    top.plot(volumes, load, marker="o", label="heat load")
    top.plot(volumes, capacity, marker="s", label="cooling capacity")
    top.plot(volumes, [c / factor for c in capacity], linestyle="--", linewidth=0.9,
             label=f"capacity / safety factor {factor:g}")
    top.set_xscale("log")
    top.set_yscale("log")
    top.set_ylabel("kW")
    margins = [s["margin"] if s["margin"] is not None else float("nan") for s in scales]
    bands = [s.get("margin_band") or {} for s in scales]
    lows = [b.get("low") if b.get("low") is not None else m for b, m in zip(bands, margins)]
    highs = [b.get("high") if b.get("high") is not None else m for b, m in zip(bands, margins)]
    bottom.errorbar(volumes, margins, yerr=[[m - lo for m, lo in zip(margins, lows)],
                                            [hi - m for m, hi in zip(margins, highs)]],
                    fmt="none", ecolor="#777777", elinewidth=1.0, capsize=3, zorder=2,
                    label="margin band (published alternatives)")
    # adequate: filled teal circles; not adequate: open amber triangles, and the label says so
    for adequate, marker, colour, face, legend in ((True, "o", charts.TEAL, charts.TEAL, "adequate"),
                                                   (False, "v", charts.AMBER, "white", "NOT adequate")):
        chosen = [(v, m) for v, m, s in zip(volumes, margins, scales) if bool(s["adequate"]) == adequate]
        if chosen:
            bottom.scatter([v for v, _ in chosen], [m for _, m in chosen], marker=marker, s=42, zorder=3,
                           edgecolors=colour, facecolors=face, linewidths=1.4, label=legend)
    for volume, margin, scale in zip(volumes, margins, scales):
        label = f"{volume:.3g} m^3" if scale["generated"] else scale["name"].split(",")[0][:24]
        if not scale["adequate"]:
            label += " (NOT adequate)"
        bottom.annotate(label, (volume, margin), textcoords="offset points", xytext=(4, 4), fontsize=7)
    bottom.axhline(factor, color="#555555", linestyle="--", linewidth=0.9, label="safety factor")
    bottom.set_xscale("log")
    bottom.set_yscale("log")
    bottom.set_ylabel("margin (capacity / load)")
    bottom.set_xlabel("vessel volume, m^3")
    largest = payload.get("largest_adequate_volume")
    if largest is not None:
        for axis in (top, bottom):
            axis.axvline(largest, color=charts.PLUM, linewidth=1.0, linestyle=":")
        text = ("similar vessels adequate beyond" if payload.get("adequate_beyond_search")
                else "largest adequate similar vessel")
        top.annotate(f"{text} {largest:.3g} m^3", (largest, min(load)), fontsize=7, ha="right",
                     textcoords="offset points", xytext=(-4, 0))
    top.legend(fontsize=7, frameon=False)
    bottom.legend(fontsize=7, frameon=False)
    top.set_title(f"Cooling margin along the scale-up ({payload['rule'].replace('_', ' ')})", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/scale-up", methods=["GET", "POST"])
def scale_up():
    return calculate(_scale_request, _scale_up, _scale_result, batch=True, rows="scales", chart=scale_up_chart,
                     lead=("name", "volume", "charge_volume", "scale_factor", "generated", "adequate", "margin",
                           "margin_band.low", "margin_band.high"))
