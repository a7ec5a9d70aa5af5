"""Printable reports: self-contained HTML printed by a real browser, and the PDF read back as text.

What a reviewer needs on paper (inputs as given, results, limits, warnings, cautions, version, date,
request hash) and one printed page per scale. The browser is Debian's chromium, headless; .ci/run
installs it. The request hash is re-derived here with hashlib from the canonical JSON (RFC 8785 in
spirit: sorted keys, no spaces), not taken from the code under test.
"""
import hashlib
import json
import os
import re
import shutil
import subprocess
import unicodedata
from io import BytesIO
from pathlib import Path

import pytest
from pypdf import PdfReader

ROOT = Path(__file__).resolve().parents[1]
DEMO = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())
CHECK = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
CAUTION = "have a licensed engineer review"


def _pages(pdf: bytes) -> list[str]:
    # NFKC: chromium sets "ff"/"ffi" as ligatures ("Puffin" reads back as "Pu\ufb03n")
    return [unicodedata.normalize("NFKC", page.extract_text()) for page in PdfReader(BytesIO(pdf)).pages]


def _canonical_hash(body: dict) -> str:
    return hashlib.sha256(json.dumps(body, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
                          .encode()).hexdigest()


def _assert_one_page_per_scale(pages: list[str], names: list[str]) -> None:
    assert "Scale-up path" in pages[0] and "NOT ADEQUATE at one or more scales" in pages[0]
    for index, name in enumerate(names, start=1):
        page = " ".join(pages[index].split())
        assert f"Scale {index}: {' '.join(name.split())}" in page, (index, page[:300])
        assert not any(f"Scale {other}:" in page for other in range(1, len(names) + 1) if other != index)
    assert "Inputs as given" in pages[len(names) + 1]
    assert all(CAUTION in " ".join(page.split()) for page in pages)  # the cautions on every printed page


@pytest.fixture(scope="module")
def scale_up(app):
    return app.test_client().post("/v1/scale-up", json=DEMO).json


def test_pdf_report_of_a_scale_up_reads_back(client, scale_up):
    response = client.post("/v1/scale-up?format=pdf", json=DEMO)
    assert response.status_code == 200 and response.mimetype == "application/pdf"
    pages = _pages(response.data)
    names = [scale["name"] for scale in scale_up["scales"]]
    _assert_one_page_per_scale(pages, names)
    text = " ".join(" ".join(pages).split())
    assert _canonical_hash(DEMO) in text  # reproducible: the same inputs give the same hash
    puffin = scale_up["scales"][-1]  # the numbers printed are the JSON answer's, rounded (the README's table)
    assert f"NOT ADEQUATE: margin {puffin['margin']:#.3g} against 1.30 required" in text
    assert "reference.diameter 0.1 m" in text and "process_temperature 45 degC" in text  # inputs as given
    assert "minimum dosing time" in text and "jacket bottom head" in text  # limits and warnings


def test_pdf_report_follows_the_output_units(client):
    pages = _pages(client.post("/v1/cooling-check?format=pdf&output_units=metric", json=CHECK).data)
    text = " ".join(" ".join(pages).split())
    answer = client.post("/v1/cooling-check", json=CHECK).json  # SI: W and s
    assert f"ADEQUATE: margin {answer['margin']:#.3g} against 1.30 required" in text
    assert f"heat load {answer['heat_load']['total'] / 1e3:#.4g} kW" in text
    assert f"minimum dosing time {answer['limits']['minimum_dosing_time'] / 60:#.4g} min" in text
    assert "lowest margin" in text and "coker_2001" in text  # the band, with what sets its low end
    assert len(pages) == 2  # the check on one page, the inputs on the next


def test_resources_without_a_report_say_so(client):
    response = client.post("/v1/geometry?format=html", json=json.loads(
        (ROOT / "examples" / "geometry_request.json").read_text()))
    assert response.status_code == 422 and response.json["errors"][0]["field"] == "format"


def _chromium() -> str:
    found = shutil.which("chromium") or shutil.which("chromium-browser")
    if found is None:
        if os.environ.get("CI"):
            pytest.fail("Debian's chromium is missing: .ci/run installs it with apt-get")
        pytest.skip("headless chromium not installed (apt-get install chromium)")
    return found


def _printed_by_chromium(html: str, folder: Path) -> list[str]:
    """The pages' text of ``html`` printed to PDF by headless chromium (self-contained: nothing fetched)."""
    assert "<script" not in html and "<link" not in html and 'src="http' not in html
    page = folder / "report.html"
    page.write_text(html)
    printed = folder / "report.pdf"
    subprocess.run([_chromium(), "--headless", "--no-sandbox", "--disable-gpu", "--no-pdf-header-footer",
                    f"--user-data-dir={folder / 'profile'}", f"--print-to-pdf={printed}", page.as_uri()],
                   check=True, timeout=120, capture_output=True)
    return _pages(printed.read_bytes())


@pytest.mark.slow
def test_html_report_printed_by_headless_chromium(client, scale_up, tmp_path):
    response = client.post("/v1/scale-up?format=html", json=DEMO)
    assert response.status_code == 200 and response.mimetype == "text/html"
    pages = _printed_by_chromium(response.get_data(as_text=True), tmp_path)
    _assert_one_page_per_scale(pages, [scale["name"] for scale in scale_up["scales"]])
    assert _canonical_hash(DEMO) in "".join(pages[0].split())  # the hash may wrap: compare without spaces


# ---------------------------------------------------------------- screening, jacket sizing, operating window
# The oracle of each number printed is the same request's JSON answer, rounded as a person reads it
# (3 significant figures for margins, 4 for quantities, thousands separated); cautions on every page.

SIZING = json.loads((ROOT / "examples" / "jacket_sizing_request.json").read_text())
WINDOW = json.loads((ROOT / "examples" / "operating_window_production.json").read_text())


def _four(value: float) -> str:
    """4 significant figures as printed: trailing zeros kept; from 1,000 to 1e7 whole, thousands separated."""
    assert 1e-4 <= abs(value) < 1e7
    if abs(value) < 1e3:
        return f"{value:#.4g}"
    return f"{float(f'{value:.4g}'):,.0f}"


@pytest.fixture(scope="module")
def plant_client(tmp_path_factory):
    from api import create_app
    from plant import load_plant

    folder = tmp_path_factory.mktemp("plant")
    application = create_app({"TESTING": True, "DATABASE_URL": f"sqlite:///{folder}/catalogue.sqlite3"})
    client = application.test_client()
    load_plant(client)
    yield client
    application.extensions["coolmargin.catalogue"].dispose()


_BAND = r"(?:-|[0-9.,]+-[0-9.,]+)"  # the margin band column: "low-high", or "-" where there is none


def _flat_text(pdf: bytes) -> tuple[list[str], str]:
    pages = _pages(pdf)
    return pages, " ".join(" ".join(pages).split())


def test_screening_report_reads_back_the_ranked_rows(plant_client):
    body = {"step": {"ref": "AC-7-FAST"}}
    created = plant_client.post("/v1/screenings?format=pdf", json=body)
    assert created.status_code == 201 and created.mimetype == "application/pdf"
    stored = plant_client.get(created.headers["Location"]).json  # the same screening as JSON
    pages, text = _flat_text(created.data)
    assert all(CAUTION in " ".join(page.split()) for page in pages)
    assert _canonical_hash(body) in text
    counts = stored["counts"]
    assert (f"{counts['adequate']} of {counts['screened']} vessels ADEQUATE for this step, "
            f"{counts['not_adequate']} NOT ADEQUATE, {counts['no_verdict']} without a verdict") in text
    for row in stored["rows"]:
        if row["margin"] is None:
            assert f"{row['rank']} {row['name']} {row['verdict']}" in text
            assert f"{row['tag']}: {row['problem']['message']}" in text  # why there is no verdict
            continue
        verdict = "adequate" if row["adequate"] else "NOT ADEQUATE"
        # margin, its band ("-" where none), minimum dosing time
        assert re.search(re.escape(f"{row['rank']} {row['name']} {verdict} {row['margin']:#.3g} ") + _BAND
                         + re.escape(f" {_four(row['minimum_dosing_time'])}"), text), row["tag"]
        assert row["controlling"].replace("_", " ") in text
    assert "AC-7-FAST revision" in text and "GLY-5 rev." in text  # the records and revisions used
    # a stored screening gives the same report (inputs as given: the request it ran)
    again = _pages(plant_client.get(created.headers["Location"] + "?format=pdf").data)
    assert _canonical_hash(body) in " ".join(" ".join(again).split())


def _answer_and_report(client, path: str, body: dict, query: str = "") -> tuple[dict, str]:
    """The JSON answer and the PDF report's text (the cautions checked on every page) of one request."""
    answer = client.post(f"{path}?{query}", json=body).json
    response = client.post(f"{path}?format=pdf&{query}", json=body)
    assert response.status_code == 200 and response.mimetype == "application/pdf"
    pages, text = _flat_text(response.data)
    assert all(CAUTION in " ".join(page.split()) for page in pages)
    return answer, text


def test_sizing_report_reads_back_the_recommendation_and_every_candidate(client):
    answer, text = _answer_and_report(client, "/v1/jacket-sizing", SIZING)
    best = answer["candidates"][answer["recommendation"]["index"]]
    assert (f"RECOMMENDED: {' '.join(answer['recommendation']['description'].split())} "
            f"(margin {best['margin']:#.3g} against 1.30)") in text
    assert " ".join(answer["recommendation"]["reasoning"].split()) in text
    assert f"duty = heat load x safety factor {_four(answer['duty'])} W" in text
    every = text[text.index("Every candidate evaluated"):]
    for candidate in answer["candidates"]:  # every candidate, in order, with its margin and capacity
        assert re.search(re.escape(f"{candidate['margin']:#.3g} ") + _BAND
                         + re.escape(f" {_four(candidate['cooling_capacity'])}"), every), candidate["index"]


def test_window_report_reads_back_the_current_point_and_boundary(client):
    answer, text = _answer_and_report(client, "/v1/operating-window", WINDOW, "output_units=metric")
    current = answer["current"]
    assert f"Current point ADEQUATE: margin {current['margin']:#.3g} against 1.30 required" in text
    assert f"share of the grid adequate {100 * answer['adequate_share']:#.3g} %" in text
    assert "heat_release.dosing_time [min]" in text and "heat load [kW]" in text  # the output units asked for
    assert answer["boundary"]
    for point in answer["boundary"]:  # each boundary point: dosing time (min) and heat load (kW), 4 figures
        assert f"{_four(point['dosing_time'])} " in text and f" {_four(point['heat_load'])} " in text


@pytest.mark.slow
def test_screening_html_printed_by_headless_chromium(plant_client, tmp_path):
    body = {"step": {"ref": "AC-7-PROD"}}
    response = plant_client.post("/v1/screenings?format=html", json=body)
    assert response.status_code == 201 and response.mimetype == "text/html"
    stored = plant_client.get(response.headers["Location"]).json
    pages = _printed_by_chromium(response.get_data(as_text=True), tmp_path)
    assert all(CAUTION in " ".join(p.split()) for p in pages)
    text = " ".join(" ".join(pages).split())
    assert _canonical_hash(body) in "".join(text.split())
    first = " ".join(pages[0].split())  # the ranked table is on the first printed page
    for row in stored["rows"]:
        margin = "-" if row["margin"] is None else f"{row['margin']:#.3g}"
        assert f"{row['rank']} {row['name']}" in first and margin in first
