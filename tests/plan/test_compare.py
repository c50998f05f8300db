"""``routeplan compare``: same target, same mass, best value per row, trade-off, outputs.

The expected winner of every row on the demo routes is worked out here independently,
from the plans' own charges and totals, not from the comparison's rows.
"""

import json
import math
from pathlib import Path

import openpyxl
import pytest

from click.testing import CliRunner

from routeplan import CAUTION
from routeplan.cli import cli
from routeplan.plan.compare import (
    HIGHER,
    LOWER,
    CompareError,
    OveragesDiffer,
    StepsWithoutYield,
    TargetFromFirst,
    Unranked,
    YieldsPlanned,
    best_indices,
    compare_plans,
    compare_routes,
    plan_for_comparison,
)
from routeplan.route.load import load_route
from routeplan.views.compare_text import tradeoff
from routeplan.vocab import UnrankedReason, ValueQualifier, YieldCase

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"
LINEAR = str(DEMO / "hx17-linear.yaml")
CONVERGENT = str(DEMO / "hx17-convergent.yaml")


@pytest.fixture(scope="module")
def demo():
    routes = [load_route(LINEAR), load_route(CONVERGENT)]
    plans, notes = plan_for_comparison(routes)
    return plans, compare_plans(plans, notes)


def _raw_kg(plan, keep=lambda c, mat: True):
    mats = plan.route.materials
    return sum(c.mass.m_as("kg") for sp in plan.steps for c in sp.charges
               if not c.intermediate and keep(c, mats[c.material]))


def _expected(plan):
    """Every ranked measure of one plan, recomputed here from its charges and totals."""
    target = plan.target_mass.m_as("kg")
    pmi = _raw_kg(plan) / target
    # sEF (Roschangar, Sheldon and Senanayake, Green Chem. 2015): solvents and water out, the
    # solute of a solution in (n x M), work-up reagents by mass in, a work-up wash by volumes out
    def solute(c, mat):
        return c.mol.m_as("mol") * mat.molar_mass.m_as("kg/mol") if mat.solution is not None else c.mass.m_as("kg")
    mats = plan.route.materials
    no_solvent = sum(solute(c, mats[c.material]) for sp in plan.steps for c in sp.charges
                     if not c.intermediate and c.role != "solvent" and mats[c.material].formula != "H2O"
                     and not (c.role == "workup" and c.basis == "volumes"))
    largest = max(plan.raw_materials, key=lambda r: r.mass.m_as("kg"))
    return {
        "steps": len(plan.steps),
        "longest_linear_sequence": len(plan.overall_yield.longest_linear_sequence),
        "overall_yield": math.prod(sp.yield_ for sp in plan.steps
                                   if sp.id in plan.overall_yield.longest_linear_sequence),
        "pmi": pmi,
        "e_factor_complete": pmi - 1,
        "e_factor_simple": (no_solvent - target) / target,
        "cost_per_kg": sum(r.cost for r in plan.raw_materials) / target,
        "batches": sum(sp.batches for sp in plan.steps),
        "largest_raw_material": largest.mass.m_as("kg"),
        **_expected_time_waste(plan),
    }


def _stream(mat) -> str | None:
    """Stream by the rule of ROUTE-FORMAT.md's readings, from the formula text."""
    if mat.solution is not None or mat.formula == "H2O":
        return "aqueous"
    if mat.formula and any(x in mat.formula for x in ("F", "Cl", "Br", "I")):
        return "halogenated"
    return "organic" if mat.formula and "C" in mat.formula else None


def _expected_time_waste(plan):
    """Campaign hours, halogenated waste and cost of goods, recomputed from the route file's numbers."""
    route, target = plan.route, plan.target_mass.m_as("kg")
    steps = [(sp, route.step(sp.id)) for sp in plan.steps]
    # both demo routes run one step at a time (route B's branches share R250): the campaign
    # is the sum of batches x cycle time
    hours = sum(sp.batches * s.cycle_time.m_as("h") for sp, s in steps)
    plant = sum(sp.batches * s.cycle_time.m_as("h") * route.equipment[sp.vessel].rate for sp, s in steps)
    streams = {"aqueous": 0.0, "organic": 0.0, "halogenated": 0.0}
    for sp in plan.steps:
        for c in sp.charges:
            where = _stream(route.materials[c.material]) if c.role in ("solvent", "workup") else None
            if where:
                streams[where] += c.mass.m_as("kg")
    prices = route.waste_prices
    waste = sum(kg * getattr(prices, name) for name, kg in streams.items())
    raw = sum(r.cost for r in plan.raw_materials)
    return {"campaign_h": hours, "halogenated_waste_per_kg": streams["halogenated"] / target,
            "cost_of_goods_per_kg": (raw + plant + waste) / target, "plant_cost_per_kg": plant / target,
            "waste_cost_per_kg": waste / target}


def test_demo_hand_numbers():
    # worked from the demo files alone:
    # steps: route A has S1..S5 (5), route B has B1..B3 (3)
    # longest linear sequence: A S1-S2-S3-S4-S5 (5); B B1-B3 or B2-B3 (2), equally long, so
    #   the one of lower expected yield (docs/metrics.md): B2-B3, 0.90 x 0.86 < 0.92 x 0.86
    # overall yield A = 0.92 x 0.88 = 0.8096; x 0.98 = 0.793408; x 0.94 = 0.74580352;
    #   x 0.85 = 0.633932992.  B = 0.90 x 0.86 = 0.774
    # target planned: 25 kg x 1.02 = 25.5 kg for both
    routes = [load_route(LINEAR), load_route(CONVERGENT)]
    cmp = compare_routes(routes)
    assert cmp.row("steps").values == (5, 3)
    assert cmp.row("longest_linear_sequence").values == (5, 2)
    assert cmp.row("overall_yield").values == pytest.approx((0.92 * 0.88 * 0.98 * 0.94 * 0.85, 0.90 * 0.86))
    assert cmp.row("overall_yield").values == pytest.approx((0.633932992, 0.774), rel=1e-12)
    assert tuple(cmp.plans[1].overall_yield.longest_linear_sequence) == ("B2", "B3")
    assert cmp.row("target_mass").values == pytest.approx((25.5, 25.5))


def test_demo_best_per_row_matches_independent_numbers(demo):
    plans, cmp = demo
    expected = [_expected(p) for p in plans]
    ranked = [r for r in cmp.rows if r.better is not None]
    assert {r.key for r in ranked} == set(expected[0])
    for row in ranked:
        vals = [e[row.key] for e in expected]
        assert list(row.values) == pytest.approx(vals, rel=1e-9), row.key
        pick = max if row.key == "overall_yield" else min
        winner = vals.index(pick(vals))
        assert row.best == (winner,), row.key
        assert row.better == (HIGHER if row.key == "overall_yield" else LOWER)


def test_demo_tradeoff_names_the_winner(demo):
    _, cmp = demo
    winners = {cmp.labels[i] for r in cmp.rows for i in r.best}
    for label in winners:
        assert label in tradeoff(cmp)
    assert tradeoff(cmp).endswith(".") and tradeoff(cmp).count(".") == 1


def test_best_indices_and_ties():
    assert best_indices([3.0, 1.5, 1.5, 2.0], LOWER) == (1, 2)
    assert best_indices([0.4, 0.7, 0.7 * (1 + 1e-12)], HIGHER) == (1, 2)
    assert best_indices([2, 2], LOWER) == ()          # all equal: nothing to choose
    assert best_indices([1.0, None], LOWER) == ()     # a missing value: not ranked
    assert best_indices([1.0, 2.0], None) == ()


def _variant(tmp_path, name, old, new, *, source=LINEAR):
    text = Path(source).read_text(encoding="utf-8")
    assert old in text
    path = tmp_path / name
    path.write_text(text.replace(old, new), encoding="utf-8")
    return str(path)


def test_different_target_keys_exit_2(tmp_path):
    other = _variant(tmp_path, "other.yaml", "material: HX17\n", "material: acid\n")
    res = CliRunner().invoke(cli, ["compare", LINEAR, other])
    assert res.exit_code == 2, res.output
    assert "different targets" in res.stderr
    assert "HX17" in res.stderr and "acid" in res.stderr and "keys differ" in res.stderr
    assert "Traceback" not in res.output


def test_same_key_different_formula_exit_2(tmp_path):
    other = _variant(tmp_path, "hx18.yaml", "formula: C14H18N2O4", "formula: C14H18N2O5", source=CONVERGENT)
    res = CliRunner().invoke(cli, ["compare", LINEAR, other])
    assert res.exit_code == 2, res.output
    assert "formulas differ" in res.stderr and "C14H18N2O5" in res.stderr


def test_one_route_is_a_usage_error():
    res = CliRunner().invoke(cli, ["compare", LINEAR])
    assert res.exit_code == 2
    assert "at least two" in res.output
    with pytest.raises(CompareError):
        compare_routes([load_route(LINEAR)])


def test_without_target_the_first_amount_is_used(tmp_path):
    other = _variant(tmp_path, "b30.yaml", "amount: 25 kg", "amount: 30 kg", source=CONVERGENT)
    cmp = compare_routes([load_route(LINEAR), load_route(other)])
    # 25 kg x 1.02 overage for both, not 30 kg for the second
    assert cmp.row("target_mass").values == pytest.approx((25.5, 25.5))
    # the note names the amount used and what the second route (index 1) asked [kg]
    assert cmp.notes == (TargetFromFirst(25.0, ((1, 30.0),)),)


def test_target_option_applies_to_every_route(tmp_path):
    out = tmp_path / "cmp.json"
    res = CliRunner().invoke(cli, ["compare", LINEAR, CONVERGENT, "--target", "40 kg", "--json", str(out)])
    assert res.exit_code == 0, res.output
    d = json.loads(out.read_text(encoding="utf-8"))
    masses = next(r for r in d["rows"] if r["key"] == "target_mass")["values"]
    assert masses == pytest.approx([40.8, 40.8])  # 40 kg x 1.02 overage


def test_json_output_has_rows_best_and_caution(demo):
    _, cmp = demo
    res = CliRunner().invoke(cli, ["compare", LINEAR, CONVERGENT, "--json", "-"])
    assert res.exit_code == 0, res.stderr
    d = json.loads(res.stdout)
    assert d["format"] == "routeplan-compare/1"
    assert d["caution"] == CAUTION
    assert [r["label"] for r in d["routes"]] == list(cmp.labels)
    keys = [r["key"] for r in d["rows"]]
    assert keys == ["target_mass", "steps", "longest_linear_sequence", "overall_yield", "pmi",
                    "e_factor_complete", "e_factor_simple", "cost_per_kg", "batches", "largest_raw_material",
                    "campaign_h", "halogenated_waste_per_kg", "cost_of_goods_per_kg", "plant_cost_per_kg",
                    "waste_cost_per_kg"]
    for row, mine in zip(d["rows"], cmp.rows):
        assert row["values"] == pytest.approx(list(mine.values))
        assert row["best"] == [cmp.labels[i] for i in mine.best]
    largest = next(r for r in d["rows"] if r["key"] == "largest_raw_material")
    assert largest["labels"] == [p.metrics.largest_raw_material[0] for p in cmp.plans]
    assert d["tradeoff"] == tradeoff(cmp)
    assert "CAUTION" in res.stderr


def test_terminal_marks_the_best_and_cautions(demo):
    _, cmp = demo
    res = CliRunner().invoke(cli, ["compare", LINEAR, CONVERGENT])
    assert res.exit_code == 0, res.output
    out = res.stdout
    steps_line = next(line for line in out.splitlines() if line.strip().startswith("steps "))
    # route B (second column) has 3 steps against 5: the mark follows the 3
    assert steps_line.rstrip().endswith("3 *") and "5 *" not in steps_line
    assert "Trade-off" in out and "CAUTION" in out


def test_xlsx_reads_back(tmp_path, demo):
    _, cmp = demo
    # a route name that looks like a formula must stay text
    odd = _variant(tmp_path, "odd.yaml", "route: HX-17 route A (linear, via the ethyl ester)",
                   "route: =1+1 route A")
    path = tmp_path / "cmp.xlsx"
    res = CliRunner().invoke(cli, ["compare", odd, CONVERGENT, "--xlsx", str(path)])
    assert res.exit_code == 0, res.output
    ws = openpyxl.load_workbook(path)["comparison"]
    cells = {(c.row, c.column): c for row in ws.iter_rows() for c in row if c.value is not None}
    texts = [c.value for c in cells.values() if isinstance(c.value, str)]
    assert any(t.startswith("CAUTION: ") and CAUTION in t for t in texts)
    header_row = next(r for (r, col), c in cells.items() if c.value == "measure")
    header = [ws.cell(header_row, col).value for col in range(1, 7)]
    assert header == ["measure", "unit", "better", "=1+1 route A", cmp.labels[1], "best"]
    assert ws.cell(header_row, 4).data_type == "s"
    rows = {ws.cell(r, 1).value: r for r in range(header_row + 1, ws.max_row + 1)}
    pmi_r = rows["process mass intensity (PMI)"]
    assert ws.cell(pmi_r, 4).value == pytest.approx(cmp.row("pmi").values[0])
    assert ws.cell(pmi_r, 5).value == pytest.approx(cmp.row("pmi").values[1])
    assert ws.cell(pmi_r, 6).value == cmp.labels[1]
    assert ws.cell(pmi_r, 5).font.b and not ws.cell(pmi_r, 4).font.b
    assert ws.cell(rows["largest single raw material: which"], 4).value == "water"
    trade = rows["trade-off"]
    assert ws.cell(trade, 2).value.startswith(cmp.labels[1] + " wins on")


def test_unpriced_cost_is_not_ranked(tmp_path):
    other = _variant(tmp_path, "nokiprice.yaml", "    formula: KI\n    phase: solid\n    price: 45\n",
                    "    formula: KI\n    phase: solid\n",
                     source=CONVERGENT)
    cmp = compare_routes([load_route(LINEAR), load_route(other)])
    row = cmp.row("cost_per_kg")
    assert row.best == ()
    assert row.unranked == Unranked(UnrankedReason.UNPRICED_MATERIALS, routes=(1,), items=(("KI",),))
    assert row.qualifiers == (None, ValueQualifier.PRICED_MATERIALS_ONLY)
    cog = cmp.row("cost_of_goods_per_kg")
    assert cog.unranked == Unranked(UnrankedReason.UNPRICED_ITEMS, routes=(1,), items=(("KI",),))
    assert cog.qualifiers == (None, ValueQualifier.PRICED_ITEMS_ONLY)
    assert "raw-material cost and cost of goods cannot be ranked" in tradeoff(cmp)


def test_plans_for_different_masses_are_refused():
    routes = [load_route(LINEAR), load_route(CONVERGENT)]
    from routeplan.plan.planner import plan_route

    with pytest.raises(CompareError, match="different target masses"):
        compare_plans([plan_route(routes[0]), plan_route(routes[1], "30 kg")])


def test_help_says_how_the_target_is_chosen():
    res = CliRunner().invoke(cli, ["compare", "--help"])
    assert res.exit_code == 0
    text = " ".join(res.output.split())
    assert "first route's target.amount" in text


def test_compare_at_low_yields(demo):
    plans, _ = demo
    low, notes = plan_for_comparison([p.route for p in plans], yields="low")
    # both routes have steps without a low yield: A's S2-S5, B's B2 and B3
    assert notes == [YieldsPlanned(YieldCase.LOW), StepsWithoutYield(0, ("S2", "S3", "S4", "S5"), YieldCase.LOW),
                     StepsWithoutYield(1, ("B2", "B3"), YieldCase.LOW)]
    cmp = compare_plans(low, notes)
    pmi = cmp.row("pmi")
    assert pmi.best == () and pmi.unranked == Unranked(UnrankedReason.YIELDS_WITHOUT_CASE, routes=(0, 1),
                                                       yields=YieldCase.LOW)
    assert cmp.row("steps").best == (1,)  # a row that does not depend on yields is still ranked
    # route A's S1 gives a range (92 %, low 88 %), the other steps of its sequence none; route
    # B's sequence is B2-B3 (the tie rule reads the expected yields) and neither has a range
    for expected, at_low, factor in zip(plans, low, (0.88 / 0.92, 1.0)):
        assert at_low.overall_yield.longest_linear_sequence == expected.overall_yield.longest_linear_sequence
        assert at_low.overall_yield.yield_ == pytest.approx(expected.overall_yield.yield_ * factor)
        assert at_low.yield_basis == "low"


def test_notes_and_reasons_are_data(tmp_path):
    # the second route asks 30 kg at 5 % overage, prices in USD and has a step without a cycle time
    other = _variant(tmp_path, "b.yaml", "currency: EUR", "currency: USD", source=CONVERGENT)
    other = _variant(tmp_path, "b.yaml", "amount: 25 kg\n  overage: 2 %", "amount: 30 kg\n  overage: 5 %",
                     source=other)
    other = _variant(tmp_path, "b.yaml", "    vessel: R250\n    cycle_time: 10 h\n", "    vessel: R250\n",
                     source=other)
    cmp = compare_routes([load_route(LINEAR), load_route(other)])
    assert cmp.notes == (TargetFromFirst(25.0, ((1, 30.0),)), OveragesDiffer((0.02, 0.05)))
    assert cmp.currency is None
    for key in ("cost_per_kg", "cost_of_goods_per_kg", "plant_cost_per_kg", "waste_cost_per_kg"):
        row = cmp.row(key)
        assert row.unit == "currency/kg" and row.best == ()
        assert row.unranked == Unranked(UnrankedReason.CURRENCIES, currencies=("EUR", "USD")), key
    campaign = cmp.row("campaign_h")
    assert campaign.values[1] is None and campaign.which == () and campaign.best == ()
    assert campaign.unranked == Unranked(UnrankedReason.NO_SCHEDULE)
    # the rows without a reason are ranked as before; none carries a word
    assert cmp.row("steps").best == (1,) and cmp.row("steps").unranked is None
