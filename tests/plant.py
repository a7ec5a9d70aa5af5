"""Record bodies of the demo plant (examples/plant.json) for the catalogue tests."""
from __future__ import annotations

import copy
import json

from serving import ROOT

PLANT = json.loads((ROOT / "examples" / "plant.json").read_text())


def record(kind: str, tag: str) -> dict:
    for item in PLANT["records"]:
        if item["kind"] == kind and item["content"]["tag"] == tag:
            return copy.deepcopy(item["content"])
    raise KeyError(tag)


def load_plant(client, headers: dict | None = None) -> None:
    """Create every record of the demo plant through the API (utilities first: vessels name them)."""
    order = {"utility": 0, "vessel": 1, "step": 2}
    for item in sorted(PLANT["records"], key=lambda item: order[item["kind"]]):
        path = {"vessel": "/v1/vessels", "utility": "/v1/utilities", "step": "/v1/steps"}[item["kind"]]
        response = client.post(path, json=item["content"], headers=headers or {})
        assert response.status_code == 201, response.json
