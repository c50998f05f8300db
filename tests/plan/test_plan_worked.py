"""A two-step route worked by hand with real formulas, and a convergent route.

Molar masses below are summed by hand from the CIAAW 2021 abridged standard atomic
weights (Prohaska et al., Pure Appl. Chem. 2022, 94, 573): C 12.011, H 1.008,
N 14.007, O 15.999, I 126.90447, K 39.0983.
"""

import math

import pytest

import routeplan

from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

TWO_STEP = """
route: methoxy anilide, two steps
target: {material: methacetin, amount: 10 kg}
materials:
  aminophenol: {formula: C6H7NO}
  Ac2O: {formula: C4H6O3, density: 1.08 g/mL}
  AcOH: {formula: C2H4O2}
  paracetamol: {formula: C8H9NO2}
  K2CO3: {formula: K2CO3}
  MeI: {formula: CH3I, density: 2.28 g/mL}
  KI: {formula: KI}
  water: {formula: H2O}
  CO2: {formula: CO2}
  methacetin: {formula: C9H11NO2}
steps:
  - id: S1
    equation: aminophenol + Ac2O -> paracetamol + AcOH
    yield: 80 %
    charges:
      - {material: Ac2O, equiv: 1.2}
  - id: S2
    equation: 2 paracetamol + K2CO3 + 2 MeI -> 2 methacetin + 2 KI + water + CO2
    yield: 90 %
    charges:
      - {material: paracetamol}
      - {material: K2CO3, equiv: 1.0}
      - {material: MeI, equiv: 1.5}
"""

C, H, N, O, I, K = 12.011, 1.008, 14.007, 15.999, 126.90447, 39.0983
M_METHACETIN = 9 * C + 11 * H + N + 2 * O  # 165.192 g/mol
M_PARACETAMOL = 8 * C + 9 * H + N + 2 * O  # 151.165 g/mol
M_AMINOPHENOL = 6 * C + 7 * H + N + O  # 109.128 g/mol
M_AC2O = 4 * C + 6 * H + 3 * O  # 102.089 g/mol
M_MEI = C + 3 * H + I  # 141.93947 g/mol
M_K2CO3 = 2 * K + C + 3 * O  # 138.2046 g/mol


@pytest.fixture(scope="module")
def plan():
    return plan_route(load_route_text(TWO_STEP, "two-step.yaml"))


def charge(plan, step, material):
    return next(c for c in plan.step(step).charges if c.material == material)


def test_two_steps_by_hand(plan):
    n_t = 10_000 / M_METHACETIN  # 60.5356 mol of target
    assert math.isclose(plan.target_mol.m_as("mol"), n_t, rel_tol=1e-9)
    # S2: n(paracetamol) = n_t / (0.90 * 2/2) = 67.2618 mol
    n_para = n_t / 0.90
    assert math.isclose(plan.step("S2").limiting_mol.m_as("mol"), n_para, rel_tol=1e-9)
    assert math.isclose(charge(plan, "S2", "paracetamol").mass.m_as("kg"), n_para * M_PARACETAMOL / 1000,
                        rel_tol=1e-9)
    # MeI: 1.5 equiv = 100.893 mol; 14.321 kg; 14.321 kg / 2.28 kg/L = 6.281 L
    n_mei = 1.5 * n_para
    assert math.isclose(charge(plan, "S2", "MeI").mass.m_as("kg"), n_mei * M_MEI / 1000, rel_tol=1e-9)
    assert math.isclose(charge(plan, "S2", "MeI").volume.m_as("L"), n_mei * M_MEI / 1000 / 2.28, rel_tol=1e-9)
    # K2CO3 at 1.0 equiv (stoichiometric would be 0.5)
    assert math.isclose(charge(plan, "S2", "K2CO3").mass.m_as("kg"), n_para * M_K2CO3 / 1000, rel_tol=1e-9)
    # S1 must make n_para: n(aminophenol) = n_para / 0.80 = 84.077 mol; 9.175 kg
    n_ap = n_para / 0.80
    assert math.isclose(plan.step("S1").limiting_mol.m_as("mol"), n_ap, rel_tol=1e-9)
    assert math.isclose(charge(plan, "S1", "aminophenol").mass.m_as("kg"), n_ap * M_AMINOPHENOL / 1000,
                        rel_tol=1e-9)
    # Ac2O 1.2 equiv = 100.893 mol; 10.300 kg; 9.537 L
    assert math.isclose(charge(plan, "S1", "Ac2O").mass.m_as("kg"), 1.2 * n_ap * M_AC2O / 1000, rel_tol=1e-9)
    # the implicit line of the limiting reagent comes before the listed Ac2O line
    assert [c.material for c in plan.step("S1").charges] == ["aminophenol", "Ac2O"]


def test_intermediate_is_not_bought(plan):
    raws = {r.material for r in plan.raw_materials}
    assert raws == {"aminophenol", "Ac2O", "K2CO3", "MeI"}
    assert charge(plan, "S2", "paracetamol").intermediate


def test_overall_yield(plan):
    oy = plan.overall_yield
    assert oy.longest_linear_sequence == ("S1", "S2")
    assert math.isclose(oy.yield_, 0.80 * 0.90)
    # from aminophenol: every mole could make one mole of target, so 0.72
    assert math.isclose(oy.by_raw_material["aminophenol"], 0.72, rel_tol=1e-9)
    # only starting materials (a bought limiting reagent, or one the route marks): a yield
    # "from" the base K2CO3 or the acylating Ac2O would be noise
    assert set(oy.by_raw_material) == {"aminophenol"}


def test_overall_yield_from_a_marked_starting_material():
    text = TWO_STEP.replace("MeI: {", "MeI: {starting_material: true, ")
    oy = plan_route(load_route_text(text, "marked.yaml")).overall_yield
    # from MeI: 2 MeI -> 2 target, charged at 1.5 equiv: 0.90 / 1.5 = 0.60
    assert math.isclose(oy.by_raw_material["MeI"], 0.60, rel_tol=1e-9)
    assert set(oy.by_raw_material) == {"aminophenol", "MeI"}


CONVERGENT = """
route: branches of different lengths
target: {material: T, amount: 7 kg}
materials:
  A0: {molar_mass: 100 g/mol}
  A1: {molar_mass: 110 g/mol}
  A2: {molar_mass: 120 g/mol}
  A3: {molar_mass: 130 g/mol}
  B0: {molar_mass: 50 g/mol}
  B1: {molar_mass: 60 g/mol}
  T: {molar_mass: 190 g/mol}
steps:
  - {id: F, equation: A3 + B1 -> T, yield: 95 %}
  - {id: A3s, equation: A2 -> A3, yield: 70 %}
  - {id: B1s, equation: B0 -> B1, yield: 60 %}
  - {id: A1s, equation: A0 -> A1, yield: 90 %}
  - {id: A2s, equation: A1 -> A2, yield: 80 %}
"""


def test_convergent_branches_of_different_lengths():
    plan = plan_route(load_route_text(CONVERGENT, "conv.yaml"))
    n_t = 7000 / 190
    raws = {r.material: r for r in plan.raw_materials}
    assert set(raws) == {"A0", "B0"}
    # long branch: A0 -> A1 -> A2 -> A3 then F: n(A0) = n_t / (0.95 * 0.70 * 0.80 * 0.90)
    assert math.isclose(raws["A0"].mol.m_as("mol"), n_t / (0.95 * 0.70 * 0.80 * 0.90), rel_tol=1e-12)
    # short branch: B0 -> B1 then F: n(B0) = n_t / (0.95 * 0.60)
    assert math.isclose(raws["B0"].mol.m_as("mol"), n_t / (0.95 * 0.60), rel_tol=1e-12)
    # execution order puts every step after its feeders; the longest linear sequence is the long branch
    order = [s.id for s in plan.steps]
    for before, after in (("A1s", "A2s"), ("A2s", "A3s"), ("A3s", "F"), ("B1s", "F")):
        assert order.index(before) < order.index(after)
    assert plan.overall_yield.longest_linear_sequence == ("A1s", "A2s", "A3s", "F")
    assert math.isclose(plan.overall_yield.yield_, 0.90 * 0.80 * 0.70 * 0.95)


SHARED = """
route: one intermediate charged in two steps
target: {material: T, amount: 1 kg}
materials:
  R: {molar_mass: 100 g/mol}
  I: {molar_mass: 100 g/mol}
  J: {molar_mass: 200 g/mol}
  T: {molar_mass: 300 g/mol}
steps:
  - {id: S1, equation: R -> I, yield: 50 %}
  - {id: S2, equation: I -> J, yield: 80 %}
  - id: S3
    equation: J + I -> T
    yield: 90 %
    charges: [{material: J}, {material: I, equiv: 1.5}]
"""


def test_demands_on_an_intermediate_add_up():
    plan = plan_route(load_route_text(SHARED, "shared.yaml"))
    n_t = 1000 / 300
    n_j = n_t / 0.9  # S3 limiting J
    n_i_direct = 1.5 * n_j  # S3 charges I at 1.5 equiv
    n_i_for_j = n_j / 0.8  # S2 makes J from I
    n_i = n_i_direct + n_i_for_j
    assert math.isclose(plan.step("S1").product_mol.m_as("mol"), n_i, rel_tol=1e-12)
    assert math.isclose(plan.raw_materials[0].mol.m_as("mol"), n_i / 0.5, rel_tol=1e-12)


RANGES = """
route: yield ranges
target: {material: C, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  B: {molar_mass: 100 g/mol}
  C: {molar_mass: 100 g/mol}
steps:
  - {id: S1, equation: A -> B, yield: {expected: 80 %, low: 70 %, high: 90 %}}
  - {id: S2, equation: B -> C, yield: 50 %}
"""


def test_overall_yield_range():
    plan = plan_route(load_route_text(RANGES, "ranges.yaml"))
    oy = plan.overall_yield
    # expected 0.80 * 0.50 = 0.40; low 0.70 * 0.50 = 0.35; high 0.90 * 0.50 = 0.45 (S2 has no range)
    assert math.isclose(oy.yield_, 0.40)
    assert math.isclose(oy.low, 0.35)
    assert math.isclose(oy.high, 0.45)
    doc = routeplan.plan_to_dict(plan)["overall_yield"]
    assert doc["low"] == pytest.approx(0.35) and doc["high"] == pytest.approx(0.45)


@pytest.mark.parametrize("basis, s1_yield", [("expected", 0.80), ("low", 0.70), ("high", 0.90)])
def test_planning_at_low_or_high_yields(basis, s1_yield):
    plan = plan_route(load_route_text(RANGES, "ranges.yaml"), yields=basis)
    n_t = 1000 / 100  # 10 mol of C
    # S2 has no range: 0.50 whatever the basis; S1 takes the chosen yield
    (raw,) = plan.raw_materials
    assert math.isclose(raw.mol.m_as("mol"), n_t / (0.50 * s1_yield), rel_tol=1e-12)
    assert plan.yield_basis == basis
    assert routeplan.plan_to_dict(plan)["yield_basis"] == basis
    assert math.isclose(plan.overall_yield.yield_, 0.50 * s1_yield)


def test_unknown_yield_basis_is_an_error():
    from routeplan.errors import PlanError

    with pytest.raises(PlanError, match="unknown yield basis 'worst'"):
        plan_route(load_route_text(RANGES, "ranges.yaml"), yields="worst")


def test_unlisted_limiting_reagent_is_charged_first():
    text = """
route: order of unlisted reactants
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  B: {molar_mass: 100 g/mol}
  P: {molar_mass: 200 g/mol}
steps:
  - {id: S1, equation: B + A -> P, limiting: A, yield: 50 %}
"""
    plan = plan_route(load_route_text(text, "order.yaml"))
    assert [c.material for c in plan.steps[0].charges] == ["A", "B"]
    assert all(c.implicit for c in plan.steps[0].charges)
