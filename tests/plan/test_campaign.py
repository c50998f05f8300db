"""Campaign sizing worked by hand: step volumes, batches, fill, carry-over, warnings."""

import math

import pytest

import routeplan

from conftest import run_cli, words, write_route
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

ROUTE = """
route: two steps, the first telescoped
target: {material: P, amount: 20 kg}
materials:
  A: {molar_mass: 100 g/mol}
  I: {molar_mass: 150 g/mol}
  P: {molar_mass: 200 g/mol}
  solv1: {molar_mass: 72 g/mol, density: 0.8 g/mL}
  solv2: {molar_mass: 18 g/mol, density: 1.0 g/mL}
equipment:
  R100: {volume: 100 L, max_fill: 80 %}
  R50: {volume: 50 L}
steps:
  - id: S1
    equation: A -> I
    yield: 100 %
    isolated: false
    vessel: R100
    charges:
      - {material: A}
      - {material: solv1, volumes: 5}
  - id: S2
    equation: I -> P
    yield: 100 %
    vessel: R50
    demonstrated_batch: 0.5 kg
    charges:
      - {material: I}
      - {material: solv2, volumes: 2, role: workup}
"""


@pytest.fixture(scope="module")
def plan():
    return plan_route(load_route_text(ROUTE, "campaign.yaml"))


def test_step_volume_and_one_batch(plan):
    s1 = plan.step("S1")
    # n(P) = 20 kg / 200 g/mol = 100 mol = n(I) = n(A); A: 10 kg (no density: left out, noted)
    # solv1: 5 L/kg * 10 kg = 50 L; vessel R100 holds 100 L * 0.80 = 80 L: ceil(50/80) = 1 batch
    assert math.isclose(s1.batch.step_volume.m_as("L"), 50.0)
    assert s1.batch.batches == 1
    assert math.isclose(s1.batch.fill_fraction, 0.50)  # 50 L of 100 L nominal
    assert [c.V_L for c in s1.charges if c.material == "A"] == [None]  # named in the notes of the views


def test_telescoped_volume_is_carried_in(plan):
    s2 = plan.step("S2")
    # carried in from S1: 50 L; solv2 (work-up, counted): 2 L/kg * 15 kg of I = 30 L; total 80 L
    # R50 holds 50 L * 0.80 (default max_fill) = 40 L: ceil(80 / 40) = 2 batches of 40 L, fill 80 %
    assert math.isclose(s2.batch.step_volume.m_as("L"), 80.0)
    assert s2.batch.batches == 2
    assert math.isclose(s2.batch.batch_volume.m_as("L"), 40.0)
    assert math.isclose(s2.batch.fill_fraction, 0.80)
    assert [c.carried_from for c in s2.charges if c.carried_from] == ["S1"]


def test_per_batch_charges_in_json(plan):
    doc = routeplan.plan_to_dict(plan)
    s2 = doc["steps"][1]
    assert s2["batches"] == 2 and s2["batch_volume_L"] == pytest.approx(40.0)
    assert s2["fill_fraction"] == pytest.approx(0.8)
    solv2 = s2["charges"][1]
    # 30 kg of solv2 over two batches: 15 kg, 15 L per batch
    assert solv2["per_batch"] == pytest.approx({"mol": 30000 / 18 / 2, "mass_kg": 15.0, "volume_L": 15.0})


def test_scale_up_jump_is_warned(plan):
    # a batch charges 15 kg / 2 = 7.5 kg of I, 15 times the 0.5 kg run so far (> 10 times)
    texts = [w.message for w in plan.warnings]
    assert any("S2" in t and "15 times" in t for t in texts), texts


def test_small_fill_is_warned():
    text = ROUTE.replace("R100: {volume: 100 L, max_fill: 80 %}", "R100: {volume: 1000 L, max_fill: 80 %}")
    plan = plan_route(load_route_text(text, "big.yaml"))
    # 50 L in a 1000 L vessel fills 5 %, below 20 % (common practice, no source)
    assert math.isclose(plan.step("S1").batch.fill_fraction, 0.05)
    assert any("fills 5 % of vessel" in w.message and "too little to stir" in w.message for w in plan.warnings)


def test_step_without_vessel_is_one_batch():
    text = ROUTE.replace("    vessel: R50\n", "")
    plan = plan_route(load_route_text(text, "novessel.yaml"))
    assert plan.step("S2").batches == 1
    assert plan.step("S2").batch.fill_fraction is None


def test_doubling_target_keeps_per_batch_rule(plan):
    plan2 = plan_route(plan.route, "40 kg")
    # 160 L in S2: ceil(160 / 40) = 4 batches of 40 L
    assert plan2.step("S2").batches == 4
    assert math.isclose(plan2.step("S2").batch.batch_volume.m_as("L"), 40.0)


def test_terminal_shows_batches(tmp_path):
    path = write_route(tmp_path, ROUTE)
    result = run_cli("plan", path)
    assert result.exit_code == 0, result.output
    assert "2 batches of 40.00 L" in words(result.stdout)  # 4 significant figures, folded to the width
    assert "m/batch [kg]" in result.stdout


def test_plan_strict_turns_campaign_warnings_into_errors(tmp_path):
    path = write_route(tmp_path, ROUTE)
    loose = run_cli("plan", path, "--json", "-")
    assert loose.exit_code == 0
    assert "warning:" in loose.stderr and "15 times the largest batch" in loose.stderr
    strict = run_cli("plan", path, "--strict")
    assert strict.exit_code == 2
    assert "15 times the largest batch" in strict.stderr
    assert "Traceback" not in strict.output


def test_many_batches_are_warned():
    # R50 written as 50 mL: 80 L in 0.05 L * 0.8 = 0.04 L batches -> 2000 batches
    text = ROUTE.replace("R50: {volume: 50 L}", "R50: {volume: 50 mL}")
    plan = plan_route(load_route_text(text, "ml.yaml"))
    assert plan.step("S2").batches == 2000
    texts = [w.render() for w in plan.warnings]
    assert any("needs 2000 batches in vessel R50 (0.05 L)" in t and "ml.yaml:" in t for t in texts), texts
