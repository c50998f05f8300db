"""Values that are valid one by one but cannot be real: impossible solutions, densities and
molar masses out of any substance's range, absurd coefficients (errors), and an equation
that does not balance by mass where the atoms cannot be counted (a warning).

Every case goes through the command line: exit code, ``file:line:`` and key path, the
words of the message and of the suggested fix, and no traceback.
"""

from __future__ import annotations

import pytest

from conftest import run_cli, write_route
from routeplan.errors import RouteError
from routeplan.route.load import load_route, load_route_text
from route_edits import change, line_of, problem_lines


def assert_one_error(tmp_path, text: str, key: str, marker, words: list[str]) -> str:
    """Check ``text``: exit 2, exactly one error, at ``marker``'s line and ``key``, with ``words``."""
    path = write_route(tmp_path, text)
    line = line_of(text, marker)
    result = run_cli("check", path)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert result.stdout == ""
    errors = [t for t in result.stderr.splitlines() if t.startswith("error: ")]
    assert len(errors) == 1, result.stderr
    hits = problem_lines(result.stderr, "error", path, line, key)
    assert hits, f"no error at line {line} for {key}:\n{result.stderr}"
    for w in words:
        assert w in hits[0], (w, hits[0])
    return hits[0]


# id, edits of data/routes/good.yaml, key path, marker of the line, words of message and hint
ERRORS = [
    # HCl: 1.008 + 35.45 = 36.458 g/mol (IUPAC/CIAAW conventional atomic weights);
    # 60 mol/L x 36.458 g/mol = 2187 g of HCl in a litre weighing 1100 g; the ceiling is
    # 1100 / 36.458 = 30.17 mol/L, and 6 mol/L (one decimal place less) is below it.
    ("molarity heavier than the solution", [("      molarity: 6 mol/L", "      molarity: 60 mol/L")],
     "materials.HCl6M.solution.molarity", "molarity: 60 mol/L",
     ["60 mol/L × 36.46 g/mol is 2.187 kg of solute per litre",
      "a litre of this solution, at 1.1 g/mL, weighs only 1.1 kg",
      "must be below 30.17 mol/L", "was 6 mol/L meant", "decimal point"]),
    ("molarity a hundred times too high", [("      molarity: 6 mol/L", "      molarity: 600 mol/L")],
     "materials.HCl6M.solution.molarity", "molarity: 600 mol/L",
     ["600 mol/L × 36.46 g/mol is 21.87 kg of solute per litre", "was 6 mol/L meant"]),
    ("mass fraction of 100 %", [("mass_fraction: 50 %", "mass_fraction: 100 %")],
     "materials.caustic.solution.mass_fraction", "mass_fraction: 100 %",
     ["leaves no solvent", "not a solution", "density: 1.52 g/mL"]),
    # osmium, the densest element, 22.59 g/cm3: CRC Handbook of Chemistry and Physics (from memory)
    ("density in g/L written as g/mL", [("    density: 1.08 g/mL", "    density: 1080 g/mL")],
     "materials.Ac2O.density", "density: 1080 g/mL",
     ["density 1080 g/mL is more than any liquid or solid", "osmium", "22.59 g/mL", "was 1.08 g/mL meant",
      "g/L and kg/m³ are 1000 times smaller"]),
    ("density in g/mL written as g/L", [("    density: 1.08 g/mL", "    density: 1.08 g/L")],
     "materials.Ac2O.density", "density: 1.08 g/L",
     ["density 1.08 g/L (0.00108 g/mL) is less than any liquid or solid", "was 1.08 g/mL meant"]),
    ("density of a gas", [("    density: 1.08 g/mL", "    density: 0.00198 kg/L")],
     "materials.Ac2O.density", "density: 0.00198 kg/L",
     ["density 0.00198 kg/L (0.00198 g/mL) is less than", "was 1.98 g/mL meant"]),
    ("density far too low", [("    density: 1.08 g/mL", "    density: 0.00001 g/mL")],
     "materials.Ac2O.density", "density: 0.00001 g/mL",
     ["is less than any liquid or solid", "between 0.05 and 25 g/mL", "a gas charged by mass needs no density"]),
    # the solution's own density: reported once, and its molarity is then not judged by it
    ("solution density out of range", [("      density: 1.10 g/mL", "      density: 1100 g/mL")],
     "materials.HCl6M.solution.density", "density: 1100 g/mL",
     ["density 1100 g/mL is more than any liquid or solid", "was 1.1 g/mL meant"]),
    ("solution density in g/L", [("      density: 1.10 g/mL", "      density: 1.10 g/L")],
     "materials.HCl6M.solution.density", "density: 1.10 g/L",
     ["density 1.1 g/L (0.0011 g/mL) is less than any liquid or solid", "was 1.1 g/mL meant"]),
    # KI: 39.098 + 126.90 = 166.00 g/mol (IUPAC/CIAAW); the floor is H, 1.008 g/mol (same table).
    # Only this error: the disagreement with the formula would say the same again.
    ("molar mass below hydrogen", [("molar_mass: 166.00 g/mol", "molar_mass: 0.166 g/mol")],
     "materials.KI.molar_mass", "molar_mass: 0.166 g/mol",
     ["molar mass 0.166 g/mol is less than that of a hydrogen atom, 1.008 g/mol", "was 166 g/mol meant"]),
    ("molar mass in mg/mol", [("molar_mass: 166.00 g/mol", "molar_mass: 166 mg/mol")],
     "materials.KI.molar_mass", "molar_mass: 166 mg/mol",
     ["molar mass 166 mg/mol (0.166 g/mol) is less than that of a hydrogen atom"]),
    ("coefficient far too large", [("equation: ester + caustic ->", "equation: 1e7 ester + caustic ->")],
     "steps[2].equation", "1e7 ester", ["coefficient '1e7' of 'ester' is out of range", "between 1e-6 and 1e6",
                                        "misplaced exponent"]),
    ("coefficient far too small", [("-> salt + EtOH", "-> 1e-320 salt + EtOH")],
     "steps[2].equation", "1e-320 salt", ["coefficient '1e-320' of 'salt' is out of range"]),
]


@pytest.mark.parametrize("edits,key,marker,words", [e[1:] for e in ERRORS], ids=[e[0] for e in ERRORS])
def test_implausible_value_is_an_error(tmp_path, good_text, edits, key, marker, words):
    assert_one_error(tmp_path, change(good_text, edits), key, marker, words)


PHENOL = """\
route: phenol in solution
target: {material: P, amount: 1 kg}
materials:
  A: {formula: C6H6O, solution: {molarity: MOLARITY, density: DENSITY}}
  P: {formula: C6H6O}
steps:
  - id: S1
    equation: A -> P
    yield: 90 %
"""


def phenol(molarity: str, density: str = "1.1 g/mL") -> str:
    return PHENOL.replace("MOLARITY", molarity).replace("DENSITY", density)


def test_the_reviewed_phenol_solution_is_an_error(tmp_path):
    # phenol C6H6O: 6 x 12.011 + 6 x 1.008 + 15.999 = 94.113 g/mol (IUPAC/CIAAW conventional
    # atomic weights); 20 mol/L x 94.113 g/mol = 1882 g/L against 1100 g/L of solution;
    # ceiling 1100 / 94.113 = 11.69 mol/L
    assert_one_error(tmp_path, phenol("20 mol/L"), "materials.A.solution.molarity", "molarity: 20 mol/L",
                     ["20 mol/L × 94.11 g/mol is 1.882 kg of solute per litre",
                      "a litre of this solution, at 1.1 g/mL, weighs only 1.1 kg", "below 11.69 mol/L",
                      "was 2 mol/L meant"])


@pytest.mark.parametrize("molarity,density,valid", [
    ("11.6 mol/L", "1.1 g/mL", True),      # 11.6 x 94.113 = 1091.7 g/L < 1100 g/L
    ("11.7 mol/L", "1.1 g/mL", False),     # 1101.1 g/L > 1100 g/L
    ("2 mol/L", "1.1 g/mL", True),
    ("0.5 mol/mL", "1.1 g/mL", False),     # 500 mol/L, another unit: converted before comparing
    ("2 mol/L", "1100 kg/m3", True),       # 1100 kg/m3 = 1.1 g/mL
    ("2 mol/L", "0.15 g/mL", False),       # 188 g/L of solute in a litre weighing 150 g
])
def test_molarity_is_compared_with_the_density_in_any_unit(tmp_path, molarity, density, valid):
    path = write_route(tmp_path, phenol(molarity, density))
    result = run_cli("check", path)
    assert "Traceback" not in result.output
    assert result.exit_code == (0 if valid else 2), result.output
    assert ("kg of solute per litre" in result.stderr) == (not valid)


def test_solute_as_heavy_as_the_solution_is_an_error():
    # 10 mol/L x 100 g/mol = 1000 g in a litre weighing 1.0 g/mL x 1000 mL = 1000 g: no solvent
    text = PHENOL.replace("formula: C6H6O, solution", "molar_mass: 100 g/mol, solution") \
        .replace("P: {formula: C6H6O}", "P: {molar_mass: 100 g/mol}")
    with pytest.raises(RouteError) as info:
        load_route_text(text.replace("MOLARITY", "10 mol/L").replace("DENSITY", "1.0 g/mL"), "equal.yaml")
    assert "1 kg of solute per litre" in str(info.value)
    route = load_route_text(text.replace("MOLARITY", "9.99 mol/L").replace("DENSITY", "1.0 g/mL"), "below.yaml")
    assert route.materials["A"].solution.molarity.m_as("mol/L") == 9.99


DENSE = """\
route: densities
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol, density: DENSITY}
  P: {molar_mass: 100 g/mol}
steps:
  - id: S1
    equation: A -> P
    yield: 90 %
"""


@pytest.mark.parametrize("density,valid", [
    ("0.05 g/mL", True), ("25 g/mL", True),          # the bounds themselves are accepted
    ("0.0499 g/mL", False), ("25.1 g/mL", False),
    ("1080 kg/m3", True), ("1.08 kg/L", True), ("1.08 g/cm3", True),
    # 1 lb = 0.45359237 kg, 1 US gallon = 3.785411784 L (NIST SP 811, appendix B):
    # 9 lb/gal = 1.078 g/mL; 9000 lb/gal = 1078 g/mL
    ("9 lb/gal", True), ("9000 lb/gal", False),
    ("1080 g/L", True), ("1.08 g/L", False),
])
def test_density_bounds_in_any_unit(tmp_path, density, valid):
    path = write_route(tmp_path, DENSE.replace("DENSITY", density))
    result = run_cli("check", path)
    assert "Traceback" not in result.output
    assert result.exit_code == (0 if valid else 2), result.output
    if not valid:
        (hit,) = problem_lines(result.stderr, "error", path, 4, "materials.A.density")
        assert f"density {density.replace('cm3', 'cm³')}" in hit


@pytest.mark.parametrize("command", ["check", "plan"])
def test_absurd_coefficients_stop_check_and_plan_without_a_traceback(tmp_path, command):
    # the review's example: the planner divided by zero on it
    text = DENSE.replace("A: {molar_mass: 100 g/mol, density: DENSITY}", "A: {molar_mass: 100 g/mol}") \
        .replace("equation: A -> P", "equation: 1e308 A -> 1e-308 P")
    path = write_route(tmp_path, text)
    result = run_cli(command, path)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    (hit,) = problem_lines(result.stderr, "error", path, 8, "steps[0].equation")
    assert "coefficient '1e308' of 'A' is out of range" in hit


# -- balance by mass, where the atoms cannot be counted

MASSES = """\
route: mass balance
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  B: {MASS_B}
  P: {molar_mass: MASS_P}
steps:
  - id: S1
    equation: EQUATION
    yield: 90 %
"""


def masses(equation: str, m_p: str, b: str = "molar_mass: 50 g/mol") -> str:
    return MASSES.replace("EQUATION", equation).replace("MASS_P", m_p).replace("MASS_B", b)


def test_the_reviewed_mass_imbalance_is_a_warning(tmp_path):
    # 2 x 100 + 50 = 250 g/mol of reactants; 3 x 200 = 600 g/mol of products: 350 more
    text = masses("2 A + B -> 3 P", "200 g/mol")
    path = write_route(tmp_path, text)
    line = line_of(text, "equation: 2 A + B")
    words = ("step S1 does not balance by mass: the products weigh 350 g/mol more than the reactants "
             "(600 vs 250 g/mol)")
    result = run_cli("check", path)
    assert result.exit_code == 0, result.output
    assert "Traceback" not in result.output
    assert f"{path}: valid" in result.stdout
    (hit,) = problem_lines(result.stderr, "warning", path, line, "steps[0].equation")
    assert words in hit and "check the coefficients and the molar masses" in hit
    (w,) = load_route(path).warnings
    assert w.severity == "warning" and w.step == "S1" and w.location.line == line

    strict = run_cli("check", "--strict", path)
    assert strict.exit_code == 2
    assert "Traceback" not in strict.output
    (hit,) = problem_lines(strict.stderr, "error", path, line, "steps[0].equation")
    assert words in hit
    assert "counted as errors under --strict" in strict.stderr


@pytest.mark.parametrize("equation,m_p,words", [
    # 2 x 100 + 50 = 250 reactants; 200 products: 50 g/mol less (20 %)
    ("2 A + B -> P", "200 g/mol", "the products weigh 50 g/mol less than the reactants (200 vs 250 g/mol)"),
    ("2 A + B -> P", "250 g/mol", None),
    ("2 A + B -> P", "251.2 g/mol", None),      # 0.48 % more: within 0.5 %
    ("2 A + B -> P", "251.3 g/mol", "the products weigh 1.3 g/mol more"),   # 0.52 %
    ("2 A + B -> P", "248.8 g/mol", None),      # 0.48 % less
    ("2 A + B -> P", "248.7 g/mol", "the products weigh 1.3 g/mol less"),
    ("A + B -> 0.5 P", "300 g/mol", None),      # coefficients count: 150 vs 150
    ("A + B -> 0.5 P", "0.3 kg/mol", None),     # and units are converted first
    ("A -> P + B", "50 g/mol", None),           # 100 vs 50 + 50
    ("A -> P + B", "60 g/mol", "the products weigh 10 g/mol more than the reactants (110 vs 100 g/mol)"),
])
def test_mass_balance_tolerance_and_direction(equation, m_p, words):
    route = load_route_text(masses(equation, m_p), "masses.yaml")
    found = [w.message for w in route.warnings if "by mass" in w.message]
    if words is None:
        assert found == []
    else:
        assert len(found) == 1 and words in found[0], found


def test_mass_balance_runs_when_only_some_species_have_formulas():
    # B is water by formula: 2 x 1.008 + 15.999 = 18.015 g/mol (IUPAC/CIAAW); A + B = 118.015
    balanced = masses("A + B -> P", "118 g/mol", b="formula: H2O")
    assert load_route_text(balanced, "mixed.yaml").warnings == ()
    (w,) = load_route_text(masses("A + B -> P", "100 g/mol", b="formula: H2O"), "mixed.yaml").warnings
    assert "does not balance by mass" in w.message and "(100 vs 118 g/mol)" in w.message


def test_with_every_formula_the_atoms_are_counted_not_the_masses(good_text):
    text = change(good_text, [("aminophenol + Ac2O -> paracetamol + AcOH", "aminophenol + Ac2O -> paracetamol")])
    (w,) = load_route_text(text, "atoms.yaml").warnings
    assert "is not balanced" in w.message and "by mass" not in w.message


def test_vessel_in_millilitres_for_a_kilo_campaign_warns_at_its_line(tmp_path, good_text):
    # issue 19: a 630 mL vessel for a 10 kg target is a unit slip for 630 L (common
    # practice, no source: no kilo campaign runs in a vessel under a litre)
    text = good_text.replace("  R630:\n    volume: 630 L", "  R630:\n    volume: 630 mL")
    line = text.splitlines().index("    volume: 630 mL") + 1
    path = write_route(tmp_path, text)
    route = load_route(path)
    hits = [w for w in route.warnings if "vessel R630 holds 630 mL" in w.message]
    assert len(hits) == 1, route.warnings
    assert hits[0].location.line == line and hits[0].location.column == 13
    assert hits[0].hint == "probably meant 630 L"
    assert run_cli("check", "--strict", path).exit_code == 2
    # the same vessel for a 0.5 kg lab route is plausible: no such warning
    lab = write_route(tmp_path, text.replace("  amount: 10 kg", "  amount: 500 g"), "lab.yaml")
    assert not any("holds 630 mL" in w.message for w in load_route(lab).warnings)
