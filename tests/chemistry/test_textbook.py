"""Worked examples of an open textbook, recomputed with routeplan's molar masses.

Source: OpenStax, *Chemistry 2e* (P. Flowers, K. Theopold, R. Langley, W. R. Robinson,
Rice University, 2019), chapter 4 "Stoichiometry of Chemical Reactions", section 4.4
"Reaction Yields".  Example 4.12 and Example 4.13 were read from reproductions of the
section (the problem text, the intermediate amounts and the answers quoted below); the
"Check Your Learning" exercises beside them are quoted from memory.
"""

from __future__ import annotations

from typing import Mapping

import pytest

from routeplan.chemistry import imbalance, molar_mass, molar_mass_value, parse_equation
from routeplan.units import Q


def _moles(masses_g: Mapping[str, float], formulas: Mapping[str, str]) -> dict[str, float]:
    """Amount of each charged reactant [mol] from its mass [g]."""
    return {k: m / molar_mass_value(formulas[k]) for k, m in masses_g.items()}


def limiting_reactant(equation: str, masses_g: Mapping[str, float],
                      formulas: Mapping[str, str]) -> tuple[str, float]:
    """The reactant that runs out first, and the extent of reaction it allows [mol].

    Plain stoichiometry: extent = min over reactants of n_i / nu_i.
    """
    eq = parse_equation(equation)
    assert imbalance(eq, formulas) == {}
    n = _moles(masses_g, formulas)
    extents = {t.key: n[t.key] / t.coefficient for t in eq.reactants if t.key in n}
    key = min(extents, key=extents.get)
    return key, extents[key]


def theoretical_yield_g(equation: str, limiting: str, mass_g: float, product: str,
                        formulas: Mapping[str, str]) -> float:
    """Mass of product [g] from ``mass_g`` [g] of the limiting reactant at 100 % yield."""
    eq = parse_equation(equation)
    assert imbalance(eq, formulas) == {}
    n_lim = mass_g / molar_mass_value(formulas[limiting])
    n_prod = n_lim * eq.coefficient(product) / eq.coefficient(limiting)
    return n_prod * molar_mass_value(formulas[product])


SI3N4 = {"Si": "Si", "N2": "N2", "Si3N4": "Si3N4"}


def test_example_4_12_identifying_the_limiting_reactant():
    # OpenStax Chemistry 2e, Example 4.12: 3 Si + 2 N2 -> Si3N4; which is limiting when
    # 2.00 g of Si and 1.50 g of N2 react?  Text: 0.0712 mol Si (read); 0.0535 mol N2 and the
    # provided Si:N2 ratio 1.33, below the 3:2 = 1.5 required, so Si is limiting (from memory).
    n = _moles({"Si": 2.00, "N2": 1.50}, SI3N4)
    assert round(n["Si"], 4) == 0.0712
    assert round(n["N2"], 4) == 0.0535
    assert round(n["Si"] / n["N2"], 2) == 1.33
    key, extent = limiting_reactant("3 Si + 2 N2 -> Si3N4", {"Si": 2.00, "N2": 1.50}, SI3N4)
    assert key == "Si"
    # law: the limiting reactant does not change with the scale of the batch
    key_kg, extent_kg = limiting_reactant("3 Si + 2 N2 -> Si3N4",
                                          {"Si": 2000.0, "N2": 1500.0}, SI3N4)
    assert key_kg == "Si" and extent_kg == pytest.approx(1000 * extent)
    # and flips when nitrogen is scarce
    assert limiting_reactant("3 Si + 2 N2 -> Si3N4", {"Si": 2.00, "N2": 0.50}, SI3N4)[0] == "N2"


def test_example_4_12_check_your_learning():
    # OpenStax Chemistry 2e, Example 4.12, Check Your Learning (from memory): which is the
    # limiting reactant when 5.00 g of H2 and 10.0 g of O2 react and form water?  Answer: O2.
    formulas = {"H2": "H2", "O2": "O2", "H2O": "H2O"}
    key, _ = limiting_reactant("2 H2 + O2 -> 2 H2O", {"H2": 5.00, "O2": 10.0}, formulas)
    assert key == "O2"


CUSO4_ZN = {"CuSO4": "CuSO4", "Zn": "Zn", "Cu": "Cu", "ZnSO4": "ZnSO4"}


def test_example_4_13_calculation_of_percent_yield():
    # OpenStax Chemistry 2e, Example 4.13: 1.274 g of copper sulfate with excess zinc gives
    # 0.392 g of copper, CuSO4 + Zn -> Cu + ZnSO4.  Text (read): CuSO4 159.60 g/mol,
    # 7.982e-3 mol CuSO4, percent yield 77.3 %; theoretical yield 0.5072 g Cu (from memory).
    assert round(molar_mass_value("CuSO4"), 1) == 159.6
    theo = theoretical_yield_g("CuSO4 + Zn -> Cu + ZnSO4", "CuSO4", 1.274, "Cu", CUSO4_ZN)
    assert round(theo, 4) == 0.5072
    assert round(1.274 / molar_mass_value("CuSO4"), 6) == 0.007982
    percent = 100 * 0.392 / theo
    assert round(percent, 1) == 77.3


def test_example_4_13_with_units():
    # the same example carried through pint quantities: g / (g/mol) -> mol
    n_cuso4 = Q(1.274, "g") / molar_mass("CuSO4")
    m_cu = (n_cuso4 * molar_mass("Cu")).to("g")
    assert n_cuso4.to("mmol").magnitude == pytest.approx(7.982, abs=5e-4)
    assert m_cu.magnitude == pytest.approx(0.5072, abs=5e-5)
    assert (Q(0.392, "g") / m_cu).to("percent").magnitude == pytest.approx(77.3, abs=0.05)


def test_example_4_13_check_your_learning():
    # OpenStax Chemistry 2e, Example 4.13, Check Your Learning (from memory): percent yield of
    # a reaction that gives 12.5 g of Freon CF2Cl2 from 32.9 g of CCl4 and excess HF,
    # CCl4 + 2 HF -> CF2Cl2 + 2 HCl.  Answer: 48.3 %.
    formulas = {"CCl4": "CCl4", "HF": "HF", "CF2Cl2": "CF2Cl2", "HCl": "HCl"}
    theo = theoretical_yield_g("CCl4 + 2 HF -> CF2Cl2 + 2 HCl", "CCl4", 32.9, "CF2Cl2", formulas)
    assert round(100 * 12.5 / theo, 1) == 48.3


def test_yield_laws():
    # percent yield is independent of scale, and mass is conserved at 100 % yield
    eq = "CuSO4 + Zn -> Cu + ZnSO4"
    small = theoretical_yield_g(eq, "CuSO4", 1.274, "Cu", CUSO4_ZN)
    big = theoretical_yield_g(eq, "CuSO4", 1274.0, "Cu", CUSO4_ZN)
    assert big == pytest.approx(1000 * small)
    n = 1.0
    reactants = n * (molar_mass_value("CuSO4") + molar_mass_value("Zn"))
    products = n * (molar_mass_value("Cu") + molar_mass_value("ZnSO4"))
    assert reactants == pytest.approx(products, rel=1e-12)
