"""The plant catalogue over HTTP, on SQLite and on the real PostgreSQL (every test runs on both).

References: RFC 9110 §8.8.3 (ETag), §13.1.1 (If-Match, strong comparison) and §15.5.13 (412); RFC 6585 §3
(428 Precondition Required); RFC 9110 §15.3.2 (201 with Location); RFC 7396 (JSON Merge Patch); RFC 9457
(problem details). That an engineering record keeps every revision, with who and when, is common practice
(management of change), no source.
"""
from __future__ import annotations

import pytest

from plant import load_plant, record

R630 = "/v1/vessels/Puffin"


def _create_vessel(client, tag="Puffin"):
    body = record("vessel", "Puffin") | {"tag": tag, "utility": None}
    return client.post("/v1/vessels", json=body)


def test_create_answers_201_with_location_and_etag_and_reads_back(store_client):
    response = _create_vessel(store_client)
    assert response.status_code == 201  # RFC 9110 §15.3.2
    location, etag = response.headers["Location"], response.headers["ETag"]
    assert location == f"/v1/vessels/{response.json['id']}" and etag.startswith('"') and etag.endswith('"')
    again = store_client.get(location)
    assert again.status_code == 200 and again.headers["ETag"] == etag
    assert again.json["content"] == record("vessel", "Puffin") | {"utility": None}
    assert again.json["revision"] == 1 and again.json["author"] == "anonymous"
    assert store_client.get(R630).json["id"] == response.json["id"]  # by tag too


def test_changes_need_if_match_and_a_stale_etag_is_refused(store_client):
    first = _create_vessel(store_client).headers["ETag"]
    missing = store_client.patch(R630, json={"notes": "seal replaced"})
    assert missing.status_code == 428 and missing.mimetype == "application/problem+json"  # RFC 6585 §3
    assert missing.json["errors"][0]["field"] == "If-Match"
    changed = store_client.patch(R630, json={"notes": "seal replaced"}, headers={"If-Match": first})
    assert changed.status_code == 200 and changed.json["revision"] == 2
    second = changed.headers["ETag"]
    assert second != first
    stale = store_client.put(R630, json=record("vessel", "Puffin") | {"utility": None}, headers={"If-Match": first})
    assert stale.status_code == 412 and stale.headers["ETag"] == second  # RFC 9110 §13.1.1
    weak = store_client.patch(R630, json={"notes": "x"}, headers={"If-Match": "W/" + second})
    assert weak.status_code == 412  # weak entity tags never match If-Match (strong comparison)
    star = store_client.patch(R630, json={"notes": "y"}, headers={"If-Match": "*"})
    assert star.status_code == 200 and star.json["revision"] == 3
    # Longer than the contract's maxLength: a 422 naming the header, on delete too (found by contract fuzzing).
    long_tag = f'"{"x" * 300}", ' + star.headers["ETag"]
    for too_long in (store_client.patch(R630, json={"notes": "w"}, headers={"If-Match": long_tag}),
                     store_client.delete(R630, headers={"If-Match": long_tag})):
        assert too_long.status_code == 422 and too_long.json["errors"][0]["field"] == "If-Match"
    assert store_client.get(R630).json["revision"] == 3


def test_merge_patch_changes_only_what_it_names(store_client):
    etag = _create_vessel(store_client).headers["ETag"]
    patched = store_client.patch(R630, json={"vessel": {"agitator": {"speed": "110 rpm"}}, "notes": None},
                                 headers={"If-Match": etag, "Content-Type": "application/merge-patch+json"})
    assert patched.status_code == 200
    content = patched.json["content"]
    assert content["vessel"]["agitator"] == {"impeller": "pitched_blade_turbine", "diameter": "0.6 m",
                                             "speed": "110 rpm"}  # RFC 7396 §2: objects merge
    assert "notes" not in content and content["vessel"]["jacket"]["type"] == "half_pipe"


def test_invalid_content_is_refused_by_the_calculation_schemas(store_client):
    etag = _create_vessel(store_client).headers["ETag"]
    bad = store_client.patch(R630, json={"vessel": {"diameter": "-2 m"}}, headers={"If-Match": etag})
    assert bad.status_code == 422 and bad.json["errors"][0]["field"] == "vessel.diameter"
    no_utility = store_client.post("/v1/vessels", json=record("vessel", "Puffin") | {"tag": "R-9"})
    assert no_utility.status_code == 422 and no_utility.json["errors"][0]["field"] == "utility"
    assert store_client.get(R630).json["revision"] == 1  # nothing was written


def test_every_revision_stays_readable_and_retirement_keeps_history(store_client):
    etag = _create_vessel(store_client).headers["ETag"]
    for note in ("inspection 2026", "agitator seal"):
        etag = store_client.patch(R630, json={"notes": note}, headers={"If-Match": etag}).headers["ETag"]
    retired = store_client.delete(R630)
    assert retired.status_code == 200 and retired.json["retired"] and retired.json["revision"] == 4
    history = store_client.get(R630 + "/revisions").json["items"]
    assert [item["revision"] for item in history] == [1, 2, 3, 4]
    assert [item["content"].get("notes") for item in history] == [None, "inspection 2026", "agitator seal",
                                                                   "agitator seal"]
    old = store_client.get(R630 + "/revisions/2")
    assert old.json["content"]["notes"] == "inspection 2026" and "ETag" not in old.headers  # not current
    assert store_client.get("/v1/vessels").json["total"] == 0
    assert store_client.get("/v1/vessels?retired=true").json["total"] == 1
    assert store_client.patch(R630, json={"notes": "z"}, headers={"If-Match": "*"}).status_code == 409
    # the tag is free again for a new vessel; the retired one keeps its id and history
    assert _create_vessel(store_client).status_code == 201
    assert store_client.get(R630).json["revision"] == 1


def test_a_live_tag_names_one_record(store_client):
    assert _create_vessel(store_client).status_code == 201
    duplicate = _create_vessel(store_client)
    assert duplicate.status_code == 409 and duplicate.mimetype == "application/problem+json"


def test_missing_records_and_revisions_are_404(store_client):
    assert store_client.get("/v1/vessels/nope").status_code == 404
    _create_vessel(store_client)
    assert store_client.get(R630 + "/revisions/7").status_code == 404
    assert store_client.get("/v1/steps/Puffin").status_code == 404  # kinds do not mix


def test_list_filters_and_pages(store_client):
    load_plant(store_client)
    everything = store_client.get("/v1/vessels?limit=3")
    assert everything.json["total"] == 8 and len(everything.json["items"]) == 3
    tags = [item["tag"] for item in everything.json["items"]]
    following = store_client.get("/v1/vessels?limit=3&offset=3").json["items"]
    assert not set(tags) & {item["tag"] for item in following}
    # nominal volumes of the demo plant, from each vessel's own geometry: between 5 and 9 m^3 are
    # Puffin, Gannet (6.07 m^3) and Cormorant (8.3 m^3)
    middle = store_client.get("/v1/vessels?volume_min=5000 L&volume_max=9 m^3").json
    assert sorted(item["tag"] for item in middle["items"]) == ["Cormorant", "Gannet", "Puffin"]
    glass = store_client.get("/v1/vessels?material=glass_lined_steel").json["items"]
    assert sorted(item["tag"] for item in glass) == ["Egret", "Pelican"]
    half_pipe = store_client.get("/v1/vessels?jacket_type=half_pipe").json["items"]
    assert sorted(item["tag"] for item in half_pipe) == ["Albatross", "Cormorant", "Gannet", "Puffin"]
    half_pipe_p = store_client.get("/v1/vessels?jacket_type=half_pipe&tag=P*").json["items"]
    assert [item["tag"] for item in half_pipe_p] == ["Puffin"]  # Pelican starts with P but is annular
    bad = store_client.get("/v1/vessels?volume_min=3 kg")
    assert bad.status_code == 422 and bad.json["errors"][0]["field"] == "volume_min"
    assert store_client.get("/v1/utilities?material=x").status_code == 422
    csv = store_client.get("/v1/utilities?format=csv").get_data(as_text=True).splitlines()
    assert csv[0].startswith("tag,id,revision") and len(csv) == 5


@pytest.fixture()
def token_client(database_url):
    from api import create_app

    app = create_app({"TESTING": True, "DATABASE_URL": database_url,
                      "AUTH_TOKENS": "s3cret-writer-token alice write, s3cret-reader-token bob read"})
    yield app.test_client()
    app.extensions["coolmargin.catalogue"].dispose()


def test_writes_need_a_write_token_and_record_its_name(token_client):
    writer = {"Authorization": "Bearer s3cret-writer-token"}
    reader = {"Authorization": "Bearer s3cret-reader-token"}
    body = record("vessel", "Puffin") | {"utility": None}
    refused = token_client.post("/v1/vessels", json=body, headers=reader)
    assert refused.status_code == 403 and "bob" in refused.json["detail"]
    created = token_client.post("/v1/vessels", json=body, headers=writer)
    assert created.status_code == 201 and created.json["author"] == "alice"
    assert token_client.get(R630, headers=reader).status_code == 200  # reading is allowed
    assert token_client.delete(R630, headers=reader).status_code == 403
    assert token_client.get(R630).status_code == 401
