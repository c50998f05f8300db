"""Formulas that used to be read wrongly without a word: a charge after a bracket, a charge
that may be a count, a zero typed for the letter O, giant counts, and isotope labels in a
SMILES.  Each is read right or refused with a message that shows what would be right."""

from __future__ import annotations

import pytest

from conftest import run_cli, run_edited, write_route
from routeplan.chemistry.formula import MAX_COUNT, molar_mass_value, parse_formula
from routeplan.errors import FormulaError
from route_edits import change, line_of

# Electron mass in u, CODATA 2018 (NIST SP 961, 2019); molmass counts an ion's electrons,
# routeplan neglects them, so molmass's ion masses are put back to the neutral atoms'.
ELECTRON_MASS = 5.48579909065e-4


# (ours, molmass text, periodictable text of the neutral atoms, charge, approximate value)
BRACKET_IONS = [
    ("[Fe(CN)6]4-", "[Fe(CN)6]4-", "Fe(CN)6", -4, 211.95),   # hexacyanoferrate(II)
    ("[SO4]2-", "[SO4]2-", "SO4", -2, 96.06),                 # sulfate
    ("[Co(NH3)6]3+", "[Co(NH3)6]3+", "Co(NH3)6", 3, 161.1),  # hexaamminecobalt(III)
]


@pytest.mark.parametrize("ours, mm_text, pt_text, charge, approx", BRACKET_IONS)
def test_charge_after_a_closing_bracket_is_a_charge(ours, mm_text, pt_text, charge, approx):
    import molmass  # reference library: reads '[...]4-' as a charge too
    import periodictable  # reference library, on the neutral atoms (routeplan neglects electrons)

    f = parse_formula(ours)
    assert f.charge == charge
    ref = molmass.Formula(mm_text)
    assert ref.charge == charge
    assert molar_mass_value(ours) == pytest.approx(ref.mass + ref.charge * ELECTRON_MASS, rel=1e-4)
    assert molar_mass_value(ours) == pytest.approx(periodictable.formula(pt_text).mass, rel=1e-4)
    assert molar_mass_value(ours) == pytest.approx(approx, abs=0.05)
    # the same ion written with the charge after a caret weighs the same
    assert molar_mass_value(ours) == molar_mass_value(ours.replace("]", "]^"))


def test_a_count_that_may_hold_the_charge_is_refused_showing_both_readings():
    with pytest.raises(FormulaError) as info:
        parse_formula("SO42-")
    text = info.value.render()
    assert "count 4 with charge 2−" in text and "count 42 with charge 1−" in text
    assert "'SO4^2-'" in text and "'SO42^-'" in text
    # both spellings it suggests read back unambiguously, as the two readings
    assert parse_formula("SO4^2-").counts["O"] == 4 and parse_formula("SO4^2-").charge == -2
    assert parse_formula("SO42^-").counts["O"] == 42 and parse_formula("SO42^-").charge == -1


@pytest.mark.parametrize("unambiguous", ["NH4+", "MnO4-", "SO4-2", "Fe+3", "C10H20", "Ag10+"])
def test_charges_that_read_one_way_only_are_kept(unambiguous):
    parse_formula(unambiguous)  # a single-digit count, a sign first, or a count ending in 0


def test_a_count_with_a_leading_zero_suggests_the_letter_O():
    with pytest.raises(FormulaError) as info:
        parse_formula("C10H17N03")
    assert "count '03' at position 8 starts with a zero" in info.value.message
    assert "was the letter O meant, as in 'C10H17NO3'?" in info.value.hint
    assert parse_formula("Fe0.95O").counts["Fe"] == pytest.approx(0.95)  # a decimal below 1 stays


def test_a_leading_zero_in_a_route_stops_the_plan_at_the_formula(tmp_path, good_text):
    text, path, result = run_edited(tmp_path, good_text, [("formula: C12H15NO4", "formula: C12H15N04")])
    assert result.exit_code == 2
    assert f"{path}:{line_of(text, 'C12H15N04')}:" in result.stderr
    assert "was the letter O meant, as in 'C12H15NO4'?" in result.stderr
    assert "Traceback" not in result.output


@pytest.mark.parametrize("giant", ["C" + "9" * 400, "S1000000000O2", "C" + "9" * 5000, "(C1000)1001"])
def test_giant_counts_are_refused_naming_the_formula(giant):
    with pytest.raises(FormulaError) as info:
        molar_mass_value(giant)
    assert "beyond any real compound" in info.value.message
    assert info.value.message.startswith("formula '" + giant[:20])


def test_counts_up_to_the_limit_are_read():
    assert parse_formula(f"C{MAX_COUNT}").counts["C"] == MAX_COUNT


def test_smiles_isotopes_are_weighed_as_the_isotope(tmp_path, good_text):
    from rdkit import Chem
    from rdkit.Chem import Descriptors  # reference library: MolWt weighs isotope labels

    import molmass  # reference library

    from routeplan.route.checks import smiles_formula

    smiles = "[2H]C([2H])([2H])N.Cl"  # methylamine-d3 hydrochloride
    mol = Chem.MolFromSmiles(smiles)
    formula, shift = smiles_formula(mol)
    assert formula == "CH3D3ClN" and shift == 0.0
    ours = molar_mass_value(formula)
    assert ours == pytest.approx(molar_mass_value("CD3NH2·HCl"))
    assert ours == pytest.approx(molmass.Formula("CD3NH2HCl").mass, rel=1e-4)
    assert ours == pytest.approx(Descriptors.MolWt(mol), rel=1e-4)
    # a carbon-13 label: the isotope's mass replaces carbon's standard atomic weight
    c13 = Chem.MolFromSmiles("[13CH4]")
    formula, shift = smiles_formula(c13)
    assert formula == "CH4"
    assert molar_mass_value(formula) + shift == pytest.approx(Descriptors.MolWt(c13), rel=1e-4)
    # in a route: a correct formula beside its SMILES agrees, and the equation balances
    text = change(good_text, [("  KI:\n    formula: KI\n    molar_mass: 166.00 g/mol\n",
                               "  KI:\n    formula: KI\n    molar_mass: 166.00 g/mol\n"
                               "  MeND2:\n    formula: CD3NH2·HCl\n    smiles: '" + smiles + "'\n")])
    result = run_cli("check", write_route(tmp_path, text))
    assert result.exit_code == 0, result.stderr
    assert "disagrees" not in result.stderr
