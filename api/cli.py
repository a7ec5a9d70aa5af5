"""Command-line client ``coolmargin``.

``coolmargin serve`` runs the service with the container's gunicorn settings; ``coolmargin check
FILE.json`` runs a cooling check and ``coolmargin scale-up FILE.json`` a scale-up (locally, or against
``--url``), each printing a table. Exit status: 0 adequate everywhere, 1 inadequate somewhere,
2 invalid input.
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
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    return args.handler(args)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
