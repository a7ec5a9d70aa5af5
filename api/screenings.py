"""``/v1/screenings``: one process step against many stored vessels, each with its own utility, ranked.

A screening is stored with the request, the record revisions it used and its ranked rows; it can be read
back and re-run, and every run says what changed since the previous run of the same request (vessels
added or retired, revisions of vessel, utility or step, margins and verdicts). A screening has a
computing budget (SCREENING_WALL_TIME); rows past it are marked "not evaluated" and the status is partial.
With a job queue (QUEUE_URL, see :mod:`api.jobs`) a large screening, one the client prefers asynchronous, or
one that ran out of its budget becomes a job instead: 202 with Location of the screening, which reports
its state and progress until it is finished.
"""
from __future__ import annotations

import json
from datetime import datetime
from typing import Any

from flask import Blueprint, Response, current_app, request
from marshmallow import ValidationError

from calc.checks import screening as screening_calc
from calc.deadline import Deadline
from schemas.base import clean
from schemas.records import RecordQuerySchema
from schemas.screening import (SCREENING_CAUTIONS, ScreeningListSchema, ScreeningRequestSchema,
                               ScreeningResultSchema, screening_row)
from schemas.heat_transfer import CalibrationSchema, with_correlations
from schemas.vessel import CoolantSchema, VesselSchema

from . import charts, jobs, report_pages, security
from .errors import ProblemError
from .http import answer, presentation, presented, request_object, requested_format
from .records import store
from .runtime import deadline
from .references import records_used, resolve
from .storage import NotFound, RevisionView, request_key

bp = Blueprint("screenings", __name__, url_prefix="/v1")
_request, _result, _list = ScreeningRequestSchema(), ScreeningResultSchema(), ScreeningListSchema()
_PAGE = RecordQuerySchema(only=("limit", "offset"))
LEAD = ("rank", "tag", "verdict", "margin", "minimum_dosing_time", "maximum_coolant_inlet_temperature",
        "controlling", "margin_band.low", "margin_band.high", "verdict_not_robust")


def _select(selection, limit: int) -> list[RevisionView]:
    catalogue = store()
    if selection is None:
        vessels, total = catalogue.list("vessel", limit=limit + 1)
    elif selection[0] == "filter":
        vessels, total = catalogue.list("vessel", limit=limit + 1, **selection[1])
    else:
        keys = selection[1]
        if len(keys) > limit:
            total = len(keys)
            vessels = []
        else:
            vessels = []
            for index, key in enumerate(keys):
                try:
                    vessels.append(catalogue.get("vessel", key))
                except NotFound as exc:
                    raise ValidationError({"vessels": {index: [str(exc)]}}) from None
            total = len(vessels)
    if total > limit:
        raise ProblemError(413, f"{total} vessels selected; at most {limit} per screening: narrow the selection",
                           [{"field": "vessels", "message": f"at most {limit} vessels"}])
    if not vessels:
        raise ProblemError(422, "no stored vessel matches the selection",
                           [{"field": "vessels", "message": "matches no live vessel"}])
    return vessels


def _candidates(vessels: list[RevisionView], coolant) -> tuple[list, dict]:
    """Calc inputs of every vessel (problems kept per vessel) and what each row says about its records."""
    catalogue = store()
    utilities: dict[str, object] = {}
    vessel_schema, coolant_schema, calibration_schema = VesselSchema(), CoolantSchema(), CalibrationSchema()
    candidates, info = [], {}
    for revision in vessels:
        body = revision.body
        index_info = {"tag": revision.tag, "name": body["vessel"].get("name", revision.tag),
                      "vessel": revision.reference() | {"used_as": "vessel"}, "utility": None, "volume": None}
        info[revision.record_id] = index_info
        problem, vessel, own = None, None, coolant
        try:
            vessel = vessel_schema.load(body["vessel"])
            if body.get("calibration") is not None:  # a fit attached to the vessel: used, as a check by reference
                vessel = with_correlations(vessel, None, calibration_schema.load(body["calibration"]["fit"]))
            if vessel.agitator is None:
                problem = ("vessel.agitator", "the vessel has no agitator; the cooling check needs one")
            from calc.vessel import geometry

            index_info["volume"] = geometry.volume_at_level(vessel.shape, geometry.brim_height(vessel.shape))
        except ValidationError as error:  # a record written under older rules
            problem = ("vessel", f"the stored vessel is no longer valid: {error.messages}")
        if own is None and problem is None:
            utility_key = body.get("utility")
            if utility_key is None:
                problem = ("coolant", "the vessel names no utility; give a coolant for the screening")
            else:
                if utility_key not in utilities:
                    try:
                        found = catalogue.get("utility", utility_key)
                        utilities[utility_key] = (found, coolant_schema.load(found.body["coolant"]))
                    except (NotFound, ValidationError) as error:
                        utilities[utility_key] = (None, str(error))
                found, loaded = utilities[utility_key]
                if found is None:
                    problem = ("vessel.utility", f"utility {utility_key!r}: {loaded}")
                else:
                    own = loaded
                    index_info["utility"] = found.reference() | {"used_as": "coolant"}
        candidates.append(screening_calc.Candidate(revision.record_id, vessel, own, problem))
    return candidates, info


def _changes(previous: dict | None, rows: list[dict]) -> dict | None:
    """What differs from the previous run of the same request, vessel by vessel."""
    if previous is None:
        return None
    before = {row["vessel"]["id"]: row for row in previous["result"]["rows"]}
    after = {row["vessel"]["id"]: row for row in rows}
    items = []
    for vessel_id, row in after.items():
        old = before.get(vessel_id)
        if old is None:
            items.append({"tag": row["tag"], "vessel_id": vessel_id, "change": "added", "details": ["newly selected"],
                          "verdict_before": None, "verdict_after": row["verdict"], "margin_before": None,
                          "margin_after": row["margin"]})
            continue
        details = []
        for member in ("vessel", "utility"):
            was, now = old.get(member) or {}, row.get(member) or {}
            if (was.get("id"), was.get("revision")) != (now.get("id"), now.get("revision")):
                details.append(f"{member} {was.get('tag', '-')} revision {was.get('revision', '-')} -> "
                               f"{now.get('tag', '-')} revision {now.get('revision', '-')}")
        if old["verdict"] != row["verdict"]:
            details.append(f"verdict {old['verdict']} -> {row['verdict']}")
        if old["margin"] != row["margin"]:
            details.append(f"margin {_fmt(old['margin'])} -> {_fmt(row['margin'])}")
        if details:
            items.append({"tag": row["tag"], "vessel_id": vessel_id, "change": "changed", "details": details,
                          "verdict_before": old["verdict"], "verdict_after": row["verdict"],
                          "margin_before": old["margin"], "margin_after": row["margin"]})
    for vessel_id, old in before.items():
        if vessel_id not in after:
            items.append({"tag": old["tag"], "vessel_id": vessel_id, "change": "removed",
                          "details": ["no longer selected (retired or changed)"], "verdict_before": old["verdict"],
                          "verdict_after": None, "margin_before": old["margin"], "margin_after": None})
    return {"previous_id": previous["id"], "previous_created_at": previous["created_at"].isoformat(),
            "items": items}


def _fmt(value) -> str:
    return "-" if value is None else f"{value:.3g}"


def run(body: dict, previous_id: str | None = None, job: jobs.Job | None = None) -> tuple[dict, int]:
    """Screen, store and shape; returns the stored payload and the HTTP status (201).

    In a request it may instead queue the screening as a job (202 and the pending screening); ``job`` is
    given when a worker runs it: no budget of the request's, progress reported, the queued row filled.
    """
    data = resolve(body, _request)
    args = _request.load(data)
    step = args["step"]
    limit = current_app.config["MAX_SCREENING_VESSELS"]
    vessels = _select(args["vessels"], limit)
    if job is None and jobs.reason(len(vessels)):
        queued = jobs.submit(body, previous_id, len(vessels))
        if queued is not None:
            return jobs.status_view(queued), 202
    candidates, info = _candidates(vessels, args["coolant"])
    # the screening's own budget, inside the request's (whatever is left of it when the rows start); a job's own
    budget = (deadline().within(current_app.config["SCREENING_WALL_TIME"]) if job is None
              else Deadline.after(float(current_app.config["SCREENING_JOB_WALL_TIME"])))
    screen = screening_calc.screen if job is None else job.screen
    result = screen(candidates, step["charge"], step["process_temperature"], step["heat_release"],
                    step["safety_factor"], budget)
    if job is None and not result.complete:  # past the budget: the whole screening as a job, when there is a queue
        queued = jobs.submit(body, previous_id, len(vessels))
        if queued is not None:
            return jobs.status_view(queued), 202
    rows = [screening_row(row, info[row.key]) for row in result.rows]
    rows = clean(_result.dump({"rows": rows})["rows"])
    used = records_used()
    step_ref = next((u for u in used if u["kind"] == "step"), None)
    counts = {"screened": len(rows), "adequate": sum(r["verdict"] == "adequate" for r in rows),
              "not_adequate": sum(r["verdict"] == "not adequate" for r in rows),
              "no_verdict": sum(r["verdict"] == "no verdict" for r in rows),
              "not_evaluated": sum(r["verdict"] == "not evaluated" for r in rows)}
    catalogue = store()
    key = request_key(body)
    previous = catalogue.last_screening(key)
    changes = _changes(previous, rows)
    if changes is not None:
        step_before = previous["result"].get("step")
        if step_before and step_ref and step_before.get("revision") != step_ref.get("revision"):
            changes["items"].insert(0, {"tag": step_ref["tag"], "vessel_id": "", "change": "changed",
                                        "details": [f"step {step_ref['tag']} revision {step_before['revision']} -> "
                                                    f"{step_ref['revision']}"], "verdict_before": None,
                                        "verdict_after": None, "margin_before": None, "margin_after": None})
    warnings = []
    if not result.complete and job is not None:
        warnings.append({"code": "screening_budget",
                         "message": "the job's time budget (COOLMARGIN_SCREENING_JOB_WALL_TIME) ran out; rows "
                                    "marked 'not evaluated' were not checked: narrow the selection or re-run"})
    elif not result.complete:
        warnings.append({"code": "screening_budget",
                         "message": "the time budget (COOLMARGIN_SCREENING_WALL_TIME, within the request's "
                                    "COOLMARGIN_REQUEST_BUDGET) ran out; rows marked 'not evaluated' were not "
                                    "checked: narrow the selection or re-run"
                                    + ("" if current_app.config.get("QUEUE_URL") else
                                       ", or give the service a job queue (COOLMARGIN_QUEUE_URL) so that large "
                                       "screenings run as jobs with progress")})
    queue_note = jobs.unavailable_warning() if job is None else None
    if queue_note is not None:
        warnings.append(queue_note)
    payload = {"status": "complete" if result.complete else "partial",
               "step": step_ref, "safety_factor": step["safety_factor"], "counts": counts, "rows": rows,
               "changes": changes, "records": used + [r["vessel"] for r in rows]
               + [r["utility"] for r in rows if r.get("utility")],
               "warnings": warnings, "cautions": list(SCREENING_CAUTIONS)}
    payload["records"] = list({json.dumps(r, sort_keys=True): r for r in payload["records"]}.values())
    stored = catalogue.save_screening(request=body, used=payload["records"], result=payload,
                                      author=security.author(), total=len(rows),
                                      done=len(rows) - counts["not_evaluated"], previous_id=previous_id,
                                      screening_id=job.id if job is not None else None)
    return _shaped(stored), 201


def _shaped(stored: dict) -> dict:
    created = stored["created_at"]
    return {"id": stored["id"], "created_at": created.isoformat() if isinstance(created, datetime) else created,
            "author": stored["author"], **stored["result"],
            "progress": {"done": stored["done"], "total": stored["total"]}}


def chart(payload: dict, fmt: str, units: dict) -> bytes:
    """Margin of every vessel (ranked, best at the top) with its band and the safety factor as a line."""
    rows = payload["rows"][::-1]
    fig, (axis,) = charts.figure(1)
    fig.set_size_inches(7.5, 1.4 + 0.32 * max(len(rows), 3))
    positions = list(range(len(rows)))
    labels = [row["tag"] + (" (NOT adequate)" if row["verdict"] == "not adequate" else "") for row in rows]
    scored = [(p, row) for p, row in zip(positions, rows) if row["margin"] is not None]
    charts.margins(axis, [p for p, _ in scored], [row["margin"] for _, row in scored],
                   [row.get("margin_band") for _, row in scored], [row["verdict"] == "adequate" for _, row in scored],
                   horizontal=True)
    for position, row in zip(positions, rows):
        if row["margin"] is None:
            note = "unbounded (no net load)" if row["verdict"] == "adequate" else row["verdict"]
            axis.annotate(note, (0, position), xytext=(4, -3), textcoords="offset points", fontsize=7,
                          color="#555555", xycoords=("axes fraction", "data"))
    factor = payload["safety_factor"]
    axis.axvline(factor, color="#555555", linestyle="--", linewidth=1.0, label=f"safety factor {factor:g}")
    axis.set_yticks(positions, labels)
    axis.set_ylim(-0.7, len(rows) - 0.3)
    axis.set_xlabel("margin (cooling capacity / heat load)")
    step = payload.get("step")
    axis.set_title(f"Screening of step {step['tag'] if step else '(inline)'} over {len(rows)} vessels", fontsize=10)
    axis.legend(fontsize=7, frameon=False, loc="best")
    charts.footnote(fig)
    return charts.render(fig, fmt)


def _pending(view: dict, status: int = 200) -> Response:
    """A screening that is not finished (queued, running) or failed: its state as JSON, whatever the format."""
    fmt = requested_format()
    retry = {"Retry-After": str(jobs.POLL_SECONDS)} if view["status"] in jobs.PENDING else {}
    if status == 200 and fmt != "json":
        progress = view["progress"]
        raise ProblemError(409, f"screening {view['id']} is {view['status']} ({progress['done']} of "
                                f"{progress['total']} vessels done); its {fmt} exists once the status is complete "
                                "or partial" + (f": {view['failure']}" if "failure" in view else ""))
    response = Response(json.dumps(view), status=status, mimetype="application/json", headers=retry)
    response.headers["Location" if status == 202 else "Content-Location"] = f"/v1/screenings/{view['id']}"
    if status == 202 and jobs.prefers_async():
        response.headers["Preference-Applied"] = "respond-async"  # RFC 7240 §3
    return response


def _answer(payload: dict, status: int = 200, request_body: dict | None = None) -> Response:
    """The stored screening (rows dumped in the default API units when it ran) in the negotiated format, with
    the presentation the query asks for (output units, digits, decimal comma), as every calculation; a job not
    finished yet answers its state (:func:`_pending`). Its printable report shows ``request_body``, the
    request the screening ran, as the inputs given."""
    if status == 202:
        return _pending(payload, status)

    def report(_asked: dict, shown: dict, units: dict, view: Any) -> Any:
        return report_pages.screening_report(request_body or {}, shown, units, view, draw=chart)

    response = answer(*presented(clean(payload), _result), rows="rows", lead=LEAD, chart=chart, report=report,
                      status=status, records=False)
    if status == 201:
        response.headers["Location"] = f"/v1/screenings/{payload['id']}"
    return response


@bp.post("/screenings")
def create():
    # a wrong output unit, digits or format is answered before the screening runs and is stored
    presentation(_result)
    body = request_object()
    payload, status = run(body)
    return _answer(payload, status, body)


@bp.get("/screenings")
def listing():
    page = _PAGE.load({k: v for k, v in request.args.items() if k != "format"})
    items, total = store().screenings(page["limit"], page["offset"])
    summaries = [{"id": s["id"], "created_at": s["created_at"].isoformat(), "author": s["author"],
                  "status": s["result"].get("status", s["status"]), "step": s["result"].get("step"),
                  "counts": s["result"].get("counts"), "progress": {"done": s["done"], "total": s["total"]}}
                 for s in items]
    body = clean(_list.dump({"items": summaries, "total": total, **page}))
    return Response(json.dumps(body), mimetype="application/json")


@bp.get("/screenings/<screening_id>")
def read(screening_id: str):
    stored = jobs.refresh(store().screening(screening_id))
    if stored["status"] in jobs.PENDING or stored["status"] == "failed":
        return _pending(jobs.status_view(stored))
    return _answer(_shaped(stored), request_body=stored["request"])


@bp.post("/screenings/<screening_id>/rerun")
def rerun(screening_id: str):
    stored = store().screening(screening_id)
    payload, status = run(stored["request"], previous_id=screening_id)
    return _answer(payload, status, stored["request"])
