"""The workbench's side of the core: a design file turned into form values and
back is the same design (every demo design gives the same review), the schema
lists every key the loader knows, and bad form values name their key."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from lampcalc.api import handle
from lampcalc.errors import InputError
from lampcalc.fixture.check import check
from lampcalc.fixture.design import SCHEMA, WIRE_SPEC, parse_design
from lampcalc.fixture.workbench import design_schema, plan_for, to_doc, to_toml

DESIGNS = Path(__file__).resolve().parent.parent / "docs" / "designs"


@pytest.mark.parametrize("name", ["panel-230", "worklight-120", "panel-24v", "unsafe-demo"])
def test_form_round_trip_keeps_the_design(name: str) -> None:
    text = (DESIGNS / f"{name}.toml").read_text(encoding="utf-8")
    again = to_toml(to_doc(text))
    a, b = check(parse_design(text)), check(parse_design(again))
    assert [c["status"] for c in a["checks"]] == [c["status"] for c in b["checks"]]
    assert a["nominal"] == b["nominal"]
    assert to_doc(again) == to_doc(text)


def test_schema_lists_every_key() -> None:
    s = design_schema()
    listed = {(t["name"], k["name"]) for t in s["tables"] for k in t["keys"]}
    assert listed == {(t, k) for t, spec in SCHEMA.items() for k in spec}
    assert {k["name"] for k in s["wire"]} == set(WIRE_SPEC)
    required = {(t["name"], k["name"]) for t in s["tables"] for k in t["keys"] if k["required"]}
    assert ("mains", "voltage") in required and ("dropper", "capacitance") not in required


def test_lists_and_points_in_the_form() -> None:
    doc = {
        "tables": {
            "": {"name": "Lists"},
            "module": {"points": "20 mA @ 2.72 V; 60 mA @ 2.80 V", "current_max": "60 mA"},
            "dropper": {"steps": "1 uF; 1.47 uF", "capacitance": "1.47 uF"},
            "array": {"series": "30", "parallel": 2},
        },
        "wires": [{"name": "cord", "size": "0.75 mm2", "length": "2 m", "carries": "line"}],
    }
    text = to_toml(doc)
    assert 'points = [["20 mA", "2.72 V"], ["60 mA", "2.80 V"]]' in text
    assert 'steps = ["1 uF", "1.47 uF"]' in text
    assert "series = 30" in text and "[[wire]]" in text
    back = to_doc(text)
    assert back["tables"]["module"]["points"] == "20 mA @ 2.72 V; 60 mA @ 2.80 V"


def test_bad_key_names_itself() -> None:
    with pytest.raises(InputError) as e:
        to_toml({"tables": {"dropper": {"capa city": "1 uF"}}, "wires": []})
    assert e.value.field == "dropper.capa city"


def test_requests_through_the_entry_point() -> None:
    text = (DESIGNS / "panel-230.toml").read_text(encoding="utf-8")
    doc = json.loads(handle(json.dumps({"kind": "design_doc", "toml": text})))
    assert doc["ok"]
    back = json.loads(handle(json.dumps({"kind": "design_toml", "doc": doc["doc"]})))
    assert back["ok"] and parse_design(back["toml"]).name == parse_design(text).name
    bad = json.loads(handle(json.dumps({"kind": "design_doc", "toml": "name = ["})))
    assert not bad["ok"] and bad["errors"][0]["field"] == "design"


def test_plan_from_the_form() -> None:
    text = (DESIGNS / "panel-230.toml").read_text(encoding="utf-8")
    body = plan_for(to_doc(text), {"modules": "24", "supply": "dropper"})
    assert body["ok"] and body["design"]
    d = parse_design(body["design"])
    assert int(d.get("array", "series")) * int(d.get("array", "parallel")) == 24
    assert check(d)["failed"] == 0
    with pytest.raises(InputError) as e:
        plan_for(to_doc(text), {"modules": "many"})
    assert e.value.field == "modules"
