"""The Summary sheet's route metrics and stock comparison, and the print layout of the
charge sheets, read back with openpyxl.

Metrics and stock numbers are compared with ``plan.metrics`` and ``plan.stock`` (the
workbook must show the Plan's numbers, never its own).  The recalculation of the to-buy
formulas and the rendered print scale are checked in LibreOffice in
``test_workbook_recalc.py``.
"""

from __future__ import annotations

import re
from dataclasses import replace
from types import SimpleNamespace

import openpyxl
import pytest

from routeplan import CAUTION
from routeplan.export.workbook import charge_sheet_names, write_workbook
from routeplan.export.workbook_charges import (FILL_IN_COLUMNS, PRINT_BUDGET_PX, PRINTED_COLUMNS,
                                               REFERENCE_COLUMNS, WIDTH_BOUNDS)
from routeplan.export.workbook_styles import px_width, sheet_title
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from routeplan.units import Q
from test_workbook import ALLOWED_FORMULA, ROUTE_NAME, ROUTE_TEXT, WRITTEN, charge_table, close, make_plan

#: Stock on hand for :data:`test_workbook.ROUTE_TEXT` (invented numbers): enough
#: aminophenol and acetone, too little ethyl bromoacetate (it limits the target) and
#: potassium iodide; water, acetic anhydride, charcoal, caustic and HCl not in stock.
STOCK = {"aminophenol": (5, "kg"), "acetone": (10, "kg"), "bromoester": (1, "kg"), "KI": (0.05, "kg")}


def make_stock_plan():
    """The plan of :data:`ROUTE_TEXT` compared with :data:`STOCK`."""
    route = load_route_text(ROUTE_TEXT, ROUTE_NAME)
    return plan_route(route, stock={k: Q(v, u) for k, (v, u) in STOCK.items()})


def fact(ws, label):
    """The first value right of the cell holding ``label``, anywhere on the sheet."""
    for row in ws.iter_rows():
        for cell in row:
            if cell.value == label:
                for other in row[cell.column:]:
                    if other.value is not None:
                        return other.value
                return None
    raise AssertionError(f"no {label!r} on sheet {ws.title!r}")


def has_label(ws, label) -> bool:
    return any(c.value == label for row in ws.iter_rows() for c in row)


def tables(ws, first, second):
    """Every ``(heading row, {heading: column}, [data rows])`` of a table whose headings
    start with ``first`` and ``second`` in columns A and B; data rows run while column A
    holds a value."""
    for r in range(1, ws.max_row + 1):
        if ws.cell(r, 1).value == first and ws.cell(r, 2).value == second:
            heads = {ws.cell(r, c).value: c for c in range(1, ws.max_column + 1) if ws.cell(r, c).value}
            rows, rr = [], r + 1
            while ws.cell(rr, 1).value is not None:
                rows.append(rr)
                rr += 1
            yield r, heads, rows


def table(ws, first, second):
    """The first of :func:`tables`."""
    for found in tables(ws, first, second):
        return found
    raise AssertionError(f"no table headed {first!r}, {second!r} on {ws.title!r}")


def stock_table(ws):
    """The stock table of a Summary sheet (the raw-material table has the same first
    headings, so it is told apart by ``need [kg]``)."""
    return next(t for t in tables(ws, "key", "material") if "need [kg]" in t[1])


def last_labelled_row(ws, label: str) -> int:
    """The 1-based row whose column A says ``label`` (the last such row)."""
    return max(r for r in range(1, ws.max_row + 1) if ws.cell(r, 1).value == label)


def column_widths(ws) -> dict[int, float]:
    """Width of each column set in the file [character units, as stored], 1-based;
    a ``<col>`` element may cover several columns (openpyxl keeps it under the first)."""
    out = {}
    for dim in ws.column_dimensions.values():
        if dim.customWidth and dim.min:
            for c in range(dim.min, dim.max + 1):
                out[c] = dim.width
    return out


def printed_px(width_as_stored: float) -> int:
    """Pixels of a column from its stored width (xlsxwriter stores width + 5/7)."""
    return px_width(width_as_stored - 5 / 7)


def _write(plan, folder, name):
    path = folder / name
    write_workbook(plan, path, written=WRITTEN)
    return SimpleNamespace(path=path, f=openpyxl.load_workbook(path),
                           v=openpyxl.load_workbook(path, data_only=True))


@pytest.fixture(scope="module")
def plan():
    return make_plan()


@pytest.fixture(scope="module")
def stock_plan():
    return make_stock_plan()


@pytest.fixture(scope="module")
def book(plan, tmp_path_factory):
    return _write(plan, tmp_path_factory.mktemp("summary"), "plain.xlsx")


@pytest.fixture(scope="module")
def stock_book(stock_plan, tmp_path_factory):
    return _write(stock_plan, tmp_path_factory.mktemp("stock"), "stock.xlsx")


# --- route metrics --------------------------------------------------------------------


def test_route_metrics_equal_plan_metrics(plan, book):
    ws, m = book.v["Summary"], plan.metrics
    assert close(fact(ws, "process mass intensity, route [kg/kg]"), m.pmi)
    assert close(fact(ws, "complete E-factor [kg/kg]"), m.e_factor_complete)
    assert close(fact(ws, "simple E-factor [kg/kg]"), m.e_factor_simple)
    assert close(fact(ws, "raw-material cost per kg of target [EUR/kg]"), m.cost_per_kg)
    for label in ("process mass intensity, route [kg/kg]", "raw-material cost per kg of target [EUR/kg]"):
        assert book.f["Summary"].cell(*_where(ws, label)).data_type == "n", label  # a number, not text


def _where(ws, label):
    """(row, column) of the value beside ``label``."""
    for row in ws.iter_rows():
        for cell in row:
            if cell.value == label:
                other = next(o for o in row[cell.column:] if o.value is not None)
                return other.row, other.column
    raise AssertionError(label)


def test_cost_names_the_unpriced_materials(plan, book):
    ws, m = book.v["Summary"], plan.metrics
    assert m.unpriced == ("water", "acetone")  # the route gives them no price
    assert fact(ws, "raw materials without a price") == "water, acetone"
    notes = [c.value for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
    assert "priced raw materials only" in notes


def test_cost_not_computed_without_a_currency(tmp_path):
    text = ROUTE_TEXT.replace("currency: EUR\n", "")
    plan = plan_route(load_route_text(text, ROUTE_NAME))
    assert plan.metrics.cost_per_kg is None
    b = _write(plan, tmp_path, "no-currency.xlsx")
    ws = b.v["Summary"]
    assert fact(ws, "raw-material cost per kg of target") == "not computed: the route gives no currency"
    assert not has_label(ws, "raw materials without a price")
    assert close(fact(ws, "process mass intensity, route [kg/kg]"), plan.metrics.pmi)


def test_step_metric_columns_equal_plan_metrics(plan, book):
    ws, m = book.v["Summary"], plan.metrics
    _h, col, rows = table(ws, "step", "name")
    assert len(rows) == len(plan.steps)
    assert "step PMI [kg/kg]" not in col and "cumulative PMI [kg/kg]" not in col  # not a grid of PMIs
    for r, sp in zip(rows, plan.steps):
        assert ws.cell(r, col["step"]).value == sp.id
        assert close(ws.cell(r, col["atom economy [%]"]).value, m.atom_economy_by_step[sp.id])
        assert close(ws.cell(r, col["reaction mass efficiency [%]"]).value,
                     m.reaction_mass_efficiency_by_step[sp.id])
        assert "%" in ws.cell(r, col["atom economy [%]"]).number_format


def test_mass_intensity_by_material_and_per_step_line(plan, book):
    """The mass intensity in our layout: kg per kg of target by input, adding up to the
    route PMI (a law: the route PMI is the sum over inputs), and one line per step with
    its step PMI and cumulative PMI in words."""
    ws, m = book.v["Summary"], plan.metrics
    _h, col, rows = table(ws, "key", "input")
    values = {ws.cell(r, 1).value: ws.cell(r, col["per kg of target [kg/kg]"]).value for r in rows}
    for key, value in m.mass_per_kg_target.items():
        assert close(values[key], value), key
    total_r = rows[-1] + 1
    assert ws.cell(total_r, 2).value == "route PMI (all inputs)"
    total = ws.cell(total_r, col["per kg of target [kg/kg]"]).value
    assert close(total, m.pmi)
    assert close(sum(values.values()), m.pmi, rel=1e-9)
    shares = [ws.cell(r, col["share of the route PMI [%]"]).value for r in rows]
    assert close(sum(shares), 1.0, rel=1e-9)
    texts = [c.value for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
    for sp in plan.steps:
        line = next(t for t in texts if t.startswith(f"{sp.id} (") or t.startswith(f"{sp.id}:"))
        assert f"{m.pmi_by_step[sp.id]:.4g} kg of inputs per kg of {sp.product}" in line
        assert f"{m.pmi_cumulative_by_step[sp.id]:.4g} kg of raw materials up to and including it" in line


def test_without_metrics_the_workbook_is_still_written(plan, tmp_path):
    b = _write(replace(plan, metrics=None), tmp_path, "no-metrics.xlsx")
    ws = b.v["Summary"]
    assert not has_label(ws, "process mass intensity, route [kg/kg]")
    assert not any(t[0] for t in tables(ws, "key", "input"))


# --- stock ----------------------------------------------------------------------------


def test_stock_facts_equal_plan_stock(stock_plan, stock_book):
    ws, s = stock_book.v["Summary"], stock_plan.stock
    assert s.limited_by == "bromoester"
    assert close(fact(ws, "largest target the stock allows [kg]"), s.max_target.m_as("kg"))
    assert fact(ws, "limited by") == "bromoester"
    missing = [r.material for r in stock_plan.raw_materials if r.material not in s.on_hand]
    assert fact(ws, "not in stock (buy in full)") == ", ".join(missing)


def test_stock_rows_equal_plan_stock(stock_plan, stock_book):
    ws, wf, s = stock_book.v["Summary"], stock_book.f["Summary"], stock_plan.stock
    _h, col, rows = stock_table(ws)
    to_buy = {k: m.m_as("kg") for k, m in s.to_buy}
    assert [ws.cell(r, col["key"]).value for r in rows] == [r.material for r in stock_plan.raw_materials]
    for r, raw in zip(rows, stock_plan.raw_materials):
        key = raw.material
        have = s.on_hand.get(key)
        assert close(ws.cell(r, col["need [kg]"]).value, raw.mass.m_as("kg")), key
        assert close(ws.cell(r, col["on hand [kg]"]).value, None if have is None else have.m_as("kg")), key
        assert close(ws.cell(r, col["to buy [kg]"]).value, to_buy.get(key, 0.0)), key
        status = ws.cell(r, col["stock"]).value
        if have is None:
            assert status == "not in stock", key
            assert close(ws.cell(r, col["to buy [kg]"]).value, raw.mass.m_as("kg")), key
        else:
            assert status.startswith("in stock"), key
        assert ("limits the target" in status) == (key == s.limited_by), key
        formula = wf.cell(r, col["to buy [kg]"]).value
        need = wf.cell(r, col["need [kg]"]).coordinate
        hand = wf.cell(r, col["on hand [kg]"]).coordinate
        assert formula == f"=MAX(0,{need}-{hand})", key
    assert to_buy.keys() <= {ws.cell(r, col["key"]).value for r in rows}


def test_stock_formulas_are_only_ours(stock_book):
    """Every formula of the stock workbook is arithmetic on cells (now with MAX)."""
    import zipfile

    allowed = ALLOWED_FORMULA
    with zipfile.ZipFile(stock_book.path) as z:
        formulas = [m for name in z.namelist() if name.startswith("xl/worksheets/sheet")
                    for m in re.findall(r"<f>(.*?)</f>", z.read(name).decode("utf-8"))]
    assert any(f.startswith("MAX(") for f in formulas)
    assert all(allowed.match(f) for f in formulas), [f for f in formulas if not allowed.match(f)]


def test_stock_text_stays_text(stock_book):
    ws = stock_book.f["Summary"]
    _h, col, rows = stock_table(ws)
    names = {ws.cell(r, col["material"]).value: ws.cell(r, col["material"]).data_type for r in rows}
    assert names['=HYPERLINK("http://x")'] == "s"


def test_no_stock_section_without_stock(book):
    ws = book.v["Summary"]
    assert not has_label(ws, "largest target the stock allows [kg]")
    assert not any("need [kg]" in t[1] for t in tables(ws, "key", "material"))


def test_summary_still_carries_the_caution(stock_book):
    ws = stock_book.v["Summary"]
    assert CAUTION in ws["A2"].value


# --- print layout -----------------------------------------------------------------------


def test_charge_sheets_print_the_plant_columns_readably(plan, book):
    """Print area: the planned columns the plant reads and the fill-in columns (A to
    O); the material data the formulas read lie right of it. Fitted to one page wide,
    their widths leave a print scale of 82 % or more on Letter landscape by our estimate
    (see PRINT_BUDGET_PX), so 10-pt text prints at about 8 pt or larger."""
    printed = [sheet_title(c) for c in PRINTED_COLUMNS + FILL_IN_COLUMNS]
    reference = [sheet_title(c) for c in REFERENCE_COLUMNS]
    for sp, _k, name in charge_sheet_names(plan):
        ws = book.f[name]
        h, col, rows = charge_table(ws)
        last_letter = openpyxl.utils.get_column_letter(len(printed))
        area = ws.print_area.split("!")[1].replace("$", "")
        assert area == f"A1:{last_letter}{last_labelled_row(ws, 'remarks')}"  # down to the sign-off block
        assert [ws.cell(h, c).value for c in range(1, len(printed) + 1)] == printed
        assert [ws.cell(h, c).value for c in range(len(printed) + 1, len(printed) + 1 + len(reference))] == reference
        assert ws.page_setup.orientation == "landscape"
        assert ws.sheet_properties.pageSetUpPr.fitToPage
        assert (ws.page_setup.fitToWidth or 1, ws.page_setup.fitToHeight) == (1, 0)
        widths = column_widths(ws)
        keys = [c.key for c in PRINTED_COLUMNS + FILL_IN_COLUMNS + REFERENCE_COLUMNS]
        for i, key in enumerate(keys, start=1):
            lo, hi = WIDTH_BOUNDS[key]
            assert lo - 0.01 <= widths[i] - 5 / 7 <= hi + 0.01, (name, key, widths[i])  # stored in 1/256
        total = sum(printed_px(widths[c]) for c in range(1, len(printed) + 1))
        assert total <= PRINT_BUDGET_PX, (name, total)
        assert (11.0 - 0.8) * 96 / total >= 0.82  # Letter landscape, 0.4 in margins
        for r in rows:  # room to write by hand, and every wrapped line shown
            assert ws.row_dimensions[r].height >= 24, (name, r)
        hazards = ws.cell(rows[0], col["hazards"])
        assert hazards.alignment.wrap_text


@pytest.mark.parametrize("sheet", ["Summary", "Materials"])
def test_summary_and_materials_fit_the_same_budget(stock_book, sheet):
    ws = stock_book.f[sheet]
    widths = column_widths(ws)
    total = sum(printed_px(w) for w in widths.values())
    assert total <= PRINT_BUDGET_PX, total
    assert ws.sheet_properties.pageSetUpPr.fitToPage and ws.page_setup.orientation == "landscape"


# --- one percent format ---------------------------------------------------------------------


def test_every_percentage_has_one_number_format(stock_plan, stock_book):
    """Fill, yields, atom economy, reaction mass efficiency, overage, assays and lot
    assays: every cell shown as a percent on the Summary, the charge sheets and the
    Materials sheet has the same number format, one decimal (38.0%, 47.6%, 28.1%)."""
    from routeplan.export.workbook_styles import PERCENT_FORMAT

    assert PERCENT_FORMAT == "0.0%"
    wb = stock_book.f
    formats = {c.number_format for ws in wb.worksheets for row in ws.iter_rows() for c in row
               if "%" in c.number_format}
    assert formats == {"0.0%"}, formats
    # and the cells that must be percentages are
    ws = wb["Summary"]
    _h, col, rows = table(ws, "step", "name")
    for heading in ("vessel fill [%]", "yield [%]", "atom economy [%]", "reaction mass efficiency [%]"):
        assert ws.cell(rows[0], col[heading]).number_format == "0.0%", heading
    assert ws.cell(*_where(stock_book.v["Summary"], "overall yield (longest linear sequence) [%]")).number_format \
        == "0.0%"
    assert ws.cell(*_where(stock_book.v["Summary"], "overage [%]")).number_format == "0.0%"
    for _sp, _k, name in charge_sheet_names(stock_plan):
        sheet = wb[name]
        _h, ccol, crows = charge_table(sheet)
        for r, c in zip(crows, _sp.charges):
            assert sheet.cell(r, ccol["assay [%]"]).number_format == "0.0%"
            sol = stock_plan.route.materials[c.material].solution
            titre = sol is not None and sol.molarity is not None and c.equiv is not None
            assert sheet.cell(r, ccol["lot assay or titre"]).number_format == ('0.000" mol/L"' if titre else "0.0%")
        assert sheet.cell(*_where(stock_book.v[name], "yield (expected) [%]")).number_format == "0.0%"

