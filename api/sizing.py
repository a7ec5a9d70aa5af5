"""``/v1/jacket-sizing``: candidate jackets and coils for a vessel shell, ranked, with a recommendation."""
from functools import partial

from flask import Blueprint

from calc.sizing import jacket_sizing as sizing
from schemas.sizing import JacketSizingRequestSchema, JacketSizingResultSchema

from . import charts, report_pages
from .http import batch_cases, calculate
from .runtime import deadline

bp = Blueprint("sizing", __name__, url_prefix="/v1")
_request, _result = JacketSizingRequestSchema(), JacketSizingResultSchema()
MARKERS = {"annular": "o", "annular_spiral_baffle": "s", "half_pipe": "^", "coil": "D", "jacket_and_coil": "P"}


def _size(args: dict) -> sizing.JacketSizing:
    return sizing.jacket_sizing(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                                args["heat_release"], args["safety_factor"], args["options"], deadline=deadline())


def sizing_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """Cooling capacity against pressure drop for every candidate, the duty line, the recommendation marked."""
    def drop(values):
        return charts.readable(values, units["candidates.pressure_drop"])

    def power(values, key="candidates.cooling_capacity"):
        return charts.readable(values, units[key])

    fig, (axis,) = charts.figure(1)
    fig.set_size_inches(7.5, 4.6)
    candidates = [c for c in payload["candidates"] if c["pressure_drop"] and c["pressure_drop"] > 0]
    # the margin band as capacity error bars (capacity x band / margin: the members share the nominal load), in the
    # style of charts.margins
    banded = [c for c in candidates if c.get("margin") and (c.get("margin_band") or {}).get("low") is not None]
    if banded:
        shown = power([c["cooling_capacity"] for c in banded])[0]
        lows = [v * c["margin_band"]["low"] / c["margin"] for v, c in zip(shown, banded)]
        highs = [v * c["margin_band"]["high"] / c["margin"] for v, c in zip(shown, banded)]
        axis.errorbar(drop([c["pressure_drop"] for c in banded])[0], shown,
                      yerr=[[v - lo for v, lo in zip(shown, lows)], [hi - v for v, hi in zip(shown, highs)]],
                      fmt="none", ecolor="#777777", elinewidth=1.0, capsize=3, zorder=1, label="margin band")
    for colour, (kind, marker) in zip(charts.COLOURS * 2, MARKERS.items()):
        rows = [c for c in candidates if c["type"] == kind]
        if not rows:
            continue
        for feasible in (True, False):
            chosen = [c for c in rows if c["feasible"] is feasible]
            if chosen:
                axis.scatter(drop([c["pressure_drop"] for c in chosen])[0],
                             power([c["cooling_capacity"] for c in chosen])[0],
                             marker=marker, s=22, color=colour if feasible else "none", edgecolors=colour,
                             linewidths=0.9, label=kind.replace("_", " ") + ("" if feasible else " (not feasible)"))
    duty = power([payload["duty"]], "duty")[0][0]
    axis.axhline(duty, color="#555555", linestyle="--", linewidth=0.9,
                 label=f"duty: load x safety factor {payload['safety_factor']:g}")
    best = payload["recommendation"].get("index")
    if best is not None:
        chosen = payload["candidates"][best]
        axis.scatter(drop([chosen["pressure_drop"]])[0], power([chosen["cooling_capacity"]])[0], s=140,
                     facecolors="none",
                     edgecolors="#000000", linewidths=1.2, label="recommended")
    axis.set_xscale("log")
    axis.set_xlabel(f"pressure drop, {drop([0.0])[1]} (largest circuit)")
    axis.set_ylabel(f"cooling capacity, {power([0.0])[1]}")
    axis.set_title("Candidate jackets and coils: capacity against pressure drop", fontsize=10)
    axis.legend(fontsize=6.5, frameon=False, ncol=2)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/jacket-sizing", methods=["GET", "POST"])
def jacket_sizing():
    return calculate(_request, _size, _result, rows="candidates", chart=sizing_chart,
                     report=partial(report_pages.sizing_report, draw=sizing_chart),
                     lead=("index", "type", "description", "feasible", "margin", "margin_band.low", "margin_band.high",
                           "verdict_not_robust", "cooling_capacity", "pressure_drop",
                           "velocity", "coolant_flow"))


@bp.post("/jacket-sizing/batch")
def jacket_sizing_batch():
    return batch_cases(_request, _size, _result)
