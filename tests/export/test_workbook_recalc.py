"""The charge-sheet workbook recalculated by a real spreadsheet: LibreOffice headless.

External check (source: LibreOffice Calc, run headless): every workbook of this module
is converted once, in one ``soffice --convert-to xlsx`` call, with a private user
profile whose setting ``/org.openoffice.Office.Calc/Formula/Load/OOXMLRecalcMode = 0``
("always recalculate" on load; LibreOffice's own default is 1, "never", so without it
the cached values would come back unchanged).  The converted files hold LibreOffice's
own results, read back with openpyxl (``data_only=True``).

* A canary workbook whose formula ``=A1*3`` is stored with a wrong value (999) must
  come back as 6: proof that LibreOffice did recalculate.
* Every recalculated mass and volume to charge, and every cost, equals the Plan's
  number to a relative 1e-9.
* Lot assays typed into a copy (with openpyxl, as a person would in the plant) raise
  the mass to charge by planned assay / lot assay, and the solvent linked to the
  limiting reagent with it; charges that do not depend on them stay (a solution by
  molarity, a solvent by volumes, an intermediate carried in solution).
* The stock table's ``to buy = MAX(0, need - on hand)`` recalculates to the Plan's
  masses to buy, and follows an on-hand mass typed into a copy.

The printed charge sheets are checked in a second, separate run (``--convert-to pdf``,
read with ``pdftotext -bbox`` from poppler): each sheet's table prints on one page
wide, without the reference columns, at a scale measured from the printed positions of
two column headings of 80 % or more (so 10-pt text prints at 8 pt or larger).
"""

from __future__ import annotations

import re
import shutil
import subprocess
from types import SimpleNamespace

import openpyxl
import pytest

from routeplan.export.workbook import charge_sheet_names, write_workbook
from conftest import missing_tool as _missing
from soffice_helpers import SOFFICE, canary_value, need_soffice, run_soffice, write_canary
from test_workbook import WRITTEN, _raw_table, charge_table, close, header_value, make_plan
from test_workbook_summary import column_widths, make_stock_plan, printed_px, stock_table

pytestmark = pytest.mark.slow

# Lot assays typed in the copy: (sheet index in charge_sheet_names, material, lot assay [-])
LOTS = [
    (0, "aminophenol", 0.90),   # limiting reagent of the two-batch step, planned 97 %
    (2, "caustic", 0.45),       # solution by mass fraction, planned 50 %
    (3, "bromoester", 0.95),    # reagent by equiv with a density, planned 98 %
    (3, "HCl6M", 5.7),          # solution by molarity, planned 6 mol/L: a titrated lot of 5.7 mol/L
    (3, "acetone", 0.90),       # solvent by volumes: recorded only, changes nothing
    (3, "salt", 0.50),          # limiting, in solution from the telescoped step: recorded only
]


# On-hand masses typed in a copy of the stock workbook: material -> mass [kg]
ON_HAND_TYPED = {"bromoester": 3.0,   # was short (it limited the target): now nothing to buy
                 "water": 5.0}        # was not in stock: now bought less by 5 kg


# What the plant typed on the first charge sheet of the actuals copy: the limiting
# aminophenol's lot assay (planned 97 %) and its actual mass; the Ac2O weighed 0.4 % over
# its (recalculated) mass to charge, the water 2 % over its own.
LIMITING_LOT = 0.90
AC2O_OVER = 1.004
WATER_OVER = 1.02


def _batch_charge(sp, material, order=None):
    c = next(c for c in sp.charges if c.material == material and (order is None or c.order == order))
    n = sp.batches
    return c, c.mass.m_as("kg") / n, (None if c.mol is None else c.mol.m_as("mol") / n)


def _actuals(plan, names):
    """(material, column heading, value) typed into the actuals copy."""
    sp = names[0][0]
    _c, m_lim, _n = _batch_charge(sp, "aminophenol")
    _c, m_ac2o, _n = _batch_charge(sp, "Ac2O")
    _c, m_water, _n = _batch_charge(sp, "water", order=2)
    mats = plan.route.materials
    # the aminophenol is weighed at its planned mass (what the plan asked for at 97 %);
    # its lot assay of 90 % then says fewer moles went in, and the Ac2O follows them
    ac2o_follows = LIMITING_LOT / mats["aminophenol"].assay
    return [("aminophenol", "lot assay or titre", LIMITING_LOT),
            ("aminophenol", "actual mass charged [kg]", m_lim),
            ("Ac2O", "actual mass charged [kg]", m_ac2o * ac2o_follows * AC2O_OVER),
            ("water", "actual mass charged [kg]", m_water * WATER_OVER)]


def recalculated(tmp_path_factory, plan, name: str):
    """``plan``'s workbook written and recalculated by LibreOffice, read back (values only)."""
    need_soffice()
    base = tmp_path_factory.mktemp(name)
    src, out = base / "in", base / "out"
    src.mkdir()
    write_workbook(plan, src / f"{name}.xlsx", written=WRITTEN)
    run_soffice([src / f"{name}.xlsx"], out, base / "profile")
    return openpyxl.load_workbook(out / f"{name}.xlsx", data_only=True)


def _row_of(ws, material):
    _h, col, rows = charge_table(ws)
    for r in rows:
        if ws.cell(r, col["key"]).value == material:
            return r, col
    raise AssertionError(material)


@pytest.fixture(scope="module")
def recalc(tmp_path_factory):
    need_soffice()
    base = tmp_path_factory.mktemp("recalc")
    src, out = base / "in", base / "out"
    src.mkdir()
    plan = make_plan()
    names = charge_sheet_names(plan)
    original = src / "plan.xlsx"
    write_workbook(plan, original, written=WRITTEN)

    lots = src / "lots.xlsx"
    wb = openpyxl.load_workbook(original)
    for index, material, value in LOTS:
        ws = wb[names[index][2]]
        r, col = _row_of(ws, material)
        ws.cell(r, col["lot assay or titre"]).value = value
    wb.save(lots)

    actuals = src / "actuals.xlsx"
    wb = openpyxl.load_workbook(original)
    ws = wb[names[0][2]]
    for material, column, value in _actuals(plan, names):
        r, col = _row_of(ws, material)
        ws.cell(r, col[column]).value = value
    wb.save(actuals)

    stock_plan = make_stock_plan()
    stock = src / "stock.xlsx"
    write_workbook(stock_plan, stock, written=WRITTEN)
    typed = src / "stock-typed.xlsx"
    wb = openpyxl.load_workbook(stock)
    ws = wb["Summary"]
    _h, col, rows = stock_table(ws)
    for r in rows:
        key = ws.cell(r, col["key"]).value
        if key in ON_HAND_TYPED:
            ws.cell(r, col["on hand [kg]"]).value = ON_HAND_TYPED[key]
    wb.save(typed)

    run_soffice([original, lots, actuals, stock, typed, write_canary(src)], out, base / "profile")
    return SimpleNamespace(
        plan=plan, names=names, stock_plan=stock_plan,
        stock=openpyxl.load_workbook(out / "stock.xlsx", data_only=True),
        typed=openpyxl.load_workbook(out / "stock-typed.xlsx", data_only=True),
        planned=openpyxl.load_workbook(out / "plan.xlsx", data_only=True),
        lots=openpyxl.load_workbook(out / "lots.xlsx", data_only=True),
        actuals=openpyxl.load_workbook(out / "actuals.xlsx", data_only=True),
        canary=canary_value(out),
    )


def test_libreoffice_did_recalculate(recalc):
    assert recalc.canary == 6


def test_recalculated_charges_equal_the_plan(recalc):
    n_cells = 0
    for sp, _k, name in recalc.names:
        ws = recalc.planned[name]
        _h, col, rows = charge_table(ws)
        for r, c in zip(rows, sp.charges):
            n = sp.batches
            assert close(ws.cell(r, col["mass to charge [kg]"]).value, c.mass.m_as("kg") / n), (name, c.material)
            expected_v = None if c.volume is None else c.volume.m_as("L") / n
            assert close(ws.cell(r, col["volume to charge [L]"]).value, expected_v), (name, c.material)
            n_cells += 2
    assert n_cells == 2 * sum(len(sp.charges) * sp.batches for sp in recalc.plan.steps)


def test_recalculated_costs_equal_the_plan(recalc):
    ws = recalc.planned["Summary"]
    h, col = _raw_table(ws)
    raws = recalc.plan.raw_materials
    for i, raw in enumerate(raws):
        assert close(ws.cell(h + 1 + i, col["cost [EUR]"]).value, raw.cost), raw.material
    total = ws.cell(h + 1 + len(raws), col["cost [EUR]"]).value
    assert close(total, sum(r.cost for r in raws if r.cost is not None))


def test_text_from_the_route_stays_text_in_a_spreadsheet(recalc):
    _sp, _k, name = recalc.names[-1]
    ws = recalc.planned[name]
    r, col = _row_of(ws, "KI")
    assert ws.cell(r, col["material"]).value == '=HYPERLINK("http://x")'
    assert ws.cell(r, col["material"]).data_type == "s"


def _mass_volume(ws, material):
    r, col = _row_of(ws, material)
    return ws.cell(r, col["mass to charge [kg]"]).value, ws.cell(r, col["volume to charge [L]"]).value


def test_a_lower_lot_assay_raises_the_charge(recalc):
    plan, names = recalc.plan, recalc.names
    mats = plan.route.materials

    def planned(index, material, order=None):
        sp = names[index][0]
        c = next(c for c in sp.charges if c.material == material and (order is None or c.order == order))
        n = sp.batches
        return c.mass.m_as("kg") / n, None if c.volume is None else c.volume.m_as("L") / n

    # limiting reagent, planned 97 %, lot 90 %: mass x 0.97 / 0.90
    f = mats["aminophenol"].assay / 0.90
    sheet = recalc.lots[names[0][2]]
    m, _v = _mass_volume(sheet, "aminophenol")
    assert close(m, planned(0, "aminophenol")[0] * f)
    # water by volumes and charcoal by mass ratio follow the limiting reagent as charged
    _h, col, rows = charge_table(sheet)
    for r, c in zip(rows, names[0][0].charges):
        got_m = sheet.cell(r, col["mass to charge [kg]"]).value
        want_m = c.mass.m_as("kg") / 2
        if c.basis in ("volumes", "mass_ratio") or c.material == "aminophenol":
            assert close(got_m, want_m * f), c.material
        else:  # Ac2O by equiv: moles fixed, its own assay unchanged
            assert close(got_m, want_m), c.material
            assert close(sheet.cell(r, col["volume to charge [L]"]).value, c.volume.m_as("L") / 2)
    # the other batch of the same step, with no lot typed, keeps the planned numbers
    other = recalc.lots[names[1][2]]
    assert close(_mass_volume(other, "aminophenol")[0], planned(1, "aminophenol")[0])

    # solution by mass fraction, planned 50 %, lot 45 %: mass and volume x 0.50 / 0.45
    m, v = _mass_volume(recalc.lots[names[2][2]], "caustic")
    pm, pv = planned(2, "caustic")
    assert close(m, pm * 0.50 / 0.45) and close(v, pv * 0.50 / 0.45)

    # reagent by equiv with a density, planned 98 %, lot 95 %
    last = recalc.lots[names[3][2]]
    m, v = _mass_volume(last, "bromoester")
    pm, pv = planned(3, "bromoester")
    assert close(m, pm * 0.98 / 0.95) and close(v, pv * 0.98 / 0.95)
    # a titre of 5.7 mol/L for a solution planned at 6 mol/L: the same moles need
    # 6 / 5.7 times the volume, and the mass follows at the solution's density
    m, v = _mass_volume(last, "HCl6M")
    pm, pv = planned(3, "HCl6M")
    assert close(m, pm * 6 / 5.7) and close(v, pv * 6 / 5.7)
    # recorded-only lot assays change nothing: not even the acetone by volumes, which
    # follows the mass cell of the limiting salt carried in solution
    for material in ("acetone", "salt"):
        m, v = _mass_volume(last, material)
        pm, pv = planned(3, material)
        assert close(m, pm) and close(v, pv), material


def test_the_amounts_follow_the_lot_and_the_actual_mass(recalc):
    """With the limiting reagent's lot assay and actual mass typed, the header gives its
    actual moles (mass x 1000 x lot assay / M) and every charge by equiv follows them:
    its amount [mol] = equiv x actual moles, its mass with it (moles of a reagent = equiv
    x moles of limiting reagent: the route format's definition of equiv)."""
    plan, names = recalc.plan, recalc.names
    sp = names[0][0]
    ws = recalc.actuals[names[0][2]]
    mats = plan.route.materials
    _c, m_lim, n_lim = _batch_charge(sp, "aminophenol")
    M = mats["aminophenol"].molar_mass.m_as("g/mol")
    actual_mol = m_lim * 1000 * LIMITING_LOT / M
    assert close(actual_mol, n_lim * LIMITING_LOT / mats["aminophenol"].assay)
    assert close(header_value(ws, "limiting reagent charged [mol]"), actual_mol)
    r, col = _row_of(ws, "Ac2O")
    c, m_ac2o, n_ac2o = _batch_charge(sp, "Ac2O")
    assert close(ws.cell(r, col["amount [mol]"]).value, c.equiv * actual_mol)
    assert close(ws.cell(r, col["amount [mol]"]).value, n_ac2o * LIMITING_LOT / mats["aminophenol"].assay)
    assert close(ws.cell(r, col["mass to charge [kg]"]).value, m_ac2o * LIMITING_LOT / mats["aminophenol"].assay)
    # the planned copy, with nothing typed, keeps the plan's amounts
    planned = recalc.planned[names[0][2]]
    r, col = _row_of(planned, "Ac2O")
    assert close(planned.cell(r, col["amount [mol]"]).value, n_ac2o)
    assert close(header_value(planned, "limiting reagent charged [mol]"), n_lim)


def test_a_mass_outside_its_tolerance_is_flagged(recalc):
    """The flag cell, recalculated: the aminophenol weighed at its planned mass is 7.8 %
    under its mass to charge at a 90 % lot (outside the route's default 1 %); the Ac2O
    0.4 % over is within it; the water 2 % over is outside; a line with no actual mass
    shows only its band."""
    names = recalc.names
    ws = recalc.actuals[names[0][2]]
    _h, col, rows = charge_table(ws)

    def flag(material, order=None):
        for r in rows:
            if ws.cell(r, col["key"]).value == material and (order is None or ws.cell(r, 1).value == order):
                return ws.cell(r, col["weighed within"]).value
        raise AssertionError(material)

    assert flag("aminophenol") == "OUTSIDE ±1.0 %"
    assert flag("Ac2O") == "within ±1.0 %"
    assert flag("water", 2) == "OUTSIDE ±1.0 %"
    assert flag("charcoal") == "±1.0 %"
    # nothing typed: every weighed line shows its band only
    planned = recalc.planned[names[0][2]]
    _h, pcol, prows = charge_table(planned)
    assert {planned.cell(r, pcol["weighed within"]).value for r in prows} == {"±1.0 %"}


# --- stock --------------------------------------------------------------------------


def _to_buy(book):
    ws = book["Summary"]
    _h, col, rows = stock_table(ws)
    return {ws.cell(r, col["key"]).value: ws.cell(r, col["to buy [kg]"]).value for r in rows}


def test_recalculated_to_buy_equals_the_plan(recalc):
    plan = recalc.stock_plan
    to_buy = {k: m.m_as("kg") for k, m in plan.stock.to_buy}
    got = _to_buy(recalc.stock)
    assert list(got) == [r.material for r in plan.raw_materials]
    for key, value in got.items():
        assert close(value, to_buy.get(key, 0.0)), key
    assert got["water"] > 0 and got["aminophenol"] == 0  # not in stock; in stock, enough


def test_to_buy_follows_a_typed_on_hand_mass(recalc):
    plan = recalc.stock_plan
    to_buy = {k: m.m_as("kg") for k, m in plan.stock.to_buy}
    need = {r.material: r.mass.m_as("kg") for r in plan.raw_materials}
    got = _to_buy(recalc.typed)
    assert close(got["bromoester"], 0.0)  # 3 kg on hand covers the need now
    assert close(got["water"], need["water"] - 5.0)
    for key, value in got.items():
        if key not in ON_HAND_TYPED:
            assert close(value, to_buy.get(key, 0.0)), key


# --- printed charge sheets ---------------------------------------------------------------

_WORD = re.compile(r'<word xMin="([-\d.]+)" yMin="([-\d.]+)" xMax="[-\d.]+" yMax="[-\d.]+">([^<]*)</word>')


@pytest.fixture(scope="module")
def printed(tmp_path_factory):
    """The workbook of :func:`make_plan` printed to PDF by LibreOffice, as words with
    their positions per page [pt]."""
    if SOFFICE is None or shutil.which("pdftotext") is None:
        _missing("LibreOffice (soffice) and pdftotext are needed to print "
                 "(.ci/run installs libreoffice-calc-nogui and poppler-utils)")
    base = tmp_path_factory.mktemp("print")
    out = base / "out"
    plan = make_plan()
    book = base / "plan.xlsx"
    write_workbook(plan, book, written=WRITTEN)
    run_soffice([book], out, base / "profile", to="pdf")
    xml = subprocess.run(["pdftotext", "-bbox", str(out / "plan.pdf"), "-"], capture_output=True,
                         text=True, check=True).stdout
    pages = [[(float(x), float(y), w) for x, y, w in _WORD.findall(page)] for page in xml.split("<page ")[1:]]
    return SimpleNamespace(plan=plan, pages=pages, workbook=openpyxl.load_workbook(book))


def test_charge_sheets_print_one_page_wide_at_8_pt_or_more(printed):
    names = charge_sheet_names(printed.plan)
    sheets = [p for p in printed.pages if any(w == "Sign-off" for _x, _y, w in p)]
    assert len(sheets) == len(names)  # each charge sheet of this route fits on one page
    for page, (_sp, _k, name) in zip(sheets, names):
        words = [w for _x, _y, w in page]
        for heading in ("#", "material", "hazards", "lot", "actual", "checked"):
            assert heading in words, (name, heading)
        for reference in ("molar", "concentration", "key"):  # right of the print area
            assert reference not in words, (name, reference)
        # scale = printed distance from the "#" heading to the "lot number" heading over
        # the same distance at 100 % (the widths of columns A to K, 0.75 pt per px)
        ws = printed.workbook[name]
        h, col, _rows = charge_table(ws)
        widths = column_widths(ws)
        nominal = 0.75 * sum(printed_px(widths[c]) for c in range(1, col["lot number"]))
        hash_x, hash_y = next((x, y) for x, y, w in page if w == "#")
        lot_x = min(x for x, y, w in page if w == "lot" and abs(y - hash_y) < 12)
        scale = (lot_x - hash_x) / nominal
        assert 0.80 <= scale <= 1.0, (name, scale)
