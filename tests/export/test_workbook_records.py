"""Charge sheets as batch records: protection, the step's warnings, the record lines at
the marked points, the tolerance on every weighed line and the sign-off block.

Read back with openpyxl (a reader independent of the writer): a protected sheet has
``<sheetProtection sheet="1">`` without a password, and a cell's ``locked`` attribute
comes from its style (ECMA-376 Part 1, the sheetProtection and protection elements; a
cell is locked unless its style says otherwise; from memory).
"""

from __future__ import annotations

import openpyxl
import pytest

from routeplan.export.workbook import charge_sheet_names, write_workbook
from routeplan.export.workbook_records import DEFAULT_POINT, SIGN_OFF_LABELS
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from test_workbook import ROUTE_NAME, ROUTE_TEXT, WRITTEN, charge_table, make_plan
from test_workbook_summary import make_stock_plan, stock_table

INPUT_HEADINGS = ("lot number", "lot assay or titre", "actual mass charged [kg]", "balance or vessel", "checked by")
LOCKED_HEADINGS = ("#", "material", "equiv [-]", "amount [mol]", "assay [%]", "mass to charge [kg]",
                   "volume to charge [L]", "weighed within", "tolerance [%]", "molar mass [g/mol]")


def _book(plan, folder, name):
    path = folder / name
    write_workbook(plan, path, written=WRITTEN)
    return openpyxl.load_workbook(path)


@pytest.fixture(scope="module")
def plan():
    return make_plan()


@pytest.fixture(scope="module")
def book(plan, tmp_path_factory):
    return _book(plan, tmp_path_factory.mktemp("records"), "plan.xlsx")


def test_every_sheet_is_protected_without_a_password(book):
    for ws in book.worksheets:
        assert ws.protection.sheet, ws.title
        assert not ws.protection.password, ws.title


def test_input_cells_unlocked_planned_and_formula_cells_locked(plan, book):
    for sp, _k, name in charge_sheet_names(plan):
        ws = book[name]
        h, col, rows = charge_table(ws)
        for r, c in zip(rows, sp.charges):
            for heading in INPUT_HEADINGS:
                cell = ws.cell(r, col[heading])
                assert cell.protection.locked is False, (name, c.material, heading)
            for heading in LOCKED_HEADINGS:
                cell = ws.cell(r, col[heading])
                assert cell.protection.locked is not False, (name, c.material, heading)
        for c in range(1, ws.max_column + 1):  # headings locked
            assert ws.cell(h, c).protection.locked is not False
        # the record lines and the sign-off are for the plant to fill in
        labels = {ws.cell(r, 1).value: r for r in range(rows[-1] + 1, ws.max_row + 1)}
        for label in SIGN_OFF_LABELS:
            assert ws.cell(labels[label], 4).protection.locked is False, (name, label)
            assert ws.cell(labels[label], 1).protection.locked is not False
        point = labels[DEFAULT_POINT]  # no controls in this route: one line at the end of reaction
        assert ws.cell(point, 1).protection.locked is not False
        assert ws.cell(point, 9).protection.locked is False  # temperature


def test_stock_on_hand_cells_are_unlocked(tmp_path):
    plan = make_stock_plan()
    ws = _book(plan, tmp_path, "stock.xlsx")["Summary"]
    _h, col, rows = stock_table(ws)
    for r in rows:
        assert ws.cell(r, col["on hand [kg]"]).protection.locked is False
        assert ws.cell(r, col["to buy [kg]"]).protection.locked is not False
        assert ws.cell(r, col["need [kg]"]).protection.locked is not False


def test_every_weighed_line_carries_its_tolerance(plan, book):
    for sp, _k, name in charge_sheet_names(plan):
        ws = book[name]
        _h, col, rows = charge_table(ws)
        for r, c in zip(rows, sp.charges):
            tol = ws.cell(r, col["tolerance [%]"]).value
            assert tol == pytest.approx(0.01)  # the route's default, 1 % (common practice, no source)
            flag = ws.cell(r, col["weighed within"])
            if c.carried_from is None:
                assert flag.data_type == "f" and "ABS(" in flag.value
            else:
                assert flag.value == "not weighed"
        rules = ws.conditional_formatting
        marked = {str(rng.sqref) for rng in rules}
        actual = openpyxl.utils.get_column_letter(col["actual mass charged [kg]"])
        weighed = [r for r, c in zip(rows, sp.charges) if c.carried_from is None]
        assert {f"{actual}{r}" for r in weighed} <= marked


# A route whose first step's demonstrated batch is far below the planned batch (a
# scale-up warning about S1), per-line and route tolerances, and marked points.
WARNED = ROUTE_TEXT.replace("    vessel: R5\n", "    vessel: R5\n    demonstrated_batch: 10 g\n"
                            "    controls:\n"
                            "      - {point: after dosing, check: internal temperature, limit: below 30 °C}\n"
                            "      - {point: end of reaction, check: HPLC conversion, limit: '>= 98 %'}\n", 1)
WARNED = WARNED.replace("      - {material: Ac2O, equiv: 1.1}", "      - {material: Ac2O, equiv: 1.1, tolerance: 0.5 %}", 1)
WARNED = WARNED.replace("currency: EUR\n", "currency: EUR\ncharge_tolerance: 2 %\n", 1)


@pytest.fixture(scope="module")
def warned(tmp_path_factory):
    plan = plan_route(load_route_text(WARNED, ROUTE_NAME))
    return plan, _book(plan, tmp_path_factory.mktemp("warned"), "warned.xlsx")


def _texts(ws):
    return [c.value for row in ws.iter_rows() for c in row if isinstance(c.value, str)]


def test_each_steps_warnings_are_on_its_sheets(warned):
    plan, book = warned
    about = {}
    for p in plan.warnings:
        assert p.step is not None
        about.setdefault(p.step, []).append(p.render())
    first = plan.steps[0].id
    assert first in about and any("times the largest batch run so far" in t for t in about[first])
    for sp, _k, name in charge_sheet_names(plan):
        texts = _texts(book[name])
        h, _col, _rows = charge_table(book[name])
        mine = [t for t in texts if t.startswith("WARNING: ")]
        assert mine == [f"WARNING: {w}" for w in about.get(sp.id, [])], name
        for t in mine:  # above the charge table
            r = next(c.row for row in book[name].iter_rows() for c in row if c.value == t)
            assert r < h
    # and still on the Summary
    summary = _texts(book["Summary"])
    for texts in about.values():
        for t in texts:
            assert t in summary


def test_controls_and_tolerances_reach_the_sheet(warned):
    plan, book = warned
    sp, _k, name = charge_sheet_names(plan)[0]
    ws = book[name]
    texts = _texts(ws)
    for point, check, limit in (("after dosing", "internal temperature", "below 30 °C"),
                                ("end of reaction", "HPLC conversion", ">= 98 %")):
        r = next(c.row for row in ws.iter_rows() for c in row if c.value == point)
        assert ws.cell(r, 4).value == check and ws.cell(r, 7).value == limit
        assert ws.cell(r, 9).protection.locked is False  # temperature to fill in
    assert "Records at the marked points (fill in at the vessel)" in texts
    _h, col, rows = charge_table(ws)
    tol = {ws.cell(r, col["key"]).value: ws.cell(r, col["tolerance [%]"]).value for r in rows}
    assert tol["Ac2O"] == pytest.approx(0.005) and tol["aminophenol"] == pytest.approx(0.02)
    assert tol["water"] == pytest.approx(0.02)
