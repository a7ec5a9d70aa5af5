"""The main job: ``/v1/cooling-check`` for one vessel and ``/v1/scale-up`` along a scale-up path."""
from flask import Blueprint, current_app

from calc.checks import cooling_check
from calc.checks import scaleup
from schemas.cooling import (CoolingCheckRequestSchema, CoolingCheckResultSchema, ScaleUpRequestSchema,
                             ScaleUpResultSchema)

from . import charts, reports
from .http import batch_cases, calculate
from .runtime import deadline

bp = Blueprint("cooling", __name__, url_prefix="/v1")
_request, _result = CoolingCheckRequestSchema(), CoolingCheckResultSchema()


def _check(args: dict) -> cooling_check.CoolingCheck:
    return cooling_check.cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                                 args["heat_release"], args["safety_factor"], deadline=deadline())


def check_chart(payload: dict, fmt: str, units: dict) -> bytes:
    """The heat balance of one check: each part of the load, the total, the capacity and what is required."""
    fig, (axis,) = charts.figure(1)
    fig.set_size_inches(7.5, 2.6)
    load = payload["heat_load"]
    parts = [("reaction", load["reaction"]), ("agitator", load["agitator"]),
             ("cold feed (taken up)", -load["feed_sensible"]), ("heat load", load["total"]),
             (f"load x safety factor {payload['safety_factor']:g}", load["total"] * payload["safety_factor"]),
             ("cooling capacity", payload["cooling_capacity"])]
    values, unit = charts.readable([value for _, value in parts], units["heat_load.total"])
    colours = [charts.INK] * 3 + [charts.AMBER, charts.SLATE, charts.TEAL if payload["adequate"] else charts.AMBER]
    axis.barh([name for name, _ in parts][::-1], values[::-1], color=colours[::-1])
    axis.axvline(0, color="#555555", linewidth=0.8)
    axis.set_xlabel(f"heat flow, {unit}")
    verdict = "adequate" if payload["adequate"] else "NOT adequate"
    margin = "-" if payload["margin"] is None else f"{payload['margin']:.3g}"
    axis.set_title(f"Heat balance: margin {margin}, {verdict}", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


def _units_note(view) -> str:
    return "Numbers to {} significant figures; units as named beside each value.".format(
        view.digits or reports.REPORT_DIGITS)


def check_report(body: dict, payload: dict, units: dict, view) -> reports.Report:
    vessel = body.get("vessel") if isinstance(body.get("vessel"), dict) else {}
    name = vessel.get("name") or "the vessel"
    chart = reports.chart(check_chart, payload, units, "Heat load, its parts and the cooling capacity")
    page = reports.check_page(payload, units, f"Cooling check of {name}", digits=view.digits or reports.REPORT_DIGITS,
                              chart=chart)
    return reports.build("Cooling check", "POST /v1/cooling-check", body, payload, [page], _units_note(view))


@bp.route("/cooling-check", methods=["GET", "POST"])
def check_cooling():
    return calculate(_request, _check, _result, batch=True, chart=check_chart, report=check_report)


@bp.post("/cooling-check/batch")
def check_cooling_batch():
    return batch_cases(_request, _check, _result)


_scale_request, _scale_result = ScaleUpRequestSchema(), ScaleUpResultSchema()


def _scale_up(args: dict) -> scaleup.ScaleUp:
    return scaleup.scale_up(args["reference"], args["targets"], args["rule"], args["charge"], args["coolant"],
                            args["process_temperature"], args["heat_release"], args["safety_factor"],
                            args["coolant_flow_rule"], deadline=deadline(), size_jacket=args["size_jacket"],
                            max_targets=int(current_app.config["MAX_SCALES"]))


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
    charts.margins(bottom, volumes, margins, [s.get("margin_band") for s in scales], [s["adequate"] for s in scales])
    for index, (volume, margin, scale) in enumerate(zip(volumes, margins, scales)):
        label = f"{volume:.3g} {volume_unit}" if scale["generated"] else scale["name"].split(",")[0][:24]
        if not scale["adequate"]:
            label += " (NOT adequate)"
        last = index == len(scales) - 1  # the largest scale is labelled to its left, inside the axes
        bottom.annotate(label, (volume, margin), textcoords="offset points", xytext=(-4 if last else 4, 4),
                        ha="right" if last else "left", fontsize=7)
    bottom.axhline(factor, color="#555555", linestyle="--", linewidth=0.9, label="safety factor")
    bottom.set_xscale("log")
    bottom.set_yscale("log")
    bottom.set_ylabel("margin (capacity / load)")
    bottom.set_xlabel(f"vessel volume, {volume_unit}")
    largest = payload.get("largest_adequate_volume")
    if largest is not None:
        for axis in (top, bottom):
            axis.axvline(largest, color=charts.PLUM, linewidth=1.0, linestyle=":")
        text = ("similar vessels adequate beyond" if payload.get("adequate_beyond_search")
                else "largest adequate similar vessel")
        top.annotate(f"{text} {largest:.3g} {units['largest_adequate_volume']}", (largest, min(load)), fontsize=7,
                     ha="right", textcoords="offset points", xytext=(-4, 0))
    top.legend(fontsize=7, frameon=False)
    bottom.legend(fontsize=7, frameon=False)
    top.set_title(f"Cooling margin along the scale-up ({payload['rule'].replace('_', ' ')})", fontsize=10)
    charts.footnote(fig)
    return charts.render(fig, fmt)


def scale_up_report(body: dict, payload: dict, units: dict, view) -> reports.Report:
    """A summary page (every scale, the largest adequate volume, the chart), then one page per scale."""
    digits = view.digits or reports.REPORT_DIGITS
    number = reports.number
    summary = [reports.Row(scale["name"], number(scale["volume"], digits), units["scales.volume"],
                           f"margin {number(scale['margin'], 3)}: {'adequate' if scale['adequate'] else 'NOT ADEQUATE'}")
               for scale in payload["scales"]]
    overall = [reports.Row("largest adequate similar volume", number(payload["largest_adequate_volume"], digits),
                           units["largest_adequate_volume"], payload.get("largest_adequate_volume_note", "")),
               reports.Row("agitation rule", payload["rule"].replace("_", " ")),
               reports.Row("coolant flow at each scale", payload["coolant_flow_rule"].replace("_", " ")),
               reports.Row("required margin (safety factor)", number(payload["safety_factor"], 3))]
    overall += [reports.Row("controlling resistance changes", number(switch["volume"], digits),
                            units["controlling_switches.volume"], f"{switch['below']} -> {switch['above']}")
                for switch in payload["controlling_switches"]]
    warnings = [w.get("message", "") for w in payload.get("warnings") or []]
    every = all(scale["adequate"] for scale in payload["scales"])
    pages = [reports.Page("Scale-up path", [reports.Section("Scales (volume to the brim)", summary),
                                            reports.Section("Along the path", overall),
                                            reports.Section("Warnings", lines=warnings or ["none"])],
                          "ADEQUATE at every scale" if every else "NOT ADEQUATE at one or more scales", every,
                          reports.chart(scale_up_chart, payload, units, "Heat load and cooling capacity by volume"))]
    for index, scale in enumerate(payload["scales"], start=1):
        vessel = [reports.Row("vessel volume (to the brim)", number(scale["volume"], digits), units["scales.volume"]),
                  reports.Row("liquid volume", number(scale["charge_volume"], digits), units["scales.charge_volume"]),
                  reports.Row("length scale factor", number(scale["scale_factor"], digits)),
                  reports.Row("inside diameter", number(scale["diameter"], digits), units["scales.diameter"]),
                  reports.Row("agitator speed", number(scale["agitator_speed"], digits), units["scales.agitator_speed"]),
                  reports.Row("generated similar vessel", "yes" if scale["generated"] else "no")]
        pages.append(reports.check_page(scale, units, f"Scale {index}: {scale['name']}", prefix="scales.",
                                        digits=digits, extra=vessel))
    return reports.build("Scale-up cooling check", "POST /v1/scale-up", body, payload, pages, _units_note(view))


@bp.route("/scale-up", methods=["GET", "POST"])
def scale_up():
    return calculate(_scale_request, _scale_up, _scale_result, batch=True, rows="scales", chart=scale_up_chart,
                     report=scale_up_report,
                     lead=("name", "volume", "charge_volume", "scale_factor", "generated", "adequate", "margin",
                           "margin_band.low", "margin_band.high"))


@bp.post("/scale-up/batch")
def scale_up_batch():
    return batch_cases(_scale_request, _scale_up, _scale_result)
