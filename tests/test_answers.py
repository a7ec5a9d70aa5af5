"""Answers keep the contract: CSV that a spreadsheet cannot run, units on every column, batches in every format.

References: OWASP "CSV Injection" (cells starting with =, +, -, @, tab or carriage return are read as
formulas; prefix them with a single quote); RFC 4180 (CSV).
"""
import copy
import csv
import io
import json

import pytest

from serving import ROOT

CHECK = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
SCALE = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())


def _rows(response) -> list[list[str]]:
    assert response.status_code == 200 and response.mimetype == "text/csv", response.get_data(as_text=True)[:300]
    return list(csv.reader(io.StringIO(response.get_data(as_text=True))))


@pytest.mark.parametrize("name", ['=HYPERLINK("http://example.invalid")', "+1+2", "-2+3", "@SUM(A1:A9)",
                                  "\tR-1", "\rR-1"])
def test_user_text_in_csv_cannot_start_a_formula(client, name):
    body = copy.deepcopy(SCALE)
    body["reference"]["name"] = name
    rows = _rows(client.post("/v1/scale-up?format=csv", json=body))
    assert rows[0][0] == "name"
    assert rows[1][0] == "'" + name  # OWASP: a leading single quote makes the cell text
    assert not any(cell.startswith(("=", "+", "@")) for row in rows[1:] for cell in row)


def test_negative_numbers_stay_numbers(client):
    body = copy.deepcopy(CHECK)
    body["heat_release"]["feed_temperature"] = "80 degC"  # hotter feed: negative feed_sensible
    rows = _rows(client.post("/v1/cooling-check?format=csv", json=body))
    column = rows[0].index("heat_load.feed_sensible [W]")
    assert float(rows[1][column]) < 0 and rows[1][column].startswith("-")


def test_indexed_columns_carry_their_unit(client):
    header = _rows(client.post("/v1/cooling-check?format=csv", json=CHECK))[0]
    indexed = [h for h in header if "[0]." in h and not h.endswith(("name", "note", "controlling", "type", "kind"))]
    assert "heat_transfer.streams[0].duty [W]" in header
    numeric = [h for h in indexed if "streams[0]" in h and h.split(".")[-1].split(" ")[0] in
               {"duty", "ua", "mass_flow", "inlet_temperature", "outlet_temperature"}]
    assert len(numeric) == 5 and all(h.endswith("]") for h in numeric)


def test_batch_answers_csv_a_row_per_case_and_field_a_line_per_case(client):
    bad = copy.deepcopy(CHECK)
    bad["vessel"]["diameter"] = -1
    batch = {"cases": [CHECK, bad]}
    rows = _rows(client.post("/v1/cooling-check?format=csv", json=batch))
    assert rows[0][:3] == ["case", "status", "problem"] and len(rows) == 3
    assert [r[1] for r in rows[1:]] == ["200", "422"] and "vessel.diameter" in rows[2][2]
    assert "margin" in rows[0] and "cooling_capacity [W]" in rows[0]
    same = _rows(client.post("/v1/cooling-check", json=batch, headers={"Accept": "text/csv"}))
    assert same == rows
    lines = client.post("/v1/cooling-check?field=adequate", json=batch).get_data(as_text=True).splitlines()
    assert lines[0] == "TRUE" and lines[1].startswith("error 422")  # booleans as spreadsheets read them
