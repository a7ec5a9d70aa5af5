"""Command-line client ``coolmargin``.

``coolmargin serve`` runs the service with the container's gunicorn settings. The calculation commands
read a request (JSON file, or ``-``/nothing for standard input), compute it in this process or call the
service at ``--url`` (or COOLMARGIN_URL) with ``--token`` (or COOLMARGIN_TOKEN), and print a table,
the JSON answer (``--output json``) or CSV (``--output csv``).

The plant catalogue (COOLMARGIN_DATABASE_URL, or ``--database-url``): ``coolmargin db upgrade`` applies
the migrations; ``coolmargin export [FILE]`` writes every record with its history as JSON;
``coolmargin import FILE`` restores an export or creates the records of a hand-written file (a ``.csv``
file is a vessel list from a spreadsheet); ``--if-empty`` imports only into an empty catalogue.

``coolmargin worker`` runs the jobs of large screenings from the Redis queue named by COOLMARGIN_QUEUE_URL
(one process per job); ``--burst`` stops once the queue is empty.
"""
from __future__ import annotations

import argparse
import contextlib
import io
import json
import os
import sys
from pathlib import Path
from typing import Any, Callable

EXIT_OK, EXIT_INADEQUATE, EXIT_INVALID, EXIT_SERVICE, EXIT_UNREACHABLE = 0, 1, 2, 3, 4
EXIT_CODES = f"""exit status:
  {EXIT_OK}  adequate at every scale / computed (thermal safety: criticality class 1 or 2; screening: at
     least one vessel adequate; sizing: a feasible design found; window: the current point adequate)
  {EXIT_INADEQUATE}  NOT adequate somewhere (thermal safety: criticality class 3 to 5; screening: no vessel
     adequate; sizing: no feasible design; window: the current point NOT adequate)
  {EXIT_INVALID}  invalid request (unreadable file, not JSON, or a 4xx answer naming the fields)
  {EXIT_SERVICE}  the service refused or failed (401 without a valid token, 5xx)
  {EXIT_UNREACHABLE}  the service could not be reached at --url
Every verdict is a screening estimate: confirm with reaction calorimetry and plant data; local codes
and a licensed engineer's review govern."""


def _version() -> str:
    from . import VERSION

    return VERSION


def _serve(args: argparse.Namespace) -> int:
    os.environ["COOLMARGIN_BIND"] = f"{args.host}:{args.port}"
    # The settings ship inside the package, so this works from a wheel as well as from a checkout.
    os.execvp(sys.executable, [sys.executable, "-m", "gunicorn", "--config", "python:api.gunicorn_settings",
                               "api.wsgi:app"])
    return EXIT_OK  # pragma: no cover (exec does not return)


class _Failure(Exception):
    def __init__(self, status: int, message: str):
        super().__init__(message)
        self.status = status


def _read(source: str | None) -> dict:
    try:
        if source in (None, "-"):
            text = sys.stdin.read()
        else:
            with open(source, encoding="utf-8") as handle:
                text = handle.read()
        body = json.loads(text)
    except (OSError, ValueError) as error:
        where = "standard input" if source in (None, "-") else source
        raise _Failure(EXIT_INVALID, f"coolmargin: cannot read {where}: {error}") from None
    if not isinstance(body, dict):
        raise _Failure(EXIT_INVALID, "coolmargin: the request must be a JSON object")
    return body


def _problem(status: int, problem: dict) -> _Failure:
    errors = problem.get("errors") or [{"field": "", "message": problem.get("detail", "")}]
    lines = "\n".join(f"coolmargin: {e.get('field')}: {e.get('message')}".replace(": : ", ": ") for e in errors)
    code = EXIT_INVALID if 400 <= status < 500 and status != 401 else EXIT_SERVICE
    return _Failure(code, f"coolmargin: the service answered {status} {problem.get('title', '')}\n{lines}")


def _call(path: str, body: dict, args: argparse.Namespace, params: dict) -> tuple[Any, str]:
    """(answer, media type): JSON as a dict, CSV as text. Computes locally without --url."""
    if args.url is None:
        from . import create_app

        # A command prints results, not the service's start-up notes: its app logs warnings and above.
        response = create_app({"LOG_LEVEL": "WARNING"}).test_client().post(path, json=body, query_string=params)
        if response.status_code >= 400:
            raise _problem(response.status_code, response.get_json(silent=True) or {})
        return (response.get_data(as_text=True) if response.mimetype == "text/csv" else response.get_json(),
                response.mimetype)
    from .client import Client, ProblemError, ServiceUnreachable

    try:
        with Client(args.url, token=args.token, timeout=(args.connect_timeout, args.timeout)) as client:
            response = client.request("POST", path, body, params)
    except ServiceUnreachable:
        raise _Failure(EXIT_UNREACHABLE, f"coolmargin: cannot reach the service at {args.url} (is it running? "
                                         "check --url or COOLMARGIN_URL)") from None
    except ProblemError as error:
        raise _problem(error.status, error.problem) from None
    media = response.headers.get("Content-Type", "").split(";")[0]
    return (response.text if media == "text/csv" else response.json()), media


def _kw(value: float | None, unit: str) -> tuple[str, str]:
    from .charts import readable

    if value is None:
        return "-", unit
    (shown,), label = readable([value], unit)
    return f"{shown:.4g}", label


def _band(result: dict) -> str:
    """The margin band as "low-high" (the published alternatives' spread), or "-" without one."""
    band = result.get("margin_band") or {}
    return "-" if band.get("low") is None else f"{band['low']:.3g}-{band['high']:.3g}"


def _print_check(result: dict, units: dict, prefix: str = "") -> None:
    def row(path: str, label: str) -> tuple[str, str, str]:
        node: Any = result
        for part in path.split("."):
            node = node.get(part) if isinstance(node, dict) else None
        value, unit = _kw(node, units.get(prefix + path, ""))
        return label, value, unit

    rows = [("verdict", "ADEQUATE" if result["adequate"] else "NOT ADEQUATE", ""),
            ("margin (capacity / load)", "-" if result["margin"] is None else f"{result['margin']:.3g}", ""),
            ("margin band", _band(result), ""),
            ("safety factor", f"{result['safety_factor']:g}", ""),
            row("heat_load.total", "heat load"), row("cooling_capacity", "cooling capacity"),
            row("coolant_outlet_temperature", "coolant outlet")]
    rows += [row(f"limits.{key}", key.replace("_", " ")) for key in result["limits"] if not key.endswith("_note")]
    width = max(len(r[0]) for r in rows)
    for name, value, unit in rows:
        print(f"  {name:<{width}}  {value:>14} {unit}")
    for warning in result.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + " ".join(result.get("cautions", [])[:1]))


def _check(answer: dict) -> int:
    cases = answer["cases"] if "cases" in answer else [{"status": 200, "result": answer}]
    worst = EXIT_OK
    for index, case in enumerate(cases):
        print(f"case {index}:" if len(cases) > 1 else "cooling check:")
        if case["status"] != 200:
            print(f"  invalid: {case['problem']['detail']}")
            worst = max(worst, EXIT_INVALID)
            continue
        _print_check(case["result"], answer["units"])
        if not case["result"]["adequate"]:
            worst = max(worst, EXIT_INADEQUATE)
    return worst


def _catalogue(args: argparse.Namespace):
    from .storage import Catalogue

    catalogue = Catalogue(args.database_url or os.environ.get("COOLMARGIN_DATABASE_URL") or None)
    catalogue.upgrade()
    return catalogue


def _db(args: argparse.Namespace) -> int:
    from .storage import StorageError

    try:
        catalogue = _catalogue(args)
    except StorageError as error:
        print(f"coolmargin: {error}", file=sys.stderr)
        return EXIT_INVALID
    print(f"catalogue at schema revision {catalogue.schema_revision()}: "
          + ", ".join(f"{n} {k}" for k, n in sorted(catalogue.counts().items()) or [("records", 0)]))
    catalogue.dispose()
    return EXIT_OK


def _worker(args: argparse.Namespace) -> int:
    from . import create_app, jobs

    settings = {"QUEUE_URL": args.queue_url} if args.queue_url else {}
    if args.database_url:
        settings["DATABASE_URL"] = args.database_url
    app = create_app(settings)
    if not app.config["QUEUE_URL"]:
        print("coolmargin: no job queue: set COOLMARGIN_QUEUE_URL (a redis:// URL) or --queue-url", file=sys.stderr)
        return EXIT_INVALID
    try:
        jobs.work(app, burst=args.burst)
    except jobs.redis.RedisError as error:
        print(f"coolmargin: the job queue at {app.config['QUEUE_URL']} is unreachable: {error}", file=sys.stderr)
        return EXIT_UNREACHABLE
    return EXIT_OK


def _export(args: argparse.Namespace) -> int:
    catalogue = _catalogue(args)
    try:
        document = catalogue.export()
    finally:
        catalogue.dispose()
    text = json.dumps(document, indent=1, ensure_ascii=False) + "\n"
    if args.file in (None, "-"):
        sys.stdout.write(text)
    else:
        Path(args.file).write_text(text, encoding="utf-8")
        print(f"exported {len(document['records'])} records to {args.file}", file=sys.stderr)
    return EXIT_OK


def _import(args: argparse.Namespace) -> int:
    try:
        text = Path(args.file).read_text(encoding="utf-8")
    except OSError as error:
        print(f"coolmargin: cannot read {args.file}: {error}", file=sys.stderr)
        return EXIT_INVALID
    catalogue = _catalogue(args)
    try:
        return _import_into(catalogue, text, args)
    finally:
        catalogue.dispose()


def _import_into(catalogue, text: str, args: argparse.Namespace) -> int:
    from marshmallow import ValidationError

    from . import bulk
    from .storage import StorageError

    if args.if_empty and sum(catalogue.counts().values()):
        print("coolmargin: the catalogue holds records already; nothing imported (--if-empty)", file=sys.stderr)
        return EXIT_OK
    author = args.author or os.environ.get("USER") or "import"
    try:
        if args.file.lower().endswith(".csv"):
            summary = bulk.import_vessels(catalogue, bulk.vessels_from_csv(text), author, args.replace)
        else:
            summary = bulk.import_catalogue(catalogue, json.loads(text), author)
    except (ValueError, ValidationError) as error:
        messages = error.messages if isinstance(error, ValidationError) else str(error)
        print(f"coolmargin: {args.file} was not imported: {messages}", file=sys.stderr)
        return EXIT_INVALID
    except StorageError as error:
        print(f"coolmargin: {error}", file=sys.stderr)
        return EXIT_INVALID
    print(", ".join(f"{len(items)} {what}" for what, items in summary.items()))
    return EXIT_OK


def _scale_up(answer: dict) -> int:
    units = answer["units"]
    print(f"scale-up, rule {answer['rule']}, safety factor {answer['safety_factor']:g}")
    volume_unit = units["scales.volume"]
    _, load_unit = _kw(0.0, units["scales.heat_load.total"])
    _, capacity_unit = _kw(0.0, units["scales.cooling_capacity"])
    print(f"  {'volume':>9} {'A/V':>6} {'U':>6} {'load':>9} {'capacity':>9} {'margin':>7} {'band':>11}  verdict"
          "       vessel")
    print(f"  {volume_unit:>9} {units['scales.area_per_volume']:>6} {'':>6} {load_unit:>9} {capacity_unit:>9}")
    worst = EXIT_OK
    for scale in answer["scales"]:
        name = f"similar vessel, {scale['volume']:.3g} {volume_unit}" if scale["generated"] else scale["name"]
        margin = "-" if scale["margin"] is None else f"{scale['margin']:.3g}"
        verdict = "adequate" if scale["adequate"] else "NOT ADEQUATE"
        print(f"  {scale['volume']:>9.4g} {scale['area_per_volume']:>6.3g} {scale['overall_coefficient']:>6.0f} "
              f"{_kw(scale['heat_load']['total'], units['scales.heat_load.total'])[0]:>9} "
              f"{_kw(scale['cooling_capacity'], units['scales.cooling_capacity'])[0]:>9} {margin:>7} "
              f"{_band(scale):>11}  {verdict:<13} {name}")  # the full vessel name last, never cut
        band = scale.get("margin_band") or {}
        if band.get("holds_across_band") is False:
            print(f"    {band['statement']}")
        if not scale["adequate"]:
            worst = EXIT_INADEQUATE
    largest = answer["largest_adequate_volume"]
    print(f"  largest adequate similar volume: {'-' if largest is None else f'{largest:.4g} {volume_unit}'} "
          f"({answer['largest_adequate_volume_note']})")
    for switch in answer["controlling_switches"]:
        print(f"  controlling resistance: {switch['below']} -> {switch['above']} at {switch['volume']:.3g} "
              f"{units.get('controlling_switches.volume', volume_unit)}")
    print("  " + answer["cautions"][0])
    return worst


def _thermal_safety(answer: dict) -> int:
    units = answer["units"]
    print("thermal safety (cooling failure):")
    for key, label in (("adiabatic_temperature_rise", "adiabatic temperature rise"), ("mtsr", "MTSR"),
                       ("mtt", "MTT"), ("td24", "T_D24"), ("time_to_maximum_rate", "TMR_ad at the MTSR")):
        value = answer.get(key)
        print(f"  {label:<28} {'-' if value is None else f'{value:.4g}':>10} {units.get(key, '')}")
    print(f"  {'criticality class':<28} {answer['criticality_class']:>10}")
    for line in answer.get("reasoning", []):
        print(f"  - {line}")
    for warning in answer.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + " ".join(answer.get("cautions", [])[:1]))
    return EXIT_OK if answer["criticality_class"] <= 2 else EXIT_INADEQUATE


def _simulation(answer: dict) -> int:
    units = answer["units"]
    print(f"simulation: {answer['message']}")
    for key, value in answer["summary"].items():
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            print(f"  {key.replace('_', ' '):<32} {value:>12.4g} {units.get('summary.' + key, '')}")
    for warning in answer.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + " ".join(answer.get("cautions", [])[:1]))
    return EXIT_OK


def _screening(answer: dict) -> int:
    units = answer["units"]
    step = answer.get("step")
    counts = answer["counts"]
    print(f"screening of step {step['tag'] + ' revision ' + str(step['revision']) if step else '(inline)'}, "
          f"safety factor {answer['safety_factor']:g}: {counts['adequate']} of {counts['screened']} vessels "
          f"adequate ({answer['status']})")
    _, time_unit = _kw(0.0, units.get("rows.minimum_dosing_time", "s"))
    inlet_unit = units.get("rows.maximum_coolant_inlet_temperature", "")
    print(f"  {'rank':>4} {'verdict':<13} {'margin':>7} {'band':>11} {'min dosing':>10} {'warmest':>8}  "
          f"{'controlling':<16} vessel")
    print(f"  {'':>4} {'':<13} {'':>7} {'':>11} {time_unit:>10} {inlet_unit:>8}")
    for row in answer["rows"]:
        margin = "-" if row["margin"] is None else f"{row['margin']:.3g}"
        dosing = _kw(row.get("minimum_dosing_time"), units.get("rows.minimum_dosing_time", "s"))[0]
        inlet = "-" if row.get("maximum_coolant_inlet_temperature") is None else \
            f"{row['maximum_coolant_inlet_temperature']:.4g}"
        verdict = row["verdict"].replace("not adequate", "NOT ADEQUATE")
        print(f"  {row['rank']:>4} {verdict:<13} {margin:>7} {_band(row):>11} {dosing:>10} {inlet:>8}  "
              f"{row.get('controlling') or '-':<16} {row.get('name') or row['tag']}")  # full name last
        if row.get("problem"):
            print(f"       {row['problem']['field']}: {row['problem']['message']}")
    for warning in answer.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + answer["cautions"][0])
    return EXIT_OK if counts["adequate"] else EXIT_INADEQUATE


def _sizing(answer: dict) -> int:
    units = answer["units"]
    recommendation = answer["recommendation"]
    duty, duty_unit = _kw(answer["duty"], units["duty"])
    print(f"jacket sizing: duty {duty} {duty_unit} (heat load x safety factor {answer['safety_factor']:g}), "
          f"{answer['candidates_evaluated']} candidates")
    by_index = {c["index"]: c for c in answer["candidates"]}
    _, power_unit = _kw(0.0, units["candidates.cooling_capacity"])
    _, drop_unit = _kw(0.0, units["candidates.pressure_drop"])
    print("  smallest feasible design of each type:")
    print(f"  {'type':<24} {'#':>4} {'margin':>7} {'band':>11} {'capacity':>9} {'drop':>8}  design")
    print(f"  {'':<24} {'':>4} {'':>7} {'':>11} {power_unit:>9} {drop_unit:>8}")
    for entry in answer["smallest_feasible"]:
        found = by_index.get(entry["index"])
        if found is None:
            print(f"  {entry['type']:<24} {'-':>4}  no feasible design of this type")
            continue
        band = found.get("margin_band") or {}
        spread = "-" if band.get("low") is None else f"{band['low']:.3g}-{band['high']:.3g}" + (
            "!" if found.get("verdict_not_robust") else "")
        print(f"  {entry['type']:<24} {found['index']:>4} {found['margin']:>7.3g} {spread:>11} "
              f"{_kw(found['cooling_capacity'], units['candidates.cooling_capacity'])[0]:>9} "
              f"{_kw(found['pressure_drop'], units['candidates.pressure_drop'])[0]:>8}  {found['description']}")
    print("  band: the margin over the published alternatives; ! the verdict does not hold across it")
    print(f"  recommended: {recommendation.get('description') or 'none feasible'}")
    print(f"  why: {recommendation.get('reasoning', '-')}")
    for warning in answer.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + answer["cautions"][0])
    return EXIT_OK if recommendation.get("index") is not None else EXIT_INADEQUATE


def _window(answer: dict) -> int:
    units = answer["units"]
    current = answer["current"]
    print(f"operating window: {len(answer['points'])} grid points, {100 * answer['adequate_share']:.3g} % adequate "
          f"at safety factor {answer['safety_factor']:g}")
    for axis in answer["axes"]:
        values = [p[axis["field"]] for p in answer["points"] if p.get(axis["field"]) is not None]
        print(f"  {axis['quantity']:<28} {min(values):.4g} to {max(values):.4g} "
              f"{units.get('points.' + axis['field'], '')} ({axis['points']} points)")
    margin = "-" if current.get("margin") is None else f"{current['margin']:.3g}"
    verdict = "ADEQUATE" if current.get("adequate") else "NOT ADEQUATE"
    print(f"  current point: margin {margin}, {verdict}")
    print(f"  boundary (margin = safety factor): {len(answer['boundary'])} points; --output csv lists the grid")
    for warning in answer.get("warnings", []):
        print(f"  warning: {warning['message']}")
    print("  " + answer["cautions"][0])
    return EXIT_OK if current.get("adequate") else EXIT_INADEQUATE


# command -> (path, help, table printer)
COMMANDS: dict[str, tuple[str, str, Callable[[dict], int]]] = {
    "check": ("/v1/cooling-check", "cooling check of one vessel (or a batch: {'cases': [...]})", _check),
    "scale-up": ("/v1/scale-up", "cooling check at every scale of a scale-up path", _scale_up),
    "thermal-safety": ("/v1/thermal-safety", "cooling-failure assessment: MTSR, T_D24, criticality class",
                       _thermal_safety),
    "simulate": ("/v1/simulations", "dynamic energy and mole balances with the jacket, cooling failure", _simulation),
    "screening": ("/v1/screenings", "one process step against the stored vessels, ranked (needs the catalogue)",
                  _screening),
    "sizing": ("/v1/jacket-sizing", "candidate jackets and coils for a bare vessel shell, with a recommendation",
               _sizing),
    "window": ("/v1/operating-window", "the cooling margin over a grid of two operating quantities", _window),
}


#: Commands whose request may be a batch, ``{"cases": [...]}`` (sent to the resource's ``/batch`` route).
BATCHES = ("check",)


def _run(args: argparse.Namespace) -> int:
    path, _, printer = COMMANDS[args.command]
    params = {"output_units": args.units} if args.units else {}
    if args.output == "csv":
        params["format"] = "csv"
    try:
        body = _read(args.file)
        if "cases" in body and args.command in BATCHES:  # a batch has its own route
            path += "/batch"
        answer, media = _call(path, body, args, params)
    except _Failure as failure:
        print(failure, file=sys.stderr)
        return failure.status
    if args.output == "csv":
        sys.stdout.write(answer)
        return EXIT_OK
    if args.output == "json":
        json.dump(answer, sys.stdout, indent=2)
        print()
        with contextlib.redirect_stdout(io.StringIO()):  # the exit status still says pass/fail; no table
            return printer(answer)
    return printer(answer)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="coolmargin", description=__doc__.splitlines()[0] + ".",
                                     epilog=EXIT_CODES, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--version", action="version", version=f"coolmargin {_version()}")
    commands = parser.add_subparsers(dest="command", required=True)
    serve = commands.add_parser("serve", help="run the HTTP service (gunicorn)")
    serve.add_argument("--host", default="127.0.0.1")
    serve.add_argument("--port", type=int, default=8000)
    serve.set_defaults(handler=_serve)
    for name, (path, help_text, _) in COMMANDS.items():
        command = commands.add_parser(name, help=help_text, description=f"{help_text} ({path}).", epilog=EXIT_CODES,
                                      formatter_class=argparse.RawDescriptionHelpFormatter)
        command.add_argument("file", nargs="?", default="-", help="request JSON file; '-' or nothing: standard input")
        command.add_argument("--url", default=os.environ.get("COOLMARGIN_URL"),
                             help="service base URL (env COOLMARGIN_URL); default: compute in this process")
        command.add_argument("--token", default=os.environ.get("COOLMARGIN_TOKEN"),
                             help="bearer token for --url (env COOLMARGIN_TOKEN)")
        command.add_argument("--output", choices=("table", "json", "csv"), default="table",
                             help="table (default), the JSON answer, or CSV with units in the header")
        command.add_argument("--units", choices=("si", "metric", "us"), default=None,
                             help="units of the answer (output_units)")
        command.add_argument("--timeout", type=float, default=120.0, help="seconds to wait for an answer")
        command.add_argument("--connect-timeout", type=float, default=5.0, help="seconds to wait for a connection")
        command.set_defaults(handler=_run)
    database = argparse.ArgumentParser(add_help=False)
    database.add_argument("--database-url", default=None,
                          help="SQLAlchemy URL of the catalogue; default COOLMARGIN_DATABASE_URL or a SQLite file "
                               "in the user's data directory")
    db = commands.add_parser("db", parents=[database], help="the catalogue's schema")
    db.add_argument("action", choices=["upgrade"], help="apply the migrations up to the newest")
    db.set_defaults(handler=_db)
    export = commands.add_parser("export", parents=[database], help="write the whole catalogue, with history, as JSON")
    export.add_argument("file", nargs="?", default=None, help="output file; default standard output")
    export.set_defaults(handler=_export)
    load = commands.add_parser("import", parents=[database],
                               help="restore an export, create a hand-written catalogue file, or a vessel CSV")
    load.add_argument("file")
    load.add_argument("--if-empty", action="store_true", help="only when the catalogue holds no record")
    load.add_argument("--replace", action="store_true", help="CSV: revise vessels whose tag exists already")
    load.add_argument("--author", default=None, help="name recorded with the new revisions; default $USER")
    load.set_defaults(handler=_import)
    worker = commands.add_parser("worker", parents=[database], help="run the jobs of large screenings (Redis queue)")
    worker.add_argument("--queue-url", default=None, help="redis:// URL of the queue; default COOLMARGIN_QUEUE_URL")
    worker.add_argument("--burst", action="store_true", help="stop once the queue is empty")
    worker.set_defaults(handler=_worker)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    return args.handler(args)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
