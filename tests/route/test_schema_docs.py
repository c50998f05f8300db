"""docs/route-file.md: its example is a valid route and it documents every key of the schema."""

from __future__ import annotations

import re
from pathlib import Path

import jsonschema
import pytest

from conftest import run_cli, write_route
from routeplan.route.jsonschema import route_json_schema
from routeplan.route.schema import (ChargeModel, ConditionsModel, ControlModel, DosingModel, MaterialModel, RouteFile,
                                    SolutionModel, StepModel, TargetModel, ThermalModel, VesselModel, YieldModel,
                                    keys_of)
from routeplan.route.yamlpos import read_yaml

DOC = Path(__file__).resolve().parents[2] / "docs" / "route-file.md"


@pytest.fixture(scope="module")
def doc() -> str:
    return DOC.read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def example(doc) -> str:
    return re.findall(r"```yaml\n(.*?)```", doc, re.S)[0]


def test_the_example_is_a_valid_route_without_warnings(tmp_path, example):
    result = run_cli("check", "--strict", write_route(tmp_path, example))
    assert result.exit_code == 0, result.output
    # A1 -> C1 and B1 -> C1 are equally long; B1 -> C1 has the lower expected yield
    # (0.90 x 0.86 < 0.92 x 0.86), the tie rule of docs/metrics.md
    assert "longest linear sequence: B1 -> C1 (2 steps)" in result.stdout


def test_the_example_passes_the_json_schema(example):
    data, _, problems = read_yaml(example, "example.yaml")
    assert not problems
    assert list(jsonschema.Draft202012Validator(route_json_schema()).iter_errors(data)) == []


@pytest.mark.parametrize("model", [RouteFile, TargetModel, MaterialModel, SolutionModel, VesselModel, StepModel,
                                   YieldModel, ChargeModel, ControlModel, ConditionsModel, DosingModel, ThermalModel],
                         ids=lambda m: m.__name__)
def test_every_key_is_documented(doc, model):
    missing = [k for k in keys_of(model) if f"`{k}`" not in doc]
    assert missing == []


def test_caution_intermediates_and_editor_setup_are_documented(doc):
    assert "assess the thermal and chemical hazards" in doc
    assert "An **intermediate** is a material that is the **main product**" in doc
    assert "# yaml-language-server: $schema=" in doc
    assert "routeplan schema -o" in doc
