"""Bulk catalogue movement, on SQLite and the real PostgreSQL: a vessel list from a spreadsheet CSV (unit row
or unit-bearing headers) and the whole catalogue as JSON, round-trip (export -> import into an empty
catalogue on the other backend -> export gives the same document, histories included).
Oracle for the CSV: the same vessel written as a JSON record must compute the same cooling check; CSV per
RFC 4180.
"""
from __future__ import annotations

import json

from api import cli
from api.storage import Catalogue
from plant import PLANT, load_plant, record

HEADERS_WITH_UNITS = (
    "tag,name,diameter [m],straight_side (m),bottom_head,wall.material,wall.thickness [mm],jacket.type,"
    "jacket.pipe_diameter [mm],jacket.pipe_pitch [mm],agitator.impeller,agitator.diameter [m],agitator.speed [rpm],"
    "fouling.process,fouling.service,utility\r\n"
    "Puffin,\"Puffin, 6.3 m3 production reactor\",1.8,2.2,torispherical_fd,stainless_316l,12,half_pipe,"
    "100,140,pitched_blade_turbine,0.6,90,0.00018,0.00035,GLY-5\r\n")
UNIT_ROW = (
    "tag,vessel.name,vessel.diameter,vessel.straight_side,vessel.bottom_head,wall.material,wall.thickness,"
    "jacket.type,jacket.gap,agitator.impeller,agitator.diameter,agitator.speed,utility\n"
    "units,,ft,m,,,mm,,mm,,in,rpm,\n"
    "T-101,storage tank with jacket,6,1.8,ellipsoidal_2_1,stainless_304,8,annular,50,hydrofoil,30,2 revolution/s,GLY-5\n"
    "T-102,second tank,1.5 m,1.8,flat,carbon_steel,10,annular,40,paddle,0.6 m,60,CW-24\n")


def _csv(client, text: str, query: str = ""):
    return client.post(f"/v1/vessels/import{query}", data=text.encode(), content_type="text/csv")


def test_a_spreadsheet_row_with_unit_headers_is_the_same_vessel_as_the_json_record(store_client):
    load_plant(store_client)
    store_client.delete("/v1/vessels/Puffin")
    imported = _csv(store_client, HEADERS_WITH_UNITS)
    assert imported.status_code == 201 and [r["tag"] for r in imported.json["created"]] == ["Puffin"]
    stored = store_client.get("/v1/vessels/Puffin").json["content"]
    assert stored["vessel"]["wall"]["thickness"] == "12 mm" and stored["vessel"]["agitator"]["speed"] == "90 rpm"
    body = {"vessel": {"ref": "Puffin"}, "step": {"ref": "AC-7-PROD"}}
    from_csv = store_client.post("/v1/cooling-check", json=body).get_json()
    step = record("step", "AC-7-PROD")
    inline = store_client.post("/v1/cooling-check", json={
        "vessel": record("vessel", "Puffin")["vessel"], "coolant": record("utility", "GLY-5")["coolant"],
        **{k: step[k] for k in ("charge", "process_temperature", "heat_release", "safety_factor")}}).get_json()
    assert from_csv["margin"] == inline["margin"]  # unit conversions are exact here: mm, m, rpm


def test_a_unit_row_applies_to_bare_numbers_and_cells_keep_their_own_units(store_client):
    load_plant(store_client)
    imported = _csv(store_client, UNIT_ROW)
    assert imported.status_code == 201, imported.json
    t101 = store_client.get("/v1/vessels/T-101").json["content"]["vessel"]
    assert t101["diameter"] == "6 ft" and t101["agitator"]["speed"] == "2 revolution/s"  # a cell's own unit wins
    assert t101["agitator"]["diameter"] == "30 in"
    listed = store_client.get("/v1/vessels?tag=T-*&volume_min=0.5").json["items"]
    # 6 ft = 1.8288 m (exact by definition of the foot); flat bottom, 1.8 m shell: V = pi/4 D^2 H for T-102
    assert {item["tag"] for item in listed} == {"T-101", "T-102"}
    again = _csv(store_client, UNIT_ROW)
    assert again.status_code == 200 and len(again.json["unchanged"]) == 2


def test_a_bad_cell_refuses_the_whole_file_naming_row_and_field(store_client):
    load_plant(store_client)
    bad = UNIT_ROW.replace("0.6 m,60,CW-24", "0.6 kg,60,CW-24").replace("T-101,storage", "T-101,storage")
    response = _csv(store_client, bad)
    assert response.status_code == 422 and response.mimetype == "application/problem+json"
    assert [e["field"] for e in response.json["errors"]] == ["row 4.vessel.agitator.diameter"]  # file line 4
    assert store_client.get("/v1/vessels?tag=T-*").json["total"] == 0  # nothing written
    assert _csv(store_client, "name,diameter\nx,1\n").status_code == 422  # no tag column
    wrong_type = store_client.post("/v1/vessels/import", json={"tag": "x"})
    assert wrong_type.status_code == 415


def test_replace_revises_existing_tags(store_client):
    load_plant(store_client)
    _csv(store_client, UNIT_ROW)
    changed = UNIT_ROW.replace(",60,CW-24", ",75,CW-24")
    kept = _csv(store_client, changed)
    assert kept.status_code == 200 and [r["tag"] for r in kept.json["existing"]] == ["T-102"]
    revised = _csv(store_client, changed, "?replace=true")
    assert [r["tag"] for r in revised.json["revised"]] == ["T-102"]
    assert store_client.get("/v1/vessels/T-102").json["revision"] == 2


def test_export_import_round_trip_keeps_every_revision(store_client, database_url, tmp_path):
    load_plant(store_client)
    etag = store_client.get("/v1/vessels/Cormorant").headers["ETag"]
    store_client.patch("/v1/vessels/Cormorant", json={"notes": "coil re-tubed"}, headers={"If-Match": etag})
    store_client.delete("/v1/vessels/Albatross")
    exported = tmp_path / "catalogue.json"
    assert cli.main(["export", "--database-url", database_url, str(exported)]) == 0
    document = json.loads(exported.read_text())
    assert len(document["records"]) == len(PLANT["records"])
    other = (f"sqlite:///{tmp_path}/other.sqlite3" if database_url.startswith("postgresql")
             else _postgres_copy_url(tmp_path))
    try:
        assert cli.main(["import", "--database-url", other, str(exported)]) == 0
        assert _export(other)["records"] == document["records"]
        assert cli.main(["import", "--database-url", other, "--if-empty", str(exported)]) == 0  # no-op
        assert _counts(other) == {"vessel": 8, "utility": 4, "step": 2}
    finally:
        _drop_copy(other)


def _export(url: str) -> dict:
    catalogue = Catalogue(url)
    try:
        return catalogue.export()
    finally:
        catalogue.dispose()


def _counts(url: str) -> dict:
    catalogue = Catalogue(url)
    try:
        return catalogue.counts()
    finally:
        catalogue.dispose()


def _postgres_copy_url(tmp_path) -> str:
    import uuid

    from sqlalchemy import create_engine, text

    from conftest import POSTGRES_URL, _postgres_schema_url

    schema = f"cm_copy_{uuid.uuid4().hex[:12]}"
    engine = create_engine(POSTGRES_URL)
    with engine.begin() as connection:
        connection.execute(text(f'CREATE SCHEMA "{schema}"'))
    engine.dispose()
    return _postgres_schema_url(schema)


def _drop_copy(url: str) -> None:
    if not url.startswith("postgresql"):
        return
    from sqlalchemy import create_engine, text

    from conftest import POSTGRES_URL

    schema = url.rsplit("%3D", 1)[1]
    engine = create_engine(POSTGRES_URL)
    with engine.begin() as connection:
        connection.execute(text(f'DROP SCHEMA "{schema}" CASCADE'))
    engine.dispose()


def test_import_refuses_a_foreign_or_invalid_file(tmp_path, database_url):
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps({"format": "something-else", "records": []}))
    assert cli.main(["import", "--database-url", database_url, str(bad)]) == 2
    invalid = dict(PLANT, records=[{"kind": "vessel", "content": {"tag": "X-1", "vessel": {"diameter": -1}}}])
    bad.write_text(json.dumps(invalid))
    assert cli.main(["import", "--database-url", database_url, str(bad)]) == 2
    assert _counts(database_url) == {}
