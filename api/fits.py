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
from schemas.fits import (SERIES_COLUMNS, UAFitRequestSchema, UAFitResultSchema, WilsonRequestSchema,
                          WilsonResultSchema)

from . import charts
from .errors import ProblemError
from .http import calculate, request_object, reserved

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
    """The input object: a JSON body or query, or a CSV log with the other fields as query parameters."""
    if request.method == "POST" and (request.mimetype or "") == "text/csv":
        data = unflatten({k: v for k, v in request.args.items() if not reserved(k)})
        data["series"] = _csv_series(request.get_data(as_text=True))
        return data
    return request_object()


def _time_axis(values: list, unit: str) -> tuple[list, str]:
    """Times drawn in minutes where the answer is in seconds (a logged run lasts minutes to hours)."""
    return ([v / 60.0 for v in values], "min") if unit == "s" else (values, unit)


def ua_fit_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """Logged and fitted contents temperature, and the residuals, in the answer's units."""
    fig, (top, bottom) = charts.figure(2)
    time, time_unit = _time_axis(payload["time"], units["time"])
    ua = f"{payload['ua']:.4g} {units['ua']}"
    top.plot(time, payload["contents_temperature"], linestyle="none", marker=".", label="logged")
    top.plot(time, payload["fitted_temperature"], label=f"fit, UA = {ua}")
    top.set_ylabel(f"contents, {units['contents_temperature']}")
    top.legend(fontsize=7, frameon=False)
    bottom.axhline(0.0, color="#555555", linewidth=0.8)
    bottom.plot(time, payload["residuals"], linestyle="none", marker=".", color=charts.COLOURS[1])
    bottom.set_ylabel(f"residual, {units['residuals']}")
    bottom.set_xlabel(f"time, {time_unit}")
    low, high = payload["ua_interval"]
    (constant,), constant_unit = _time_axis([payload["time_constant"]], units["time_constant"])
    top.set_title(f"UA fit: {ua} (95 %: {low:.4g}-{high:.4g}), time constant {constant:.3g} {constant_unit}",
                  fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


def _fit_run(args: dict) -> plant_runs.RunFit:
    series = args["series"]
    return plant_runs.fit_run(series["time"], series["contents_temperature"], series["coolant_inlet_temperature"],
                              args["charge"], args["mode"], series["coolant_outlet_temperature"], args["coolant"],
                              args["vessel"], args["shaft_power"], args["heat_loss"])


@bp.route("/ua-fit", methods=["GET", "POST"])
def ua_fit():
    return calculate(_request, _fit_run, _result, read=_ua_fit_object, own_utility=False, chart=ua_fit_chart)


def wilson_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """1/U against Re^-b with the fitted line (Wilson 1915), 1/U in the answer's unit."""
    fig, (axis,) = charts.figure(1)
    unit = units["inverse_u"]
    scale, shown = (1e3, f"1e-3 {unit}") if unit == "m^2*K/W" else (1.0, unit)
    x = payload["x"]
    axis.plot(x, [v * scale for v in payload["inverse_u"]], linestyle="none", marker="o", label="runs")
    ends = [0.0, max(x) * 1.05]
    intercept = payload["remaining_resistance"]
    slope = (payload["fitted_inverse_u"][0] - intercept) / x[0]
    axis.plot(ends, [(intercept + slope * e) * scale for e in ends], label="least-squares line")
    axis.set_xlabel(f"Re^-{payload['exponent']:.3g}")
    axis.set_ylabel(f"1/U, {shown}")
    axis.set_title(f"Wilson plot: a = {payload['process_constant']:.3g}, remaining resistance "
                   f"{intercept * scale:.3g} {shown}", fontsize=10)
    axis.legend(fontsize=7, frameon=False)
    charts.footnote(fig)
    return charts.render(fig, fmt)


def _wilson(args: dict) -> plant_runs.WilsonRuns:
    return plant_runs.wilson_from_runs(args["vessel"], args["charge"], args["process_temperature"], args["runs"],
                                       args["coolant"], args["exponent"], args["prandtl_exponent"])


@bp.route("/wilson-plot", methods=["GET", "POST"])
def wilson():
    return calculate(_wilson_request, _wilson, _wilson_result, own_utility=False, chart=wilson_chart)
