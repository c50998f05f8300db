"""Warnings: a valid route that deserves a look.  Exit 0, or 2 under --strict.

Each case changes one thing in ``data/routes/good.yaml``; the route stays valid, the
warning is printed on standard error with its line and key, and it is in
``Route.warnings`` as a Problem of severity "warning".
"""

from __future__ import annotations

import pytest

from conftest import GOOD_ROUTE, run_cli, run_edited, write_route
from routeplan.route.load import load_route, load_route_text
from route_edits import change, line_of, problem_lines

DEAD_END = """
  - id: S5
    name: a side product nobody uses
    equation: AcOH + EtOH -> ethyl-acetate + water
    yield: 60 %
"""

WARNINGS = [
    # id, edits, key path, marker of the line, words
    ("unbalanced equation", [("aminophenol + Ac2O -> paracetamol + AcOH", "aminophenol + Ac2O -> paracetamol")],
     "steps[0].equation", "Ac2O -> paracetamol", "step S1 is not balanced: the products have 2 C, 4 H and 2 O fewer"),
    ("sub-stoichiometric reactant", [("        equiv: 1.5", "        equiv: 0.4")], "steps[1].charges[2]",
     ("material: K2CO3", 0), "'K2CO3' is charged at 0.4 equiv, below its stoichiometric ratio 0.5"),
    ("dead-end step", [("      - {material: water, volumes: 3, role: workup}\n",
                        "      - {material: water, volumes: 3, role: workup}\n" + DEAD_END),
                       ("  acid:\n", "  ethyl-acetate:\n    formula: C4H8O2\n  acid:\n")],
     "steps[4].id", "id: S5", "step S5 does not lead to the target 'acid'"),
    ("price without currency", [("currency: EUR\n", "")], "materials.aminophenol.price", "price: 18",
     "no cost will be computed"),
]


@pytest.mark.parametrize("edits,key,marker,words", [w[1:] for w in WARNINGS], ids=[w[0] for w in WARNINGS])
def test_warning(tmp_path, edits, key, marker, words):
    text, path, result = run_edited(tmp_path, GOOD_ROUTE.read_text(encoding="utf-8"), edits)
    line = line_of(text, marker)
    assert result.exit_code == 0, result.output
    assert "Traceback" not in result.output
    assert f"{path}: valid" in result.stdout
    hits = problem_lines(result.stderr, "warning", path, line, key)
    assert hits and words in hits[0], result.stderr
    route = load_route(path)
    assert len(route.warnings) == 1
    assert route.warnings[0].severity == "warning"
    assert route.warnings[0].location.line == line

    strict = run_cli("check", "--strict", path)
    assert strict.exit_code == 2
    assert "Traceback" not in strict.output
    assert any(t.startswith(f"error: {path}:{line}:") and words in t for t in strict.stderr.splitlines())
    assert "counted as errors under --strict" in strict.stderr


def test_good_route_has_no_warning(tmp_path):
    # the route itself has none; check also plans it at its target (issue 19), where 10 kg
    # fills too little of its vessels, so the strict check runs on the route at 40 kg
    assert load_route(GOOD_ROUTE).warnings == ()
    path = write_route(tmp_path, GOOD_ROUTE.read_text(encoding="utf-8").replace("  amount: 10 kg", "  amount: 40 kg"))
    result = run_cli("check", "--strict", path)
    assert result.exit_code == 0, result.output
    assert result.stderr == ""


VOLUMES_REACTANT = """
route: hydrolysis with water charged by volumes
target: {material: P, amount: 1 kg}
materials:
  A: {molar_mass: 100 g/mol}
  water: {molar_mass: 18 g/mol, density: 1.0 g/mL}
  P: {molar_mass: 118 g/mol}
steps:
  - id: S1
    equation: A + water -> P
    yield: 90 %
    charges:
      - {material: A}
      - {material: water, volumes: VOL}
"""


@pytest.mark.parametrize("volumes,warned", [
    # 1 mol A = 100 g = 0.1 kg; 0.1 L/kg x 0.1 kg = 0.01 L = 10 g water = 0.556 mol < 1 equiv
    (0.1, True),
    # 0.18 L/kg x 0.1 kg = 0.018 L = 18 g = 1.000 mol: exactly stoichiometric, no warning
    (0.18, False),
    # 1 L/kg x 0.1 kg = 0.1 L = 100 g = 5.56 mol: in excess
    (1, False),
])
def test_reactant_charged_by_volumes_is_compared_in_moles(volumes, warned):
    route = load_route_text(VOLUMES_REACTANT.replace("VOL", str(volumes)), "vol.yaml")
    messages = [w.message for w in route.warnings]
    assert any("below its stoichiometric ratio" in m for m in messages) == warned, messages


def test_portions_of_a_reactant_add_up():
    # K2CO3 needs 0.5 equiv (1 per 2 paracetamol); two portions of 0.3 make 0.6: no warning
    text = change(GOOD_ROUTE.read_text(encoding="utf-8"), [
        ("        equiv: 1.5\n", "        equiv: 0.3\n      - material: K2CO3\n        equiv: 0.3\n")])
    assert load_route_text(text, "portions.yaml").warnings == ()
    low = text.replace("        equiv: 0.3\n", "        equiv: 0.2\n")
    (w,) = load_route_text(low, "portions.yaml").warnings
    assert "0.4 equiv" in w.message
