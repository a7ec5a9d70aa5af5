"""Command-line client ``coolmargin``.

``coolmargin serve`` runs the service with the container's gunicorn settings; ``coolmargin check
FILE.json`` runs a cooling check and ``coolmargin scale-up FILE.json`` a scale-up (locally, or against
``--url``), each printing a table. Exit status: 0 adequate everywhere, 1 inadequate somewhere,
2 invalid input.

The plant catalogue (COOLMARGIN_DATABASE_URL, or ``--database-url``): ``coolmargin db upgrade`` applies
the migrations; ``coolmargin export [FILE]`` writes every record with its history as JSON;
``coolmargin import FILE`` restores an export or creates the records of a hand-written file (a ``.csv``
file is a vessel list from a spreadsheet); ``--if-empty`` imports only into an empty catalogue.
"""
from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path

EXIT_OK, EXIT_INADEQUATE, EXIT_INVALID = 0, 1, 2


def _serve(args: argparse.Namespace) -> int:
    os.environ["COOLMARGIN_BIND"] = f"{args.host}:{args.port}"
    # The settings ship inside the package, so this works from a wheel as well as from a checkout.
    os.execvp(sys.executable, [sys.executable, "-m", "gunicorn", "--config", "python:api.gunicorn_settings",
                               "api.wsgi:app"])
    return EXIT_OK  # pragma: no cover (exec does not return)


def _post(path: str, body: dict, url: str | None) -> tuple[int, dict]:
    """POST to the service at ``url``, or to an in-process app when no URL is given."""
    if url is None:
        from . import create_app

        # A command prints results, not the service's start-up notes: its app logs warnings and above.
        response = create_app({"LOG_LEVEL": "WARNING"}).test_client().post(path, json=body)
        return response.status_code, response.get_json()
    import urllib.error
    import urllib.request

    request = urllib.request.Request(url.rstrip("/") + path, data=json.dumps(body).encode(),
                                     headers={"Content-Type": "application/json"}, method="POST")
    try:
        with urllib.request.urlopen(request, timeout=120) as response:
            return response.status, json.loads(response.read())
    except urllib.error.HTTPError as error:
        return error.code, json.loads(error.read() or b"{}")


def _band(result: dict) -> str:
    band = result.get("margin_band") or {}
    return "-" if band.get("low") is None else f"{band['low']:.3g}-{band['high']:.3g}"


def _print_check(result: dict, units: dict, out) -> None:
    rows = [("verdict", "ADEQUATE" if result["adequate"] else "NOT ADEQUATE", ""),
            ("margin (capacity / load)", f"{result['margin']:.3g}" if result["margin"] is not None else "-", ""),
            ("margin band", _band(result), ""),
            ("safety factor", f"{result['safety_factor']:g}", ""),
            ("heat load", f"{result['heat_load']['total'] / 1e3:.4g}", "kW"),
            ("cooling capacity", f"{result['cooling_capacity'] / 1e3:.4g}", "kW"),
            ("coolant outlet", f"{result['coolant_outlet_temperature']:.4g}"
             if result["coolant_outlet_temperature"] is not None else "-", units.get("coolant_outlet_temperature", ""))]
    for key, value in result["limits"].items():
        if not key.endswith("_note"):
            rows.append((key.replace("_", " "), "-" if value is None else f"{value:.4g}", units.get(f"limits.{key}", "")))
    width = max(len(r[0]) for r in rows)
    for name, value, unit in rows:
        print(f"  {name:<{width}}  {value:>14} {unit}", file=out)
    for warning in result.get("warnings", []):
        print(f"  warning: {warning['message']}", file=out)
    print("  " + " ".join(result.get("cautions", [])[:1]), file=out)


def _request(path: str, args: argparse.Namespace) -> tuple[dict | None, int]:
    """Read the request file and call ``path``; on failure print the problem and return the exit status."""
    try:
        body = json.loads(Path(args.file).read_text())
    except (OSError, ValueError) as error:
        print(f"coolmargin: cannot read {args.file}: {error}", file=sys.stderr)
        return None, EXIT_INVALID
    status, answer = _post(path, body, args.url)
    if status != 200:
        for error in (answer or {}).get("errors", []) or [{"field": "", "message": (answer or {}).get("detail", "")}]:
            print(f"coolmargin: {error['field']}: {error['message']}", file=sys.stderr)
        return None, EXIT_INVALID
    return answer, EXIT_OK


def _scale_up(args: argparse.Namespace) -> int:
    answer, status = _request("/v1/scale-up", args)
    if answer is None:
        return status
    units = answer["units"]
    print(f"scale-up, rule {answer['rule']}, safety factor {answer['safety_factor']:g}")
    header = (f"  {'vessel':<34} {'volume':>9} {'A/V':>6} {'U':>6} {'load':>9} {'capacity':>9} {'margin':>7} "
              f"{'band':>11}  verdict")
    print(header)
    print(f"  {'':<34} {'m^3':>9} {'1/m':>6} {'W/m2K':>6} {'kW':>9} {'kW':>9} {'':>7} {'':>11}")
    worst = EXIT_OK
    for scale in answer["scales"]:
        name = f"{scale['volume']:.3g} m^3 similar" if scale["generated"] else scale["name"][:34]
        margin = "-" if scale["margin"] is None else f"{scale['margin']:.3g}"
        verdict = "adequate" if scale["adequate"] else "NOT ADEQUATE"
        print(f"  {name:<34} {scale['volume']:>9.4g} {scale['area_per_volume']:>6.3g} "
              f"{scale['overall_coefficient']:>6.0f} {scale['heat_load']['total'] / 1e3:>9.4g} "
              f"{scale['cooling_capacity'] / 1e3:>9.4g} {margin:>7} {_band(scale):>11}  {verdict}")
        band = scale.get("margin_band") or {}
        if band.get("holds_across_band") is False:
            print(f"    {band['statement']}")
        if not scale["adequate"]:
            worst = EXIT_INADEQUATE
    largest = answer["largest_adequate_volume"]
    print(f"  largest adequate similar volume: {'-' if largest is None else f'{largest:.4g} m^3'} "
          f"({answer['largest_adequate_volume_note']})")
    for switch in answer["controlling_switches"]:
        print(f"  controlling resistance: {switch['below']} -> {switch['above']} at {switch['volume']:.3g} "
              f"{units.get('controlling_switches.volume', 'm^3')}")
    print("  " + answer["cautions"][0])
    return worst


def _check(args: argparse.Namespace) -> int:
    answer, status = _request("/v1/cooling-check", args)
    if answer is None:
        return status
    cases = answer["cases"] if "cases" in answer else [{"status": 200, "result": answer}]
    worst = EXIT_OK
    for index, case in enumerate(cases):
        print(f"case {index}:" if len(cases) > 1 else "cooling check:")
        if case["status"] != 200:
            print(f"  invalid: {case['problem']['detail']}")
            worst = max(worst, EXIT_INVALID)
            continue
        _print_check(case["result"], answer["units"], sys.stdout)
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


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="coolmargin", description=__doc__.splitlines()[0])
    commands = parser.add_subparsers(dest="command", required=True)
    serve = commands.add_parser("serve", help="run the HTTP service (gunicorn)")
    serve.add_argument("--host", default="127.0.0.1")
    serve.add_argument("--port", type=int, default=8000)
    serve.set_defaults(handler=_serve)
    check = commands.add_parser("check", help="cooling check of a request file (JSON, single or {'cases': [...]})")
    check.add_argument("file")
    check.add_argument("--url", default=None, help="service base URL; default: compute locally")
    check.set_defaults(handler=_check)
    scale = commands.add_parser("scale-up", help="cooling check at every scale of a scale-up request file (JSON)")
    scale.add_argument("file")
    scale.add_argument("--url", default=None, help="service base URL; default: compute locally")
    scale.set_defaults(handler=_scale_up)
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
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    return args.handler(args)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
