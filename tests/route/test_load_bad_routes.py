"""Every mistake in a route file gets exit code 2 and a message with line, key and remedy.

Each case changes one thing in the valid route ``tests/data/routes/good.yaml`` and runs
``routeplan check`` on it.  The expected line is found from a marker: the first line of
the changed text that contains it.  Each case asserts the exit code, an ``error:`` line
with ``file:line:`` and the key path, the words of the message, and that no traceback is
shown.
"""

from __future__ import annotations

import pytest

from conftest import GOOD_ROUTE, run_cli, run_edited, write_route
from route_edits import change, line_of, problem_lines


# id, edits, key path in the message, marker of the line, words of the message
CASES = [
    # -- unknown and misspelt keys (suggest the nearest valid one)
    ("top-level typo", [("currency: EUR", "currancy: EUR")], "currancy", "currancy:", "did you mean 'currency'"),
    ("step key typo", [("    yield: 88 %", "    yeild: 88 %")], "steps[1].yeild", "yeild:", "did you mean 'yield'"),
    ("material key typo", [("    formula: C4H6O3", "    formla: C4H6O3")], "materials.Ac2O.formla", "formla:",
     "did you mean 'formula'"),
    ("charge key typo", [("        equiv: 1.5", "        equv: 1.5")], "steps[1].charges[2].equv", "equv:",
     "did you mean 'equiv'"),
    ("target key typo", [("  amount: 10 kg", "  amout: 10 kg")], "target.amout", "amout:", "did you mean 'amount'"),
    ("vessel key typo", [("    max_fill: 80 %", "    max_fil: 80 %")], "equipment.R250.max_fil", "max_fil:",
     "did you mean 'max_fill'"),
    ("solution key typo", [("      molarity: 6 mol/L", "      molarty: 6 mol/L")],
     "materials.HCl6M.solution.molarty", "molarty:", "did you mean 'molarity'"),
    ("unknown key without near match", [("    price: 18\n", "    colour: white\n")],
     "materials.aminophenol.colour", "colour:", "valid keys here"),
    # -- missing required keys
    ("missing route name", [("route: test route (acid via the ethyl ester)\n", "")], "route", "format: 1",
     "is required"),
    ("missing equation", [("    equation: ester + caustic -> salt + EtOH\n", "")], "steps[2].equation", "id: S3",
     "is required"),
    ("missing yield", [("    yield: 98 %\n", "")], "steps[2].yield", "id: S3", "is required"),
    ("missing amount", [("  amount: 10 kg\n", "")], "target.amount", "material: acid", "is required"),
    ("missing vessel volume", [("    volume: 630 L\n", "    max_fill: 70 %\n")], "equipment.R630.volume",
     "max_fill: 70 %", "is required"),
    # -- values
    ("negative equiv", [("Ac2O, equiv: 1.1}", "Ac2O, equiv: -1}")], "steps[0].charges[2].equiv", "equiv: -1",
     "must be a positive number, got -1"),
    ("equiv as words", [("Ac2O, equiv: 1.1}", "Ac2O, equiv: lots}")], "steps[0].charges[2].equiv", "equiv: lots",
     "must be a positive number"),
    ("decimal comma quantity", [("amount: 10 kg", "amount: 10,5 kg")], "target.amount", "amount: 10,5 kg",
     "decimal comma"),
    ("decimal comma number", [("        volumes: 8", "        volumes: 8,5")], "steps[1].charges[1].volumes",
     "volumes: 8,5", "decimal point"),
    ("wrong dimension", [("    density: 1.08 g/mL", "    density: 1.08 kg")], "materials.Ac2O.density",
     "density: 1.08 kg", "density"),
    ("quantity without unit", [("amount: 10 kg", "amount: 10")], "target.amount", "amount: 10", "no unit"),
    ("unknown unit", [("amount: 10 kg", "amount: 10 kilo")], "target.amount", "amount: 10 kilo", "unknown unit"),
    ("negative quantity", [("    volume: 630 L", "    volume: -630 L")], "equipment.R630.volume", "-630 L",
     "must be positive"),
    ("yield as bare number", [("    yield: 88 %", "    yield: 88")], "steps[1].yield", "yield: 88", "88 %"),
    ("yield zero", [("    yield: 98 %", "    yield: 0 %")], "steps[2].yield", "yield: 0 %", "zero"),
    ("yield above 100 %", [("    yield: 94 %", "    yield: 120 %")], "steps[3].yield", "yield: 120 %",
     "above 100 %"),
    ("assay zero", [("    assay: 98 %\n    price: 18", "    assay: 0 %\n    price: 18")],
     "materials.aminophenol.assay", "assay: 0 %", "zero"),
    ("max_fill bare number", [("max_fill: 80 %", "max_fill: 95")], "equipment.R250.max_fill", "max_fill: 95",
     "95 %"),
    ("negative overage", [("overage: 2 %", "overage: -2 %")], "target.overage", "overage: -2 %", "negative"),
    ("format 2", [("format: 1", "format: 2")], "format", "format: 2", "route format 1"),
    ("currency lower case", [("currency: EUR", "currency: eur")], "currency", "currency: eur", "write 'EUR'"),
    ("currency not a code", [("currency: EUR", "currency: EURO")], "currency", "currency: EURO",
     "three-letter ISO 4217"),
    ("role misspelt", [("role: workup}\n\n  - id: S2", "role: work-up}\n\n  - id: S2")],
     "steps[0].charges[3].role", "role: work-up", "did you mean 'workup'"),
    ("isolated yes", [("isolated: false", "isolated: yes")], "steps[2].isolated", "isolated: yes",
     "true or false"),
    ("step id a number", [("  - id: S3", "  - id: 3")], "steps[2].id", "id: 3", "in quotes"),
    ("hazards not a list", [("hazards: [harmful if swallowed]", "hazards: harmful")],
     "materials.aminophenol.hazards", "hazards: harmful", "must be a list"),
    ("charges left empty", [("    isolated: false\n    charges:\n      - {material: ester}\n"
                             "      - {material: caustic, equiv: 1.3}\n", "    isolated: false\n    charges:\n")],
     "steps[2].charges", ("isolated: false", 1), "must be a list"),
    ("material not a mapping", [("  CO2:\n    formula: CO2\n", "  CO2: CO2\n")], "materials.CO2", "CO2: CO2",
     "must be a mapping"),
    ("material key with a space", [("  KBr:\n", "  K Br:\n"), ("2 KBr +", "2 K Br +")], 'materials["K Br"]',
     "K Br:", "not a valid material key"),
    ("material key with plus", [("  NaCl:\n", "  Na+Cl:\n")], 'materials["Na+Cl"]', "Na+Cl:",
     "not a valid material key"),
    # -- YAML level
    ("duplicate key", [("    price: 1.9\n", "    price: 1.9\n    price: 2.1\n")], "materials.K2CO3.price",
     "price: 2.1", "duplicate key"),
    ("custom tag", [("  amount: 10 kg", "  amount: !!python/object:os.system 10 kg")], "target.amount",
     "!!python", "not allowed"),
    ("syntax error", [("  overage: 2 %", "  overage: [2 %")], None, "materials:", "not valid YAML"),
    # -- materials
    ("solution without density", [("      density: 1.10 g/mL\n", "")], "materials.HCl6M.solution.density",
     "molarity: 6 mol/L", "density"),
    ("solution with molarity and mass fraction", [("      molarity: 6 mol/L\n",
                                                    "      molarity: 6 mol/L\n      mass_fraction: 20 %\n")],
     "materials.HCl6M.solution", "molarity: 6 mol/L", "both molarity and mass_fraction"),
    ("solution without strength", [("      molarity: 6 mol/L\n", "")], "materials.HCl6M.solution",
     "density: 1.10 g/mL", "neither molarity nor mass_fraction"),
    ("assay on a solution", [("    formula: NaOH\n", "    formula: NaOH\n    assay: 50 %\n")],
     "materials.caustic.assay", "assay: 50 %", "does not apply to a solution"),
    ("molar mass disagrees", [("molar_mass: 166.00 g/mol", "molar_mass: 170 g/mol")], "materials.KI.molar_mass",
     "molar_mass: 170", "166.00"),
    ("formula unreadable", [("    formula: C4H6O3", "    formula: C4H6Xq3")], "materials.Ac2O.formula",
     "C4H6Xq3", "Xq"),
    ("molar use without molar mass", [("{material: charcoal, mass_ratio: 0.05, role: workup}",
                                       "{material: charcoal, equiv: 0.05, role: workup}")],
     "materials.charcoal", "  charcoal:", "no molar mass"),
    # -- references
    ("unknown material in equation", [("aminophenol + Ac2O ->", "aminophenol + Ac20 ->")], "steps[0].equation",
     "Ac20 ->", "did you mean 'Ac2O'"),
    ("unknown material in charge", [("{material: Ac2O, equiv: 1.1}", "{material: Acc2O, equiv: 1.1}")],
     "steps[0].charges[2].material", "Acc2O", "did you mean 'Ac2O'"),
    ("unknown target", [("  material: acid\n", "  material: acd\n")], "target.material", "material: acd",
     "did you mean 'acid'"),
    ("formula used as key", [("2 KBr + water", "2 KBr + H2O")], "steps[1].equation", "2 KBr + H2O",
     "did you mean 'water' (formula H2O)"),
    ("unknown vessel", [("    vessel: R630\n    charges:\n      - {material: HCl6M",
                         "    vessel: R600\n    charges:\n      - {material: HCl6M")], "steps[3].vessel",
     "vessel: R600", "did you mean 'R630'"),
    ("limiting is a product", [("    yield: {expected", "    limiting: paracetamol\n    yield: {expected")],
     "steps[0].limiting", "limiting: paracetamol", "is a product of the equation"),
    ("limiting unknown", [("    limiting: salt", "    limiting: slat")], "steps[3].limiting", "limiting: slat",
     "did you mean 'salt'"),
    ("limiting not in equation", [("    limiting: salt", "    limiting: ester")], "steps[3].limiting",
     "limiting: ester", "not in the equation"),
    ("product is a reactant", [("    product: acid", "    product: salt")], "steps[3].product", "product: salt",
     "is a reactant of the equation"),
    ("equation without arrow", [("aminophenol + Ac2O -> paracetamol + AcOH", "aminophenol + Ac2O = paracetamol")],
     "steps[0].equation", "Ac2O = paracetamol", "equation"),
    # -- charge lines
    ("two bases", [("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 1.1, mass_ratio: 0.9}")],
     "steps[0].charges[2].mass_ratio", "mass_ratio: 0.9", "both equiv and mass_ratio"),
    ("volumes without density", [("        equiv: 1.5", "        volumes: 1.5")], "steps[1].charges[2].volumes",
     "volumes: 1.5", "no density"),
    ("non-reactant without basis", [("{material: water, volumes: 3}", "{material: water}")],
     "steps[0].charges[1]", "{material: water}", "needs a basis"),
    ("limiting with a basis", [("{material: aminophenol}", "{material: aminophenol, equiv: 1.2}")],
     "steps[0].charges[0].equiv", "aminophenol, equiv: 1.2", "limiting reagent"),
    ("limiting by volumes", [("      - material: paracetamol\n", "      - material: paracetamol\n        volumes: 2\n")],
     "steps[1].charges[0].volumes", "        volumes: 2", "limiting reagent"),
    ("limiting charged twice", [("      - {material: ester}\n", "      - {material: ester}\n      - {material: ester}\n")],
     "steps[2].charges[1].material", ("{material: ester}", 1), "charged twice"),
    ("charges own product", [("{material: Ac2O, equiv: 1.1}", "{material: paracetamol, equiv: 0.1}")],
     "steps[0].charges[2].material", "material: paracetamol, equiv: 0.1", "its own product"),
    ("yield outside range", [("expected: 92 %", "expected: 97 %")], "steps[0].yield.high", "expected: 97 %",
     "outside low..high"),
    # -- the route as a whole
    ("duplicate step id", [("  - id: S4", "  - id: S3")], "steps[3].id", ("name: acidification", -1),
     "duplicate step id"),
    ("two steps make one product", [("ester + caustic -> salt + EtOH", "ester + caustic -> acid + EtOH")],
     "steps[3].product", "product: acid", "main product of two steps"),
    ("target made by no step", [("  material: acid\n", "  material: NaCl\n")], "target.material",
     "material: NaCl", "only a by-product of S4"),
    ("cycle of steps", [("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 1.1}\n      - {material: ester, "
                                                         "equiv: 0.1}")],
     "steps[0].id", "id: S1", "S1 -> S2 -> S1"),
]


@pytest.mark.parametrize("edits,key,marker,words", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_route(tmp_path, edits, key, marker, words):
    text, path, result = run_edited(tmp_path, GOOD_ROUTE.read_text(encoding="utf-8"), edits)
    line = line_of(text, marker)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert result.stdout == ""
    hits = problem_lines(result.stderr, "error", path, line, key)
    assert hits, f"no error at line {line} for {key}:\n{result.stderr}"
    assert any(words in t for t in hits), result.stderr


def test_there_are_at_least_forty_cases():
    assert len(CASES) >= 40
    assert len({c[0] for c in CASES}) == len(CASES)


def test_all_errors_of_a_file_are_reported_together(tmp_path):
    text = change(GOOD_ROUTE.read_text(encoding="utf-8"), [
        ("currency: EUR", "currancy: EUR"),                    # schema
        ("Ac2O, equiv: 1.1}", "Ac2O, equiv: -1}"),                           # schema
        ("aminophenol + Ac2O ->", "aminophenol + Ac20 ->"),    # cross-check on a valid step
        ("  material: acid\n", "  material: acd\n"),           # cross-check on the target
    ])
    result = run_cli("check", write_route(tmp_path, text))
    assert result.exit_code == 2
    errors = [t for t in result.stderr.splitlines() if t.startswith("error: ")]
    assert len(errors) == 4, result.stderr
    for words in ("currancy", "got -1", "Ac20", "acd"):
        assert any(words in t for t in errors), words
    lines = [int(t.split(":")[2]) for t in errors]
    assert lines == sorted(lines)


# -- whole-file problems: no line to point at, but the file and a clear reason

@pytest.mark.parametrize("name,content,words", [
    ("empty.yaml", b"", "empty"),
    ("comments.yaml", b"# nothing but a comment\n", "empty"),
    ("list.yaml", b"- route: a\n- route: b\n", "must be a mapping"),
    ("scalar.yaml", b"just some words\n", "must be a mapping"),
    ("binary.yaml", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", "binary"),
    ("latin1.yaml", "route: caf\u00e9\n".encode("latin-1"), "not UTF-8"),
    ("utf16.yaml", "route: caf\u00e9\n".encode("utf-16"), "UTF-16 text, not UTF-8"),
    ("two-docs.yaml", b"route: a\n---\nroute: b\n", "single document"),
    ("control-char.yaml", b"route: a\x07b\n", "not allowed in YAML"),
])
def test_bad_file(tmp_path, name, content, words):
    path = tmp_path / name
    path.write_bytes(content)
    result = run_cli("check", path)
    assert result.exit_code == 2
    assert "Traceback" not in result.output
    assert f"error: {path}" in result.stderr
    assert words in result.stderr


def test_file_over_five_megabytes(tmp_path):
    path = tmp_path / "huge.yaml"
    path.write_bytes(b"# padding\n" * 600_000)  # 6 MB
    result = run_cli("check", path)
    assert result.exit_code == 2
    assert "at most 5 MB" in result.stderr


def test_missing_file(tmp_path):
    result = run_cli("check", tmp_path / "nope.yaml")
    assert result.exit_code == 2
    assert "no such file" in result.stderr


def test_several_files_all_checked(tmp_path, good_text):
    bad = write_route(tmp_path, change(good_text, [("Ac2O, equiv: 1.1}", "Ac2O, equiv: -1}")]), "bad.yaml")
    result = run_cli("check", bad, GOOD_ROUTE)
    assert result.exit_code == 2
    assert f"{GOOD_ROUTE}: valid" in result.stdout
    assert f"{bad}: 1 error" in result.stderr
