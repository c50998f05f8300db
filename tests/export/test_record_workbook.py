"""The workbook of the rest of a campaign, recalculated by LibreOffice.

On the sheet of S2 (route CAMP, record of tests/record_helpers.py), the I1 line carries
the lots in hand and their mass-weighted assay; the sheet's own formula
``mass = n * M / 1000 / lot assay`` must give, once LibreOffice recalculates it (an
independent spreadsheet engine), the number stored and the number worked by hand.
"""

import math

import openpyxl
import pytest

from record_helpers import CAMP, RECORD_YAML
from test_workbook import WRITTEN, charge_table, header_value
from soffice_helpers import canary_value, need_soffice, run_soffice, write_canary
from routeplan.export.workbook import write_workbook
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

pytestmark = pytest.mark.slow

# worked by hand in test_record_worked.py: S2 still makes (266.67 - 148.5) mol of I2, at its lot's
# yield 148.5 / 190 (--record-yields actual) from (266.67 - 148.5) / (148.5 / 190) mol of I1; the
# lots in hand of I1 are at (27.0 * 0.96 + 25.0 * 0.92) / 52.0
N_I1 = (100 / (0.75 * 0.5) - 30.0 * 0.99 / 0.200) / (148.5 / 190)
LOT_ASSAY = (27.0 * 0.96 + 25.0 * 0.92) / 52.0
MASS_AT_LOT = N_I1 * 150.0 / 1000 / LOT_ASSAY   # [mol] * [g/mol] / 1000 / [-] = [kg]


@pytest.fixture(scope="module")
def books(tmp_path_factory):
    need_soffice()
    base = tmp_path_factory.mktemp("record-book")
    src, out = base / "in", base / "out"
    src.mkdir()
    (src / "record.yaml").write_text(RECORD_YAML, encoding="utf-8")
    route = load_route_text(CAMP, "camp.yaml")
    plan = plan_route(route, record=src / "record.yaml", record_yields="actual")
    write_workbook(plan, src / "rest.xlsx", written=WRITTEN)
    run_soffice([src / "rest.xlsx", write_canary(src)], out, base / "profile")
    return (openpyxl.load_workbook(src / "rest.xlsx", data_only=True),
            openpyxl.load_workbook(out / "rest.xlsx", data_only=True),
            canary_value(out))


def _i1_line(ws):
    _h, col, rows = charge_table(ws)
    r = next(r for r in rows if ws.cell(r, col["key"]).value == "I1")
    return {name: ws.cell(r, c).value for name, c in col.items()}


def test_the_lot_in_hand_is_prefilled_and_recalculates(books):
    written, recalculated, canary = books
    assert canary == 6          # LibreOffice did recalculate
    before, after = _i1_line(written["S2"]), _i1_line(recalculated["S2"])
    assert before["lot number"].startswith("in hand: S1 batches 1, 2")
    assert math.isclose(before["lot assay or titre"], LOT_ASSAY, rel_tol=1e-12)
    assert math.isclose(before["mass to charge [kg]"], MASS_AT_LOT, rel_tol=1e-9)
    assert math.isclose(after["mass to charge [kg]"], MASS_AT_LOT, rel_tol=1e-9)


def test_the_sheet_says_the_yield_is_the_lots_mean(books):
    written, _, _ = books
    # S2's one lot: 148.5 mol of I2 from 190 mol of I1
    assert math.isclose(header_value(written["S2"], "yield (mean of the recorded lots) [%]"), 148.5 / 190,
                        rel_tol=1e-12)
    assert header_value(written["S3"], "yield (expected) [%]") == 0.75
    summary = [v for row in written["Summary"].iter_rows(values_only=True) for v in row if isinstance(v, str)]
    assert any("actual yields (S1 88.1 %, S2 78.2 %" in v for v in summary)  # percentages as every view writes them
