"""Small helpers behind the messages: suggestions, key paths, values in words."""

from __future__ import annotations

import pytest

from routeplan.route.checks import suggest
from routeplan.route.schema import describe_value, keys_of, model_at
from routeplan.route.yamlpos import format_path


@pytest.mark.parametrize("name,choices,formulas,expected", [
    ("Ac20", ["Ac2O", "AcOH"], None, "did you mean 'Ac2O'?"),
    ("acoh", ["Ac2O", "AcOH"], None, "did you mean 'AcOH'?"),          # case only
    ("H2O", ["water", "EtOH"], {"water": "H2O"}, "did you mean 'water' (formula H2O)?"),
    ("zzz", ["water", "EtOH"], {"water": "H2O"}, None),
])
def test_suggest(name, choices, formulas, expected):
    assert suggest(name, choices, formulas=formulas) == expected


@pytest.mark.parametrize("path,text", [
    (("steps", 2, "charges", 1, "equiv"), "steps[2].charges[1].equiv"),
    (("materials", "Na-salt", "assay"), "materials.Na-salt.assay"),
    (("materials", "K Br"), 'materials["K Br"]'),
    (("materials", "Pd(OAc)2"), 'materials["Pd(OAc)2"]'),
    ((), ""),
])
def test_format_path(path, text):
    assert format_path(path) == text


@pytest.mark.parametrize("value,text", [
    (-1, "-1"), (1.5, "1.5"), ("1,5 kg", "'1,5 kg'"), (None, "nothing (an empty value)"), (True, "true"),
    ([1], "a list"), ({"a": 1}, "a mapping"),
])
def test_describe_value(value, text):
    assert describe_value(value) == text


def test_model_at_follows_lists_and_mappings():
    assert model_at(()).__name__ == "RouteFile"
    assert model_at(("materials", "anything", "solution")).__name__ == "SolutionModel"
    assert model_at(("steps", 3, "yield")).__name__ == "YieldModel"
    assert model_at(("steps", 3, "nope")) is None
    assert keys_of(model_at(("steps", 0)))[:4] == ["id", "name", "equation", "limiting"]
    assert "yield" in keys_of(model_at(("steps", 0)))
    assert "demonstrated_batch" in keys_of(model_at(("steps", 0)))
