"""The route file's JSON Schema, checked with the ``jsonschema`` package as an independent
validator: it accepts every demo route and the test route, and rejects typical mistakes that
routeplan itself rejects too."""

from __future__ import annotations

import copy
from pathlib import Path

import jsonschema
import pytest

from conftest import GOOD_ROUTE
from routeplan.errors import RouteError
from routeplan.route.jsonschema import route_json_schema
from routeplan.route.load import load_route_text
from routeplan.route.yamlpos import read_yaml

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"


def _data(path: Path):
    data, _, problems = read_yaml(path.read_text(encoding="utf-8"), str(path))
    assert not problems
    return data


def _routes_in(folder: Path) -> list[Path]:
    """Route files in ``folder`` (files with top-level 'steps'; a stock list is not a route)."""
    return sorted(p for p in folder.glob("*.yaml") if isinstance(d := _data(p), dict) and "steps" in d)


@pytest.fixture(scope="module")
def validator():
    schema = route_json_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


@pytest.fixture(scope="module")
def good():
    return _data(GOOD_ROUTE)


def test_schema_is_a_valid_draft_2020_12_schema(validator):
    assert validator.schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_demo_routes_are_valid(validator):
    routes = _routes_in(DEMO)
    assert routes, "demo_routes/ must hold at least one route file"
    for path in routes:
        errors = [e.message for e in validator.iter_errors(_data(path))]
        assert errors == [], f"{path.name}: {errors}"


def test_the_test_route_is_valid(validator, good):
    assert list(validator.iter_errors(good)) == []


def _set(data, path, value):
    node = data
    for part in path[:-1]:
        node = node[part]
    if value is DELETE:
        del node[path[-1]]
    else:
        node[path[-1]] = value


DELETE = object()

BAD = [
    ("unknown top-level key", ("currancy",), "EUR"),
    ("misspelt step key", ("steps", 0, "yeild"), "88 %"),
    ("misspelt charge key", ("steps", 0, "charges", 2, "equv"), 1.1),
    ("missing equation", ("steps", 0, "equation"), DELETE),
    ("missing target amount", ("target", "amount"), DELETE),
    ("yield as a bare number", ("steps", 1, "yield"), 88),
    ("amount without unit", ("target", "amount"), 10),
    ("decimal comma", ("target", "amount"), "10,5 kg"),
    ("negative equiv", ("steps", 0, "charges", 2, "equiv"), -1),
    ("role misspelt", ("steps", 0, "charges", 3, "role"), "work-up"),
    ("material key with a space", ("materials", "Ac 2O"), {"formula": "C4H6O3"}),
    ("currency lower case", ("currency",), "eur"),
    ("format 2", ("format",), 2),
    ("isolated as text", ("steps", 2, "isolated"), "yes"),
    ("no steps", ("steps",), []),
    ("empty value", ("materials", "Ac2O", "density"), None),
    ("solution without density", ("materials", "HCl6M", "solution", "density"), DELETE),
]


@pytest.mark.parametrize("path,value", [b[1:] for b in BAD], ids=[b[0] for b in BAD])
def test_schema_rejects_what_routeplan_rejects(validator, good, path, value):
    data = copy.deepcopy(good)
    _set(data, path, value)
    assert list(validator.iter_errors(data)), "the JSON Schema accepted it"
    import json

    with pytest.raises(RouteError):
        load_route_text(json.dumps(data), "mutant.json.yaml")


@pytest.mark.parametrize("value", ["85 %", "85%", "85 percent", 0.85, 1, "0.85"])
def test_percent_forms(validator, good, value):
    data = copy.deepcopy(good)
    data["steps"][1]["yield"] = value
    assert list(validator.iter_errors(data)) == []
    data["steps"][1]["yield"] = {"expected": value, "low": "80 %"}
    assert list(validator.iter_errors(data)) == []


def test_quantities_are_strings_with_any_unit(validator, good):
    data = copy.deepcopy(good)
    data["target"]["amount"] = "55 lb"
    data["equipment"]["R250"]["volume"] = "66 gal"
    assert list(validator.iter_errors(data)) == []
