"""The charge-sheet workbook, read back with openpyxl.

Checks that every number stored in the workbook equals the Plan's, that every mass to
charge is a live formula, that text from the route file stays text, that sheet names
are valid and unique, that the print set-up is there, and that a failure part-way never
harms an earlier file.  The recalculation in a spreadsheet is in
``test_workbook_recalc.py``.
"""

from __future__ import annotations

import hashlib
import math
import re
import zipfile
from datetime import datetime, timezone
from pathlib import Path
from types import SimpleNamespace

import openpyxl
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from routeplan import CAUTION
from routeplan.errors import OutputError
from routeplan.export.workbook import MAX_SHEET_NAME, charge_sheet_names, write_workbook
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

#: A small route of our own (invented numbers; real reagents, balanced equations) with
#: every kind of charge: a limiting solid below 100 % assay, solvent by volumes, a
#: reagent by equiv with a density, a filter aid by mass ratio with no molar mass, a
#: catalyst by mol %, a solution by mass fraction, a solution by molarity, a telescoped
#: step, a step of two batches, odd and long step ids, and text that a spreadsheet
#: would take for a formula.
ROUTE_TEXT = """\
route: '=1+2 test route'
currency: EUR
target: {material: ester, amount: 2 kg}
materials:
  aminophenol: {name: 4-aminophenol, formula: C6H7NO, assay: 97 %, price: 18, hazards: [harmful if swallowed]}
  Ac2O: {name: acetic anhydride, formula: C4H6O3, density: 1.08 g/mL, price: 2.4, hazards: ['+flammable', corrosive]}
  AcOH: {formula: C2H4O2}
  water: {formula: H2O, density: 1.00 g/mL}
  charcoal: {name: activated charcoal, price: 8}
  paracetamol: {formula: C8H9NO2, assay: 99 %}
  caustic: {name: 'sodium hydroxide, 50 %', formula: NaOH, solution: {mass_fraction: 50 %, density: 1.52 g/mL}, price: 0.45}
  salt: {formula: C8H8NNaO2}
  bromoester: {name: ethyl bromoacetate, formula: C4H7BrO2, assay: 98 %, density: 1.506 g/mL, price: 35, hazards: ['@lachrymator']}
  NaBr: {formula: NaBr}
  KI: {name: '=HYPERLINK("http://x")', formula: KI, price: 45}
  acetone: {formula: C3H6O, density: 0.784 g/mL, hazards: ['-highly flammable']}
  HCl6M: {name: 'hydrochloric acid, 6 mol/L', formula: HCl, solution: {molarity: 6 mol/L, density: 1.10 g/mL}, price: 0.35}
  ester: {formula: C12H15NO4, assay: 98 %}
equipment:
  R5: {volume: 5 L}
steps:
  - id: 'A:1/[prep]'
    name: '@SUM(1)'
    equation: aminophenol + Ac2O -> paracetamol + AcOH
    yield: 90 %
    vessel: R5
    notes: '+note from the route'
    charges:
      - {material: aminophenol}
      - {material: water, volumes: 3}
      - {material: Ac2O, equiv: 1.1}
      - {material: charcoal, mass_ratio: 0.05, role: workup}
      - {material: water, volumes: 2, role: workup}
  - id: 'A?1/[prep]'
    equation: paracetamol + caustic -> salt + water
    yield: 98 %
    isolated: false
    charges:
      - {material: paracetamol}
      - {material: water, volumes: 4}
      - {material: caustic, equiv: 1.05}
  - id: a step id that is far longer than thirty-one characters
    equation: salt + bromoester -> ester + NaBr
    yield: 90 %
    charges:
      - {material: salt}
      - {material: acetone, volumes: 5}
      - {material: KI, mol_percent: 5}
      - {material: bromoester, equiv: 1.2}
      - {material: HCl6M, equiv: 0.2, role: workup}
"""

ROUTE_NAME = "odd-route.yaml"
WRITTEN = datetime(2025, 3, 4, 10, 15, tzinfo=timezone.utc)
REL = 1e-9


def make_plan():
    """The plan of :data:`ROUTE_TEXT`."""
    return plan_route(load_route_text(ROUTE_TEXT, ROUTE_NAME))


def close(actual, expected, rel=REL):
    """True when ``actual`` equals ``expected`` to ``rel`` (both None counts)."""
    if expected is None:
        return actual is None
    return actual is not None and math.isclose(actual, expected, rel_tol=rel, abs_tol=1e-15)


def charge_table(ws):
    """``(heading row (1-based), {heading: column index (1-based)}, [row numbers])``
    of the charge table on a charge sheet, found by its ``#`` heading."""
    for r in range(1, ws.max_row + 1):
        if ws.cell(r, 1).value == "#":
            heads = {ws.cell(r, c).value: c for c in range(1, ws.max_column + 1) if ws.cell(r, c).value}
            rows = []
            rr = r + 1
            while isinstance(ws.cell(rr, 1).value, int):
                rows.append(rr)
                rr += 1
            return r, heads, rows
    raise AssertionError(f"no charge table on sheet {ws.title!r}")


def header_value(ws, label):
    """The value beside ``label`` in a sheet's header block."""
    for row in ws.iter_rows(min_row=1, max_row=40):
        for cell in row:
            if cell.value == label:
                for other in row[cell.column:]:
                    if other.value is not None:
                        return other.value
    raise AssertionError(f"no {label!r} on sheet {ws.title!r}")


@pytest.fixture(scope="module")
def plan():
    return make_plan()


@pytest.fixture(scope="module")
def book(plan, tmp_path_factory):
    """The workbook written from :func:`plan`: path, formulas view, cached-values view."""
    path = tmp_path_factory.mktemp("book") / "charges.xlsx"
    write_workbook(plan, path, written=WRITTEN)
    return SimpleNamespace(path=path, f=openpyxl.load_workbook(path), v=openpyxl.load_workbook(path, data_only=True))


def test_sheets_in_order(plan, book):
    names = [name for _sp, _k, name in charge_sheet_names(plan)]
    assert book.f.sheetnames == ["Summary", *names, "Materials"]
    assert len(names) == sum(sp.batches for sp in plan.steps) == 4
    assert plan.steps[0].batches == 2  # the 5 L vessel needs two batches


def test_every_sheet_carries_the_caution(book):
    for ws in book.f.worksheets:
        texts = [c.value for row in ws.iter_rows(min_row=1, max_row=3) for c in row if isinstance(c.value, str)]
        assert any(CAUTION in t for t in texts), ws.title
        assert CAUTION in " ".join(ws.oddFooter.left.text.split())  # printed on two lines


def test_charge_sheet_header(plan, book):
    for sp, k, name in charge_sheet_names(plan):
        ws = book.v[name]
        n = sp.batches
        assert f"batch {k} of {n}" in ws["A1"].value
        assert header_value(ws, "step") == sp.id
        assert header_value(ws, "batch") == f"{k} of {n}"
        assert header_value(ws, "equation") == sp.equation
        assert close(header_value(ws, "yield (expected) [%]"), sp.yield_)
        assert close(header_value(ws, "limiting reagent per batch [mol]"), sp.limiting_mol.m_as("mol") / n)
        assert close(header_value(ws, "product per batch [kg]"), sp.product_mass.m_as("kg") / n)
        assert close(header_value(ws, "volume per batch [L]"), sp.batch.batch_volume.m_as("L"))
        assert plan.route.source.sha256 in header_value(ws, "route")


def test_stored_charge_values_equal_the_plan(plan, book):
    mats = plan.route.materials
    checked = 0
    for sp, _k, name in charge_sheet_names(plan):
        ws = book.v[name]
        _h, col, rows = charge_table(ws)
        n = sp.batches
        assert len(rows) == len(sp.charges)
        for r, c in zip(rows, sp.charges):
            m = mats[c.material]
            sol = m.solution

            def cell(heading):
                return ws.cell(r, col[heading]).value

            assert cell("#") == c.order
            assert cell("key") == c.material
            assert cell("material") == c.name
            assert cell("role").startswith(c.role)
            assert close(cell("basis value"), c.basis_value)
            assert close(cell("equiv [-]"), c.equiv)
            assert close(cell("amount [mol]"), None if c.mol is None else c.mol.m_as("mol") / n)
            assert close(cell("molar mass [g/mol]"), None if m.molar_mass is None else m.molar_mass.m_as("g/mol"))
            assay = (sol.mass_fraction if sol is not None else m.assay)
            assert close(cell("assay [%]"), assay)
            molarity = sol.molarity.m_as("mol/L") if sol is not None and sol.molarity is not None else None
            assert close(cell("concentration [mol/L]"), molarity)
            density = sol.density if sol is not None else m.density
            assert close(cell("density [g/mL]"), None if density is None else density.m_as("g/mL"))
            assert close(cell("mass to charge [kg]"), c.mass.m_as("kg") / n)
            assert close(cell("volume to charge [L]"), None if c.volume is None else c.volume.m_as("L") / n)
            assert (cell("hazards") or "") == "; ".join(m.hazards)
            for fill_in in ("lot number", "lot assay or titre", "actual mass charged [kg]", "checked by"):
                assert cell(fill_in) is None
            checked += 1
    assert checked == sum(len(sp.charges) * sp.batches for sp in plan.steps)


def test_mass_and_volume_cells_hold_formulas(plan, book):
    """Every mass and volume to charge is a live formula, except those of an
    intermediate carried in solution: the plan's plain numbers (nothing to weigh)."""
    carried = 0
    for sp, _k, name in charge_sheet_names(plan):
        ws = book.f[name]
        _h, col, rows = charge_table(ws)
        for r, c in zip(rows, sp.charges):
            mass = ws.cell(r, col["mass to charge [kg]"])
            vol = ws.cell(r, col["volume to charge [L]"])
            if c.carried_from is not None:
                assert (mass.data_type, vol.data_type) == ("n", "n"), (name, c.material)
                carried += 1
                continue
            assert mass.data_type == "f" and mass.value.startswith("="), (name, c.material, mass.value)
            if c.volume is None:
                assert vol.value is None
            else:
                assert vol.data_type == "f", (name, c.material, vol.value)
    assert carried == 1  # the salt, in solution from the telescoped step


def _lot_rules(ws):
    """Data validation of each cell of a sheet: ``{"J13": rule}``."""
    return {rng.coord: dv for dv in ws.data_validations.dataValidation for rng in dv.sqref.ranges}


def test_intermediate_in_solution_is_transferred_not_weighed(plan, book):
    """The salt made by the telescoped step A?1/[prep] comes in its reaction mixture:
    the sheet says to transfer the whole mixture, the volume to charge is the plan's
    volume of mixture carried in (the salt has no density, so it cannot be mass /
    density), the mass is the salt's content shown in italics, and the lot assay is
    grey and read by no formula."""
    from openpyxl.utils import get_column_letter as L

    src, sp = plan.steps[1], plan.steps[2]
    c = next(c for c in sp.charges if c.material == "salt")
    assert c.carried_from == src.id and not src.isolated
    assert plan.route.materials["salt"].density is None
    name = next(n for s, _k, n in charge_sheet_names(plan) if s is sp)
    ws, wv = book.f[name], book.v[name]
    _h, col, rows = charge_table(ws)
    r = rows[c.order - 1]
    assert ws.cell(r, col["key"]).value == "salt"
    role = ws.cell(r, col["role"]).value
    assert f"in solution from {src.id}" in role and "transfer the whole mixture" in role
    assert "limiting reagent" in role
    # the whole mixture of the one-batch telescoped step goes into the one batch
    vol = ws.cell(r, col["volume to charge [L]"])
    assert vol.data_type == "n" and close(vol.value, c.volume.m_as("L") / sp.batches)
    assert close(vol.value, src.batch.step_volume.m_as("L"))
    assert vol.font.b
    mass = ws.cell(r, col["mass to charge [kg]"])
    assert mass.data_type == "n" and close(mass.value, c.mass.m_as("kg") / sp.batches)
    assert mass.font.i and not mass.font.b
    assert close(wv.cell(r, col["mass to charge [kg]"]).value, c.mass.m_as("kg") / sp.batches)
    # the lot-assay cell is grey like that of the solvent by volumes (acetone), and only recorded
    lot = ws.cell(r, col["lot assay or titre"])
    grey_r = rows[[x.material for x in sp.charges].index("acetone")]
    assert lot.fill.fgColor.rgb == ws.cell(grey_r, col["lot assay or titre"]).fill.fgColor.rgb
    assert lot.fill.fgColor.rgb != ws.cell(rows[1], col["lot number"]).fill.fgColor.rgb  # not the fill-in green
    rules = _lot_rules(ws)
    assert rules[lot.coordinate].type in (None, "any")
    assert "no lot assay" in rules[lot.coordinate].prompt
    assert "nothing is weighed" in rules[mass.coordinate].prompt
    used = " ".join(str(x.value) for row in ws.iter_rows() for x in row if x.data_type == "f")
    assert f"{L(col['lot assay or titre'])}{r}" not in used
    # the acetone by volumes still follows the limiting salt's (now plain) mass cell
    acetone_r = rows[[x.material for x in sp.charges].index("acetone")]
    assert f"{L(col['mass to charge [kg]'])}{r}" in ws.cell(acetone_r, col["volume to charge [L]"]).value


def test_formulas_follow_the_design(plan, book):
    """Molar charges read the lot-assay cell; volumes and mass ratios read the mass
    cell of the limiting reagent's row; a solution by molarity reads its concentration."""
    from openpyxl.utils import get_column_letter as L

    sp = plan.steps[0]
    ws = book.f[charge_sheet_names(plan)[0][2]]
    _h, col, rows = charge_table(ws)
    by = {c.order: (r, c) for r, c in zip(rows, sp.charges)}
    lim_r = rows[0]
    lim_mass = f"{L(col['mass to charge [kg]'])}{lim_r}"
    r, _c = by[1]  # aminophenol, limiting, molar
    assert f"{L(col['lot assay or titre'])}{r}" in ws.cell(r, col["mass to charge [kg]"]).value
    for order in (2, 4, 5):  # water (volumes), charcoal (mass ratio), water (volumes)
        r, c = by[order]
        target = "volume to charge [L]" if c.basis == "volumes" else "mass to charge [kg]"
        assert lim_mass in ws.cell(r, col[target]).value, (c.material, ws.cell(r, col[target]).value)
    last = book.f[charge_sheet_names(plan)[-1][2]]
    _h, col, rows = charge_table(last)
    r = rows[-1]  # HCl6M by molarity
    assert f"{L(col['concentration [mol/L]'])}{r}" in last.cell(r, col["volume to charge [L]"]).value


#: The tokens routeplan's formulas are made of, as they appear in the XML of a sheet
#: (``&amp;`` joins text, ``&lt;`` and ``&gt;`` compare; quoted words are our own).
ALLOWED_FORMULA = re.compile(r'^(?:[A-Z]{1,3}[0-9]+|[0-9.e+-]+|[*/(),:=]|&amp;|&lt;|&gt;|"[a-zA-Z ±%]*"'
                             r'|IF|ISNUMBER|SUM|ABS|AND|FIXED|MAX)+$')


def _formulas_in(path: Path) -> list[str]:
    with zipfile.ZipFile(path) as z:
        return [m for name in z.namelist() if name.startswith("xl/worksheets/sheet")
                for m in re.findall(r"<f>(.*?)</f>", z.read(name).decode("utf-8"))]


def test_only_our_formulas_are_in_the_file(book):
    """Every <f> element of the package is one of routeplan's arithmetic formulas: cell
    references, numbers, * and /, comparisons, IF, ISNUMBER, SUM, ABS, AND, FIXED and the
    joining of short quoted words (Office Open XML, ECMA-376 Part 1: a cell's formula is
    held in its <f> element; from memory)."""
    allowed = ALLOWED_FORMULA
    formulas = _formulas_in(book.path)
    assert formulas
    for f in formulas:
        assert allowed.match(f), f
    assert not any("HYPERLINK" in f for f in formulas)


def test_injection_text_stays_text(plan, book):
    found = {}
    for ws in book.f.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                if isinstance(cell.value, str) and cell.value[:1] in "=+-@" and cell.data_type != "f":
                    found.setdefault(cell.value, cell.data_type)
    expected = ['=HYPERLINK("http://x")', "+flammable; corrosive", "-highly flammable", "@lachrymator",
                "@SUM(1)", "+note from the route"]
    for text in expected:
        assert found.get(text) == "s", (text, found.get(text))
    summary = book.f["Summary"]
    assert any(c.value == "=1+2 test route" and c.data_type == "s" for row in summary.iter_rows() for c in row)


def test_summary_sheet(plan, book):
    ws = book.v["Summary"]
    # SHA-256 of the route text as UTF-8, from Python's hashlib (FIPS 180-4)
    sha = hashlib.sha256(ROUTE_TEXT.encode("utf-8")).hexdigest()
    assert header_value(ws, "route file SHA-256") == sha
    assert header_value(ws, "route file") == ROUTE_NAME
    assert header_value(ws, "route") == plan.route.name
    assert header_value(ws, "written") == "2025-03-04 10:15 +00:00"
    assert close(header_value(ws, "target mass, with overage [kg]"), plan.target_mass.m_as("kg"))
    assert close(header_value(ws, "target amount [mol]"), plan.target_mol.m_as("mol"))
    assert close(header_value(ws, "overall yield (longest linear sequence) [%]"), plan.overall_yield.yield_)
    assert header_value(ws, "currency") == "EUR"


def _raw_table(ws):
    for r in range(1, ws.max_row + 1):
        if ws.cell(r, 1).value == "key" and ws.cell(r, 3).value == "mass [kg]":
            heads = {ws.cell(r, c).value: c for c in range(1, 9)}
            return r, heads
    raise AssertionError("no raw-material table")


def test_summary_raw_material_totals(plan, book):
    ws, wf = book.v["Summary"], book.f["Summary"]
    h, col = _raw_table(ws)
    for i, raw in enumerate(plan.raw_materials):
        r = h + 1 + i
        price = plan.route.materials[raw.material].price

        def cell(heading):
            return ws.cell(r, col[heading]).value

        assert cell("key") == raw.material
        assert close(cell("mass [kg]"), raw.mass.m_as("kg"))
        assert close(cell("volume [L]"), None if raw.volume is None else raw.volume.m_as("L"))
        assert close(cell("amount [mol]"), None if raw.mol is None else raw.mol.m_as("mol"))
        assert close(cell("price [EUR/kg]"), price)
        assert close(cell("cost [EUR]"), raw.cost)
        if raw.cost is not None:
            assert wf.cell(r, col["cost [EUR]"]).data_type == "f"
    total_row = h + 1 + len(plan.raw_materials)
    assert ws.cell(total_row, col["material"]).value == "total cost of priced materials"
    assert close(ws.cell(total_row, col["cost [EUR]"]).value, sum(r.cost for r in plan.raw_materials if r.cost))
    assert wf.cell(total_row, col["cost [EUR]"]).value.startswith("=SUM(")


def test_summary_lists_steps_and_warnings(plan, book):
    ws = book.v["Summary"]
    texts = [c.value for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
    for sp in plan.steps:
        assert sp.id in texts
    for p in plan.warnings:
        assert p.render() in texts


def test_materials_sheet(plan, book):
    ws = book.v["Materials"]
    h = next(r for r in range(1, 10) if ws.cell(r, 1).value == "key")
    col = {ws.cell(h, c).value: c for c in range(1, ws.max_column + 1)}
    mats = list(plan.route.materials.values())
    for i, m in enumerate(mats):
        r = h + 1 + i
        sol = m.solution
        assert ws.cell(r, col["key"]).value == m.key
        assert ws.cell(r, col["material"]).value == m.name
        assert ws.cell(r, col["formula"]).value == m.formula
        assert close(ws.cell(r, col["molar mass [g/mol]"]).value, m.molar_mass and m.molar_mass.m_as("g/mol"))
        assert close(ws.cell(r, col["assay [%]"]).value, None if sol else m.assay)
        assert close(ws.cell(r, col["density [g/mL]"]).value, m.density and m.density.m_as("g/mL"))
        assert close(ws.cell(r, col["solution concentration [mol/L]"]).value,
                     sol.molarity.m_as("mol/L") if sol and sol.molarity is not None else None)
        assert close(ws.cell(r, col["solution mass fraction [%]"]).value, sol.mass_fraction if sol else None)
        assert close(ws.cell(r, col["solution density [g/mL]"]).value, sol.density.m_as("g/mL") if sol else None)
        assert close(ws.cell(r, col["price [EUR/kg]"]).value, m.price)
        assert (ws.cell(r, col["hazards"]).value or "") == "; ".join(m.hazards)
    assert ws.cell(h + 1 + len(mats), 1).value is None


def test_print_setup_panes_formats(plan, book):
    for ws in book.f.worksheets:
        assert ws.page_setup.orientation == "landscape", ws.title
        assert ws.sheet_properties.pageSetUpPr.fitToPage, ws.title
        # an absent fitToWidth means 1 (ECMA-376 Part 1, the pageSetup element: fitToWidth
        # defaults to 1; from memory)
        assert (ws.page_setup.fitToWidth or 1, ws.page_setup.fitToHeight) == (1, 0), ws.title
        assert ws.freeze_panes is not None, ws.title
        assert ws.print_title_rows, ws.title
    for _sp, _k, name in charge_sheet_names(plan):
        ws = book.f[name]
        h, col, rows = charge_table(ws)
        assert ws.freeze_panes == f"A{h + 1}"
        assert ws.print_title_rows.replace("$", "") == f"{h}:{h}"
        for heading, c in col.items():
            letter = openpyxl.utils.get_column_letter(c)
            width = ws.column_dimensions[letter].width
            longest_word = max(len(w) for w in heading.split())
            assert width >= longest_word, (name, heading, width)
        r = rows[0]
        assert "%" in ws.cell(r, col["assay [%]"]).number_format
        assert "%" in ws.cell(r, col["lot assay or titre"]).number_format
        assert re.fullmatch(r"#,##0\.0+", ws.cell(r, col["mass to charge [kg]"]).number_format)


def test_lot_assay_cells_accept_only_a_fraction(plan, book):
    """A lot assay is asked for where a charge by equiv (or mol %) of a solid, a neat
    liquid or a solution by mass fraction depends on it; elsewhere (volumes, mass ratio,
    a solution by molarity, an intermediate carried in solution) it is recorded only."""
    kinds = set()
    for sp, _k, name in charge_sheet_names(plan):
        ws = book.f[name]
        _h, col, rows = charge_table(ws)
        lot = openpyxl.utils.get_column_letter(col["lot assay or titre"])
        rules = _lot_rules(ws)
        for r, c in zip(rows, sp.charges):
            dv = rules[f"{lot}{r}"]
            sol = plan.route.materials[c.material].solution
            asked = c.equiv is not None and c.carried_from is None
            titre = sol is not None and sol.molarity is not None
            if asked:
                assert dv.type == "decimal" and dv.operator in (None, "between")  # "between" is the default
                # an assay is a fraction up to 1; a titre a concentration up to 60 mol/L
                assert float(dv.formula1) > 0 and float(dv.formula2) == (60.0 if titre else 1)
            else:
                assert dv.type is None or dv.type == "any", (name, c.material)  # recorded only
            kinds.add(asked)
    assert kinds == {True, False}


def test_pandas_sees_numbers(plan, book):
    """A reader that does not calculate (pandas) gets the stored numbers."""
    import pandas as pd

    sp, _k, name = charge_sheet_names(plan)[-1]
    h, _col, _rows = charge_table(book.f[name])
    frame = pd.read_excel(book.path, sheet_name=name, header=h - 1, nrows=len(sp.charges))
    masses = frame["mass to charge [kg]"].tolist()
    assert all(close(a, c.mass.m_as("kg")) for a, c in zip(masses, sp.charges))


# --- sheet names -------------------------------------------------------------------


def _fake_plan(ids_batches):
    return SimpleNamespace(steps=[SimpleNamespace(id=i, batches=n) for i, n in ids_batches])


def _valid(name: str) -> bool:
    return (0 < len(name.encode("utf-16-le")) // 2 <= MAX_SHEET_NAME
            and not re.search(r"[\[\]:*?/\\]", name)
            and not name.startswith("'") and not name.endswith("'"))


def test_sheet_names_odd_long_duplicate():
    plan = _fake_plan([
        ("S1", 1), ("s1", 1), ("A:1/[x]", 1), ("A?1/[x]", 1), ("Summary", 1), ("materials", 1),
        ("'quoted'", 1), ("x" * 40, 3), ("x" * 40, 1), ("", 1), ("[]", 1), ("a\tb", 1), ("😀" * 20, 2),
    ])
    names = [n for _sp, _k, n in charge_sheet_names(plan)]
    assert all(_valid(n) for n in names), names
    folded = [n.casefold() for n in names]
    assert len(set(folded)) == len(folded)
    assert not {"summary", "materials", "history"} & set(folded)
    assert names[0] == "S1" and names[1] == "s1 (2)"
    assert names[2] == "A_1__x_" and names[3] == "A_1__x_ (2)"
    long_batches = [n for n in names if n.startswith("xxx") and "batch" in n]
    assert [n.rsplit("batch", 1)[1] for n in long_batches] == [" 1 of 3", " 2 of 3", " 3 of 3"]


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.text(min_size=0, max_size=45), st.integers(1, 3)), min_size=1, max_size=6))
def test_sheet_names_always_valid_and_unique(ids):
    """Any step ids give names that xlsxwriter's own check of the spreadsheet rules
    (length, forbidden characters, apostrophes, case-blind uniqueness) accepts."""
    import io

    import xlsxwriter

    names = [n for _sp, _k, n in charge_sheet_names(_fake_plan(ids))]
    assert all(_valid(n) for n in names), names
    wb = xlsxwriter.Workbook(io.BytesIO(), {"in_memory": True})
    for name in ["Summary", *names, "Materials"]:
        wb.add_worksheet(name)  # raises on an invalid or duplicate name
    wb.close()


# --- atomic writing --------------------------------------------------------------------


def _only(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir())


def test_failure_part_way_keeps_the_earlier_file(plan, tmp_path, monkeypatch):
    import routeplan.export.workbook_charges as charges

    path = tmp_path / "plan.xlsx"
    write_workbook(plan, path, written=WRITTEN)
    before = path.read_bytes()
    real = charges.write_charge_sheet
    calls = []

    def flaky(*args, **kw):
        calls.append(1)
        if len(calls) == 2:
            raise RuntimeError("disk on fire")
        return real(*args, **kw)

    monkeypatch.setattr(charges, "write_charge_sheet", flaky)
    with pytest.raises(RuntimeError, match="disk on fire"):
        write_workbook(plan, path, written=datetime(2030, 1, 1, tzinfo=timezone.utc))
    assert len(calls) == 2
    assert path.read_bytes() == before
    assert _only(tmp_path) == ["plan.xlsx"]


def test_failure_while_saving_keeps_the_earlier_file(plan, tmp_path, monkeypatch):
    """A failure after some bytes of the new package are on disk."""
    import xlsxwriter.workbook

    path = tmp_path / "plan.xlsx"
    write_workbook(plan, path, written=WRITTEN)
    before = path.read_bytes()

    def half_written(self):
        Path(self.filename).write_bytes(b"PK\x03\x04 half a zip")
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(xlsxwriter.workbook.Workbook, "_store_workbook", half_written)
    with pytest.raises(OutputError, match="cannot write"):
        write_workbook(plan, path, written=WRITTEN)
    assert path.read_bytes() == before
    assert _only(tmp_path) == ["plan.xlsx"]


def test_failure_leaves_no_file_where_there_was_none(plan, tmp_path, monkeypatch):
    import routeplan.export.workbook_summary as summary

    def broken(*args, **kw):
        raise RuntimeError("broken")

    monkeypatch.setattr(summary, "write_materials", broken)
    with pytest.raises(RuntimeError):
        write_workbook(plan, tmp_path / "new.xlsx")
    assert _only(tmp_path) == []


def test_missing_folder_is_an_output_error(plan, tmp_path):
    with pytest.raises(OutputError, match="does not exist"):
        write_workbook(plan, tmp_path / "nowhere" / "plan.xlsx")


def test_command_line_writes_workbook_and_csv(tmp_path):
    from conftest import run_cli, write_route

    route = write_route(tmp_path, ROUTE_TEXT, ROUTE_NAME)
    out = tmp_path / "sheets.xlsx"
    result = run_cli("plan", route, "--xlsx", out, "--csv", tmp_path / "tables", "--quiet")
    assert result.exit_code == 0, result.output
    assert f"wrote {out}" in result.stderr
    assert openpyxl.load_workbook(out).sheetnames[0] == "Summary"
    assert (tmp_path / "tables" / "summary.csv").is_file()
