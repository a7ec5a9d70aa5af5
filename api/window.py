"""``/v1/operating-window``: the cooling check's margin over a grid of two operating quantities."""
from functools import partial

from flask import Blueprint, current_app

from calc.checks.operating_window import operating_window as window_calculation
from calc.checks.operating_window import OperatingWindow
from schemas.window import OperatingWindowRequestSchema, OperatingWindowResultSchema

from . import charts, report_pages
from .errors import ProblemError
from .http import calculate
from .runtime import deadline

bp = Blueprint("window", __name__, url_prefix="/v1")
_request, _result = OperatingWindowRequestSchema(), OperatingWindowResultSchema()


def _window(args: dict) -> OperatingWindow:
    limit = current_app.config["MAX_WINDOW_POINTS"]
    count = len(args["axes"][0].values) * len(args["axes"][1].values)
    if count > limit:
        raise ProblemError(413, f"at most {limit} grid points per operating window, asked for {count}",
                           [{"field": "axes", "message": f"points of the two axes multiply to {count}; "
                                                        f"at most {limit}"}])
    return window_calculation(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                              args["heat_release"], tuple(args["axes"]), args["safety_factor"], deadline=deadline())


def window_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """Margin contours over the two axes, the safety-factor line bold, the request's own point marked."""
    import numpy as np

    (first, second) = payload["axes"]
    n1, n2 = first["points"], second["points"]
    points = payload["points"]
    x = np.array([p[first["field"]] for p in points]).reshape(n1, n2)
    y = np.array([p[second["field"]] for p in points]).reshape(n1, n2)
    margin = np.array([np.nan if p["margin"] is None else p["margin"] for p in points], dtype=float).reshape(n1, n2)
    factor = payload["safety_factor"]
    fig, (axis,) = charts.figure(1)
    fig.set_size_inches(7.5, 5.2)
    finite = margin[np.isfinite(margin)]
    if finite.size and finite.min() < finite.max():
        top = min(finite.max(), 4.0 * factor)
        levels = np.linspace(min(finite.min(), factor * 0.99), max(top, factor * 1.01), 13)
        from matplotlib.colors import TwoSlopeNorm

        norm = TwoSlopeNorm(vcenter=factor, vmin=levels[0], vmax=levels[-1])  # pale exactly at the safety factor
        filled = axis.contourf(x, y, np.clip(margin, None, top), levels=levels, cmap=charts.margin_colours(),
                               norm=norm, extend="neither")
        fig.colorbar(filled, ax=axis, label="margin (capacity / load)")
        if finite.min() < factor:  # the inadequate region hatched as well as coloured
            axis.contourf(x, y, margin, levels=[levels[0] - 1.0, factor], colors="none", hatches=["///"])
        if finite.min() < factor < finite.max():
            line = axis.contour(x, y, margin, levels=[factor], colors="#222222", linewidths=2.0)
            axis.clabel(line, fmt={factor: f"safety factor {factor:g}"}, fontsize=7)
    current = payload["current"]
    if current.get(first["field"]) is not None and current.get(second["field"]) is not None:
        axis.plot(current[first["field"]], current[second["field"]], marker="*", markersize=13, color=charts.INK,
                  markeredgecolor="white", linestyle="none", label="current operating point")
        axis.legend(fontsize=7, frameon=False, loc="best")
    axis.set_xlabel(f"{first['quantity']} [{units.get('points.' + first['field'], '')}]")
    axis.set_ylabel(f"{second['quantity']} [{units.get('points.' + second['field'], '')}]")
    axis.set_title("Operating window: cooling margin (adequate where margin >= safety factor)", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/operating-window", methods=["GET", "POST"])
def operating_window():
    return calculate(_request, _window, _result, rows="points", chart=window_chart,
                     report=partial(report_pages.window_report, draw=window_chart),
                     lead=("dosing_time", "coolant_inlet_temperature", "coolant_flow", "coolant_volume_flow",
                           "process_temperature", "agitator_speed", "margin", "adequate"))
