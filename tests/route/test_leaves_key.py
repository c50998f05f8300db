"""``steps[].charges[].leaves``: only a work-up charge can leave; bad input is a located
error (exit 2, file:line:column, the key, no traceback); good input loads and plans."""

from __future__ import annotations

import pytest

from conftest import route_text, run_cli, write_route
from route_edits import change, line_of

WASH = route_text("telescoped-wash.yaml")

CASES = [
    # id, old, new, marker of the line, words of the message
    ("the limiting reagent", "{material: BzCl}", "{material: BzCl, leaves: true}", "{material: BzCl",
     "the limiting reagent 'BzCl' cannot leave"),
    ("another reactant", "{material: Et3N, equiv: 1.2}", "{material: Et3N, equiv: 1.2, role: workup, leaves: true}",
     "{material: Et3N", "'Et3N' is a reactant of the equation, consumed by the reaction"),
    ("the intermediate carried in", "      - {material: ester}\n", "      - {material: ester, leaves: true}\n",
     "{material: ester", "the limiting reagent 'ester' cannot leave"),
    ("a solvent by default", "{material: toluene, volumes: 5}", "{material: toluene, volumes: 5, leaves: true}",
     "{material: toluene", "this line of 'toluene' is a solvent, and only a work-up charge leaves"),
    ("a catalyst", "{material: toluene, volumes: 5}", "{material: toluene, volumes: 5, role: catalyst, leaves: true}",
     "{material: toluene", "is a catalyst"),
]


@pytest.mark.parametrize("name, old, new, marker, words", CASES, ids=[c[0] for c in CASES])
def test_what_cannot_leave_is_a_located_error(tmp_path, name, old, new, marker, words):
    text = change(WASH, [(old, new)])
    path = write_route(tmp_path, text)
    for command in ("check", "plan"):
        result = run_cli(command, path)
        assert result.exit_code == 2, result.output
        assert f"{path}:{line_of(text, marker)}:" in result.stderr, result.stderr
        assert "error: " in result.stderr and "leaves: " in result.stderr, result.stderr
        assert words in result.stderr and "drop 'leaves'" in result.stderr, result.stderr
        assert "Traceback" not in result.output


def test_leaves_must_be_true_or_false(tmp_path):
    # YAML 1.2: 'yes' is a string, not a boolean
    text = change(WASH, [("leaves: true}", "leaves: yes}")])
    path = write_route(tmp_path, text)
    result = run_cli("check", path)
    assert result.exit_code == 2
    assert f"{path}:{line_of(text, 'leaves: yes')}:" in result.stderr and "leaves" in result.stderr, result.stderr
    assert "Traceback" not in result.output


def test_leaves_on_an_isolated_step_is_allowed(tmp_path):
    # there it only changes the fullest volume of the step itself
    text = change(WASH, [("    isolated: false\n", "")])
    text = change(text, [("      - {material: ester}\n", "      - {material: ester}\n"
                                                           "      - {material: toluene, volumes: 5}\n")])
    result = run_cli("check", "--strict", write_route(tmp_path, text))
    assert result.exit_code == 0, result.output


def test_the_json_schema_knows_leaves():
    import jsonschema

    from routeplan.route.jsonschema import route_json_schema
    from routeplan.route.yamlpos import read_yaml

    schema = route_json_schema()
    validator = jsonschema.Draft202012Validator(schema)
    data, _, _ = read_yaml(WASH, "telescoped-wash.yaml")
    assert list(validator.iter_errors(data)) == []
    data["steps"][0]["charges"][-1]["leaves"] = "yes"
    assert list(validator.iter_errors(data))
    text = run_cli("schema").stdout
    assert '"leaves"' in text and "separated and discarded" in text
