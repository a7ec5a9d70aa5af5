"""The command line: exit statuses, standard input, output formats, an unreachable server, tokens."""
import io
import json
import subprocess
import sys
from pathlib import Path

import pytest

from api import cli
from serving import free_port

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "examples" / "scale_up_demo.json"
SAFETY = ROOT / "examples" / "thermal_safety_production.json"


def _main(monkeypatch, capsys, argv, stdin=None):
    if stdin is not None:
        monkeypatch.setattr(sys, "stdin", io.StringIO(stdin))
    status = cli.main(argv)
    out = capsys.readouterr()
    return status, out.out, out.err


def test_version_and_exit_statuses_in_help(monkeypatch, capsys):
    with pytest.raises(SystemExit):
        cli.main(["--version"])
    assert capsys.readouterr().out.startswith("coolmargin ")
    help_text = cli.build_parser().format_help()
    for code in ("0  adequate", "1  NOT adequate", "2  invalid request", "4  the service could not be reached"):
        assert code in help_text


def test_scale_up_from_standard_input_prints_full_vessel_names(monkeypatch, capsys):
    status, out, _ = _main(monkeypatch, capsys, ["scale-up"], stdin=DEMO.read_text())
    assert status == cli.EXIT_INADEQUATE  # Puffin falls short in the demo (README)
    assert "Puffin, 6.3 m3 production reactor" in out  # no longer cut at 34 characters


def test_json_and_csv_outputs_keep_the_exit_status(monkeypatch, capsys):
    status, out, _ = _main(monkeypatch, capsys, ["scale-up", str(DEMO), "--output", "json", "--units", "metric"])
    answer = json.loads(out)
    assert status == cli.EXIT_INADEQUATE and answer["units"]["scales.cooling_capacity"] == "kW"
    status, out, _ = _main(monkeypatch, capsys, ["scale-up", str(DEMO), "--output", "csv"])
    assert out.startswith("name,volume [m^3],")


def test_thermal_safety_exit_status_follows_the_criticality_class(monkeypatch, capsys):
    # Stoessel's classes 1 and 2 need no technical measure beyond the cooling; 3 to 5 do (Stoessel 1993).
    status, out, _ = _main(monkeypatch, capsys, ["thermal-safety", str(SAFETY)])
    assert "criticality class" in out and status == cli.EXIT_OK  # the demo is class 1 (README)


def test_unreachable_server_is_its_own_exit_status_without_a_traceback():
    run = subprocess.run([sys.executable, "-m", "api.cli", "check", str(ROOT / "examples" /
                          "cooling_check_production.json"), "--url", f"http://127.0.0.1:{free_port()}",
                          "--connect-timeout", "2"], capture_output=True, text=True, timeout=60, cwd=ROOT)
    assert run.returncode == cli.EXIT_UNREACHABLE
    assert "cannot reach the service" in run.stderr and "Traceback" not in run.stderr


def test_unreadable_request_is_invalid(monkeypatch, capsys):
    status, _, err = _main(monkeypatch, capsys, ["check", "-"], stdin="{not json")
    assert status == cli.EXIT_INVALID and "cannot read standard input" in err
