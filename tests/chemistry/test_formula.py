"""Tests of the formula parser and molar masses (routeplan.chemistry.formula)."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from routeplan.chemistry import (
    Formula,
    element_counts,
    hill_formula,
    molar_mass,
    molar_mass_value,
    parse_formula,
)
from routeplan.chemistry.elements import table
from routeplan.errors import FormulaError

# Electron mass in u, CODATA 2018 (NIST SP 961, 2019): 5.48579909065e-4.  routeplan neglects
# the electrons of an ion; periodictable and molmass count them, so their ion masses are
# put back to the neutral atoms' mass before comparing.
ELECTRON_MASS = 5.48579909065e-4

# (our formula, periodictable's spelling, molmass's spelling, molmass divisor)
# periodictable writes a hydrate as 'A+nB' (it reads 'CuSO4.5H2O' as O4.5), knows no '[]'
# and charges only single atoms ('Fe{3+}'); molmass reads 'A.nB' but no decimal counts, so
# the hemihydrate is compared as (CaSO4)2·H2O divided by 2.  Charged species are compared
# with their neutral counterparts (electron mass, above).
REFERENCE_FORMULAS = [
    ("H2O", "H2O", "H2O", 1),                                   # water
    ("C2H5OH", "C2H5OH", "C2H5OH", 1),                          # ethanol
    ("CH2Cl2", "CH2Cl2", "CH2Cl2", 1),                          # dichloromethane
    ("C6H5CH3", "C6H5CH3", "C6H5CH3", 1),                       # toluene
    ("C4H8O", "C4H8O", "C4H8O", 1),                             # tetrahydrofuran
    ("HCON(CH3)2", "HCON(CH3)2", "HCON(CH3)2", 1),              # DMF
    ("CH3CN", "CH3CN", "CH3CN", 1),                             # acetonitrile
    ("CH3COOC2H5", "CH3COOC2H5", "CH3COOC2H5", 1),              # ethyl acetate
    ("(CH3CO)2O", "(CH3CO)2O", "(CH3CO)2O", 1),                 # acetic anhydride
    ("C8H7BrO2", "C8H7BrO2", "C8H7BrO2", 1),                    # methyl 4-bromobenzoate
    ("K2CO3", "K2CO3", "K2CO3", 1),
    ("NaBH4", "NaBH4", "NaBH4", 1),
    ("LiAlH4", "LiAlH4", "LiAlH4", 1),
    ("(C4H9)4NBr", "(C4H9)4NBr", "(C4H9)4NBr", 1),              # tetrabutylammonium bromide
    ("CuSO4·5H2O", "CuSO4+5H2O", "CuSO4.5H2O", 1),
    ("Na2CO3.10H2O", "Na2CO3+10H2O", "Na2CO3(H2O)10", 1),
    ("MgSO4*7H2O", "MgSO4+7H2O", "MgSO4.7H2O", 1),
    ("CaSO4·0.5H2O", "CaSO4+0.5H2O", "(CaSO4)2H2O", 2),         # hemihydrate
    ("SO4-2", "SO4", "SO4-2", 1),                               # sulfate
    ("SO4^2-", "SO4", "[SO4]2-", 1),
    ("NH4+", "NH4", "NH4+", 1),                                 # ammonium
    ("Fe+3", "Fe{3+}", "Fe+3", 1),                              # iron(III)
    ("MnO4-", "MnO4", "MnO4-", 1),                              # permanganate
    ("Pd(C2H3O2)2", "Pd(C2H3O2)2", "Pd(C2H3O2)2", 1),           # palladium(II) acetate
    ("Pd(P(C6H5)3)4", "Pd(P(C6H5)3)4", "Pd(P(C6H5)3)4", 1),     # Pd(PPh3)4
    ("[Cu(NH3)4]SO4", "(Cu(NH3)4)SO4", "[Cu(NH3)4]SO4", 1),     # tetraamminecopper(II) sulfate
    ("[Cu(NH3)4]SO4·H2O", "(Cu(NH3)4)SO4+H2O", "[Cu(NH3)4]SO4.H2O", 1),
    ("D2O", "D2O", "D2O", 1),                                   # heavy water
]


@pytest.mark.parametrize("ours,pt_text,mm_text,divisor", REFERENCE_FORMULAS)
def test_molar_mass_against_periodictable(ours, pt_text, mm_text, divisor):
    import periodictable as pt  # reference library
    f = pt.formula(pt_text)
    ref = f.mass + f.charge * ELECTRON_MASS  # back to neutral atoms (periodictable subtracts e-)
    assert molar_mass_value(ours) == pytest.approx(ref, rel=1e-4)


@pytest.mark.parametrize("ours,pt_text,mm_text,divisor", REFERENCE_FORMULAS)
def test_molar_mass_against_molmass(ours, pt_text, mm_text, divisor):
    import molmass  # reference library
    f = molmass.Formula(mm_text)
    assert f.charge == parse_formula(ours).charge * divisor
    ref = (f.mass + f.charge * ELECTRON_MASS) / divisor  # molmass adds the electrons of anions
    assert molar_mass_value(ours) == pytest.approx(ref, rel=1e-4)


# (our formula, SMILES) for RDKit's Descriptors.MolWt (reference library, optional)
RDKIT_CASES = [
    ("H2O", "O"),
    ("C2H5OH", "CCO"),
    ("CH2Cl2", "ClCCl"),
    ("C6H5CH3", "Cc1ccccc1"),
    ("HCON(CH3)2", "CN(C)C=O"),
    ("CH3COOC2H5", "CCOC(C)=O"),
    ("C8H7BrO2", "COC(=O)c1ccc(Br)cc1"),
    ("K2CO3", "[K+].[K+].[O-]C([O-])=O"),
    ("CuSO4·5H2O", "[Cu+2].[O-]S(=O)(=O)[O-]" + ".O" * 5),
    ("Na2CO3·10H2O", "[Na+].[Na+].[O-]C([O-])=O" + ".O" * 10),
    ("SO4-2", "[O-]S(=O)(=O)[O-]"),
    ("NH4+", "[NH4+]"),
    ("Pd(C2H3O2)2", "CC(=O)O[Pd]OC(C)=O"),
    ("Pd(P(C6H5)3)4", "[Pd]" + ".P(c1ccccc1)(c1ccccc1)c1ccccc1" * 4),
    ("[Cu(NH3)4]SO4", "[Cu+2].N.N.N.N.[O-]S(=O)(=O)[O-]"),
    ("D2O", "[2H]O[2H]"),
]


@pytest.mark.parametrize("ours,smiles", RDKIT_CASES)
def test_molar_mass_and_composition_against_rdkit(ours, smiles):
    from rdkit import Chem
    from rdkit.Chem import Descriptors

    mol = Chem.MolFromSmiles(smiles)
    counts: dict[str, int] = {}
    for atom in mol.GetAtoms():
        sym = {2: "D", 3: "T"}.get(atom.GetIsotope(), atom.GetSymbol()) \
            if atom.GetSymbol() == "H" else atom.GetSymbol()
        counts[sym] = counts.get(sym, 0) + 1
        if atom.GetTotalNumHs():
            counts["H"] = counts.get("H", 0) + atom.GetTotalNumHs()
    assert element_counts(ours) == pytest.approx(counts)
    assert sorted(element_counts(ours)) == sorted(counts)
    assert parse_formula(ours).charge == Chem.GetFormalCharge(mol)
    assert molar_mass_value(ours) == pytest.approx(Descriptors.MolWt(mol), rel=1e-4)


def test_water_and_copper_sulfate_pentahydrate():
    # water 18.015 g/mol and CuSO4·5H2O 249.68 g/mol: values printed in general-chemistry
    # tables (e.g. OpenStax Chemistry 2e, ch. 3), from memory
    assert round(molar_mass_value("H2O"), 3) == 18.015
    assert round(molar_mass_value("CuSO4·5H2O"), 2) == 249.68
    q = molar_mass("CuSO4·5H2O")
    assert q.to("kg/mol").magnitude == pytest.approx(molar_mass_value("CuSO4·5H2O") / 1000)
    assert q.check("[mass] / [substance]")
    assert q.to("g/mol").magnitude == molar_mass_value("CuSO4·5H2O")


@pytest.mark.parametrize("a,b", [
    ("CuSO4·5H2O", "CuSO4.5H2O"), ("CuSO4·5H2O", "CuSO4*5H2O"), ("CuSO4·5H2O", "CuSO4 · 5 H2O"),
    ("CuSO4·5H2O", "CuSO4(H2O)5"), ("CaSO4·0.5H2O", "CaSO4*0.5H2O"),
    ("CaSO4·0.5H2O", "CaSO4.0.5H2O"), ("CaSO4·0.5H2O", "(CaSO4)2·H2O/2"),
    ("SO4-2", "SO4^2-"), ("SO4-2", "SO4^-2"), ("SO4-2", "SO4--"), ("SO4-2", "SO4 2-"),
    ("SO4-2", "SO₄−2"), ("Fe+3", "Fe+++"), ("Fe+3", "Fe^3+"), ("NH4+", "NH4^+"),
    ("C8H7BrO2", " C8 H7 Br O2 "), ("[Cu(NH3)4]SO4", "(Cu(NH3)4)SO4"),
    ("[Cu(NH3)4]SO4", "CuN4H12SO4"), ("Na2CO3.10H2O", "Na2CO3·10H2O"),
])
def test_spellings_of_one_substance_agree(a, b):
    if b.endswith("/2"):
        fa, fb = parse_formula(a), parse_formula(b[:-2])
        assert {k: 2 * v for k, v in fa.counts.items()} == dict(fb.counts)
        return
    assert parse_formula(a) == parse_formula(b)
    assert molar_mass_value(a) == molar_mass_value(b)


def test_counts_are_in_hill_order_and_whole_counts_are_ints():
    assert list(element_counts("C2H5OH")) == ["C", "H", "O"]
    assert list(element_counts("CH3CN")) == ["C", "H", "N"]
    assert list(element_counts("H2SO4")) == ["H", "O", "S"]        # no carbon: alphabetical
    assert list(element_counts("CCl4")) == ["C", "Cl"]
    counts = element_counts("CaSO4·0.5H2O")
    assert counts == {"Ca": 1, "H": 1, "O": 4.5, "S": 1}
    assert type(counts["H"]) is int and type(counts["O"]) is float
    assert element_counts("Fe0.95O") == {"Fe": 0.95, "O": 1}
    assert element_counts("C2H4.5") == {"C": 2, "H": 4.5}
    assert element_counts("Li1.2 Mn0.54O2") == {"Li": 1.2, "Mn": 0.54, "O": 2}
    assert element_counts("CuSO4.H2O.H2O") == element_counts("CuSO4·2H2O")
    # decimal multipliers are exact: ten times 0.1 H2O is one H2O
    assert element_counts("(H2O)0.1") == {"H": 0.2, "O": 0.1}
    assert element_counts("((H2O)0.1)10") == {"H": 2, "O": 1}


def test_hill_formula_display():
    assert hill_formula({"O": 1, "H": 2}) == "H2O"
    assert hill_formula({"O": 2, "C": 1}) == "CO2"
    assert hill_formula(element_counts("CuSO4·5H2O")) == "CuH10O9S"
    assert hill_formula({"S": 1, "O": 4}, charge=-2) == "O4S-2"
    assert hill_formula({"N": 1, "H": 4}, charge=1) == "H4N+"
    assert hill_formula({"C": 1.5, "H": 3}) == "C1.5 H3"
    assert hill_formula({"C": 2, "H": 0}) == "C2"
    assert parse_formula("SO4-2").hill() == "O4S-2"
    with pytest.raises(ValueError):
        hill_formula({"C": -1})


def test_electron_mass_is_neglected_and_charge_kept():
    assert molar_mass_value("SO4-2") == molar_mass_value("SO4")
    assert parse_formula("SO4-2").charge == -2
    assert parse_formula("NH4+").charge == 1
    assert parse_formula("Fe+3").charge == 3
    assert parse_formula("H2O").charge == 0


def test_results_are_frozen_and_cached():
    f = parse_formula("C8H7BrO2")
    assert f is parse_formula("C8H7BrO2")
    with pytest.raises(TypeError):
        f.counts["C"] = 9  # type: ignore[index]
    with pytest.raises(AttributeError):
        f.charge = 1  # type: ignore[misc]
    counts = element_counts("C8H7BrO2")
    counts["C"] = 99
    assert element_counts("C8H7BrO2")["C"] == 8
    assert hash(f) == hash(Formula({"C": 8, "H": 7, "Br": 1, "O": 2}))
    assert parse_formula(f) is f
    assert molar_mass_value(f) == molar_mass_value("C8H7BrO2")


def test_element_without_standard_weight_is_counted_but_has_no_molar_mass():
    assert element_counts("TcO4-") == {"O": 4, "Tc": 1}
    with pytest.raises(FormulaError) as info:
        molar_mass_value("NaTcO4")
    err = info.value
    assert "'Tc'" in str(err) and "technetium" in str(err)
    assert "no standard atomic weight" in str(err)
    assert err.token == "Tc" and err.position == 3
    with pytest.raises(FormulaError) as info:
        molar_mass_value("CH3CO2Ac")  # acetyl written as 'Ac' is actinium
    assert "CH3CO" in str(info.value)


# (bad formula, offending text that the message must name, 1-based position or None)
BAD_FORMULAS = [
    ("C8H7Xq", "'Xq' at position 5", 5),
    ("2H2O", "'2' at position 1", 1),
    ("0.5H2O", "'0.5' at position 1", 1),
    ("", "empty", None),
    ("   ", "empty", None),
    ("(C2H3O2", "'(' at position 1", 1),
    ("Pd(C2H3O2", "'(' at position 3", 3),
    ("C2H3O2)2", "')' at position 7", 7),
    ("[Cu(NH3]4", "']' at position 8", 8),
    ("Pd()2", "'()' at position 3", 3),
    ("C0H4", "zero count '0' at position 2", 2),
    ("(CH2)0", "zero count '0' at position 6", 6),
    ("CuSO4·0H2O", "zero count '0' at position 7", 7),
    ("CuSO4.", "dangling '.' at position 6", 6),
    ("CuSO4·", "dangling '·' at position 6", 6),
    ("CuSO4*", "dangling '*' at position 6", 6),
    ("CuSO4..5H2O", "'.' at position 7", 7),
    ("·5H2O", "'·' at position 1", 1),
    ("CuSO4·5", "count '5' at position 7", 7),
    ("cl", "'cl' at position 1", 1),
    ("NaCL", "'L' at position 4", 4),
    ("Pd(PPh3)4", "'Ph' at position 5", 5),
    ("RCOOH", "'R' at position 1", 1),
    ("C 8H", "'8' at position 3", 3),
    ("C(2H)", "'2' at position 3", 3),
    ("C2H5-OH", "'-OH' at position 5", 5),
    ("SO4-0", "zero charge '-0' at position 4", 4),
    ("SO4+-", "'+-' at position 4", 4),
    ("CaSO4.1.5.H2O", "'4.1.' at position 5", 5),
    ("C1.5.3H2O", "'1.5.' at position 2", 2),
    ("H2O = H2O", "'=' at position 5", 5),
    ("H²O", "'²' at position 2", 2),
    ("(CuSO4·5H2O)", "'·' at position 7", 7),
]


@pytest.mark.parametrize("text,named,position", BAD_FORMULAS)
def test_bad_formulas_are_errors_that_name_the_offending_text(text, named, position):
    with pytest.raises(FormulaError) as info:
        parse_formula(text)
    err = info.value
    assert named in str(err)
    assert err.position == position
    if position is not None:
        assert f"formula '{text}'" in str(err)
        assert err.formula == text
        assert text.translate({0x2212: "-"})[position - 1:].startswith(err.token[:1])


@pytest.mark.parametrize("text,suggestion", [
    ("CL", "'Cl'"), ("cl", "'Cl'"), ("NA", "'Na'"), ("br", "'Br'"), ("PPh3", "C6H5"),
    ("2H2O", "'CuSO4·2H2O'"), ("MeOH", "CH3"), ("CuSO4.", "'CuSO4·5H2O'"),
])
def test_errors_suggest_what_would_be_right(text, suggestion):
    with pytest.raises(FormulaError) as info:
        parse_formula(text)
    assert suggestion in str(info.value)
    assert info.value.hint and suggestion in info.value.hint


def test_non_text_is_a_formula_error():
    for bad in (12, None, 1.5, ["H2O"]):
        with pytest.raises(FormulaError):
            parse_formula(bad)  # type: ignore[arg-type]
        with pytest.raises(FormulaError):
            molar_mass_value(bad)  # type: ignore[arg-type]


# --- property tests ------------------------------------------------------------------

_SYMBOLS = sorted(s for s, e in table().items())
_element = st.sampled_from(_SYMBOLS)
_count = st.one_of(st.integers(1, 30), st.sampled_from([0.5, 0.25, 0.75]))


def _count_text(k) -> str:
    return "" if k == 1 else str(k)


@st.composite
def simple_formulas(draw):
    """A formula of elements with counts, some groups in brackets with multipliers."""
    items = []
    for _ in range(draw(st.integers(1, 4))):
        if draw(st.booleans()):
            items.append(draw(_element) + _count_text(draw(_count)))
        else:
            inner = "".join(draw(_element) + _count_text(draw(_count))
                            for _ in range(draw(st.integers(1, 3))))
            o, c = draw(st.sampled_from(["()", "[]"]))
            items.append(f"{o}{inner}{c}{_count_text(draw(st.integers(1, 6)))}")
    return "".join(items)


@settings(max_examples=150, deadline=None)
@given(a=simple_formulas(), b=simple_formulas(),
       n=st.one_of(st.integers(1, 12), st.sampled_from([0.5, 0.25, 1.5, 2.5])),
       sep=st.sampled_from(["·", "*", "."]))
def test_molar_mass_is_additive_over_hydrate_parts(a, b, n, sep):
    if sep == "." and isinstance(n, float) and n >= 1:
        sep = "·"  # 'X4.1.5H2O' is ambiguous on purpose (an error); tested above
    text = f"{a}{sep}{_count_text(n)}{b}"
    # M(A·nB) = M(A) + n·M(B): mass is additive (law of conservation of mass)
    assert molar_mass_value(text) == pytest.approx(molar_mass_value(a) + n * molar_mass_value(b),
                                                   rel=1e-12)
    ca, cb, cab = element_counts(a), element_counts(b), element_counts(text)
    for sym in set(ca) | set(cb):
        assert cab[sym] == pytest.approx(ca.get(sym, 0) + n * cb.get(sym, 0), rel=1e-12)


@settings(max_examples=150, deadline=None)
@given(x=simple_formulas(), k=st.integers(1, 50), brackets=st.sampled_from(["()", "[]"]))
def test_molar_mass_scales_with_a_multiplier(x, k, brackets):
    o, c = brackets
    # M((X)k) = k·M(X)
    assert molar_mass_value(f"{o}{x}{c}{k}") == pytest.approx(k * molar_mass_value(x), rel=1e-12)
    # and three parts: A·B·2C
    assert molar_mass_value(f"{x}·{x}·2{x}") == pytest.approx(4 * molar_mass_value(x), rel=1e-12)


@settings(max_examples=150, deadline=None)
@given(x=simple_formulas(), charge=st.integers(-4, 4))
def test_hill_formula_reads_back_to_the_same_formula(x, charge):
    f = parse_formula(x)
    again = parse_formula(hill_formula(f.counts, charge))
    assert dict(again.counts) == pytest.approx(dict(f.counts), rel=1e-12)
    assert list(again.counts) == list(f.counts)
    assert again.charge == charge


_FORMULA_CHARS = list("CHONSPFIBKLiMgClBrPdCuFeqxz()[]{}·•.*+-^=,/ 0123456789²₂−") + [
    "Cl", "Br", "Pd", "H2O", "·5", ".", "0.5", "SO4", "-2", "^2-", "Xq"]


@settings(max_examples=400, deadline=None)
@given(st.one_of(st.text(), st.lists(st.sampled_from(_FORMULA_CHARS), max_size=14).map("".join)))
def test_parsing_raises_only_formula_errors(text):
    try:
        f = parse_formula(text)
    except FormulaError as err:
        assert err.formula == text or err.formula == ""
        return
    assert f.counts and all(v > 0 for v in f.counts.values())
    assert isinstance(f.charge, int)
    try:
        m = molar_mass_value(text)
    except FormulaError as err:
        assert "no standard atomic weight" in str(err)
    else:
        assert m > 0
