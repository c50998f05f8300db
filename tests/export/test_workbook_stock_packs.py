"""The Summary's purchase list and stock table with ``--stock``, recalculated by LibreOffice
headless (as in ``test_workbook_recalc``: the external check is LibreOffice Calc's own
results, read back with openpyxl).

The demo route planned with ``demo_routes/stock.yaml``: the purchase list gives what the
stock gives and what is left to buy, and its packs cover only that (one 5 kg pack of
ethyl bromoacetate for the 0.93 kg short, none for toluene, of which 200 kg are on hand);
process water (``bought: false``) is to buy nowhere.  After recalculation every number
is still the plan's, and the stock table's live ``to buy`` agrees with the purchase list.
"""

from __future__ import annotations

import pytest

from conftest import ROOT
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from test_workbook import close
from test_workbook_recalc import recalculated
from test_workbook_summary import stock_table, tables

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def book(tmp_path_factory):
    plan = plan_route(load_route(ROOT / "demo_routes" / "hx17-linear.yaml"),
                      stock=ROOT / "demo_routes" / "stock.yaml")
    return plan, recalculated(tmp_path_factory, plan, "stock")["Summary"]


def test_the_purchase_list_covers_what_is_left_to_buy(book):
    plan, ws = book
    _h, col, rows = next(t for t in tables(ws, "key", "material") if "packs to order [-]" in t[1])
    got = {ws.cell(r, col["key"]).value: r for r in rows}
    assert "water" not in got  # bought: false
    for raw in plan.raw_materials:
        if not raw.bought:
            continue
        r = got[raw.material]
        assert close(ws.cell(r, col["needed [kg]"]).value, raw.m_kg)
        assert close(ws.cell(r, col["from stock [kg]"]).value, raw.stock_m_kg or 0.0)
        assert close(ws.cell(r, col["to buy [kg]"]).value, raw.buy_m_kg)
        assert close(ws.cell(r, col["to buy [L]"]).value, raw.buy_V_L)
        packs = ws.cell(r, col["packs to order [-]"]).value
        assert packs == raw.packs
    # demo_routes/stock.yaml: 25 kg BrCH2CO2Et for 25.93 kg; 200 kg toluene for 196.5 kg
    assert ws.cell(got["BrCH2CO2Et"], col["packs to order [-]"]).value == 1
    assert ws.cell(got["BrCH2CO2Et"], col["ordered"]).value == "5 kg"
    assert ws.cell(got["toluene"], col["packs to order [-]"]).value == 0


def test_the_stock_table_agrees_and_water_is_not_to_buy(book):
    plan, ws = book
    _h, col, rows = stock_table(ws)
    raws = {r.material: r for r in plan.raw_materials}
    for r in rows:
        key = ws.cell(r, col["key"]).value
        buy = ws.cell(r, col["to buy [kg]"]).value
        if key == "water":
            assert buy is None and "not bought" in ws.cell(r, col["stock"]).value
        else:  # LibreOffice's MAX(0, need - on hand) is the plan's need less stock
            assert close(buy, raws[key].buy_m_kg), key
    assert "water" not in {k for k, _m in plan.stock.to_buy}
