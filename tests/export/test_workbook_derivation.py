"""The Derivation sheet with live formulas, recalculated by a real spreadsheet: LibreOffice headless.

External check (source: LibreOffice Calc, run headless with "always recalculate" on
load, as in test_workbook_recalc.py (tests/soffice_helpers.py); a canary formula stored with a wrong value must come
back right): every line's result on the sheet is a formula over its factor cells, and a
factor that is an earlier result is a formula pointing at that result's cell (in the same
block, or in the block of the step that derives it).  After LibreOffice recalculates
the workbook, every result cell equals the derivation's own value, and the cells that
give a charge's moles, mass and volume equal the Plan's numbers, to a relative 1e-9.
The unit conversions the sheet adds (1000 for kg / (g/mol) to mol) are pint's, whose
units follow NIST SP 811.
"""

from __future__ import annotations

import math
import re

import openpyxl
import pytest

import routeplan
from routeplan import CAUTION
from conftest import DATA, ROOT
from routeplan.export.workbook import write_workbook
from routeplan.export.workbook_derivation import DERIVATION_COLUMNS, DERIVATION_SHEET, DERIVATION_TOP
from routeplan.views.derivation_text import sheet_blocks
from soffice_helpers import canary_value, need_soffice, run_soffice, write_canary

pytestmark = pytest.mark.slow

COL = {key: i for i, (_h, key) in enumerate(DERIVATION_COLUMNS)}
LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"


def _plans():
    load = routeplan.load_route
    return {
        "linear": routeplan.plan_route(load(LINEAR), explain=True),
        "convergent": routeplan.plan_route(load(CONVERGENT), explain=True, yields="low"),
        "stock": routeplan.plan_route(load(LINEAR), stock=ROOT / "demo_routes" / "stock.yaml", explain=True),
        "record": routeplan.plan_route(load(LINEAR), record=ROOT / "demo_routes" / "record.yaml", explain=True),
        "shared": routeplan.plan_route(load(DATA / "routes" / "shared.yaml"), explain=True),
        "good": routeplan.plan_route(load(DATA / "routes" / "good.yaml"), explain=True),
    }


@pytest.fixture(scope="module")
def sheets(tmp_path_factory):
    need_soffice()
    base = tmp_path_factory.mktemp("derivation")
    src, out = base / "in", base / "out"
    src.mkdir()
    plans = _plans()
    files = [write_workbook(plan, src / f"{name}.xlsx") for name, plan in plans.items()]
    run_soffice([*files, write_canary(src)], out, base / "profile")
    assert canary_value(out) == 6
    return {name: (plan, openpyxl.load_workbook(src / f"{name}.xlsx")[DERIVATION_SHEET],
                   openpyxl.load_workbook(out / f"{name}.xlsx", data_only=True)[DERIVATION_SHEET])
            for name, plan in plans.items()}


def _lines(ws):
    """Rows of the sheet grouped by (step, #, line): [(row numbers, result row)], in order."""
    out, current, key = [], [], None
    for r in range(DERIVATION_TOP + 2, ws.max_row + 1):
        k = tuple(ws.cell(r, COL[c] + 1).value for c in ("step", "order", "line"))
        if k[0] is None:
            break
        if k != key and current:
            out.append((key, current))
            current = []
        key = k
        current.append(r)
    if current:
        out.append((key, current))
    return out


NAMES = ["linear", "convergent", "stock", "record", "shared", "good"]


@pytest.mark.parametrize("name", NAMES)
def test_every_result_is_a_live_formula_and_recalculates_to_the_plan(sheets, name):
    plan, formulas, values = sheets[name]
    blocks = sheet_blocks(plan)
    lines = _lines(formulas)
    assert len(lines) == sum(len(b["lines"]) for b in blocks)
    checked = 0
    for (key, rows), line in zip(lines, (x for b in blocks for x in b["lines"])):
        last = rows[-1]
        formula = formulas.cell(last, COL["result"] + 1).value
        assert isinstance(formula, str) and formula.startswith("="), (key, formula)
        # the formula is the line's value cells, in order, joined by operators: no number of its own
        assert re.fullmatch(r"=F\d+([*/+-]F\d+)*", formula), (key, formula)
        assert re.findall(r"F(\d+)", formula) == [str(r) for r in rows], (key, formula)
        got = values.cell(last, COL["result"] + 1).value
        assert math.isclose(got, line["value"], rel_tol=1e-9), (name, key, got, line["value"])
        checked += 1
    assert checked > 10


@pytest.mark.parametrize("name", NAMES)
def test_each_charge_ends_on_the_plans_numbers(sheets, name):
    plan, _formulas, values = sheets[name]
    lines = _lines(values)
    flat = [(b, x) for b in sheet_blocks(plan) for x in b["lines"]]
    n = 0
    for (key, rows), (block, line) in zip(lines, flat):
        if line["amount"] is None:
            continue
        c = next(c for c in plan.step(block["step"]).charges if c.order == block["order"])
        want = {"n": c.n_mol, "m": c.m_kg, "V": c.V_L}[line["amount"]]
        assert line["unit"] == {"n": "mol", "m": "kg", "V": "L"}[line["amount"]]
        got = values.cell(rows[-1], COL["result"] + 1).value
        assert math.isclose(got, want, rel_tol=1e-9), (name, key, got, want)
        n += 1
    # every charge of every running step: its moles (where it has moles) and mass at least
    charges = sum(len(sp.charges) for sp in plan.steps if sp.runs)
    assert n >= charges


def test_an_earlier_result_is_a_reference_to_its_cell(sheets):
    plan, formulas, values = sheets["linear"]
    refs = 0
    for r in range(DERIVATION_TOP + 2, formulas.max_row + 1):
        v = formulas.cell(r, COL["value"] + 1).value
        if isinstance(v, str) and v.startswith("="):
            target = int(v.replace("=$J$", ""))
            # the cell pointed at is a result whose 'result is' is this factor's 'what'
            assert formulas.cell(target, COL["result_what"] + 1).value == formulas.cell(r, COL["what"] + 1).value
            assert math.isclose(values.cell(r, COL["value"] + 1).value, values.cell(target, COL["result"] + 1).value,
                                rel_tol=1e-12)
            refs += 1
    assert refs > 20
    # some point at another step's block (the demand on a step comes from the next one)
    sources = [formulas.cell(r, COL["source"] + 1).value for r in range(DERIVATION_TOP + 2, formulas.max_row + 1)]
    assert any(s and s.startswith("derived in S") for s in sources)


def test_a_shared_intermediate_sums_both_branches_by_reference(sheets):
    # benzoyl chloride is charged in S2 and S3: the demand on S1 is one formula adding the
    # two result cells, each the charge's own line in its step's block
    plan, formulas, values = sheets["shared"]
    sums = [r for r in range(DERIVATION_TOP + 2, formulas.max_row + 1)
            if formulas.cell(r, COL["result_what"] + 1).value == "BzCl to make in S1"]
    assert sums
    r = sums[0]
    ops = [formulas.cell(k, COL["op"] + 1).value for k in range(r - 1, r + 1)]
    assert ops == ["", "+"]
    whats = {formulas.cell(k, COL["what"] + 1).value for k in range(r - 1, r + 1)}
    assert whats == {"BzCl charged to S2", "BzCl charged to S3"}
    s2 = next(c for c in plan.step("S2").charges if c.material == "BzCl").n_mol
    s3 = next(c for c in plan.step("S3").charges if c.material == "BzCl").n_mol
    assert math.isclose(values.cell(r, COL["result"] + 1).value, s2 + s3, rel_tol=1e-9)


def test_sheet_is_protected_and_text_stays_text(tmp_path):
    text = (DATA / "routes" / "good.yaml").read_text(encoding="utf-8").replace(
        "route: test route (acid via the ethyl ester)", "route: '=HYPERLINK(\"http://x\",\"y\")'")
    path = tmp_path / "r.yaml"
    path.write_text(text, encoding="utf-8")
    plan = routeplan.plan_route(routeplan.load_route(path), explain=True)
    wb = openpyxl.load_workbook(write_workbook(plan, tmp_path / "d.xlsx"))
    ws = wb[DERIVATION_SHEET]
    assert ws.protection.sheet
    # printed like every sheet: landscape, one page wide, headings on every page, the caution in the footer
    # (an absent fitToWidth means 1: ECMA-376 Part 1, the pageSetup element)
    assert ws.page_setup.orientation == "landscape" and ws.sheet_properties.pageSetUpPr.fitToPage
    assert (ws.page_setup.fitToWidth or 1, ws.page_setup.fitToHeight) == (1, 0)
    assert ws.print_title_rows == f"${DERIVATION_TOP + 1}:${DERIVATION_TOP + 1}"
    assert CAUTION in " ".join(ws.oddFooter.left.text.split())
    assert ws.cell(2, 1).value == "CAUTION: " + CAUTION  # near the top, as on every sheet
    title = ws.cell(1, 1)
    assert title.data_type == "s" and title.value.endswith('=HYPERLINK("http://x","y")')
    for r in range(DERIVATION_TOP + 2, ws.max_row + 1):
        for key in ("step", "material", "what", "source", "unit", "result_unit", "result_what"):
            cell = ws.cell(r, COL[key] + 1)
            assert cell.value is None or cell.data_type == "s", (r, key, cell.value)


def test_without_explain_there_is_no_derivation_sheet(tmp_path):
    plan = routeplan.plan_route(routeplan.load_route(LINEAR))
    assert DERIVATION_SHEET not in openpyxl.load_workbook(write_workbook(plan, tmp_path / "e.xlsx")).sheetnames
