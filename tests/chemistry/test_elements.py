"""Tests of the atomic weight table (routeplan.chemistry.elements)."""

from __future__ import annotations

import os
import re
import subprocess
import sys
from importlib import resources
from pathlib import Path

import pytest

from routeplan.chemistry import elements
from routeplan.chemistry.elements import ATOMIC_WEIGHTS_FILE, atomic_weight, element, table
from routeplan.errors import FormulaError, RouteplanError

REPO = Path(__file__).resolve().parents[2]

# Atomic numbers of the elements WITHOUT a standard atomic weight up to U: Tc, Pm, Po..Ac.
# Source: Prohaska et al., Pure Appl. Chem. 2022, 94, 573 (CIAAW 2021), Table 1 lists none.
_NO_WEIGHT_Z = {43, 61, 84, 85, 86, 87, 88, 89}


def _elements_only():
    return {s: e for s, e in table().items() if not e.is_isotope}


def test_table_has_every_element_with_a_standard_atomic_weight():
    els = _elements_only()
    # CIAAW 2021 (Prohaska et al. 2022): 84 elements have a standard atomic weight.
    assert len(els) == 84
    assert {e.number for e in els.values()} == set(range(1, 93)) - _NO_WEIGHT_Z
    assert len({e.symbol for e in els.values()}) == 84
    # every row is positive, with a positive uncertainty far below the value
    for e in els.values():
        assert 0 < e.uncertainty < 0.01 * e.weight, e.symbol
    # atomic weights grow with atomic number, save the known inversions Ar/K, Co/Ni,
    # Te/I and Th/Pa (a law of the periodic table, common practice, no source)
    by_z = sorted(els.values(), key=lambda e: e.number)
    inversions = {(a.symbol, b.symbol) for a, b in zip(by_z, by_z[1:]) if b.weight < a.weight}
    assert inversions == {("Ar", "K"), ("Co", "Ni"), ("Te", "I"), ("Th", "Pa")}


# Abridged standard atomic weights and their uncertainties, CIAAW 2021:
# Prohaska et al., Pure Appl. Chem. 2022, 94, 573, Table 2 (abridged values).
CIAAW_ABRIDGED = {
    "H": (1.0080, 0.0002),
    "He": (4.0026, 0.0001),
    "Li": (6.94, 0.06),
    "B": (10.81, 0.02),
    "C": (12.011, 0.002),
    "N": (14.007, 0.001),
    "O": (15.999, 0.001),
    "F": (18.998, 0.001),
    "Na": (22.990, 0.001),
    "Mg": (24.305, 0.002),
    "Si": (28.085, 0.001),
    "P": (30.974, 0.001),
    "S": (32.06, 0.02),
    "Cl": (35.45, 0.01),
    "K": (39.098, 0.001),
    "Fe": (55.845, 0.002),
    "Cu": (63.546, 0.003),
    "Zn": (65.38, 0.02),
    "Br": (79.904, 0.003),
    "Pd": (106.42, 0.01),
    "I": (126.90, 0.01),
    "Tl": (204.38, 0.01),
    "Pb": (207.2, 1.1),
}
# Elements whose standard atomic weight is an interval: our table holds the abridged
# (conventional) value exactly.  Same source.
INTERVAL_ELEMENTS = {"H", "Li", "B", "C", "N", "O", "Mg", "Si", "S", "Cl", "Ar", "Br", "Tl", "Pb"}


@pytest.mark.parametrize("symbol", sorted(CIAAW_ABRIDGED))
def test_weights_agree_with_ciaaw_abridged_table(symbol):
    value, unc = CIAAW_ABRIDGED[symbol]  # Prohaska et al. 2022, Table 2
    w = atomic_weight(symbol)
    assert abs(w - value) <= unc + 1e-12
    if symbol in INTERVAL_ELEMENTS:
        assert w == value


def test_interval_elements_carry_their_interval_and_lie_near_it():
    for symbol in INTERVAL_ELEMENTS:
        el = element(symbol)
        m = re.search(r"interval \[([0-9.]+); ([0-9.]+)\]", el.note)
        assert m, symbol
        lo, hi = float(m.group(1)), float(m.group(2))
        assert lo < hi
        # the abridged value lies in the interval widened by its uncertainty
        # (thallium's 204.38 lies just below [204.382, 204.385]; CIAAW 2021)
        assert lo - el.uncertainty <= el.weight <= hi + el.uncertainty, symbol
    others = {s for s, e in _elements_only().items() if "interval" in e.note}
    assert others == INTERVAL_ELEMENTS


# CIAAW 2024 revision (IUPAC CIAAW announcement of 2024, reported in C&EN 102(34), 2024):
# Zr 91.222 ± 0.003, Gd 157.249 ± 0.002, Lu 174.96669 ± 0.00005.
CIAAW_2024 = {"Zr": (91.222, 0.003), "Gd": (157.249, 0.002), "Lu": (174.96669, 0.00005)}


@pytest.mark.parametrize("symbol", sorted(CIAAW_2024))
def test_ciaaw_2024_revisions_are_applied(symbol):
    value, unc = CIAAW_2024[symbol]
    assert element(symbol).weight == value
    assert element(symbol).uncertainty == unc
    assert "2024" in element(symbol).note


def test_every_element_agrees_with_periodictable():
    import periodictable as pt  # reference library (CIAAW 2021 table)
    for symbol, el in _elements_only().items():
        ref = pt.elements.symbol(symbol).mass
        assert el.weight == pytest.approx(ref, rel=1e-4), symbol
        if symbol not in CIAAW_2024:
            # periodictable carries the same CIAAW 2021 release: agreement within the
            # stated uncertainty, far tighter than 1e-4
            assert abs(el.weight - ref) <= el.uncertainty, symbol


# molmass computes a few interval elements from isotope abundances rather than using the
# CIAAW abridged value.  Sulfur is the one beyond 1e-4: molmass 32.0648 vs CIAAW 32.06
# (relative 1.5e-4).  Both lie in the CIAAW 2021 interval [32.059, 32.076], which is what
# we check for it instead.
MOLMASS_EXCEPTIONS = {"S": (32.059, 32.076)}


def test_every_element_agrees_with_molmass():
    import molmass  # reference library
    for symbol, el in _elements_only().items():
        ref = molmass.ELEMENTS[symbol].mass
        if symbol in MOLMASS_EXCEPTIONS:
            lo, hi = MOLMASS_EXCEPTIONS[symbol]
            assert lo <= ref <= hi and lo <= el.weight <= hi
            assert el.weight != pytest.approx(ref, rel=1e-4)  # the exception is still needed
        else:
            assert el.weight == pytest.approx(ref, rel=1e-4), symbol


def test_deuterium_and_tritium_are_the_ame2020_atomic_masses():
    import periodictable as pt
    import molmass
    # AME2020 (Wang et al., Chinese Physics C 45, 030003, 2021), as carried by periodictable
    assert atomic_weight("D") == pytest.approx(pt.elements.D.mass, rel=1e-10)
    assert atomic_weight("T") == pytest.approx(pt.elements.T.mass, rel=1e-10)
    # molmass carries the earlier AME2016 mass of 2H (2.01410177812), 1.4e-10 relative from
    # AME2020, so it is checked at 1e-8; molmass has no 3H at all
    assert atomic_weight("D") == pytest.approx(molmass.Formula("[2H]").mass, rel=1e-8)
    assert element("D").is_isotope and element("T").is_isotope
    assert element("D").number == element("T").number == 1


@pytest.mark.parametrize("symbol,name", [("Tc", "technetium"), ("Pm", "promethium"),
                                         ("Po", "polonium"), ("Ra", "radium"),
                                         ("Pu", "plutonium"), ("Og", "oganesson")])
def test_element_without_standard_weight_is_a_clear_error(symbol, name):
    with pytest.raises(FormulaError) as info:
        atomic_weight(symbol)
    assert f"'{symbol}'" in str(info.value)
    assert name in str(info.value)
    assert "no standard atomic weight" in str(info.value)
    assert elements.is_symbol(symbol) and not elements.has_standard_weight(symbol)


@pytest.mark.parametrize("symbol", ["Xx", "cl", "", "CL"])
def test_unknown_symbol_is_an_error(symbol):
    with pytest.raises(FormulaError) as info:
        atomic_weight(symbol)
    assert isinstance(info.value, RouteplanError)
    assert f"unknown element '{symbol}'" in str(info.value)


def test_data_file_is_packaged_with_its_source_in_the_header():
    path = resources.files("routeplan.chemistry").joinpath(ATOMIC_WEIGHTS_FILE)
    assert ATOMIC_WEIGHTS_FILE == "atomic_weights.csv"
    text = path.read_text(encoding="utf-8")
    header = "".join(line for line in text.splitlines(True) if line.startswith("#"))
    for needed in ("CIAAW", "Standard atomic weights of the elements 2021", "Prohaska",
                   "Pure Appl. Chem. 2022, 94, 573", "2024", "AME2020", "Chinese Physics C"):
        assert needed in header
    columns = next(line for line in text.splitlines() if not line.startswith("#"))
    assert columns == "atomic_number,symbol,name,weight,uncertainty,note"


def test_table_is_read_once_and_read_only():
    assert table() is table()
    with pytest.raises(TypeError):
        table()["H"] = None  # type: ignore[index]
    with pytest.raises(AttributeError):
        element("H").weight = 1.0  # type: ignore[misc]


def test_importing_chemistry_loads_no_pint():
    code = (
        "import sys\n"
        "import routeplan.chemistry as c\n"
        "before = 'pint' in sys.modules\n"
        "c.parse_formula('CuSO4.5H2O'); c.molar_mass_value('H2O'); c.atomic_weight('C')\n"
        "c.imbalance('2 A -> B', {'A': 'H', 'B': 'H2'}); c.parse_equation('A -> B')\n"
        "middle = 'pint' in sys.modules\n"
        "c.molar_mass('H2O')\n"
        "print(before, middle, 'pint' in sys.modules)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], cwd=REPO, capture_output=True, text=True,
                         env={**os.environ, "PYTHONPATH": str(REPO)}, check=True)
    # pint stays unloaded until a pint quantity is asked for (the last call proves the probe works)
    assert out.stdout.split() == ["False", "False", "True"]
