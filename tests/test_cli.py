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


# ---------------------------------------------------------------- screening, sizing, window against a live server

@pytest.fixture(scope="module")
def plant_server(tmp_path_factory):
    """gunicorn over a catalogue holding the demo plant (examples/plant.json), loaded through the API."""
    from api import create_app
    from plant import load_plant
    from serving import gunicorn

    url = f"sqlite:///{tmp_path_factory.mktemp('plant')}/catalogue.sqlite3"
    loader = create_app({"TESTING": True, "DATABASE_URL": url})
    load_plant(loader.test_client())
    loader.extensions["coolmargin.catalogue"].dispose()
    with gunicorn(env={"COOLMARGIN_DATABASE_URL": url}, workers=1) as base:
        yield base


@pytest.mark.slow
def test_screening_from_standard_input_against_the_live_server(plant_server, monkeypatch, capsys):
    # AC-7-FAST: Cormorant is the one adequate vessel of the demo plant (tests/test_screenings.py ranks it)
    status, out, _ = _main(monkeypatch, capsys, ["screening", "--url", plant_server],
                           stdin=json.dumps({"step": {"ref": "AC-7-FAST"}}))
    assert status == cli.EXIT_OK and "1 of 8 vessels adequate" in out
    assert "Cormorant, 8 m3 reactor with coil" in out and "Gannet, 6.3 m3 production reactor on tower water" in out
    # none of the vessels chosen is adequate: the exit status says so, whatever the output format
    body = json.dumps({"step": {"ref": "AC-7-FAST"}, "vessels": ["Puffin", "Gannet"]})
    status, out, _ = _main(monkeypatch, capsys, ["screening", "-", "--url", plant_server, "--output", "json"],
                           stdin=body)
    answer = json.loads(out)
    assert status == cli.EXIT_INADEQUATE and {row["verdict"] for row in answer["rows"]} == {"not adequate"}
    status, out, _ = _main(monkeypatch, capsys, ["screening", "--url", plant_server, "--output", "csv"], stdin=body)
    lines = out.splitlines()
    assert lines[0].startswith("rank,tag,verdict,margin,minimum_dosing_time [s]") and len(lines) == 3
    # a vessel the catalogue does not hold: the service's 422 names the field, exit status 2
    status, _, err = _main(monkeypatch, capsys, ["screening", "--url", plant_server],
                           stdin=json.dumps({"step": {"ref": "AC-7-FAST"}, "vessels": ["Nowhere"]}))
    assert status == cli.EXIT_INVALID and "vessels[0]" in err


@pytest.mark.slow
def test_sizing_and_window_against_the_live_server(plant_server, monkeypatch, capsys, app):
    sizing = ROOT / "examples" / "jacket_sizing_request.json"
    local = app.test_client().post("/v1/jacket-sizing", json=json.loads(sizing.read_text())).json
    status, out, _ = _main(monkeypatch, capsys, ["sizing", str(sizing), "--url", plant_server])
    assert status == cli.EXIT_OK and f"recommended: {local['recommendation']['description']}" in out
    status, out, _ = _main(monkeypatch, capsys, ["sizing", str(sizing), "--url", plant_server, "--output", "csv"])
    assert out.startswith("index,type,description,feasible,margin") and len(out.splitlines()) == 1 + len(
        local["candidates"])
    # the whole dose in 5 min instead of 80: a heat load no candidate removes, exit status 1
    demanding = json.loads(sizing.read_text())
    demanding["heat_release"]["dosing_time"] = "5 min"
    status, out, _ = _main(monkeypatch, capsys, ["sizing", "--url", plant_server], stdin=json.dumps(demanding))
    assert status == cli.EXIT_INADEQUATE and "recommended: no feasible design" in out
    window = ROOT / "examples" / "operating_window_production.json"
    status, out, _ = _main(monkeypatch, capsys, ["window", str(window), "--url", plant_server, "--output", "json",
                                                 "--units", "metric"])
    answer = json.loads(out)
    assert status == (cli.EXIT_OK if answer["current"]["adequate"] else cli.EXIT_INADEQUATE)
    assert answer["units"]["points.dosing_time"] == "min"


def test_a_batch_goes_to_its_own_route_and_each_case_keeps_its_verdict(monkeypatch, capsys):
    check = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
    batch = {"cases": [check, dict(check, safety_factor=3.0)]}  # the recipe's margin 2.2 is short of 3
    paths = []
    call = cli._call
    monkeypatch.setattr(cli, "_call", lambda path, *rest: paths.append(path) or call(path, *rest))
    status, out, _ = _main(monkeypatch, capsys, ["check", "--output", "json"], stdin=json.dumps(batch))
    assert paths == ["/v1/cooling-check/batch"]
    answer = json.loads(out)
    assert [case["result"]["adequate"] for case in answer["cases"]] == [True, False]
    assert status == cli.EXIT_INADEQUATE
