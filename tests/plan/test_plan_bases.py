"""The backward walk, worked by hand for every charge basis and conversion.

Every expected number below is computed by hand in the comment beside it, from the
rules of the route format ("How the plan is computed").  The molar masses are given
explicitly so that the arithmetic stays readable.
"""

import math

import pytest

from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

BASES = """
route: every basis
target: {material: P, amount: 15 kg}
materials:
  A: {molar_mass: 100 g/mol, assay: 80 %}
  B: {molar_mass: 50 g/mol, density: 1.25 g/mL}
  P: {molar_mass: 150 g/mol}
  W: {molar_mass: 18 g/mol}
  cat: {molar_mass: 200 g/mol}
  solv: {molar_mass: 80 g/mol, density: 0.8 g/mL}
  aid: {name: filter aid}
  caustic: {molar_mass: 40 g/mol, solution: {mass_fraction: 50 %, density: 1.5 g/mL}}
  base: {molar_mass: 64 g/mol, solution: {molarity: 2.5 mol/L, density: 0.7 g/mL}}
steps:
  - id: S1
    equation: A + B -> P + W
    yield: 50 %
    charges:
      - {material: A}
      - {material: solv, volumes: 4}
      - {material: B, equiv: 1.5}
      - {material: cat, mol_percent: 5}
      - {material: caustic, equiv: 0.5}
      - {material: base, equiv: 0.25}
      - {material: aid, mass_ratio: 0.1, role: workup}
"""


@pytest.fixture(scope="module")
def step():
    plan = plan_route(load_route_text(BASES, "bases.yaml"))
    return plan, plan.steps[0], {c.material: c for c in plan.steps[0].charges}


def close(q, unit, expected):
    assert q is not None
    assert math.isclose(q.m_as(unit), expected, rel_tol=1e-12), (q, expected)


def test_target_moles(step):
    plan, _, _ = step
    # n = 15 kg * (1 + 0) * 1.00 / 150 g/mol = 15000 g / 150 g/mol = 100 mol
    close(plan.target_mol, "mol", 100.0)


def test_limiting_reagent_from_yield_and_assay(step):
    _, sp, c = step
    # n_lim = 100 mol / (0.50 * 1/1) = 200 mol; mass = 200 mol * 100 g/mol / 0.80 = 25 kg
    close(sp.limiting_mol, "mol", 200.0)
    close(c["A"].mol, "mol", 200.0)
    close(c["A"].mass, "kg", 25.0)
    assert c["A"].volume is None  # no density: no volume
    assert c["A"].equiv == 1.0


def test_equiv_and_density(step):
    _, _, c = step
    # n = 1.5 * 200 mol = 300 mol; m = 300 mol * 50 g/mol = 15 kg; V = 15 kg / 1.25 kg/L = 12 L
    close(c["B"].mol, "mol", 300.0)
    close(c["B"].mass, "kg", 15.0)
    close(c["B"].volume, "L", 12.0)


def test_mol_percent(step):
    _, _, c = step
    # 5 mol % = 0.05 equiv: n = 10 mol; m = 10 mol * 200 g/mol = 2 kg
    assert c["cat"].role == "catalyst"
    assert c["cat"].equiv == pytest.approx(0.05)
    close(c["cat"].mol, "mol", 10.0)
    close(c["cat"].mass, "kg", 2.0)


def test_volumes_of_limiting_reagent_as_charged(step):
    _, _, c = step
    # V = 4 L/kg * 25 kg (A as charged, assay included) = 100 L; m = 100 L * 0.8 kg/L = 80 kg;
    # n = 80 kg / 80 g/mol = 1000 mol
    assert c["solv"].role == "solvent"
    assert c["solv"].equiv is None
    close(c["solv"].volume, "L", 100.0)
    close(c["solv"].mass, "kg", 80.0)
    close(c["solv"].mol, "mol", 1000.0)


def test_solution_by_mass_fraction(step):
    _, _, c = step
    # n = 0.5 * 200 = 100 mol; m = 100 mol * 40 g/mol / 0.50 = 8 kg; V = 8 kg / 1.5 kg/L = 5.333 L
    close(c["caustic"].mol, "mol", 100.0)
    close(c["caustic"].mass, "kg", 8.0)
    close(c["caustic"].volume, "L", 8.0 / 1.5)


def test_solution_by_molarity(step):
    _, _, c = step
    # n = 0.25 * 200 = 50 mol; V = 50 mol / 2.5 mol/L = 20 L; m = 20 L * 0.7 kg/L = 14 kg
    close(c["base"].mol, "mol", 50.0)
    close(c["base"].volume, "L", 20.0)
    close(c["base"].mass, "kg", 14.0)


def test_mass_ratio_without_molar_mass(step):
    _, _, c = step
    # m = 0.1 kg/kg * 25 kg = 2.5 kg; no molar mass, no density
    close(c["aid"].mass, "kg", 2.5)
    assert c["aid"].mol is None and c["aid"].volume is None
    assert c["aid"].role == "workup"


def test_order_of_addition_kept(step):
    _, sp, _ = step
    assert [c.material for c in sp.charges] == ["A", "solv", "B", "cat", "caustic", "base", "aid"]
    assert [c.order for c in sp.charges] == list(range(1, 8))


def test_product_and_raw_totals(step):
    plan, sp, _ = step
    close(sp.product_mol, "mol", 100.0)
    close(sp.product_mass, "kg", 15.0)
    raws = {r.material: r for r in plan.raw_materials}
    assert set(raws) == {"A", "solv", "B", "cat", "caustic", "base", "aid"}
    close(raws["solv"].mass, "kg", 80.0)


OVERAGE = """
route: overage and assay of the target
target: {material: P, amount: 10 kg, overage: 5 %}
materials:
  A: {molar_mass: 100 g/mol}
  P: {molar_mass: 200 g/mol, assay: 90 %}
steps:
  - {id: S1, equation: 2 A -> P, yield: 80 %}
"""


def test_overage_assay_and_coefficients():
    plan = plan_route(load_route_text(OVERAGE, "overage.yaml"))
    sp = plan.steps[0]
    # n = 10 kg * 1.05 * 0.90 / 200 g/mol = 47.25 mol of pure P
    close(plan.target_mol, "mol", 47.25)
    # target mass delivered as isolated = 10 kg * 1.05 = 10.5 kg
    close(plan.target_mass, "kg", 10.5)
    # n_lim = 47.25 / (0.80 * 1/2) = 118.125 mol; implicit line of A at 1 equiv
    close(sp.limiting_mol, "mol", 118.125)
    close(sp.charges[0].mass, "kg", 11.8125)
    assert sp.charges[0].implicit
    # product as isolated at 90 %: 47.25 mol * 200 g/mol / 0.90 = 10.5 kg
    close(sp.product_mass, "kg", 10.5)


def test_target_override_any_mass_unit():
    route = load_route_text(OVERAGE, "overage.yaml")
    # NIST SP 811, B.8: 1 lb = 0.45359237 kg exactly, so 22.0462262185 lb is 10 kg to 1e-11
    plan = plan_route(route, "22.0462262185 lb")
    assert math.isclose(plan.target_mol.m_as("mol"), 47.25, rel_tol=1e-10)


def test_numbers_that_overflow_are_a_located_error():
    from routeplan.errors import PlanError

    # a yield of 1e-300 on a 10 kg target needs some 1e302 mol: beyond any campaign
    text = OVERAGE.replace("yield: 80 %", "yield: 1e-300")
    with pytest.raises(PlanError) as info:
        plan_route(load_route_text(text, "overflow.yaml"))
    assert "step S1" in str(info.value) and "beyond any campaign" in str(info.value)
    assert "yield (expected) 1e-298 %" in str(info.value)
    assert "overflow.yaml:" in str(info.value)
