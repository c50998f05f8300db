"""From a valid route file to the frozen domain objects: completed charges, units, defaults."""

from __future__ import annotations

import hashlib
import math
import sys

import pytest

import routeplan
from conftest import GOOD_ROUTE, write_route
from routeplan.chemistry.formula import molar_mass
from routeplan.errors import RouteError
from routeplan.route.load import load_route, load_route_text
from routeplan.units import Q

CHARGES = """
route: completing charge lines
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 50 g/mol}
  B: {molar_mass: 100 g/mol}
  C: {molar_mass: 20 g/mol}
  P: {molar_mass: 150 g/mol}
  D: {molar_mass: 80 g/mol}
  solv: {molar_mass: 92 g/mol, density: 0.87 g/mL}
  cat: {molar_mass: 200 g/mol}
  aid: {name: filter aid}
  base: {molar_mass: 40 g/mol}
steps:
  - id: S1
    equation: 2 A + B + 3 C -> P + D
    limiting: B
    yield: 80 %
    charges:
      - {material: solv, volumes: 5}
      - {material: C}
      - {material: cat, mol_percent: 2}
      - {material: base, equiv: 0.5}
      - {material: aid, mass_ratio: 0.1}
      - {material: solv, volumes: 2, role: workup}
"""


@pytest.fixture(scope="module")
def charges():
    return load_route_text(CHARGES, "charges.yaml").steps[0].charges


def test_implicit_lines_come_first_limiting_reagent_leading(charges):
    implicit = [(c.material, c.basis, c.value, c.role) for c in charges if c.implicit]
    # B is the limiting reagent (1 equiv) and leads; then A in equation order: nu 2 / nu_B 1 = 2
    assert implicit == [("B", "stoichiometric", 1.0, "reactant"), ("A", "stoichiometric", 2.0, "reactant")]
    assert [c.implicit for c in charges] == [True, True, False, False, False, False, False, False]


def test_listed_lines_keep_their_order_bases_and_default_roles(charges):
    listed = [(c.material, c.basis, c.value, c.role) for c in charges if not c.implicit]
    assert listed == [
        ("solv", "volumes", 5.0, "solvent"),
        ("C", "stoichiometric", 3.0, "reactant"),   # a reactant without basis: nu_C / nu_B = 3
        ("cat", "mol_percent", 2.0, "catalyst"),
        ("base", "equiv", 0.5, "reagent"),
        ("aid", "mass_ratio", 0.1, "reagent"),
        ("solv", "volumes", 2.0, "workup"),
    ]
    cat = next(c for c in charges if c.material == "cat")
    assert cat.equiv == pytest.approx(0.02)


def test_limiting_reagent_may_be_listed_at_one_equiv():
    text = CHARGES.replace("      - {material: C}\n", "      - {material: B, equiv: 1}\n      - {material: C}\n")
    (step,) = load_route_text(text, "x.yaml").steps
    b = step.charge_of("B")
    assert (b.basis, b.value, b.implicit, b.role) == ("equiv", 1.0, False, "reactant")
    assert [c.material for c in step.charges if c.implicit] == ["A"]


def test_charge_lines_know_where_they_are(charges):
    listed = [c for c in charges if not c.implicit]
    lines = [i for i, t in enumerate(CHARGES.splitlines(), 1) if t.startswith("      - {")]
    assert len(lines) == 6
    assert [c.location.line for c in listed] == lines
    assert listed[0].location.key == "steps[0].charges[0]"


@pytest.fixture(scope="module")
def good():
    return load_route(GOOD_ROUTE)


def test_materials(good):
    m = good.materials
    assert list(m)[:3] == ["aminophenol", "Ac2O", "AcOH"]  # file order
    assert m["aminophenol"].name == "4-aminophenol"
    assert m["AcOH"].name == "AcOH"                       # defaults to the key
    assert m["aminophenol"].assay == pytest.approx(0.98)
    assert m["AcOH"].assay == 1.0
    assert m["Ac2O"].molar_mass.m_as("g/mol") == pytest.approx(molar_mass("C4H6O3").m_as("g/mol"))
    assert m["Ac2O"].density.m_as("g/mL") == pytest.approx(1.08)
    assert m["aminophenol"].hazards == ("harmful if swallowed",)
    assert m["aminophenol"].price == 18.0
    assert m["charcoal"].molar_mass is None                # charged by mass ratio only
    # an explicit molar mass within 0.1 % of the formula's: the formula's value is used
    assert m["KI"].molar_mass.m_as("g/mol") == pytest.approx(molar_mass("KI").m_as("g/mol"))


def test_solutions(good):
    hcl, caustic = good.materials["HCl6M"], good.materials["caustic"]
    assert hcl.solution.molarity.m_as("mol/L") == 6.0
    assert hcl.solution.mass_fraction is None
    assert hcl.density.m_as("g/mL") == pytest.approx(1.10)  # the solution's density
    assert hcl.assay == 1.0
    assert caustic.solution.mass_fraction == pytest.approx(0.5)
    assert caustic.solution.molarity is None
    assert caustic.formula == "NaOH"


def test_target_steps_and_vessels(good):
    assert good.name == "test route (acid via the ethyl ester)"
    assert (good.target.material, good.target.amount.m_as("kg"), good.target.overage) == ("acid", 10.0,
                                                                                          pytest.approx(0.02))
    assert good.currency == "EUR" and good.format == 1
    assert [s.id for s in good.steps] == ["S1", "S2", "S3", "S4"]
    s1, s2, s3, s4 = good.steps
    assert (s1.limiting, s1.product, s1.yield_.expected, s1.yield_.low, s1.yield_.high) == \
        ("aminophenol", "paracetamol", pytest.approx(0.92), pytest.approx(0.88), pytest.approx(0.95))
    assert s1.demonstrated_batch.m_as("kg") == 5.0 and s2.demonstrated_batch is None
    assert s2.equation.coefficient("paracetamol") == 2.0
    assert s2.equation_text.startswith("2 paracetamol + K2CO3")
    assert s3.isolated is False and s1.isolated is True
    assert s3.vessel is None and s4.vessel == "R630"
    assert s4.name == "acidification"
    assert s4.yield_.low is None
    assert good.equipment["R250"].volume.m_as("L") == 250.0
    assert good.equipment["R630"].max_fill == 0.8       # the default


def test_intermediates_are_main_products_only(good):
    # water is a by-product of S2 and charged in S1 and S4: it is bought, not an intermediate
    assert good.intermediates == frozenset({"paracetamol", "ester", "salt", "acid"})
    assert not good.is_intermediate("water")


def test_source_hash_is_that_of_the_file_bytes(good):
    assert good.source.path == str(GOOD_ROUTE)
    assert good.source.sha256 == hashlib.sha256(GOOD_ROUTE.read_bytes()).hexdigest()
    text = GOOD_ROUTE.read_text(encoding="utf-8")
    from_text = load_route_text(text, "mine.yaml")
    assert from_text.source.path == "mine.yaml"
    assert from_text.source.sha256 == good.source.sha256


def test_public_api_loads_the_same_route():
    assert routeplan.load_route is load_route


def test_units_are_converted_on_loading():
    text = CHARGES.replace("amount: 1 kg", "amount: 2.20462262185 lb").replace(
        "    yield: 80 %\n", "    yield: 80 %\n    demonstrated_batch: 500 g\n")
    route = load_route_text(text, "lb.yaml")
    assert route.target.amount.m_as("kg") == pytest.approx(1.0, rel=1e-9)  # 1 lb = 0.45359237 kg exactly
    assert route.target.amount.units == Q(1.0, "kg").units
    assert route.steps[0].demonstrated_batch.m_as("kg") == pytest.approx(0.5)


def test_byte_order_mark_and_anchors(tmp_path):
    text = CHARGES.replace("      - {material: solv, volumes: 5}", "      - &solvent {material: solv, volumes: 5}")
    text = text.replace("      - {material: solv, volumes: 2, role: workup}", "      - *solvent")
    path = tmp_path / "bom.yaml"
    path.write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    step = load_route(path).steps[0]
    assert [(c.material, c.value) for c in step.charges if c.material == "solv"] == [("solv", 5.0), ("solv", 5.0)]


def test_alias_expansion_is_capped():
    # each level doubles nine times over: 9**7 values if expanded
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x]"]
    for i in range(1, 8):
        prev = f"*a{i - 1}"
        lines.append(f"a{i}: &a{i} [{', '.join([prev] * 9)}]")
    with pytest.raises(RouteError) as info:
        load_route_text("\n".join(lines) + "\n", "bomb.yaml")
    assert "expands to more than" in str(info.value)


def test_yaml_1_2_words_are_strings():
    # YAML 1.1 would read 'no' as false; in 1.2 it is text, so this is a valid name
    text = CHARGES.replace("aid: {name: filter aid}", "aid: {name: no}")
    assert load_route_text(text, "x.yaml").materials["aid"].name == "no"


def test_smiles_without_rdkit_is_a_clear_error(monkeypatch):
    monkeypatch.setitem(sys.modules, "rdkit", None)  # as if RDKit were not installed
    text = CHARGES.replace("A: {molar_mass: 50 g/mol}", "A: {smiles: CCO}")
    with pytest.raises(RouteError) as info:
        load_route_text(text, "smiles.yaml")
    (problem,) = info.value.problems
    assert problem.location.key == "materials.A.smiles" and problem.location.line == 5
    assert "RDKit" in problem.message and "smiles" in problem.hint and "formula" in problem.hint
    # with a formula beside it, the formula gives the molar mass
    ok = load_route_text(CHARGES.replace("A: {molar_mass: 50 g/mol}", "A: {smiles: CCO, formula: C2H6O}"), "s.yaml")
    assert ok.materials["A"].molar_mass.m_as("g/mol") == pytest.approx(46.068, rel=1e-4)
    assert ok.materials["A"].smiles == "CCO"


def test_errors_are_listed_in_file_order_with_one_error_each():
    text = CHARGES.replace("yield: 80 %", "yield: 80").replace("amount: 1 kg", "amount: 1 kilo")
    with pytest.raises(RouteError) as info:
        load_route_text(text, "two.yaml")
    lines = [p.location.line for p in info.value.problems]
    assert lines == [3, 18]
    assert all(p.severity == "error" for p in info.value.problems)
    assert "two.yaml: 2 errors" in str(info.value)


def test_write_route_helper_round_trips(tmp_path):
    path = write_route(tmp_path, CHARGES)
    assert math.isclose(load_route(path).target.amount.m_as("kg"), 1.0)


@pytest.fixture
def real_rdkit():
    """RDKit itself (the `smiles` extra, also in the `test` extra): an outside reference."""
    import rdkit

    return rdkit


def test_smiles_gives_formula_and_molar_mass(real_rdkit):
    route = load_route_text(CHARGES.replace("A: {molar_mass: 50 g/mol}", "A: {smiles: CCO}"), "s.yaml")
    assert route.materials["A"].formula == "C2H6O"
    assert route.materials["A"].molar_mass.m_as("g/mol") == pytest.approx(molar_mass("C2H6O").m_as("g/mol"))


@pytest.mark.parametrize("material,key,words", [
    ("A: {smiles: OCCN, formula: C2H6O}", "materials.A.smiles", "disagrees with"),   # SMILES vs formula
    ("A: {smiles: CCO, molar_mass: 60 g/mol}", "materials.A.molar_mass", "from the SMILES"),
    ("A: {smiles: 'C(('}", "materials.A.smiles", "not a valid SMILES: it cannot be parsed"),
    ("A: {smiles: 'c1cccc1'}", "materials.A.smiles", "not a valid SMILES: Can't kekulize"),
])
def test_smiles_mistakes(real_rdkit, material, key, words):
    with pytest.raises(RouteError) as info:
        load_route_text(CHARGES.replace("A: {molar_mass: 50 g/mol}", material), "s.yaml")
    (problem,) = info.value.problems
    assert problem.location.key == key and words in problem.message
