"""Printable reports of the ranked and gridded answers: screening, jacket sizing and operating window.

Each builds its pages with :func:`api.reports.table_page` (a summary, tables with a column per quantity, the
chart, the answer's warnings) inside the frame every report shares (:func:`api.reports.build`: inputs as
given, records used, cautions, version, date, request hash). The resource passes its own chart function,
so this module imports no resource (no import cycle).
"""
from __future__ import annotations

from typing import Any, Callable

from . import reports
from .reports import Column, Row, Section, number

Draw = Callable[[dict, str, dict], bytes]


def _digits(view: Any) -> int:
    return getattr(view, "digits", None) or reports.REPORT_DIGITS


def _units_note(view: Any) -> str:
    return (f"Numbers to {_digits(view)} significant figures (margins to 3); units in each column heading or "
            "beside each value.")


def _band(item: dict) -> str:
    band = item.get("margin_band") or {}
    if not isinstance(band, dict) or band.get("low") is None or band.get("high") is None:
        return "-"
    return f"{number(band['low'], 3)}-{number(band['high'], 3)}"


def _verdict_line(adequate: bool | None, margin: Any, required: Any) -> str:
    text = "no verdict" if adequate is None else ("ADEQUATE" if adequate else "NOT ADEQUATE")
    if margin is not None and required is not None:
        text += f": margin {number(margin, 3)} against {number(required, 3)} required"
    return text


# ---------------------------------------------------------------- screening

def _reference(ref: Any) -> str:
    if not isinstance(ref, dict):
        return "-"
    return f"{ref.get('tag', '-')} rev. {ref.get('revision', '-')}"


SCREENING_COLUMNS = [
    Column("rank", "rank", figures=3),
    Column("name", "vessel", text=lambda row: str(row.get("name") or row.get("tag") or "-")),
    Column("verdict", "verdict", text=lambda row: str(row.get("verdict") or "-").replace("not adequate",
                                                                                          "NOT ADEQUATE")),
    Column("margin", "margin", figures=3),
    Column("margin_band", "margin band", text=_band),
    Column("minimum_dosing_time", "minimum dosing time", "rows.minimum_dosing_time"),
    Column("maximum_coolant_inlet_temperature", "warmest coolant inlet", "rows.maximum_coolant_inlet_temperature"),
    Column("controlling", "controlling resistance",
           text=lambda row: str(row.get("controlling") or "-").replace("_", " ")),
    Column("utility", "utility", text=lambda row: _reference(row.get("utility")) if row.get("utility") else "-"),
]


def screening_report(body: dict, payload: dict, units: dict, view: Any, draw: Draw) -> reports.Report:
    """One page: the ranked vessels, why some have no verdict, what changed, the chart of margins."""
    digits = _digits(view)
    rows = payload.get("rows") or []
    counts = payload.get("counts") or {}
    step = payload.get("step")
    summary = [Row("process step", str(step.get("tag")) if step else "inline", "",
                   f"revision {step.get('revision')}" if step else "given in the request"),
               Row("required margin (safety factor)", number(payload.get("safety_factor"), 3)),
               Row("vessels screened", number(counts.get("screened"), digits), "",
                   f"status {payload.get('status') or '-'}, {counts.get('not_evaluated', 0)} not evaluated"),
               Row("stored screening", "", "",
                   f"{payload.get('id') or '-'}, {str(payload.get('created_at') or '')[:16].replace('T', ' ')} UTC "
                   f"by {payload.get('author') or '-'}")]
    table = reports.table_section("Vessels, ranked (adequate first, then by margin)", rows, SCREENING_COLUMNS, units,
                                  digits=digits)
    notes = []
    problems = [f"{row.get('tag')}: {row['problem'].get('message')} ({row['problem'].get('field')})"
                for row in rows if isinstance(row.get("problem"), dict)]
    if problems:
        notes.append(Section("Why some vessels have no verdict", lines=problems))
    row_warnings = [f"{row.get('tag')}: {w.get('message')}" for row in rows for w in row.get("warnings") or []
                    if isinstance(w, dict)]
    if row_warnings:
        notes.append(Section("Warnings of single vessels", lines=row_warnings))
    changes = payload.get("changes")
    if isinstance(changes, dict):
        items = [f"{item.get('tag')}: {item.get('change')} ({'; '.join(item.get('details') or [])})"
                 for item in changes.get("items") or []]
        notes.append(Section("Changes since the previous run", lines=[  # ids stay out of headings (set in capitals)
            f"previous run: screening {changes.get('previous_id')}",
            *(items or ["none: the same revisions, margins and verdicts"])]))
    verdict = (f"{counts.get('adequate', 0)} of {counts.get('screened', len(rows))} vessels ADEQUATE for this step, "
               f"{counts.get('not_adequate', 0)} NOT ADEQUATE, {counts.get('no_verdict', 0)} without a verdict")
    page = reports.table_page(payload, "Screening of vessels for one process step", summary=summary, tables=[table],
                              notes=notes, verdict=verdict, adequate=None,
                              chart=reports.chart(draw, payload, units, "Margin of each vessel against the "
                                                                        "safety factor"))
    return reports.build("Screening of vessels", "POST /v1/screenings", body, payload, [page], _units_note(view))


# ---------------------------------------------------------------- jacket sizing

def _feasible(candidate: dict) -> str:
    return "yes" if candidate.get("feasible") else "no"


SIZING_COLUMNS = [
    Column("index", "#", figures=3),
    Column("type", "type", text=lambda c: str(c.get("type") or "-").replace("_", " ")),
    Column("description", "design", text=lambda c: str(c.get("description") or "-")),
    Column("feasible", "feasible", text=_feasible),
    Column("margin", "margin", figures=3),
    Column("margin_band", "margin band", text=_band),
    Column("cooling_capacity", "capacity", "candidates.cooling_capacity"),
    Column("heat_transfer_area", "area", "candidates.heat_transfer_area"),
    Column("overall_coefficient", "U", "candidates.overall_coefficient"),
    Column("coolant_flow", "flow", "candidates.coolant_flow"),
    Column("velocity", "velocity", "candidates.velocity"),
    Column("pressure_drop", "drop", "candidates.pressure_drop"),
]


def sizing_report(body: dict, payload: dict, units: dict, view: Any, draw: Draw) -> reports.Report:
    """Page 1: the recommendation, its reasoning, the smallest feasible design of each type, the chart.
    Page 2: every candidate evaluated (the recommended one in bold), with why infeasible ones fail."""
    digits = _digits(view)
    candidates = payload.get("candidates") or []
    recommendation = payload.get("recommendation") or {}
    best = recommendation.get("index")
    chosen = candidates[best] if isinstance(best, int) and 0 <= best < len(candidates) else None
    load = (payload.get("heat_load") or {}).get("total")
    summary = [Row("heat load", number(load, digits), units.get("heat_load.total", "")),
               Row("required margin (safety factor)", number(payload.get("safety_factor"), 3)),
               Row("duty = heat load x safety factor", number(payload.get("duty"), digits), units.get("duty", "")),
               Row("candidates evaluated", number(payload.get("candidates_evaluated"), digits)),
               Row("recommended design", "-" if best is None else f"#{best}", "",
                   str(recommendation.get("description") or "none feasible"))]
    reasoning = Section("Why this recommendation", lines=[
        str(recommendation.get("reasoning") or "-"),
        "capacity: cooling capacity; flow: coolant flow of the first circuit; drop: pressure drop of the largest "
        "circuit; cut back: the utility's flow was cut back to its hydraulic limit"])
    by_index = {c.get("index"): c for c in candidates}
    smallest = []
    for entry in payload.get("smallest_feasible") or []:
        found = by_index.get(entry.get("index"))
        smallest.append(found if found is not None else {"index": None, "type": entry.get("type"),
                                                         "description": "no feasible design of this type"})

    def is_best(candidate: dict) -> bool:
        return candidate.get("index") == best

    first = reports.table_section("Smallest feasible design of each type", smallest, SIZING_COLUMNS, units,
                                  digits=digits, marked=is_best)
    every = reports.table_section("Every candidate evaluated (recommended in bold)", candidates,
                                  [c for c in SIZING_COLUMNS if c.key != "type"] + [
                                      Column("flow_limited", "cut back", text=lambda c: "yes" if
                                             c.get("flow_limited") else "-")],
                                  units, digits=digits, marked=is_best)
    verdict = (f"RECOMMENDED: {recommendation.get('description')}" if chosen is not None
               else "NO FEASIBLE DESIGN among the candidates evaluated")
    if chosen is not None:
        verdict += f" (margin {number(chosen.get('margin'), 3)} against {number(payload.get('safety_factor'), 3)})"
        if chosen.get("verdict_not_robust"):
            verdict += f"; margin band {_band(chosen)}: NOT robust, below the safety factor at its low end"
    pages = [reports.table_page(payload, "Jacket and coil sizing", summary=summary, tables=[reasoning, first],
                                verdict=verdict, adequate=chosen is not None,
                                chart=reports.chart(draw, payload, units, "Cooling capacity against pressure drop "
                                                                          "of every candidate")),
             reports.table_page(None, "Candidates evaluated", summary=[], tables=[every])]
    return reports.build("Jacket and coil sizing", "POST /v1/jacket-sizing", body, payload, pages, _units_note(view))


# ---------------------------------------------------------------- operating window

def window_report(body: dict, payload: dict, units: dict, view: Any, draw: Draw) -> reports.Report:
    """One page: the grid and its verdicts, the current point, the boundary of the adequate region, the contours."""
    digits = _digits(view)
    axes = payload.get("axes") or []
    points = payload.get("points") or []
    factor = payload.get("safety_factor")
    current = payload.get("current") or {}
    summary = []
    for axis in axes:
        values = [p.get(axis["field"]) for p in points if p.get(axis["field"]) is not None]
        unit = units.get(f"points.{axis['field']}", "")
        span = f"{number(min(values), digits)} to {number(max(values), digits)}" if values else "-"
        summary.append(Row(f"axis: {axis['quantity']}", "", "",
                           f"{span} {reports.pretty_unit(unit)}, {axis.get('points')} points"))
    margins = [p for p in points if p.get("margin") is not None]
    summary += [Row("grid points", number(len(points), digits), "",
                    f"{sum(1 for p in points if p.get('margin') is None)} without a cooling state"),
                Row("share of the grid adequate", number(100 * (payload.get("adequate_share") or 0.0), 3), "%"),
                Row("required margin (safety factor)", number(factor, 3))]
    for label, pick in (("lowest margin on the grid", min), ("highest margin on the grid", max)):
        if margins:
            where = pick(margins, key=lambda p: p["margin"])
            summary.append(Row(label, number(where["margin"], 3), "", "at " + ", ".join(
                f"{a['quantity']} {number(where.get(a['field']), digits)} "
                f"{reports.pretty_unit(units.get('points.' + a['field'], ''))}" for a in axes)))
    columns = [Column(axis["field"], axis["quantity"], f"points.{axis['field']}") for axis in axes] + [
        Column("margin", "margin", figures=3),
        Column("adequate", "verdict", text=lambda p: "-" if p.get("adequate") is None else
               ("adequate" if p["adequate"] else "NOT ADEQUATE")),
        Column("heat_load", "heat load", "points.heat_load"),
        Column("cooling_capacity", "cooling capacity", "points.cooling_capacity"),
        Column("coolant_outlet_temperature", "coolant outlet", "points.coolant_outlet_temperature")]
    here = reports.table_section("Current operating point (the request's own)", [current], columns, units,
                                 digits=digits, lines=[current["note"]] if current.get("note") else [])
    boundary = payload.get("boundary") or []
    edge = reports.table_section(f"Boundary of the adequate region: margin = {number(factor, 3)}", boundary,
                                 [c for c in columns if c.key not in ("margin", "adequate")],
                                 units, digits=digits,
                                 lines=[] if boundary else ["the verdict does not change on any grid line"])
    page = reports.table_page(payload, "Operating window", summary=summary, tables=[here], notes=[edge],
                              verdict="Current point " + _verdict_line(current.get("adequate"), current.get("margin"),
                                                                       factor),
                              adequate=current.get("adequate"),
                              chart=reports.chart(draw, payload, units, "Margin over the grid; the bold line is the "
                                                                        "safety factor, the dot the current point"))
    return reports.build("Operating window", "POST /v1/operating-window", body, payload, [page], _units_note(view))
