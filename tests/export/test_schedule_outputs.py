"""The schedule, waste and cost of goods in the workbook and the CSV files equal the plan's."""

from __future__ import annotations

import csv
from pathlib import Path

import openpyxl
import pytest

from conftest import run_cli
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route

DEMO = Path(__file__).resolve().parents[2] / "demo_routes" / "hx17-convergent.yaml"


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    folder = tmp_path_factory.mktemp("out")
    result = run_cli("plan", DEMO, "--target", "250 kg", "-q", "--xlsx", folder / "plan.xlsx", "--csv", folder / "csv")
    assert result.exit_code == 0, result.output
    return folder, plan_route(load_route(DEMO), "250 kg")


def test_schedule_sheet_lists_every_batch_as_planned(written):
    folder, plan = written
    ws = openpyxl.load_workbook(folder / "plan.xlsx")["Schedule"]
    rows = [[c.value for c in row] for row in ws.iter_rows()]
    head = next(i for i, r in enumerate(rows) if r[0] == "step")
    got = []
    for r in rows[head + 1:]:
        if r[0] is None:
            break
        got.append((r[0], r[1], r[5], r[9], r[13]))  # step, vessel, batch, start, end (merged cells)
    want = [(s.id, s.vessel, b.batch, b.start_h, b.end_h) for s in plan.schedule.steps for b in s.batches]
    assert got == want and len(want) == sum(sp.batches for sp in plan.steps)
    assert any(r[0] == "R630" and "B3" in r for r in rows)  # the timeline lane


def test_summary_and_csv_carry_duration_waste_and_cost_of_goods(written):
    folder, plan = written
    ws = openpyxl.load_workbook(folder / "plan.xlsx")["Summary"]
    facts = {row[0].value: row[3].value for row in ws.iter_rows() if row[0].value}
    assert facts["campaign duration [h]"] == plan.schedule.campaign_h
    assert facts["halogenated waste [kg]"] == pytest.approx(plan.waste.total.halogenated_kg, rel=1e-12)
    assert facts["cost of goods per kg of target [EUR/kg]"] == pytest.approx(plan.cost_of_goods.per_kg, rel=1e-12)
    with open(folder / "csv" / "schedule.csv", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))[1:-1]
    assert [(r[0], int(r[2]), float(r[3]), float(r[4])) for r in rows] == \
        [(s.id, b.batch, b.start_h, b.end_h) for s in plan.schedule.steps for b in s.batches]
    with open(folder / "csv" / "waste.csv", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))[1:-1]
    assert sum(float(r[4]) for r in rows) == pytest.approx(plan.waste.waste_kg, rel=1e-12)
