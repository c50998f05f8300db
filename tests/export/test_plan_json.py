"""The JSON plan follows the contract of ROUTE-FORMAT.md ("Plan output as JSON")."""

import json
import math
from pathlib import Path

import pytest

import routeplan

from routeplan.cli import cli
from click.testing import CliRunner

ROOT = Path(__file__).resolve().parents[2]
LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"

NUM = (int, float)


def _plan_json(*extra):
    result = CliRunner().invoke(cli, ["plan", str(LINEAR), "--json", "-", *extra])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_contract_keys_and_types():
    doc = _plan_json()
    assert doc["format"] == "routeplan-plan/1"
    assert isinstance(doc["route"], str)
    t = doc["target"]
    assert t["material"] == "HX17" and isinstance(t["mass_kg"], NUM) and isinstance(t["mol"], NUM)
    assert [s["id"] for s in doc["steps"]] == ["S1", "S2", "S3", "S4", "S5"]  # execution order
    for s in doc["steps"]:
        assert isinstance(s["limiting"], str)
        assert set(s["product"]) >= {"material", "mol", "mass_kg"}
        assert 0 < s["yield"] <= 1
        for c in s["charges"]:
            assert set(c) >= {"material", "role", "equiv", "mol", "mass_kg", "volume_L"}
            assert c["role"] in {"reactant", "reagent", "catalyst", "solvent", "workup"}
            assert c["equiv"] is None or isinstance(c["equiv"], NUM)
            assert c["mol"] is None or isinstance(c["mol"], NUM)
            assert isinstance(c["mass_kg"], NUM) and c["mass_kg"] > 0
            assert c["volume_L"] is None or isinstance(c["volume_L"], NUM)
            # the campaign additions keep per-batch numbers consistent with the totals
            assert math.isclose(c["per_batch"]["mass_kg"] * s["batches"], c["mass_kg"], rel_tol=1e-12)
        assert isinstance(s["batches"], int) and s["batches"] >= 1
    for r in doc["raw_materials"]:
        assert isinstance(r["material"], str) and isinstance(r["mass_kg"], NUM)
        assert r["volume_L"] is None or isinstance(r["volume_L"], NUM)
    oy = doc["overall_yield"]
    assert oy["longest_linear_sequence"] == ["S1", "S2", "S3", "S4", "S5"]
    assert 0 < oy["yield"] < 1
    assert "hazards" in doc["caution"]


def test_json_numbers_match_the_definitions():
    doc = _plan_json("--target", "40 kg")
    # target: 40 kg * 1.02 overage; mol = 40.8 kg * 0.995 / M(C14H18N2O4)
    m = 14 * 12.011 + 18 * 1.008 + 2 * 14.007 + 4 * 15.999  # CIAAW 2021 abridged weights: 278.308 g/mol
    assert doc["target"]["mass_kg"] == pytest.approx(40.8, rel=1e-12)
    assert doc["target"]["mol"] == pytest.approx(40.8e3 * 0.995 / m, rel=1e-9)
    # raw totals are the sums of the step charges of bought materials
    sums = {}
    for s in doc["steps"]:
        for c in s["charges"]:
            if not c["intermediate"]:
                sums[c["material"]] = sums.get(c["material"], 0.0) + c["mass_kg"]
    assert {r["material"]: r["mass_kg"] for r in doc["raw_materials"]} == pytest.approx(sums, rel=1e-12)


def test_json_to_file_and_to_dict_agree(tmp_path):

    out = tmp_path / "plan.json"
    result = CliRunner().invoke(cli, ["plan", str(LINEAR), "--json", str(out), "--quiet"])
    assert result.exit_code == 0, result.output
    from_file = json.loads(out.read_text())
    from_api = routeplan.plan_to_dict(routeplan.plan_route(routeplan.load_route(LINEAR)))
    from_file.pop("source"), from_api.pop("source")
    assert from_file == json.loads(json.dumps(from_api))


def test_to_frame_has_every_charge():

    plan = routeplan.plan_route(routeplan.load_route(LINEAR))
    frame = routeplan.plan_frame(plan)
    assert len(frame) == sum(len(s.charges) for s in plan.steps)
    assert "mass [kg]" in frame.columns
    assert frame["mass [kg]"].sum() == pytest.approx(sum(c.mass.m_as("kg") for s in plan.steps for c in s.charges))
