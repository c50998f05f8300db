"""Yield uncertainty on the command line, in the JSON, the workbook Summary and compare."""

import json
from pathlib import Path

import openpyxl
import pytest

from conftest import run_cli, write_route
from routeplan.plan.compare import Unranked, YieldsDrawn, compare_plans, plan_for_comparison
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from routeplan.views.uncertainty_text import (NO_UNCERTAINTY, contribution_rows, histogram_data, sparkline,
                                              uncertainty_fact_rows, uncertainty_lines)
from routeplan.vocab import UnrankedReason, ValueQualifier

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"
LINEAR = DEMO / "hx17-linear.yaml"
CONVERGENT = DEMO / "hx17-convergent.yaml"
DRAWS = "5000"


def flat_copy(tmp_path) -> Path:
    """The linear demo route with its one yield range removed."""
    text = LINEAR.read_text(encoding="utf-8").replace("yield: {expected: 92 %, low: 88 %, high: 95 %}",
                                                      "yield: 92 %")
    assert "low:" not in text
    return write_route(tmp_path, text, "flat.yaml")


@pytest.fixture(scope="module")
def drawn():
    return plan_route(load_route(LINEAR), confidence=0.9, draws=int(DRAWS), seed=1)


# ---------------------------------------------------------------------- JSON


def test_json_block_is_the_contract(drawn):
    result = run_cli("plan", LINEAR, "--confidence", "90 %", "--draws", DRAWS, "--json", "-")
    assert result.exit_code == 0, result.output
    u = json.loads(result.stdout)["uncertainty"]
    # ROUTE-FORMAT.md, "Yield uncertainty": these keys and meanings are fixed
    assert {"draws", "seed", "distribution", "delivered_kg", "probability_of_target", "for_confidence"} <= set(u)
    assert u["draws"] == 5000 and u["seed"] == 1 and u["distribution"] == "beta-PERT"
    assert set(u["delivered_kg"]) == {"p10", "p50", "p90", "mean"}
    assert set(u["for_confidence"]) == {"confidence", "target_kg", "raw_materials"}
    assert u["for_confidence"]["confidence"] == 0.9
    # the same numbers as the Plan, for the same seed and draws
    d = drawn.uncertainty
    assert u["delivered_kg"] == {"p10": d.p10_kg, "p50": d.p50_kg, "p90": d.p90_kg, "mean": d.mean_kg}
    assert u["for_confidence"]["target_kg"] == d.target_kg
    assert [r["material"] for r in u["for_confidence"]["raw_materials"]] == [r.material for r in drawn.raw_materials]
    assert [c["step"] for c in u["contributions"]] == ["S1"]


def test_json_has_no_block_without_confidence():
    result = run_cli("plan", LINEAR, "--json", "-")
    assert "uncertainty" not in json.loads(result.stdout)


# ------------------------------------------------------------------ terminal


def test_terminal_shows_percentiles_probability_target_and_shares():
    result = run_cli("plan", LINEAR, "--confidence", "90 %", "--draws", DRAWS)
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert "Yield uncertainty (beta-PERT, 5 000 draws, seed 1)" in out
    for word in ("P10", "P50", "P90", "probability of delivering", "to be 90 % sure", "share of the spread"):
        assert word in out, word


def test_a_route_without_ranges_is_said_to_carry_no_uncertainty(tmp_path):
    result = run_cli("plan", flat_copy(tmp_path), "--confidence", "90 %", "--draws", "200")
    assert result.exit_code == 0, result.output
    assert NO_UNCERTAINTY in result.stdout
    assert "not a certainty" in result.stdout


@pytest.mark.parametrize("args, where", [
    (["--confidence", "0"], "--confidence"),
    (["--confidence", "100 %"], "--confidence"),
    (["--confidence", "-5 %"], "--confidence"),
    (["--confidence", "ninety"], "--confidence"),
    (["--confidence", "90 %", "--draws", "-10"], "--draws"),
    (["--confidence", "90 %", "--draws", "0"], "--draws"),
    (["--confidence", "90 %", "--draws", "20000000"], "--draws"),
    (["--confidence", "90 %", "--seed", "-1"], "--seed"),
    (["--draws", "1000"], "--draws"),
    (["--confidence", "90 %", "--yields", "low"], "--yields"),
])
def test_bad_options_exit_2_with_a_located_message(args, where):
    result = run_cli("plan", LINEAR, *args)
    assert result.exit_code == 2
    assert f"error: {where}: " in result.stderr
    assert "Traceback" not in result.output


def test_compare_bad_confidence_exits_2():
    result = run_cli("compare", LINEAR, CONVERGENT, "--confidence", "100 %")
    assert result.exit_code == 2 and "error: --confidence: " in result.stderr


# --------------------------------------------------------------------- views


def test_views_give_histogram_and_contribution_data(drawn):
    u = drawn.uncertainty
    h = histogram_data(u)
    assert len(h["edges_kg"]) == len(h["counts"]) + 1
    assert sum(h["counts"]) == u.draws and sum(h["share"]) == pytest.approx(1.0)
    assert h["edges_kg"][0] <= h["p10_kg"] <= h["p50_kg"] <= h["p90_kg"] <= h["edges_kg"][-1]
    rows = contribution_rows(u)
    assert [r["step"] for r in rows] == ["S1"] and 0.99 < rows[0]["share"] <= 1.0 + 1e-12
    assert any(line.startswith("  P10 ") for line in uncertainty_lines(drawn))


def test_sparkline_scales_to_the_tallest_bin():
    assert sparkline([0, 4, 8]) == " ▄█"
    assert sparkline([]) == ""


# ------------------------------------------------------------------ workbook


def test_workbook_summary_carries_the_uncertainty_block(drawn, tmp_path):
    from routeplan.export.workbook import write_workbook

    path = tmp_path / "u.xlsx"
    write_workbook(drawn, path)
    ws = openpyxl.load_workbook(path)["Summary"]
    cells = {}
    for row in ws.iter_rows(values_only=True):
        vals = [v for v in row if v is not None]
        if len(vals) >= 2 and isinstance(vals[0], str):
            cells[vals[0]] = vals[1]
    facts = {r["item"]: r for r in uncertainty_fact_rows(drawn)}
    assert cells["delivered, P10 [kg]"] == pytest.approx(drawn.uncertainty.p10_kg, rel=1e-12)
    assert cells["target to plan for 90 % confidence [kg]"] == pytest.approx(drawn.uncertainty.target_kg, rel=1e-12)
    assert cells["probability of delivering the target [%]"] == pytest.approx(
        drawn.uncertainty.probability_of_target, rel=1e-12)
    assert "to buy at 90 % confidence: aminophenol" in facts


# ------------------------------------------------------------------- compare


def test_compare_rows_probability_and_confidence_target(tmp_path):
    routes = [load_route(flat_copy(tmp_path)), load_route(CONVERGENT)]
    plans, notes = plan_for_comparison(routes, confidence=0.9, draws=2000, seed=1)
    cmp = compare_plans(plans, notes)
    prob, target = cmp.row("probability_of_target"), cmp.row("confidence_target")
    # the flat route has no value (never a probability of 1) and says why
    assert prob.values[0] is None and target.values[0] is None
    assert prob.best == () and prob.unranked == Unranked(UnrankedReason.NO_UNCERTAINTY, routes=(0,))
    assert prob.qualifiers == (ValueQualifier.NO_UNCERTAINTY, None)
    assert cmp.notes[-1] == YieldsDrawn(2000, "beta-PERT", 1)
    assert prob.values[1] == plans[1].uncertainty.probability_of_target
    assert target.values[1] == plans[1].uncertainty.target_kg


def test_compare_ranks_routes_with_ranges(tmp_path):
    # the convergent demo with a wider range on its last step delivers less surely
    text = CONVERGENT.read_text(encoding="utf-8").replace("    yield: 86 %", "    yield: {expected: 86 %, low: 70 %, high: 88 %}")
    wide = write_route(tmp_path, text.replace("route: HX-17 route B", "route: HX-17 route B wide"), "wide.yaml")
    result = run_cli("compare", CONVERGENT, wide, "--confidence", "90 %", "--draws", "4000", "--json", "-")
    assert result.exit_code == 0, result.output
    rows = {r["key"]: r for r in json.loads(result.stdout)["rows"]}
    p_narrow, p_wide = rows["probability_of_target"]["values"]
    t_narrow, t_wide = rows["confidence_target"]["values"]
    assert p_narrow > p_wide and t_narrow < t_wide
    assert rows["confidence_target"]["best"] == [json.loads(result.stdout)["routes"][0]["label"]]
