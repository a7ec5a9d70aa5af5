"""Large screenings as jobs on a Redis queue (rq), so no request runs past its budget.

With ``QUEUE_URL`` set (``COOLMARGIN_QUEUE_URL``, a ``redis://`` URL), ``POST /v1/screenings`` (and a
re-run) becomes a job when

* the client asks for it: ``Prefer: respond-async`` (RFC 7240 §4.1; answered with
  ``Preference-Applied: respond-async``), or
* the selection holds more than ``SCREENING_SYNC_VESSELS`` vessels, or
* a screening computed in the request ran out of its budget (its rows are computed again by the job).

The answer is ``202 Accepted`` (RFC 9110 §15.3.3) with ``Location`` of the screening resource itself,
whose ``status`` goes ``queued`` -> ``running`` -> ``complete`` (or ``partial`` past the job's own
budget, ``SCREENING_JOB_WALL_TIME``) or ``failed`` (with the reason), and whose ``progress`` counts the
vessels done of the total. The state lives on the stored screening row (the database), so it survives a
restart of Redis and shows in the listing; Redis only carries the work. ``coolmargin worker`` runs the
workers (rq's forking worker: one process per job, so a crash or a leak ends with the job).

Without ``QUEUE_URL`` (``make run``, no server) nothing changes: a screening is computed in the request
and, past its budget, answers ``partial`` with a warning that says how to get the whole answer.
"""
from __future__ import annotations

import logging
from typing import Any, Callable

import redis
from flask import Flask, current_app, g, request
from rq import Queue, SimpleWorker, Worker
from rq.exceptions import NoSuchJobError
from rq.job import Job as RqJob
from rq.job import JobStatus

from calc.checks import screening as screening_calc

log = logging.getLogger("coolmargin")
#: States of a screening; the last three are final ("complete" and "partial" are a finished screening's).
PENDING = ("queued", "running")
STATES = PENDING + ("complete", "partial", "failed")
#: Seconds a client is asked to wait before reading a pending screening again.
POLL_SECONDS = 2
#: Vessels screened between two progress updates of a job.
_LOST = (JobStatus.FAILED, JobStatus.STOPPED, JobStatus.CANCELED)
_connections: dict[str, redis.Redis] = {}
_worker_app: Flask | None = None


def queue(app: Flask | None = None) -> Queue | None:
    """The screening queue, or None when no QUEUE_URL is configured."""
    config = (app or current_app).config
    url = config.get("QUEUE_URL")
    if not url:
        return None
    if url not in _connections:
        _connections[url] = redis.Redis.from_url(url, socket_connect_timeout=2, socket_timeout=10)
    return Queue(config["QUEUE_NAME"], connection=_connections[url])


def prefers_async() -> bool:
    """The request carries ``Prefer: respond-async`` (RFC 7240: comma-separated preferences, tokens any case)."""
    for header in request.headers.getlist("Prefer"):
        for preference in header.split(","):
            if preference.split(";")[0].split("=")[0].strip().lower() == "respond-async":
                return True
    return False


def reason(vessels: int) -> str | None:
    """Why this screening should be a job ("asked", "size"), or None to compute it in the request."""
    if not current_app.config.get("QUEUE_URL"):
        return None
    if prefers_async():
        return "asked"
    if vessels > int(current_app.config["SCREENING_SYNC_VESSELS"]):
        return "size"
    return None


def unavailable_warning() -> dict | None:
    """What a screening answered in the request says about the queue (None when all is as asked)."""
    if g.get("queue_unreachable"):
        return {"code": "job_queue_unreachable",
                "message": f"the job queue could not be reached ({g.queue_unreachable}); the screening ran in the "
                           "request instead of as a job"}
    if current_app.config.get("QUEUE_URL"):
        return None
    if prefers_async():
        return {"code": "no_job_queue", "message": "Prefer: respond-async was not applied: this service has no job "
                                                   "queue (COOLMARGIN_QUEUE_URL); the screening ran in the request"}
    return None


def submit(body: dict, previous_id: str | None, total: int) -> dict | None:
    """Store a queued screening and put its job on the queue; None when the queue cannot be reached."""
    from . import security
    from .records import store

    work = queue()
    if work is None:
        return None
    try:
        work.connection.ping()
    except redis.RedisError as exc:
        log.warning("job queue unreachable (%s); the screening runs in the request", exc)
        g.queue_unreachable = type(exc).__name__
        return None
    catalogue = store()
    stored = catalogue.save_screening(request=body, used=[], result={"status": "queued"}, author=security.author(),
                                      status="queued", done=0, total=total, previous_id=previous_id)
    wall = float(current_app.config["SCREENING_JOB_WALL_TIME"])
    try:
        work.enqueue(run_job, stored["id"], job_id=stored["id"], job_timeout=int(wall) + 60,
                     result_ttl=3600, failure_ttl=7 * 24 * 3600, description=f"screening {stored['id']}")
    except redis.RedisError as exc:
        fail(stored["id"], f"the job queue refused the job ({type(exc).__name__})")
        raise
    return catalogue.screening(stored["id"])


def status_view(stored: dict) -> dict:
    """A screening that is not finished: its state and progress (and why it failed)."""
    result = stored["result"] or {}
    created = stored["created_at"]
    out = {"id": stored["id"], "created_at": created.isoformat() if hasattr(created, "isoformat") else created,
           "author": stored["author"], "status": stored["status"],
           "progress": {"done": stored["done"], "total": stored["total"]}}
    if stored["status"] == "failed":
        out["failure"] = result.get("failure", "the job failed")
    return out


def refresh(stored: dict) -> dict:
    """A pending screening whose job the queue has lost (worker killed, job cancelled, queue flushed): failed."""
    if stored["status"] not in PENDING:
        return stored
    work = queue()
    if work is None:
        return stored
    try:
        job = RqJob.fetch(stored["id"], connection=work.connection)
        status = job.get_status(refresh=True)
    except redis.RedisError:
        return stored  # cannot tell; the stored state stands
    except NoSuchJobError:  # expired, or the queue was flushed
        status = None
    if status is None or status in _LOST:
        fail(stored["id"], f"the job was lost ({status or 'not on the queue'}): the worker stopped or the "
                           "queue was cleared; re-run the screening")
        from .records import store

        return store().screening(stored["id"])
    return stored


def fail(screening_id: str, why: str) -> None:
    from .records import store

    store().update_screening(screening_id, status="failed", result={"status": "failed", "failure": why})


class Job:
    """The job side of :func:`api.screenings.run`: which stored row to fill, and the progress it reports."""

    def __init__(self, screening_id: str, report: Callable[[int, int], None]):
        self.id = screening_id
        self.report = report

    def screen(self, candidates: list, *args: Any, **kwargs: Any) -> screening_calc.Screening:
        """``calc.checks.screening.screen`` reporting its progress after each batch it checks together
        (:data:`calc.checks.screening.BATCH` vessels); vessels without a check to run count as done at once."""
        total = len(candidates)
        self.report(0, total)

        def progress(done: int, checked: int) -> None:
            self.report(done + total - checked, total)

        return screening_calc.screen(candidates, *args, progress=progress, **kwargs)


def run_job(screening_id: str) -> str | None:
    """The queued screening ``screening_id``: computed, stored on its row; the worker's entry point."""
    app = _worker_app or _app_from_environment()
    with app.test_request_context("/v1/screenings", method="POST"):  # g and current_app; no HTTP request runs
        from marshmallow import ValidationError

        from .errors import ProblemError
        from .records import store
        from .screenings import run
        from .storage import NotFound

        catalogue = store()
        try:
            stored = catalogue.screening(screening_id)
        except NotFound:
            log.warning("job for screening %s: no such screening", screening_id)
            return None
        if stored["status"] != "queued":
            return stored["status"]  # taken already (a job enqueued twice) or failed meanwhile
        g.token_name = stored["author"]

        def report(done: int, total: int) -> None:
            catalogue.update_screening(screening_id, status="running", done=done, total=total,
                                       result={"status": "running"})

        try:
            payload, _ = run(stored["request"], previous_id=stored["previous_id"], job=Job(screening_id, report))
        except ValidationError as exc:
            fail(screening_id, f"the request is no longer valid: {exc.messages}")
            return "failed"
        except ProblemError as exc:
            fail(screening_id, exc.detail)
            return "failed"
        except Exception as exc:
            fail(screening_id, f"the screening failed ({type(exc).__name__}); see the worker's log")
            raise
        return str(payload["status"])


def _app_from_environment() -> Flask:
    global _worker_app
    from . import create_app

    _worker_app = create_app()
    return _worker_app


def work(app: Flask, *, burst: bool = False, fork: bool = True) -> bool:
    """Run a worker on the app's screening queue (``burst``: until it is empty); ``fork=False`` runs each
    job in this process (rq's SimpleWorker: tests, debugging)."""
    global _worker_app
    work_queue = queue(app)
    if work_queue is None:
        raise RuntimeError("no job queue: set COOLMARGIN_QUEUE_URL (a redis:// URL)")
    _worker_app = app
    worker_class = Worker if fork else SimpleWorker
    worker = worker_class([work_queue], connection=work_queue.connection)
    return bool(worker.work(burst=burst, logging_level=app.config.get("LOG_LEVEL", "INFO")))
