"""Steps of many batches in the charge-sheet workbook.

A vessel typed as ``0.7 mL`` instead of ``0.7 L`` splits a step into thousands of
batches.  Up to :data:`~routeplan.export.workbook.MAX_BATCH_SHEETS` batches a step gets
a charge sheet per batch; beyond that it gets one sheet, headed "each of n batches
(identical)", whose quantities are per batch, and the Summary says so.  Numbers are
compared with the Plan's; the route is that of ``test_workbook.py`` with only the
vessel changed.
"""

from __future__ import annotations

import time
from types import SimpleNamespace

import openpyxl
import pytest

from routeplan import CAUTION
from routeplan.export.workbook import MAX_BATCH_SHEETS, charge_sheet_names, write_workbook
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from test_workbook import ROUTE_NAME, ROUTE_TEXT, WRITTEN, charge_table, close, header_value, make_plan
from test_workbook_summary import last_labelled_row, table


def plan_with_batches(n: int):
    """The plan of :data:`ROUTE_TEXT` with its first step's vessel sized so that the
    step needs ``n`` batches: a vessel of ``V / (0.8 * (n - 0.5))`` at the default
    80 % fill, ``V`` the step's volume (which does not depend on the vessel)."""
    volume = make_plan().steps[0].batch.step_volume.m_as("L")
    vessel = volume / (0.8 * (n - 0.5))
    text = ROUTE_TEXT.replace("R5: {volume: 5 L}", f"R5: {{volume: {vessel!r} L}}")
    assert text != ROUTE_TEXT
    plan = plan_route(load_route_text(text, ROUTE_NAME))
    assert plan.steps[0].batches == n
    return plan


def _write(plan, folder):
    path = folder / "many.xlsx"
    started = time.perf_counter()
    write_workbook(plan, path, written=WRITTEN)
    seconds = time.perf_counter() - started
    return SimpleNamespace(path=path, seconds=seconds, f=openpyxl.load_workbook(path),
                           v=openpyxl.load_workbook(path, data_only=True))


def test_names_one_sheet_per_batch_up_to_the_cap():
    def steps(*batches):
        return SimpleNamespace(steps=[SimpleNamespace(id=f"S{i}", batches=n) for i, n in enumerate(batches, 1)])

    assert MAX_BATCH_SHEETS == 12
    names = charge_sheet_names(steps(12, 13, 1_000_000))
    assert [k for _sp, k, _n in names[:12]] == list(range(1, 13))
    assert names[11][2] == "S1 batch 12 of 12"
    assert [(k, n) for _sp, k, n in names[12:]] == [(None, "S2 all 13 batches"), (None, "S3 all 1000000 batches")]
    long = charge_sheet_names(SimpleNamespace(steps=[SimpleNamespace(id="x" * 40, batches=10**9)]))
    assert len(long) == 1 and len(long[0][2]) <= 31 and long[0][2].endswith(" all 1000000000 batches")


def test_twelve_batches_still_get_a_sheet_each(tmp_path):
    plan = plan_with_batches(12)
    book = _write(plan, tmp_path)
    sheets = [n for n in book.f.sheetnames if n.startswith("A_1__prep_ batch")]
    assert sheets == [f"A_1__prep_ batch {k} of 12" for k in range(1, 13)]
    assert header_value(book.v[sheets[-1]], "batch") == "12 of 12"


@pytest.mark.parametrize("n", [13, 10_000])
def test_many_batches_share_one_sheet(tmp_path, n):
    plan = plan_with_batches(n)
    sp = plan.steps[0]
    book = _write(plan, tmp_path)
    assert book.seconds < 5.0, book.seconds  # was one sheet per batch: minutes for 10 000
    shared = f"A_1__prep_ all {n} batches"
    assert book.f.sheetnames == ["Summary", shared, "A_1__prep_", "a step id that is far longer th",
                                 "Materials"]
    ws = book.v[shared]
    assert ws["A1"].value == f"Charge sheet · step {sp.id} · each of {n} batches (identical)"
    assert CAUTION in ws["A2"].value
    assert header_value(ws, "batch").startswith(f"each of {n} batches (identical)")
    assert "each batch fills" in header_value(ws, "vessel")
    # every quantity is per batch
    assert close(header_value(ws, "limiting reagent per batch [mol]"), sp.limiting_mol.m_as("mol") / n)
    assert close(header_value(ws, "product per batch [kg]"), sp.product_mass.m_as("kg") / n)
    assert close(header_value(ws, "volume per batch [L]"), sp.batch.batch_volume.m_as("L"))
    _h, col, rows = charge_table(ws)
    assert len(rows) == len(sp.charges)
    for r, c in zip(rows, sp.charges):
        assert close(ws.cell(r, col["mass to charge [kg]"]).value, c.mass.m_as("kg") / n), c.material
        assert close(ws.cell(r, col["amount [mol]"]).value, None if c.mol is None else c.mol.m_as("mol") / n)
        assert close(ws.cell(r, col["volume to charge [L]"]).value,
                     None if c.volume is None else c.volume.m_as("L") / n), c.material
    # the formulas stay live on the shared sheet
    assert book.f[shared].cell(rows[0], col["mass to charge [kg]"]).data_type == "f"
    # the plant writes which batch each printed copy is for; the print area reaches it
    labels = [ws.cell(r, 1).value for r in range(rows[-1] + 1, ws.max_row + 1)]
    assert f"batch number (1 to {n})" in labels
    area = book.f[shared].print_area.split("!")[1].replace("$", "")
    assert area.endswith(str(last_labelled_row(ws, "remarks")))
    # the Summary's steps table says one sheet stands for every batch
    summary = book.v["Summary"]
    _h, scol, srows = table(summary, "step", "name")
    first = srows[0]
    assert summary.cell(first, scol["batches [-]"]).value == n
    assert summary.cell(first, scol["charge sheets"]).value == \
        f"{shared} (one sheet for each of {n} identical batches)"
    assert "identical" not in summary.cell(srows[1], scol["charge sheets"]).value
