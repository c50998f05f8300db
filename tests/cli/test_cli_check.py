"""``routeplan check`` and ``routeplan schema`` on the command line."""

from __future__ import annotations

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import GOOD_ROUTE, run_cli, words, write_route
from routeplan import CAUTION
from routeplan.route.jsonschema import route_json_schema_text
from route_edits import change

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"


def demo_routes() -> list[Path]:
    """Route files among the demo files (a stock list is not a route)."""
    return sorted(p for p in DEMO.glob("*.yaml") if "\nsteps:" in "\n" + p.read_text(encoding="utf-8"))


def test_summary_of_a_valid_route():
    result = run_cli("check", GOOD_ROUTE)
    assert result.exit_code == 0, result.output
    # check plans the route at its target (issue 19), so the plan's fill warnings of this
    # 10 kg route in 250 L and 630 L vessels show here as they do under plan; no others
    assert all("below 20 %: too little to stir" in line for line in result.stderr.splitlines()), result.stderr
    out = words(result.stdout)  # long lines are folded to the width (issue 19)
    assert out.startswith(f"{GOOD_ROUTE}: valid: test route (acid via the ethyl ester) ")
    for line in ("target: 10 kg of acid (+2 % overage)",
                 "1. S1 N-acetylation: aminophenol + Ac2O -> paracetamol + AcOH (yield 92 %, in R250)",
                 "3. S3 ester hydrolysis: ester + caustic -> salt + EtOH (yield 98 %, telescoped)",
                 "raw materials: aminophenol, Ac2O, water, K2CO3, bromoester, KI, acetone, caustic, HCl6M, charcoal",
                 "intermediates: paracetamol, ester, salt",
                 "longest linear sequence: S1 -> S2 -> S3 -> S4 (4 steps)"):
        assert f" {line} " in out, line
    assert out.endswith("CAUTION: " + CAUTION)


def test_steps_are_listed_in_execution_order_not_file_order(tmp_path, good_text):
    # move S1 to the end of the file: execution order is still S1, S2, S3, S4
    head, s1 = good_text.split("  - id: S1\n")
    s1, rest = s1.split("  - id: S2\n")
    text = head + "  - id: S2\n" + rest.rstrip("\n") + "\n\n  - id: S1\n" + s1
    result = run_cli("check", write_route(tmp_path, text))
    assert result.exit_code == 0, result.output
    # a numbered line starts '    1. '; a folded step goes on deeper
    numbered = [t.split()[1] for t in result.stdout.splitlines() if re.match(r"    \d+\. ", t)]
    assert numbered == ["S1", "S2", "S3", "S4"]


def test_convergent_route_summary(tmp_path):
    text = """
route: convergent
target: {material: P, amount: 5 kg}
materials:
  A: {formula: C2H4O2}
  B: {formula: C2H6O}
  E: {formula: C4H8O2}
  water: {formula: H2O}
  C: {formula: NH3}
  F: {formula: C2H7N}
  P: {formula: C4H9NO}
steps:
  - {id: L1, equation: A + B -> E + water, yield: 70 %}
  - {id: R1, equation: B + C -> F + water, yield: 60 %}
  - {id: X1, equation: E + F -> P + B, yield: 50 %}
"""
    # ethyl acetate from acetic acid and ethanol; ethylamine from ethanol and ammonia; the two
    # meet in N-ethylacetamide, giving back ethanol (all balanced)
    result = run_cli("check", "--strict", write_route(tmp_path, text))
    assert result.exit_code == 0, result.output
    # L1 -> X1 and R1 -> X1 are equally long; R1 -> X1 has the lower expected yield
    # (0.60 x 0.50 < 0.70 x 0.50), the tie rule of docs/metrics.md
    assert "  longest linear sequence: R1 -> X1 (2 steps)" in result.stdout
    assert "  intermediates: E, F" in result.stdout
    assert "  raw materials: A, B, C" in result.stdout
    assert "  by-products: water" in result.stdout


def test_several_valid_files(tmp_path, good_text):
    other = write_route(tmp_path, good_text.replace("route: test route", "route: second route"), "b.yaml")
    result = run_cli("check", GOOD_ROUTE, other)
    assert result.exit_code == 0
    assert result.stdout.count(": valid: ") == 2
    assert result.stdout.count("CAUTION") == 1


def test_strict_passes_a_route_without_warnings(tmp_path, good_text):
    # at 10 kg the good route's batches fill too little of their vessels (a plan warning,
    # which check now reports); at 40 kg they fill 32-68 % and nothing warns
    path = write_route(tmp_path, change(good_text, [("  amount: 10 kg", "  amount: 40 kg")]))
    assert run_cli("check", "--strict", path).exit_code == 0
    assert run_cli("plan", "--strict", "-q", path).exit_code == 0


def test_strict_fails_on_a_warning_but_still_summarises(tmp_path, good_text):
    path = write_route(tmp_path, change(good_text, [("currency: EUR\n", "")]))
    result = run_cli("check", "--strict", path)
    assert result.exit_code == 2
    # exit 2, so the summary must not call it valid
    assert f"{path}: not valid under --strict:" in result.stdout
    assert f"{path}: valid" not in result.stdout
    assert "no cost will be computed" in result.stderr
    # without --strict, the same route is valid
    assert f"{path}: valid:" in run_cli("check", path).stdout


def test_no_route_given_is_a_usage_error():
    result = run_cli("check")
    assert result.exit_code == 2
    assert "ROUTE" in result.output


def test_internal_errors_are_not_hidden_as_bad_input(monkeypatch):
    import routeplan.route.load as load

    def broken(path):
        raise ZeroDivisionError("a bug")

    monkeypatch.setattr(load, "load_route", broken)
    from click.testing import CliRunner

    from routeplan.cli import cli

    result = CliRunner().invoke(cli, ["check", str(GOOD_ROUTE)])
    assert result.exit_code == 1
    assert "--debug" in result.stderr and "Traceback" not in result.output


@pytest.mark.parametrize("name", [p.name for p in demo_routes()] or ["(none)"])
def test_demo_routes_pass_check(name):
    assert name != "(none)", "demo_routes/ holds no route file"
    assert run_cli("check", DEMO / name).exit_code == 0
    result = run_cli("check", "--strict", DEMO / name)
    # the demo shows one heat screening finding on purpose (a criticality class 3 step,
    # docs/safety.md); under --strict that, and nothing else, may count as an error
    errors = [line for line in result.output.splitlines() if line.startswith("error:")]
    assert result.exit_code == 0 or (errors and all(
        "a screening estimate that never replaces calorimetry" in line for line in errors)), result.output


def test_schema_to_standard_output():
    result = run_cli("schema")
    assert result.exit_code == 0
    assert result.stdout == route_json_schema_text()
    assert json.loads(result.stdout)["title"].startswith("routeplan route file")


def test_schema_to_a_file(tmp_path):
    path = tmp_path / "route.schema.json"
    result = run_cli("schema", "-o", path)
    assert result.exit_code == 0
    assert path.read_text(encoding="utf-8") == route_json_schema_text()
    assert f"wrote {path}" in result.stderr


def test_schema_to_an_unwritable_place(tmp_path):
    result = run_cli("schema", "-o", tmp_path / "no" / "such" / "dir" / "s.json")
    assert result.exit_code == 2
    assert "cannot write" in result.stderr and "does not exist" in result.stderr


def test_command_modules_import_nothing_heavy():
    code = ("import sys, routeplan.commands.check, routeplan.commands.schema; "
            "print(sorted(m for m in ('pint', 'networkx', 'pydantic', 'ruamel', 'rich', 'pandas') "
            "if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60,
                         cwd=Path(__file__).resolve().parents[2])
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[]"


def test_check_reports_the_plans_warnings(tmp_path, good_text):
    # A step whose batch is far above the largest batch run so far is only seen by planning
    # the route at its target: check plans it too, so check --strict and plan --strict agree.
    text = good_text.replace("demonstrated_batch: 5 kg", "demonstrated_batch: 10 g", 1)
    path = write_route(tmp_path, text)
    plain = run_cli("check", path)
    assert plain.exit_code == 0, plain.output
    assert "times the largest batch run so far" in plain.stderr
    strict = run_cli("check", "--strict", path)
    assert strict.exit_code == 2
    assert "error: " in strict.stderr and "times the largest batch run so far" in strict.stderr
    assert "counted as errors under --strict" in strict.stderr
    planned = run_cli("plan", "--strict", "-q", path)
    assert planned.exit_code == 2  # the plan refuses it too: check and plan agree
    # and the unchanged route checks clean and plans clean
    assert run_cli("check", "--strict", GOOD_ROUTE).exit_code == run_cli("plan", "--strict", "-q", GOOD_ROUTE).exit_code


def test_an_invalid_route_shows_its_warnings_in_the_same_run(tmp_path, good_text):
    # an error (an unknown unit) and a warning (a reagent ten times too much) in one file:
    # both come in one run, so that fixing the error brings no second round of findings
    text = change(good_text, [("amount: 10 kg", "amount: 10 kgs"),
                              ("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 11}")])
    path = write_route(tmp_path, text)
    for command in ("check", "plan"):
        result = run_cli(command, path)
        assert result.exit_code == 2
        lines = result.stderr.splitlines()
        assert any(x.startswith("error: ") and "unknown unit 'kgs'" in x for x in lines), result.stderr
        assert any(x.startswith("warning: ") and "was 'equiv: 1.1' meant?" in x for x in lines), result.stderr
    assert f"{path}: 1 error and 1 warning, not a valid route" in run_cli("check", path).stderr
