"""Numbers so extreme that outputs would hold nan, inf or 1e300 kg are located errors; a run
that would need 1e306 batches stops in batch sizing (it used to hang naming the sheets);
and --yields low|high on steps without a range is said in the plan and the comparison."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from conftest import run_cli, write_route
from route_edits import change, line_of

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"


@pytest.mark.parametrize("name, edit, words", [
    ("tiny yield", ("    yield: 88 %", "    yield: 1e-300"), ["beyond any campaign", "step S2 yield (expected)"]),
    ("tiny assay", ("    formula: C6H7NO\n    assay: 98 %", "    formula: C6H7NO\n    assay: 1e-300 %"),
     ["beyond any campaign", "assay of aminophenol"]),
    ("huge overage", ("overage: 2 %", "overage: 1e300 %"), ["the target", "beyond any campaign"]),
    ("target beyond any campaign", ("amount: 10 kg", "amount: 1e20 kg"), ["the target", "beyond any campaign"]),
    ("target that overflows", ("amount: 10 kg", "amount: 1e307 kg"), ["target.amount", "out of any sensible range"]),
])
def test_extreme_numbers_are_located_errors_and_nothing_is_written(tmp_path, good_text, name, edit, words):
    text = change(good_text, [edit])
    path = write_route(tmp_path, text)
    out = tmp_path / "plan.json"
    result = run_cli("plan", path, "--json", out, "--xlsx", tmp_path / "p.xlsx", "--csv", tmp_path / "csv")
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output and "internal error" not in result.output
    err = [t for t in result.stderr.splitlines() if t.startswith("error: ")]
    assert len(err) == 1 and err[0].startswith(f"error: {path}:"), result.stderr
    for w in words:
        assert w in err[0]
    assert not out.exists() and not (tmp_path / "p.xlsx").exists() and not (tmp_path / "csv").exists()


def test_a_run_that_would_need_1e306_batches_stops_with_a_located_error(tmp_path, good_text):
    from routeplan.plan.campaign import MAX_BATCHES

    # max_fill 1e-300: each batch may hold 2.5e-298 L, so ~1e300 batches; used to hang
    # naming the workbook's sheets
    text = change(good_text, [("    volume: 250 L\n    max_fill: 80 %", "    volume: 250 L\n    max_fill: 1e-300")])
    path = write_route(tmp_path, text)
    result = run_cli("plan", path, "--xlsx", tmp_path / "p.xlsx")
    assert result.exit_code == 2
    assert f"error: {path}:{line_of(text, 'R250:')}:" in result.stderr
    assert "batches in vessel R250" in result.stderr and "no campaign runs that many" in result.stderr
    assert MAX_BATCHES <= 1e6 and not (tmp_path / "p.xlsx").exists()


def test_sheet_names_never_loop_on_a_long_suffix():
    from routeplan.export.workbook import MAX_SHEET_NAME, safe_sheet_name

    name = safe_sheet_name("S1", " all " + "9" * 300 + " batches", set())
    assert 0 < len(name) <= MAX_SHEET_NAME


def test_the_json_of_any_plan_is_finite(tmp_path):
    result = run_cli("plan", DEMO / "hx17-linear.yaml", "--json", "-")
    assert result.exit_code == 0
    json.loads(result.stdout, parse_constant=lambda c: pytest.fail(f"{c} in the JSON"))


def test_yields_low_without_ranges_is_said_in_every_output(tmp_path):
    route = DEMO / "hx17-linear.yaml"  # S1 has a range, S2..S5 do not
    out = tmp_path / "plan.json"
    result = run_cli("plan", route, "--yields", "low", "--json", out, "--csv", tmp_path / "csv", "-q")
    assert result.exit_code == 0
    words = "--yields low: steps S2, S3, S4, S5 have no low yield"
    assert words in result.stderr and "not a worst case" in result.stderr
    plan = json.loads(out.read_text())
    assert any(words in w for w in plan["warnings"])
    assert words in (tmp_path / "csv" / "summary.csv").read_text()
    # the law: without ranges the low plan is the expected plan for those steps
    expected = json.loads(run_cli("plan", route, "--json", "-").stdout)
    by_id = {s["id"]: s for s in expected["steps"]}
    for s in plan["steps"]:
        if s["id"] != "S1":
            assert s["yield"] == by_id[s["id"]]["yield"]
    assert run_cli("plan", route, "--yields", "low", "--strict", "-q").exit_code == 2


def test_yields_expected_says_nothing_about_ranges():
    result = run_cli("plan", DEMO / "hx17-linear.yaml", "-q")
    assert "--yields" not in result.stderr


def test_compare_yields_low_does_not_rank_routes_without_ranges(tmp_path):
    out = tmp_path / "c.json"
    result = run_cli("compare", DEMO / "hx17-linear.yaml", DEMO / "hx17-convergent.yaml", "--yields", "low",
                     "--json", out)
    assert result.exit_code == 0
    cmp = json.loads(out.read_text())
    text = json.dumps(cmp)
    assert "have no low yield" in text
    rows = {r["key"]: r for r in cmp["rows"]}
    for key in ("overall_yield", "pmi", "batches"):
        assert not rows[key]["best"], rows[key]
        assert "without a low yield" in rows[key]["note"]
    assert rows["steps"]["best"]  # the yield-free rows are still ranked
    assert math.isfinite(rows["pmi"]["values"][0])
