"""Command-line client ``coolmargin``.

``coolmargin serve`` runs the service with the container's gunicorn settings.
"""
from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXIT_OK, EXIT_INADEQUATE, EXIT_INVALID = 0, 1, 2


def _serve(args: argparse.Namespace) -> int:
    os.environ["COOLMARGIN_BIND"] = f"{args.host}:{args.port}"
    config = ROOT / "docker" / "gunicorn.conf.py"
    os.execvp(sys.executable, [sys.executable, "-m", "gunicorn", "--config", str(config),
                               "--chdir", str(ROOT), "api.wsgi:app"])
    return EXIT_OK  # pragma: no cover (exec does not return)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="coolmargin", description=__doc__.splitlines()[0])
    commands = parser.add_subparsers(dest="command", required=True)
    serve = commands.add_parser("serve", help="run the HTTP service (gunicorn)")
    serve.add_argument("--host", default="127.0.0.1")
    serve.add_argument("--port", type=int, default=8000)
    serve.set_defaults(handler=_serve)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    return args.handler(args)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
