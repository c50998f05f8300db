"""Charge lines, yields and overages outside the usual range: a located warning that says
what is usual (an error under --strict), and mol_percent above 100 an error.

The ranges are common practice, no source (see routeplan.route.checks_plausibility).
"""

from __future__ import annotations

import pytest

from conftest import run_cli, run_edited
from routeplan.route import checks_plausibility as plausible
from route_edits import line_of


# id, edit of good.yaml, key path, marker of the line, text of the value, words
CASES = [
    ("catalyst by mass_ratio above 0.5",
     ("{material: charcoal, mass_ratio: 0.05, role: workup}", "{material: charcoal, mass_ratio: 5, role: catalyst}"),
     "steps[3].charges[1].mass_ratio", "mass_ratio: 5,", "5,",
     ["charcoal is charged at mass_ratio: 5", "more than 0.3", "for a catalyst", "1 to 20 wt %",
      "for 5 wt % write 'mass_ratio: 0.05'"]),
    # a 5 wt % palladium on carbon typed ten times too big
    ("catalyst by mass_ratio ten times too big",
     ("{material: charcoal, mass_ratio: 0.05, role: workup}", "{material: charcoal, mass_ratio: 0.5, role: catalyst}"),
     "steps[3].charges[1].mass_ratio", "mass_ratio: 0.5,", "0.5,",
     ["charcoal is charged at mass_ratio: 0.5", "more than 0.3", "was 'mass_ratio: 0.05' meant"]),
    ("equiv above 10", ("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 11}"),
     "steps[0].charges[2].equiv", "equiv: 11", "11", ["Ac2O is charged at equiv: 11", "more than 10", "up to 10 equiv"]),
    ("work-up volumes above 50", ("{material: water, volumes: 2, role: workup}", "{material: water, volumes: 60, "
                                                                                   "role: workup}"),
     "steps[0].charges[3].volumes", "volumes: 60", "60",
     ["water is charged at volumes: 60", "more than 50) for a workup", "up to 50 volumes"]),
    # a reaction solvent at 40 volumes is most often 4 typed with a zero too many
    ("solvent volumes above 30", ("{material: water, volumes: 3}", "{material: water, volumes: 40}"),
     "steps[0].charges[1].volumes", "volumes: 40", "40",
     ["water is charged at volumes: 40", "more than 30) for a solvent", "3 to 20 volumes", "a zero too many"]),
    ("step yield below 10 %", ("    yield: 88 %", "    yield: 0.9 %"),
     "steps[1].yield", "yield: 0.9 %", "0.9 %",
     ["step S2: a yield of 0.9 % is below the usual range (less than 10 %)", "was the fraction 0.9 (90 %) meant?"]),
    ("low yield below 10 %", ("{expected: 92 %, low: 88 %, high: 95 %}", "{expected: 92 %, low: 8 %, high: 95 %}"),
     "steps[0].yield.low", "low: 8 %", "8 %", ["a low yield of 8 % is below the usual range"]),
    ("overage above 100 %", ("overage: 2 %", "overage: 150 %"), "target.overage", "overage: 150 %", "150 %",
     ["an overage of 150 % is above the usual range (more than 100 %)", "2.5 times the target"]),
]


@pytest.mark.parametrize("name, edit, key, marker, value, words", CASES, ids=[c[0] for c in CASES])
def test_out_of_range_is_a_located_warning_and_an_error_under_strict(tmp_path, good_text, name, edit, key,
                                                                    marker, value, words):
    text, path, result = run_edited(tmp_path, good_text, [edit])
    assert result.exit_code == 0, result.stderr
    line = line_of(text, marker)
    column = text.splitlines()[line - 1].index(value) + 1
    hits = [t for t in result.stderr.splitlines() if t.startswith(f"warning: {path}:{line}:{column}: {key}: ")]
    assert len(hits) == 1, result.stderr
    for w in words:
        assert w in hits[0], (w, hits[0])
    strict = run_cli("check", path, "--strict")
    assert strict.exit_code == 2
    assert f"error: {path}:{line}:{column}: {key}: " in strict.stderr
    planned = run_cli("plan", path, "--strict", "--json", tmp_path / "plan.json")
    assert planned.exit_code == 2 and not (tmp_path / "plan.json").exists()


def test_mol_percent_above_100_is_an_error(tmp_path, good_text):
    text, path, result = run_edited(tmp_path, good_text, [("mol_percent: 5", "mol_percent: 150")])
    assert result.exit_code == 2
    assert f"error: {path}:{line_of(text, 'mol_percent: 150')}:" in result.stderr
    assert "1.5 equivalents, more than one" in result.stderr and "write 'equiv: 1.5'" in result.stderr


@pytest.mark.parametrize("basis, role, limit", [
    ("mass_ratio", "catalyst", 0.3), ("mass_ratio", "workup", 10.0), ("equiv", "reagent", 10.0),
    ("volumes", "solvent", 30.0), ("volumes", "workup", 50.0), ("mol_percent", "catalyst", 100.0)])
def test_the_limit_itself_is_usual_and_just_above_is_not(basis, role, limit):
    assert plausible.charge_findings(("x",), "m", basis, limit, role) == []
    assert len(plausible.charge_findings(("x",), "m", basis, limit * 1.001, role)) == 1


def test_a_solvent_by_equiv_is_not_limited():
    # a reagent that is also the solvent (acetic anhydride as solvent) is charged in large excess
    assert plausible.charge_findings(("x",), "Ac2O", "equiv", 25, "solvent") == []


def test_the_good_route_and_the_demo_routes_have_no_range_warning(good_text):
    from pathlib import Path

    from routeplan.route.load import load_route, load_route_text

    routes = [load_route_text(good_text, "good.yaml")]
    routes += [load_route(p) for p in sorted((Path(__file__).resolve().parents[2] / "demo_routes").glob("hx17-*.yaml"))]
    for r in routes:
        assert not [w for w in r.warnings if "usual range" in w.message], r.warnings
