"""Plant data in: ``/v1/ua-fit`` (UA of a logged run) and ``/v1/wilson-plot`` (runs at several speeds).

Both take JSON; ``/v1/ua-fit`` also takes the log itself as ``text/csv`` (a header naming each column
and its unit, ``time [min],contents_temperature [degC],...``) with the other fields as query parameters.
"""
from __future__ import annotations

import csv
import io
import re

from flask import Blueprint, request

from calc.fits import plant_runs
from schemas.base import unflatten
from calc.cautions import FITS as CAUTIONS
from schemas.fits import (SERIES_COLUMNS, UAFitRequestSchema, UAFitResultSchema, WilsonRequestSchema,
                          WilsonResultSchema, ua_fit_dict, wilson_dict)

from . import charts
from .errors import ProblemError
from .http import RESERVED_PARAMETERS, request_object, respond
from .references import resolve

bp = Blueprint("fits", __name__, url_prefix="/v1")
_request, _result = UAFitRequestSchema(), UAFitResultSchema()
_wilson_request, _wilson_result = WilsonRequestSchema(), WilsonResultSchema()
_HEADER = re.compile(r"^\s*([A-Za-z_]+)\s*(?:\[(.*)\])?\s*$")


def _csv_series(text: str) -> dict:
    """The ``series`` object of a CSV log: each column {"unit", "values"} (no unit: the default unit)."""
    rows = list(csv.reader(io.StringIO(text)))
    rows = [row for row in rows if any(cell.strip() for cell in row)]
    if len(rows) < 2:
        raise ProblemError(422, "the CSV log needs a header row and at least one data row",
                           [{"field": "series", "message": "no data rows"}])
    series: dict = {}
    columns = []
    for cell in rows[0]:
        match = _HEADER.match(cell)
        if match is None or match.group(1) not in SERIES_COLUMNS:
            raise ProblemError(422, f"unknown CSV column {cell!r}",
                               [{"field": "series", "message": f"columns are {', '.join(SERIES_COLUMNS)}, each "
                                                             "optionally with its unit in brackets"}])
        columns.append((match.group(1), (match.group(2) or "").strip() or None))
    for index, (name, unit) in enumerate(columns):
        values = []
        for number, row in enumerate(rows[1:], start=2):
            try:
                values.append(float(row[index]))
            except (IndexError, ValueError):
                raise ProblemError(422, f"CSV row {number}, column {name}: not a number",
                                   [{"field": f"series.{name}", "message": f"row {number} is not a number"}]) from None
        series[name] = {"unit": unit, "values": values} if unit else values
    return series


def _ua_fit_object() -> dict:
    if request.method == "POST" and (request.mimetype or "") == "text/csv":
        data = unflatten({k: v for k, v in request.args.items() if k not in RESERVED_PARAMETERS})
        data["series"] = _csv_series(request.get_data(as_text=True))
        return data
    return request_object()


def ua_fit_chart(payload: dict, fmt: str, units: dict | None = None) -> bytes:
    """Logged and fitted contents temperature, and the residuals."""
    fig, (top, bottom) = charts.figure(2)
    time = [t / 60.0 for t in payload["time"]]
    top.plot(time, payload["contents_temperature"], linestyle="none", marker=".", label="logged")
    top.plot(time, payload["fitted_temperature"], label=f"fit, UA = {payload['ua']:.4g} W/K")
    top.set_ylabel("contents, degC")
    top.legend(fontsize=7, frameon=False)
    bottom.axhline(0.0, color="#555555", linewidth=0.8)
    bottom.plot(time, payload["residuals"], linestyle="none", marker=".", color=charts.COLOURS[1])
    bottom.set_ylabel("residual, K")
    bottom.set_xlabel("time, min")
    low, high = payload["ua_interval"]
    top.set_title(f"UA fit: {payload['ua']:.4g} W/K (95 %: {low:.4g}-{high:.4g}), time constant "
                  f"{payload['time_constant'] / 60:.3g} min", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/ua-fit", methods=["GET", "POST"])
def ua_fit():
    args = _request.load(resolve(_ua_fit_object(), _request, own_utility=False))
    series = args["series"]
    fitted = plant_runs.fit_run(series["time"], series["contents_temperature"], series["coolant_inlet_temperature"],
                                args["charge"], args["mode"], series["coolant_outlet_temperature"], args["coolant"],
                                args["vessel"], args["shaft_power"], args["heat_loss"])
    return respond(ua_fit_dict(fitted, CAUTIONS), _result, chart=ua_fit_chart)


def wilson_chart(payload: dict, fmt: str, units: dict | None = None) -> bytes:
    """1/U against Re^-b with the fitted line (Wilson 1915)."""
    fig, (axis,) = charts.figure(1)
    x = payload["x"]
    axis.plot(x, [v * 1e3 for v in payload["inverse_u"]], linestyle="none", marker="o", label="runs")
    ends = [0.0, max(x) * 1.05]
    intercept = payload["remaining_resistance"]
    slope = (payload["fitted_inverse_u"][0] - intercept) / x[0]
    axis.plot(ends, [(intercept + slope * e) * 1e3 for e in ends], label="least-squares line")
    axis.set_xlabel(f"Re^-{payload['exponent']:.3g}")
    axis.set_ylabel("1/U, 1e-3 m2 K/W")
    axis.set_title(f"Wilson plot: a = {payload['process_constant']:.3g}, remaining resistance "
                   f"{intercept * 1e3:.3g}e-3 m2 K/W", fontsize=10)
    axis.legend(fontsize=7, frameon=False)
    charts.footnote(fig)
    return charts.render(fig, fmt)


@bp.route("/wilson-plot", methods=["GET", "POST"])
def wilson():
    args = _wilson_request.load(resolve(request_object(), _wilson_request, own_utility=False))
    result = plant_runs.wilson_from_runs(args["vessel"], args["charge"], args["process_temperature"], args["runs"],
                                         args["coolant"], args["exponent"], args["prandtl_exponent"])
    return respond(wilson_dict(result, CAUTIONS), _wilson_result, chart=wilson_chart)
