"""Intermediates on the shelf in every output: terminal, JSON, CSV and workbook.

Route SHELF of test_stock_intermediates: 20 kg of P need 100 mol (15 kg) of I; 4.5 kg of I
on the shelf is 30 % of it, 20 kg covers it (15 kg taken) and S1 does not run.
"""

import csv
import json

import openpyxl
import pytest

from conftest import route_text, run_cli, words, write_route
from routeplan import CAUTION
from routeplan.export.csv import write_csv
from routeplan.export.workbook import write_workbook
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from routeplan.units import Q

SHELF = route_text("shelf.yaml")


@pytest.fixture
def files(tmp_path):
    route = write_route(tmp_path, SHELF, "shelf.yaml")
    part = tmp_path / "part.yaml"
    part.write_text("I: 4.5 kg\nA: 15.3 kg\n")
    full = tmp_path / "full.yaml"
    full.write_text("I: 20 kg\nA: 10 kg\nR: 5 kg\n")
    return route, part, full


def test_terminal_partial_and_covered(files):
    route, part, full = files
    text = words(run_cli("plan", route, "--stock", part).stdout)  # folded to the width
    assert "4.500 kg of I taken from stock; this step makes the rest" in text  # 4 significant figures
    assert "using the intermediates in stock first" in text and "limited by A" in text
    result = run_cli("plan", route, "--stock", full)
    assert result.exit_code == 0, result.output
    out = words(result.stdout)
    assert "not run: the stock of I covers it (15.00 kg of I taken from stock)" in out
    assert "in stock, not needed for this target (charged only in steps that do not run): A" in out
    assert "intermediates from stock, counted as inputs in the PMI and E-factors" in out
    assert "CAUTION" in out


def test_json_keys(files):
    route, _part, full = files
    result = run_cli("plan", route, "--stock", full, "--json", "-")
    assert result.exit_code == 0, result.output
    doc = json.loads(result.stdout)
    s1, s2 = doc["steps"]
    assert s1["runs"] is False and s1["not_run"] == "the stock of I covers it"
    assert s1["from_stock_mol"] == pytest.approx(100.0) and s1["from_stock_kg"] == pytest.approx(15.0)
    assert s1["batches"] == 0 and s1["charges"][0]["per_batch"] == {"mol": None, "mass_kg": None, "volume_L": None}
    assert s2["runs"] is True and s2["from_stock_mol"] is None and s2["not_run"] is None
    assert doc["stock"]["intermediates"] == [{"material": "I", "step": "S1", "on_hand_kg": 20.0,
                                              "taken_kg": pytest.approx(15.0), "taken_mol": pytest.approx(100.0),
                                              "runs": False}]
    assert [b["material"] for b in doc["stock"]["to_buy"]] == ["R", "solv2"]
    # (9.96 + 30) kg of raw materials + 15 kg of I from stock, over 20 kg of P
    assert doc["metrics"]["pmi"] == pytest.approx(54.96 / 20)
    assert doc["caution"] == CAUTION


def test_csv_steps(tmp_path):
    plan = plan_route(load_route_text(SHELF, "shelf.yaml"), stock={"I": Q(20, "kg")})
    write_csv(plan, tmp_path / "out")
    with open(tmp_path / "out" / "steps.csv", newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    s1 = rows[0]
    assert s1["step"] == "S1" and s1["batches [-]"] == "0"
    assert float(s1["product from stock [kg]"]) == pytest.approx(15.0)
    assert float(s1["product from stock [mol]"]) == pytest.approx(100.0)
    assert s1["not run because"] == "the stock of I covers it"
    assert rows[1]["not run because"] == "" and rows[1]["product from stock [kg]"] == ""
    assert rows[-1]["step"].startswith("CAUTION: ")
    with open(tmp_path / "out" / "charges-01-S1.csv", newline="", encoding="utf-8") as fh:
        charge = next(csv.DictReader(fh))
    assert charge["mass [kg]"] == "0.0" and charge["mass per batch [kg]"] == ""


def test_workbook_read_back(files, tmp_path):
    route, part, full = files
    path = tmp_path / "full.xlsx"
    result = run_cli("plan", route, "--stock", full, "--xlsx", path)
    assert result.exit_code == 0, result.output
    wb = openpyxl.load_workbook(path)
    assert wb.sheetnames == ["Summary", "S2", "Materials"]  # no charge sheet for S1
    cells = [str(v) for row in wb["Summary"].iter_rows(values_only=True) for v in row if v is not None]
    assert "none: the step does not run" in cells
    assert "15 kg of I taken from stock; not run: the stock of I covers it; no charge sheet" in cells
    assert "I taken from stock [kg]" in cells
    assert any(c.startswith("CAUTION: ") for c in cells)
    # the partial case: both steps get sheets, and the Summary says what came from stock
    path2 = tmp_path / "part.xlsx"
    assert run_cli("plan", route, "--stock", part, "--xlsx", path2).exit_code == 0
    wb2 = openpyxl.load_workbook(path2)
    assert wb2.sheetnames == ["Summary", "S1", "S2", "Materials"]
    cells2 = [str(v) for row in wb2["Summary"].iter_rows(values_only=True) for v in row if v is not None]
    assert "4.5 kg of I taken from stock; this step makes the rest" in cells2


def test_workbook_writer_directly(tmp_path):
    # a step that does not run writes no sheet and breaks no per-batch division
    plan = plan_route(load_route_text(SHELF, "shelf.yaml"), stock={"I": Q(15, "kg")})
    write_workbook(plan, tmp_path / "w.xlsx")
    assert "S1" not in openpyxl.load_workbook(tmp_path / "w.xlsx").sheetnames
