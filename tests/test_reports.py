"""Printable reports: self-contained HTML printed by a real browser, and the PDF read back as text.

What a reviewer needs on paper (inputs as given, results, limits, warnings, cautions, version, date,
request hash) and one printed page per scale. The browser is Debian's chromium, headless; .ci/run
installs it. The request hash is re-derived here with hashlib from the canonical JSON (RFC 8785 in
spirit: sorted keys, no spaces), not taken from the code under test.
"""
import hashlib
import json
import os
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


@pytest.mark.slow
def test_html_report_printed_by_headless_chromium(client, scale_up, tmp_path):
    response = client.post("/v1/scale-up?format=html", json=DEMO)
    assert response.status_code == 200 and response.mimetype == "text/html"
    html = response.get_data(as_text=True)
    # Self-contained: no scripts, no stylesheets or images fetched from anywhere.
    assert "<script" not in html and "<link" not in html and 'src="http' not in html
    page = tmp_path / "report.html"
    page.write_text(html)
    printed = tmp_path / "report.pdf"
    subprocess.run([_chromium(), "--headless", "--no-sandbox", "--disable-gpu", "--no-pdf-header-footer",
                    f"--user-data-dir={tmp_path / 'profile'}", f"--print-to-pdf={printed}", page.as_uri()],
                   check=True, timeout=120, capture_output=True)
    pages = _pages(printed.read_bytes())
    _assert_one_page_per_scale(pages, [scale["name"] for scale in scale_up["scales"]])
    assert _canonical_hash(DEMO) in "".join(pages[0].split())  # the hash may wrap: compare without spaces
