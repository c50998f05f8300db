"""The route file's phase, conditions, dosing and thermal keys: bad input is a located
error (exit 2, file:line:column, the key, no traceback); good input loads."""

from __future__ import annotations

from pathlib import Path

import pytest

from conftest import run_cli, write_route

BASE = Path(__file__).resolve().parents[1] / "data" / "routes" / "safety.yaml"


def line_of(text: str, marker: str) -> int:
    return next(i for i, t in enumerate(text.splitlines(), 1) if marker in t)


CASES = [
    # id, old, new, key path, marker of the line, words of the message
    ("enthalpy without per mol", "reaction_enthalpy: -132 kJ/mol", "reaction_enthalpy: -132 kJ",
     "steps[0].thermal.reaction_enthalpy", "reaction_enthalpy:", "is an energy, but a molar enthalpy"),
    ("heat capacity without kelvin", "heat_capacity: 2.0 kJ/(kg*K)", "heat_capacity: 2.0 kJ/kg",
     "steps[0].thermal.heat_capacity", "heat_capacity:", "but a heat capacity such as '1.9 kJ/(kg*K)'"),
    ("temperature without unit", "max_technical_temperature: 60 degC", "max_technical_temperature: 60",
     "steps[0].thermal.max_technical_temperature", "max_technical_temperature:", "has no unit"),
    ("condition temperature without unit", "{temperature: 25 degC, pressure: 1 bar}",
     "{temperature: 25, pressure: 1 bar}", "steps[0].conditions.temperature", "conditions:", "has no unit"),
    ("pressure of the wrong kind", "pressure: 1 bar}", "pressure: 1 L}", "steps[0].conditions.pressure",
     "conditions:", "a pressure such as"),
    ("below absolute zero", "decomposition_temperature_24h: 120 degC", "decomposition_temperature_24h: -300 degC",
     "steps[0].thermal.decomposition_temperature_24h", "decomposition_temperature_24h", "absolute zero"),
    ("MTT below Tp", "max_technical_temperature: 60 degC", "max_technical_temperature: 20 degC",
     "steps[0].thermal.max_technical_temperature", "max_technical_temperature:",
     "the MTT 20 degC is below the process temperature Tp 25 degC"),
    ("dosing a material not charged", "dosing: {material: reag", "dosing: {material: CO2",
     "steps[0].dosing.material", "dosing:", "the dosed material 'CO2' is not charged in step G1"),
    ("accumulation without dosing", "    dosing: {material: reag, time: 2 h}\n", "",
     "steps[0].thermal.accumulation", "accumulation:", "accumulation applies to a dosed step only"),
    ("gas without formula", "    formula: CO2\n    phase: gas", "    phase: gas", "materials.CO2.phase",
     "phase: gas", "'CO2' is a gas (phase: gas) but has no formula or molar mass"),
    ("phase misspelt", "    phase: gas", "    phase: gaseous", "materials.CO2.phase", "phase: gaseous",
     "did you mean 'gas'"),
    ("dosing time missing", "dosing: {material: reag, time: 2 h}", "dosing: {material: reag}",
     "steps[0].dosing.time", "dosing:", "is required"),
    ("thermal without heat capacity", "      heat_capacity: 2.0 kJ/(kg*K)\n", "",
     "steps[0].thermal.heat_capacity", "reaction_enthalpy:", "no default is ever guessed"),
    ("thermal key misspelt", "      accumulation: 40 %", "      acumulation: 40 %",
     "steps[0].thermal.acumulation", "acumulation", "did you mean 'accumulation'"),
]


@pytest.mark.parametrize("name, old, new, key, marker, words", CASES, ids=[c[0] for c in CASES])
def test_bad_safety_keys_are_located_errors(tmp_path, name, old, new, key, marker, words):
    base = BASE.read_text(encoding="utf-8")
    assert base.count(old) == 1, "test bug: the text to change must occur once"
    text = base.replace(old, new)
    path = write_route(tmp_path, text)
    for command in ("check", "plan"):
        result = run_cli(command, path)
        assert result.exit_code == 2, result.output
        line = line_of(text, marker)
        assert f"{path}:{line}:" in result.stderr and "error: " in result.stderr, result.stderr
        assert f"{key}: " in result.stderr and words in result.stderr, result.stderr
        assert "Traceback" not in result.output


def test_a_positive_enthalpy_and_temperatures_below_zero_are_fine(tmp_path):
    text = BASE.read_text(encoding="utf-8").replace("-132 kJ/mol", "+40 kJ/mol").replace(
        "{temperature: 25 degC, pressure: 1 bar}", "{temperature: -10 degC, pressure: 1 bar}")
    result = run_cli("plan", write_route(tmp_path, text))
    assert result.exit_code == 0, result.output
    assert "MTSR -22.12 °C" in result.stdout  # -10 degC + 40 % x (-40 kJ/mol x 10 mol / (6.6 kg x 2 kJ/(kg K)))


def test_mtt_equal_to_tp_is_fine_reflux(tmp_path):
    text = BASE.read_text(encoding="utf-8").replace("max_technical_temperature: 60 degC",
                                                    "max_technical_temperature: 298.15 K")
    assert run_cli("check", write_route(tmp_path, text)).exit_code == 0


def test_the_json_schema_knows_the_new_keys():
    import jsonschema

    from routeplan.route.jsonschema import route_json_schema
    from routeplan.route.yamlpos import read_yaml

    schema = route_json_schema()
    data, _, _ = read_yaml(BASE.read_text(encoding="utf-8"), "safety.yaml")
    validator = jsonschema.Draft202012Validator(schema)
    assert list(validator.iter_errors(data)) == []
    data["steps"][0]["thermal"]["heat_kapacity"] = "2 kJ/(kg*K)"
    assert list(validator.iter_errors(data))
    del data["steps"][0]["thermal"]["heat_kapacity"]
    data["materials"]["CO2"]["phase"] = "vapour"
    assert list(validator.iter_errors(data))
    result = run_cli("schema")
    assert '"ThermalModel"' in result.stdout and '"reaction_enthalpy"' in result.stdout
