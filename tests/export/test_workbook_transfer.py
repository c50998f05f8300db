"""Charge sheets of a telescoped step whose wash leaves before the transfer, recalculated
by LibreOffice headless (as in ``test_workbook_recalc``: the external check is LibreOffice
Calc's own results, read back with openpyxl).

Route ``tests/data/routes/telescoped-wash.yaml`` (worked by hand in
``tests/plan/test_transfer.py``): T1 runs in two batches and its water wash is separated
and discarded; T2 takes the toluene solution in one batch.  The sheets must say what is
separated and what is transferred, and every recalculated mass and volume to charge must
be the plan's per batch: the volume of T1's mixture carried into T2 is what stays, not the
wash.
"""

from __future__ import annotations

import pytest

from conftest import DATA
from routeplan.export.workbook import charge_sheet_names
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from test_workbook import charge_table, close, header_value
from test_workbook_recalc import recalculated

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def book(tmp_path_factory):
    plan = plan_route(load_route(DATA / "routes" / "telescoped-wash.yaml"))
    return plan, recalculated(tmp_path_factory, plan, "wash")


def _rows(ws):
    _h, col, rows = charge_table(ws)
    return col, {ws.cell(r, col["key"]).value: r for r in rows}


def test_recalculated_charges_are_the_plans_per_batch(book):
    plan, wb = book
    n_cells = 0
    for sp, _k, name in charge_sheet_names(plan):
        ws = wb[name]
        _h, col, rows = charge_table(ws)
        for r, c in zip(rows, sp.charges):
            assert close(ws.cell(r, col["mass to charge [kg]"]).value, c.m_kg / sp.batches), (name, c.material)
            assert close(ws.cell(r, col["volume to charge [L]"]).value,
                         None if c.V_L is None else c.V_L / sp.batches), (name, c.material)
            n_cells += 2
    assert n_cells == 2 * (5 * 2 + 2)


def test_the_telescoped_sheet_says_what_is_separated_and_what_goes_on(book):
    plan, wb = book
    t1 = plan.step("T1")
    for _sp, k, name in charge_sheet_names(plan):
        if not name.startswith("T1"):
            continue
        ws = wb[name]
        col, row = _rows(ws)
        assert "separated and discarded right after this line, not transferred" in ws.cell(row["water"],
                                                                                             col["role"]).value
        assert "separated" not in ws.cell(row["toluene"], col["role"]).value
        product = header_value(ws, "product")
        # per batch: 92.245 L / 2 = 46.12 L, 80.787 kg / 2 = 40.39 kg (tests/plan/test_transfer.py)
        assert product.startswith("ester, goes on in solution to T2: 46.12 L of mixture (40.39 kg) per batch")
        assert product.endswith("separated and discarded before the transfer: water")
        assert t1.batch.transfer_V_L / 2 == pytest.approx(46.12, abs=5e-3)


def test_the_next_sheet_transfers_only_what_stays(book):
    plan, wb = book
    ws = wb["T2"]
    col, row = _rows(ws)
    r = row["ester"]
    assert "in solution from T1: transfer the mixture left after water was separated" in ws.cell(r, col["role"]).value
    # the volume to charge is what stays in T1's vessel: 92.245 L, not 92.245 + 36.225 L
    V = ws.cell(r, col["volume to charge [L]"]).value
    assert V == pytest.approx(plan.step("T1").batch.transfer_V_L, rel=1e-9)
    assert V == pytest.approx(92.245, abs=1e-3)
    water = plan.step("T1").charges[-1]
    assert V < plan.step("T1").batch.step_V_L - 0.99 * water.V_L
