"""Route metrics worked by hand: PMI (route, step, cumulative), E-factors, AE, RME, cost.

Every expected number is worked out in the comment beside it from the definitions in
``routeplan.plan.metrics`` (and docs/metrics.md).  Molar masses are given explicitly
where that keeps the arithmetic readable; the atom-economy check against a published
worked example uses formulas and our own atomic-weight table.
"""

import io
import json
import math

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from routeplan.plan.metrics import (
    Metrics,
    atom_economy,
    compute_metrics,
    cumulative_pmi,
    is_water,
    route_pmi,
    step_pmi,
)
from routeplan.views.metrics_text import metrics_lines
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route, load_route_text
from routeplan.route.model import Material, Solution
from routeplan.units import Q

_DEMO = Path(__file__).resolve().parents[2] / "demo_routes"
DEMOS = (str(_DEMO / "hx17-linear.yaml"), str(_DEMO / "hx17-convergent.yaml"))

# Two steps, every molar mass 100 g/mol so that 1 kg is 10 mol.
#   target: 0.8 kg of P = 8 mol.
#   S2 (yield 80 %): n(I) = 8 / 0.80 = 10 mol -> I 1 kg; R 1 equiv = 10 mol = 1 kg;
#       solv mass_ratio 8 -> 8 x 1 kg = 8 kg.  Inputs 1 + 1 + 8 = 10 kg (9 kg besides I).
#   S1 (yield 100 %) must make 10 mol of I: A 10 mol = 1 kg; B 1 equiv = 1 kg;
#       water mass_ratio 8 -> 8 kg (no role written: the default role of mass_ratio is
#       reagent, yet it is water).  Inputs 1 + 1 + 8 = 10 kg make 1 kg of I.
TWO_STEP = """
route: two steps by hand
currency: EUR
target: {material: P, amount: 0.8 kg}
materials:
  A: {molar_mass: 100 g/mol, price: 10}
  B: {molar_mass: 100 g/mol, price: 20}
  W: {molar_mass: 100 g/mol}
  I: {molar_mass: 100 g/mol}
  R: {molar_mass: 100 g/mol, price: 50}
  Z: {molar_mass: 100 g/mol}
  P: {molar_mass: 100 g/mol}
  water: {formula: H2O, price: 0.01}
  solv: {molar_mass: 92.14 g/mol, price: 2}
steps:
  - id: S1
    equation: A + B -> I + W
    yield: 100 %
    charges:
      - {material: A}
      - {material: B, equiv: 1}
      - {material: water, mass_ratio: 8}
  - id: S2
    equation: I + R -> P + Z
    yield: 80 %
    charges:
      - {material: I}
      - {material: R, equiv: 1}
      - {material: solv, mass_ratio: 8, role: solvent}
"""


@pytest.fixture(scope="module")
def two_step():
    return plan_route(load_route_text(TWO_STEP, "two-step.yaml"))


def test_two_step_masses_are_the_ones_worked_by_hand(two_step):
    s1, s2 = two_step.steps
    assert [c.mass.m_as("kg") for c in s1.charges] == pytest.approx([1.0, 1.0, 8.0], rel=1e-12)
    assert [c.mass.m_as("kg") for c in s2.charges] == pytest.approx([1.0, 1.0, 8.0], rel=1e-12)
    assert s1.product_mass.m_as("kg") == pytest.approx(1.0, rel=1e-12)
    assert two_step.target_mass.m_as("kg") == pytest.approx(0.8, rel=1e-12)


def test_route_pmi_is_not_the_sum_of_step_pmis(two_step):
    # step PMI: S1 10 kg / 1 kg = 10; S2 (1 + 9) kg / 0.8 kg = 12.5
    assert step_pmi(two_step.steps[0]) == pytest.approx(10.0, rel=1e-12)
    assert step_pmi(two_step.steps[1]) == pytest.approx(12.5, rel=1e-12)
    # route PMI: raw materials 1 + 1 + 8 + 1 + 8 = 19 kg per 0.8 kg = 23.75 (not 10 + 12.5 = 22.5)
    assert route_pmi(two_step) == pytest.approx(23.75, rel=1e-12)
    m = two_step.metrics
    assert m.pmi == pytest.approx(23.75, rel=1e-12)
    assert m.pmi != pytest.approx(sum(m.pmi_by_step.values()))
    # cumulative: S1 10 kg / 1 kg = 10; S2 19 kg / 0.8 kg = 23.75
    assert dict(m.pmi_cumulative_by_step) == pytest.approx({"S1": 10.0, "S2": 23.75}, rel=1e-12)


def test_e_factors_by_hand(two_step):
    m = two_step.metrics
    # cEF = PMI - 1 = 22.75
    assert m.e_factor_complete == pytest.approx(22.75, rel=1e-12)
    # sEF leaves out the solvent (8 kg) and the water (8 kg, though its role is reagent):
    # (A 1 + B 1 + R 1 - 0.8) / 0.8 = 2.2 / 0.8 = 2.75
    assert m.e_factor_simple == pytest.approx(2.75, rel=1e-12)


def test_atom_economy_and_reaction_mass_efficiency_by_hand(two_step):
    m = two_step.metrics
    # AE = 1 x 100 / (100 + 100) = 0.5 in both steps
    assert dict(m.atom_economy_by_step) == pytest.approx({"S1": 0.5, "S2": 0.5}, rel=1e-12)
    # RME S1 = 1 kg I / (1 kg A + 1 kg B) = 0.5; S2 = 0.8 kg P / (1 kg I + 1 kg R) = 0.4
    assert dict(m.reaction_mass_efficiency_by_step) == pytest.approx({"S1": 0.5, "S2": 0.4}, rel=1e-12)


def test_mass_per_kg_target_and_largest(two_step):
    m = two_step.metrics
    # A 1/0.8 = 1.25; B 1.25; water 8/0.8 = 10; R 1.25; solv 10 -- they add up to the PMI
    assert dict(m.mass_per_kg_target) == pytest.approx(
        {"A": 1.25, "B": 1.25, "water": 10.0, "R": 1.25, "solv": 10.0}, rel=1e-12)
    assert sum(m.mass_per_kg_target.values()) == pytest.approx(m.pmi, rel=1e-12)
    # water and solv tie at 8 kg; the first in order of use is reported
    assert m.largest_raw_material == ("water", pytest.approx(8.0, rel=1e-12))


def test_step_count_and_longest_linear_sequence(two_step):
    m = two_step.metrics
    assert m.step_count == 2
    assert m.longest_linear_sequence == ("S1", "S2")


def test_cost_per_kg_by_hand(two_step):
    m = two_step.metrics
    # A 1 kg x 10 + B 1 x 20 + water 8 x 0.01 + R 1 x 50 + solv 8 x 2
    #   = 10 + 20 + 0.08 + 50 + 16 = 96.08 EUR for 0.8 kg -> 120.1 EUR/kg
    assert m.cost_per_kg == pytest.approx(120.1, rel=1e-12)
    assert m.currency == "EUR"
    assert m.unpriced == () and m.cost_complete


def test_cost_over_priced_materials_only_names_the_unpriced():
    text = TWO_STEP.replace("solv: {molar_mass: 92.14 g/mol, price: 2}", "solv: {molar_mass: 92.14 g/mol}")
    plan = plan_route(load_route_text(text, "unpriced.yaml"))
    m = plan.metrics
    # without solv's 16 EUR: 80.08 EUR / 0.8 kg = 100.1 EUR/kg, over the priced materials only
    assert m.cost_per_kg == pytest.approx(100.1, rel=1e-12)
    assert m.unpriced == ("solv",) and not m.cost_complete
    d = m.to_dict()
    assert d["unpriced"] == ["solv"] and d["cost_complete"] is False
    text_lines = "\n".join(metrics_lines(m, plan.target_material))
    assert "priced materials only" in text_lines and "solv" in text_lines


def test_no_currency_no_cost():
    plan = plan_route(load_route_text(TWO_STEP.replace("currency: EUR\n", ""), "nocur.yaml"))
    assert plan.metrics.cost_per_kg is None and plan.metrics.currency is None
    assert plan.metrics.to_dict()["cost_per_kg"] is None
    assert any("no currency" in line for line in metrics_lines(plan.metrics, plan.target_material))


# Convergent: two branches meet in S3.  Every molar mass 100 g/mol (1 kg = 10 mol).
#   target 1 kg of P = 10 mol; S3 yield 50 % -> I1 20 mol = 2 kg; I2 1 equiv = 2 kg;
#       solv mass_ratio 2 -> 4 kg.  S3 inputs 8 kg -> 1 kg P: step PMI 8.
#   S1 (100 %) makes 20 mol I1: A 2 kg, X 2 kg, solv mass_ratio 3 -> 6 kg: 10 kg -> 2 kg, PMI 5.
#   S2 (100 %) makes 20 mol I2: C 2 kg, D 2 kg, water mass_ratio 2 -> 4 kg: 8 kg -> 2 kg, PMI 4.
#   route: raw materials 10 + 8 + 4 = 22 kg per 1 kg -> PMI 22; the naive sum 5 + 4 + 8 = 17.
CONVERGENT = """
route: convergent by hand
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  X: {molar_mass: 100 g/mol}
  C: {molar_mass: 100 g/mol}
  D: {molar_mass: 100 g/mol}
  I1: {molar_mass: 100 g/mol}
  I2: {molar_mass: 100 g/mol}
  W1: {molar_mass: 100 g/mol}
  W2: {molar_mass: 100 g/mol}
  Z: {molar_mass: 100 g/mol}
  P: {molar_mass: 100 g/mol}
  solv: {molar_mass: 78.11 g/mol}
  water: {formula: H2O}
steps:
  - id: S1
    equation: A + X -> I1 + W1
    yield: 100 %
    charges:
      - {material: A}
      - {material: X, equiv: 1}
      - {material: solv, mass_ratio: 3, role: solvent}
  - id: S2
    equation: C + D -> I2 + W2
    yield: 100 %
    charges:
      - {material: C}
      - {material: D, equiv: 1}
      - {material: water, mass_ratio: 2, role: workup}
  - id: S3
    equation: I1 + I2 -> P + Z
    yield: 50 %
    charges:
      - {material: I1}
      - {material: I2, equiv: 1}
      - {material: solv, mass_ratio: 2, role: solvent}
"""


def test_convergent_route_pmi_differs_from_the_sum_of_step_pmis():
    plan = plan_route(load_route_text(CONVERGENT, "convergent.yaml"))
    m = plan.metrics
    assert dict(m.pmi_by_step) == pytest.approx({"S1": 5.0, "S2": 4.0, "S3": 8.0}, rel=1e-12)
    assert m.pmi == pytest.approx(22.0, rel=1e-12)
    assert sum(m.pmi_by_step.values()) == pytest.approx(17.0, rel=1e-12)
    # cumulative: each branch counted once -- S1 10 kg / 2 kg = 5, S2 8 / 2 = 4, S3 22 / 1 = 22
    assert dict(m.pmi_cumulative_by_step) == pytest.approx({"S1": 5.0, "S2": 4.0, "S3": 22.0}, rel=1e-12)
    # sEF: A 2 + X 2 + C 2 + D 2 = 8 kg without solvents and water: (8 - 1) / 1 = 7
    assert m.e_factor_simple == pytest.approx(7.0, rel=1e-12)
    # longest linear sequence: two steps (S1 -> S3); three steps in all
    assert m.step_count == 3 and len(m.longest_linear_sequence) == 2


# An intermediate I feeds both S2 and S3: its raw materials must be shared, not counted twice.
SHARED = """
route: shared intermediate
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  B: {molar_mass: 100 g/mol}
  I: {molar_mass: 100 g/mol}
  J: {molar_mass: 200 g/mol}
  P: {molar_mass: 300 g/mol}
  solv: {molar_mass: 50 g/mol}
steps:
  - id: S1
    equation: A -> I
    yield: 90 %
    charges:
      - {material: A}
      - {material: solv, mass_ratio: 5, role: solvent}
  - id: S2
    equation: I + B -> J
    yield: 80 %
    charges:
      - {material: I}
      - {material: B, equiv: 1.2}
      - {material: solv, mass_ratio: 4, role: solvent}
  - id: S3
    equation: I + J -> P
    limiting: J
    yield: 70 %
    charges:
      - {material: J}
      - {material: I, equiv: 1.1}
      - {material: solv, mass_ratio: 3, role: solvent}
"""


def test_shared_intermediate_is_counted_once():
    plan = plan_route(load_route_text(SHARED, "shared.yaml"))
    cum = cumulative_pmi(plan)
    # the step making the target carries every raw material exactly once
    assert cum["S3"] == pytest.approx(route_pmi(plan), rel=1e-12)
    # and S1's share that goes to S2 counts in S2's cumulative PMI: more than S2's own raw
    s2 = plan.step("S2")
    own = sum(c.mass.m_as("kg") for c in s2.charges if not c.intermediate) / s2.product_mass.m_as("kg")
    assert cum["S2"] > own


def test_is_water():
    assert is_water(Material(key="pw", name="process water", formula="H2O"))
    # water by its formula, never by its key: renaming it changes nothing, a key alone is not water
    assert is_water(Material(key="aqua", name="aqua", formula="H2O"))
    assert not is_water(Material(key="water", name="water"))
    assert not is_water(Material(key="ethanol", name="ethanol", formula="C2H6O"))
    brine = Solution(density=Q(1.2, "g/mL"), mass_fraction=0.26)
    assert not is_water(Material(key="brine", name="brine", formula="H2O", solution=brine))


# Published worked example: 1-bromobutane from 1-butanol.  R. C. C. Duarte, catalogue of
# teaching syntheses, Universidade do Porto (educa.fc.up.pt/catalogo/pt/sinteses/29/141),
# gives AE = 50 % for C4H9OH + NaBr + H2SO4 -> C4H9Br + NaHSO4 + H2O, 88 % for
# C4H9OH + HBr -> C4H9Br + H2O and 47 % with KBr in place of NaBr.
BROMOBUTANE = """
route: 1-bromobutane
target: {{material: BuBr, amount: 1 kg}}
materials:
  BuOH: {{formula: C4H10O}}
  {salt}: {{formula: {salt}}}
  H2SO4: {{formula: H2SO4}}
  HBr: {{formula: HBr}}
  BuBr: {{formula: C4H9Br}}
  {hso4}: {{formula: {hso4}}}
  H2O: {{formula: H2O}}
steps:
  - id: S1
    equation: {equation}
    yield: 90 %
"""


@pytest.mark.parametrize("salt, hso4, equation, published", [
    ("NaBr", "NaHSO4", "BuOH + NaBr + H2SO4 -> BuBr + NaHSO4 + H2O", 50),
    ("KBr", "KHSO4", "BuOH + KBr + H2SO4 -> BuBr + KHSO4 + H2O", 47),
    ("NaBr", "NaHSO4", "BuOH + HBr -> BuBr + H2O", 88),
])
def test_atom_economy_of_a_published_example(salt, hso4, equation, published):
    route = load_route_text(BROMOBUTANE.format(salt=salt, hso4=hso4, equation=equation), "bubr.yaml")
    ae = atom_economy(route, "S1")
    # the source rounds to whole percent
    assert abs(100 * ae - published) < 0.5, ae


def test_atom_economy_is_none_without_a_molar_mass():
    text = """
route: no molar mass
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  P: {molar_mass: 100 g/mol}
steps:
  - id: S1
    equation: A -> P
    yield: 50 %
"""
    route = load_route_text(text, "nomm.yaml")
    assert atom_economy(route, "S1") == pytest.approx(1.0)
    # a frozen route whose product has lost its molar mass gives None, not a wrong number
    from dataclasses import replace
    from types import MappingProxyType

    mats = dict(route.materials)
    mats["P"] = replace(mats["P"], molar_mass=None)
    assert atom_economy(replace(route, materials=MappingProxyType(mats)), "S1") is None


# ------------------------------------------------------------------ laws


@pytest.mark.parametrize("path", DEMOS)
def test_metrics_do_not_change_when_the_target_doubles(path):
    route = load_route(path)
    one = plan_route(route).metrics
    two = plan_route(route, route.target.amount * 2).metrics
    assert two.pmi == pytest.approx(one.pmi, rel=1e-9)
    assert two.e_factor_simple == pytest.approx(one.e_factor_simple, rel=1e-9)
    assert two.cost_per_kg == pytest.approx(one.cost_per_kg, rel=1e-9)
    assert dict(two.pmi_by_step) == pytest.approx(dict(one.pmi_by_step), rel=1e-9)
    assert dict(two.mass_per_kg_target) == pytest.approx(dict(one.mass_per_kg_target), rel=1e-9)
    assert two.largest_raw_material[1] == pytest.approx(2 * one.largest_raw_material[1], rel=1e-9)


@settings(max_examples=25, deadline=None)
@given(st.floats(min_value=0.01, max_value=1e4))
def test_pmi_and_cost_are_per_kg_at_any_target(kg):
    route = load_route_text(TWO_STEP, "two-step.yaml")
    m = plan_route(route, Q(kg, "kg")).metrics
    assert m.pmi == pytest.approx(23.75, rel=1e-9)
    assert m.cost_per_kg == pytest.approx(120.1, rel=1e-9)


@pytest.mark.parametrize("path", DEMOS)
def test_complete_e_factor_is_pmi_minus_one_and_cumulative_ends_at_pmi(path):
    plan = plan_route(load_route(path))
    m = plan.metrics
    assert m.e_factor_complete == pytest.approx(m.pmi - 1, rel=1e-12)
    final = plan.steps[-1].id
    assert m.pmi_cumulative_by_step[final] == pytest.approx(m.pmi, rel=1e-12)
    assert sum(m.mass_per_kg_target.values()) == pytest.approx(m.pmi, rel=1e-12)
    assert 0 < m.e_factor_simple < m.e_factor_complete
    for ae in m.atom_economy_by_step.values():
        assert 0 < ae <= 1
    for rme, ae in zip(m.reaction_mass_efficiency_by_step.values(), m.atom_economy_by_step.values()):
        # yield below 1 and any excess make RME at most the atom economy
        assert 0 < rme <= ae + 1e-12


# ------------------------------------------------------------------ outputs


def test_metrics_reach_the_plan_json(two_step):
    from routeplan.export.json import plan_to_json

    d = json.loads(plan_to_json(two_step))["metrics"]
    for key in ("pmi", "pmi_by_step", "pmi_cumulative_by_step", "e_factor_complete", "e_factor_simple",
                "atom_economy_by_step", "reaction_mass_efficiency_by_step", "cost_per_kg", "currency",
                "mass_per_kg_target", "step_count", "longest_linear_sequence"):
        assert key in d, key
    assert d["pmi"] == pytest.approx(23.75)
    assert d["pmi_by_step"] == pytest.approx({"S1": 10.0, "S2": 12.5})
    assert d["longest_linear_sequence"] == {"count": 2, "steps": ["S1", "S2"]}
    assert d["step_count"] == 2


def test_metrics_reach_the_terminal(two_step):
    from routeplan.export.terminal import print_plan

    buf = io.StringIO()
    print_plan(two_step, file=buf, width=200)
    out = buf.getvalue()
    assert "process mass intensity (PMI): 23.8 kg/kg" in out  # a ratio, whatever the plan's units
    assert "simple 2.75 kg/kg" in out
    assert "120.1 EUR per kg of P" in out
    assert "longest linear sequence 2 (S1 → S2)" in out


def test_metrics_object_is_frozen(two_step):
    m = two_step.metrics
    assert isinstance(m, Metrics)
    with pytest.raises(AttributeError):
        m.pmi = 1.0  # type: ignore[misc]
    with pytest.raises(TypeError):
        m.pmi_by_step["S1"] = 1.0  # type: ignore[index]
    assert compute_metrics(two_step).pmi == m.pmi
    assert math.isfinite(m.pmi)
