"""Tests of the atom and charge balance (routeplan.chemistry.balance)."""

from __future__ import annotations

import re

import pytest

from routeplan.chemistry import (
    Equation,
    Term,
    describe_imbalance,
    element_counts,
    imbalance,
    parse_equation,
)
from routeplan.chemistry.formula import parse_formula
from routeplan.errors import EquationError, FormulaError

# Reactions balanced by chempy.balance_stoichiometry (reference library).  Each maps
# material key -> formula (in chempy's notation, which routeplan reads too), reactants
# first.  Keys are route-file keys (no '+').
REACTIONS = {
    # redox, ionic: permanganate oxidises oxalate in acid
    "permanganate/oxalate": (
        {"MnO4": "MnO4-", "oxalate": "C2O4-2", "proton": "H+"},
        {"Mn2": "Mn+2", "CO2": "CO2", "H2O": "H2O"}),
    # redox, ionic: dichromate oxidises iron(II) in acid
    "dichromate/iron(II)": (
        {"Cr2O7": "Cr2O7-2", "Fe2": "Fe+2", "proton": "H+"},
        {"Cr3": "Cr+3", "Fe3": "Fe+3", "H2O": "H2O"}),
    # redox, molecular: copper dissolves in nitric acid
    "copper/nitric acid": (
        {"Cu": "Cu", "HNO3": "HNO3"},
        {"CuNO3_2": "Cu(NO3)2", "NO": "NO", "H2O": "H2O"}),
    # redox, molecular: permanganate oxidises chloride
    "permanganate/hydrochloric acid": (
        {"KMnO4": "KMnO4", "HCl": "HCl"},
        {"KCl": "KCl", "MnCl2": "MnCl2", "Cl2": "Cl2", "H2O": "H2O"}),
    # combustion of ethanol
    "ethanol combustion": (
        {"EtOH": "C2H5OH", "O2": "O2"},
        {"CO2": "CO2", "H2O": "H2O"}),
    # the phenoxide step of ROUTE-FORMAT.md: 2 ArOH + K2CO3 -> 2 ArOK + H2O + CO2
    "phenol/potassium carbonate": (
        {"ArOH": "C6H5OH", "K2CO3": "K2CO3"},
        {"ArOK": "C6H5OK", "H2O": "H2O", "CO2": "CO2"}),
    # acetylation of aniline with acetic anhydride
    "aniline acetylation": (
        {"Aniline": "C6H5NH2", "Ac2O": "(CH3CO)2O"},
        {"Acetanilide": "C6H5NHCOCH3", "AcOH": "CH3COOH"}),
    # a hydrate losing its water of crystallisation
    "copper sulfate dehydration": (
        {"CuSO4_5H2O": "CuSO4·5H2O"},
        {"CuSO4": "CuSO4", "H2O": "H2O"}),
}


def _chempy_balanced(name):
    import chempy  # reference library
    reac, prod = REACTIONS[name]
    by_formula = {f: k for k, f in {**reac, **prod}.items()}
    r, p = chempy.balance_stoichiometry(set(reac.values()), set(prod.values()))
    text = (" + ".join(f"{int(c)} {by_formula[f]}" for f, c in r.items()) + " -> "
            + " + ".join(f"{int(c)} {by_formula[f]}" for f, c in p.items()))
    return text, {**reac, **prod}


@pytest.mark.parametrize("name", sorted(REACTIONS))
def test_chempy_balanced_reactions_have_no_imbalance(name):
    text, formulas = _chempy_balanced(name)
    assert imbalance(text, formulas) == {}
    assert describe_imbalance(imbalance(text, formulas), "S1") == "step S1 is balanced"


@pytest.mark.parametrize("name", sorted(REACTIONS))
def test_our_formulas_agree_with_chempy_composition(name):
    import chempy
    import periodictable as pt
    for formula in {**REACTIONS[name][0], **REACTIONS[name][1]}.values():
        comp = dict(chempy.Substance.from_formula(formula).composition)
        charge = comp.pop(0, 0)
        ours = element_counts(formula)
        assert {pt.elements.symbol(s).number: k for s, k in ours.items()} == comp
        assert parse_formula(formula).charge == charge


@pytest.mark.parametrize("name", sorted(REACTIONS))
def test_a_perturbed_coefficient_shows_the_missing_atoms(name):
    text, formulas = _chempy_balanced(name)
    eq = parse_equation(text)
    for side in ("reactants", "products"):
        terms = getattr(eq, side)
        for i, term in enumerate(terms):
            more = terms[:i] + (Term(term.coefficient + 1, term.key),) + terms[i + 1:]
            bumped = (Equation(more, eq.products) if side == "reactants"
                      else Equation(eq.reactants, more))
            diff = imbalance(bumped, formulas)
            # one more unit of a reactant leaves its atoms missing from the products,
            # one more unit of a product puts its atoms in excess
            sign = -1 if side == "reactants" else 1
            f = parse_formula(formulas[term.key])
            expected = {s: sign * k for s, k in f.counts.items()}
            if f.charge:
                expected["charge"] = sign * f.charge
            assert diff == pytest.approx(expected)
            message = describe_imbalance(diff, "S7")
            assert message.startswith("step S7 is not balanced: ")
            for sym, k in f.counts.items():
                assert re.search(rf"(?<![0-9.]){k} {sym}\b", message), (sym, message)
            assert ("fewer" if sign < 0 else "more") in message
            assert ("more" if sign < 0 else "fewer") not in message


def test_permanganate_charge_imbalance_is_described():
    formulas = {"MnO4": "MnO4-", "oxalate": "C2O4-2", "proton": "H+", "Mn2": "Mn+2",
                "CO2": "CO2", "H2O": "H2O"}
    # balanced: 2 MnO4- + 5 C2O4-2 + 16 H+ -> 2 Mn+2 + 10 CO2 + 8 H2O (chempy, above)
    # with 14 H+ and 8 H2O the products hold 2 H more and 2 charges more than they should
    diff = imbalance("2 MnO4 + 5 oxalate + 14 proton -> 2 Mn2 + 10 CO2 + 8 H2O", formulas)
    assert diff == {"H": 2.0, "charge": 2.0}
    assert describe_imbalance(diff, "S4") == ("step S4 is not balanced: the products have "
                                              "2 H more than the reactants, and their "
                                              "charge is 2 higher")
    # with 14 H+ and 7 H2O the hydrogen balances, but one O and two charges do not
    diff = imbalance("2 MnO4 + 5 oxalate + 14 proton -> 2 Mn2 + 10 CO2 + 7 H2O", formulas)
    assert diff == {"O": -1.0, "charge": 2.0}
    assert describe_imbalance(diff, "S4") == ("step S4 is not balanced: the products have "
                                              "1 O fewer than the reactants, and their "
                                              "charge is 2 higher")


def test_descriptions_in_words():
    # ethanol -> ethylene without the water: 2 H and 1 O missing
    diff = imbalance("EtOH -> C2H4", {"EtOH": "C2H5OH", "C2H4": "C2H4"})
    assert diff == {"H": -2.0, "O": -1.0}
    assert describe_imbalance(diff, "S2") == (
        "step S2 is not balanced: the products have 2 H and 1 O fewer than the reactants")
    diff = imbalance("A -> B", {"A": "C2H4", "B": "C3H2"})
    assert diff == {"C": 1.0, "H": -2.0}
    assert describe_imbalance(diff, "S3") == (
        "step S3 is not balanced: the products have 1 C more and 2 H fewer than the reactants")
    assert describe_imbalance({"C": 1, "H": 2, "N": 0.5}, "S9") == (
        "step S9 is not balanced: the products have 1 C, 2 H and 0.5 N more than the reactants")
    assert describe_imbalance({"charge": -1.0}, "S5") == (
        "step S5 is not balanced: the charge of the products is 1 lower than that of the "
        "reactants")
    assert describe_imbalance({"O": 1.0}, None).startswith("the equation is not balanced")


def test_imbalance_is_in_hill_order_with_charge_last():
    diff = imbalance("A -> B", {"A": "CH4", "B": "NaClO3S-"})
    assert list(diff) == ["C", "H", "Cl", "Na", "O", "S", "charge"]
    diff = imbalance("A -> B", {"A": "H2O", "B": "NaCl"})
    assert list(diff) == ["Cl", "H", "Na", "O"]  # no carbon: alphabetical


def test_tolerance_is_relative_and_tight():
    formulas = {"A": "H2", "B": "H6"}
    assert imbalance("A -> 0.3333333333333333 B", formulas) == {}
    assert imbalance("A -> 0.333333 B", formulas) == pytest.approx({"H": -2e-6})
    assert imbalance("300000 A -> 99999.99999999999 B", formulas) == {}


def test_imbalance_scales_with_the_equation():
    formulas = {"A": "C2H5OH", "B": "C2H4"}
    one = imbalance("A -> B", formulas)
    three = imbalance("3 A -> 3 B", formulas)
    assert three == {k: 3 * v for k, v in one.items()}


def test_a_key_without_a_formula_is_an_error():
    with pytest.raises(EquationError) as info:
        imbalance("A + B -> C", {"A": "H2", "C": "H2"})
    assert "'B'" in str(info.value)
    with pytest.raises(FormulaError) as info:
        imbalance("A -> C", {"A": "H2", "C": "Xq2"})
    assert "'Xq'" in str(info.value)
