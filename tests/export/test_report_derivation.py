"""Derivations in the HTML report, opened in a real browser: Debian's Chromium, headless.

External check (source: Chromium, run headless and driven through its DevTools protocol,
tests/chromium_cdp.py; pdftotext from poppler reads the printouts).  The reports are
written by the command line (``routeplan plan ROUTE --html FILE --json FILE``), so that
the JSON plan beside them gives the numbers to check against:

* a number of a charge table, clicked with a real mouse event, opens the derivation of
  that charge (no script: a link into a ``<details>`` element, which the browser opens)
  and brings its line forward; that line's result, as rendered, is the number clicked,
  and is the JSON plan's number for the same charge to the printed digits (4 significant
  figures); every line shows its factors one per row, each with its unit and source;
* an amount derived with another step links to it, and the link opens that step's
  derivation at a line of the same name and value; where two steps charge one
  intermediate, the sum shows both branches, each linked;
* no console error or warning, no request but the file itself, no script element;
* printed, a closed derivation leaves no trace (the same number of pages as a report
  without derivations), an opened one prints;
* a route file whose name holds markup shows it as text (its path is every factor's
  source) and runs nothing.

Under CI (``CI`` set) a missing Chromium or poppler fails these tests.
"""

from __future__ import annotations

import json
import math
import shutil
import subprocess
from pathlib import Path

import pytest

import routeplan
from chromium_cdp import Browser, need_chromium
from conftest import DATA, ROOT, missing_tool, run_cli
from routeplan.export.html import write_plan_html

pytestmark = pytest.mark.slow

PDFTOTEXT = shutil.which("pdftotext")
PDFINFO = shutil.which("pdfinfo")
LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"
HOSTILE_NAME = '<img src=x onerror="document.title=1">&"q".yaml'
#: Display units of the charge table's columns -> factor to mol, kg, L.
UNIT = {"mmol": 1e-3, "mol": 1.0, "kmol": 1e3, "mg": 1e-6, "g": 1e-3, "kg": 1.0, "t": 1e3,
        "mL": 1e-3, "L": 1.0, "m³": 1e3}
COLUMN = {"mol": "mol", "mass_kg": "mass_kg", "volume_L": "volume_L"}


def _write(base: Path, name: str, route: Path, *extra: str):
    html, js = base / f"{name}.html", base / f"{name}.json"
    r = run_cli("plan", route, "--html", html, "--json", js, "-q", *extra)
    assert r.exit_code == 0, r.output
    return html, json.loads(js.read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    need_chromium()
    base = tmp_path_factory.mktemp("derivation-report")
    out = {name: _write(base, name, route) for name, route in
           (("linear", LINEAR), ("convergent", CONVERGENT), ("shared", DATA / "routes" / "shared.yaml"))}
    out["stock"] = _write(base, "stock", LINEAR, "--stock", str(ROOT / "demo_routes" / "stock.yaml"))
    hostile = base / HOSTILE_NAME
    hostile.write_text((DATA / "routes" / "good.yaml").read_text(encoding="utf-8"), encoding="utf-8")
    out["hostile"] = _write(base, "hostile", hostile)
    plain = base / "plain.html"  # the same plan without derivations (the library, explain off)
    write_plan_html(routeplan.plan_route(routeplan.load_route(LINEAR)), plain)
    out["plain"] = (plain, None)
    return out


@pytest.fixture(scope="module")
def browser(tmp_path_factory, pages):
    with Browser(tmp_path_factory.mktemp("chromium-profile")) as b:
        yield b


def click(b, expression: str) -> None:
    """Scroll the element of ``expression`` into view and click its middle with the mouse."""
    x, y = b.evaluate(f"""(() => {{ const e = {expression}; e.scrollIntoView({{block: 'center'}});
        const r = e.getBoundingClientRect(); return [r.x + r.width / 2, r.y + r.height / 2]; }})()""")
    for kind in ("mousePressed", "mouseReleased"):
        b.send("Input.dispatchMouseEvent", {"type": kind, "x": x, "y": y, "button": "left", "clickCount": 1},
               session=True)


def target_line(b) -> dict:
    """The line the address points at: its derivation block (open?), result text, unit and what."""
    return b.evaluate("""(() => { const t = document.getElementById(location.hash.slice(1));
        const res = t.querySelector('tr.result');
        return {open: t.closest('details').open, block: t.closest('details').id, amount: t.dataset.amount || null,
                result: res.cells[2].innerText, value: parseFloat(res.cells[2].dataset.value),
                unit: res.cells[3].innerText, what: res.cells[4].innerText,
                step: t.closest('section.step').dataset.step}; })()""")


@pytest.mark.parametrize("name", ["linear", "convergent", "shared", "stock", "hostile"])
def test_loads_without_console_error_or_network_request(browser, pages, name):
    path, _data = pages[name]
    browser.open(path)
    assert browser.console_errors() == []
    assert browser.requests() == [path.resolve().as_uri()]
    assert browser.evaluate("document.querySelectorAll('script').length") == 0
    n = browser.evaluate("document.querySelectorAll('details.derivation').length")
    data = pages[name][1]
    assert n == sum(len(s["charges"]) for s in data["steps"] if s["batches"] > 0)
    # closed at first; the JSON written beside the report carries no derivation (no --explain)
    assert browser.evaluate("[...document.querySelectorAll('details.derivation')].every(d => !d.open)")
    assert all("derivation" not in c for s in data["steps"] for c in s["charges"])


@pytest.mark.parametrize("name", ["linear", "convergent", "shared"])
def test_a_clicked_number_opens_its_derivation_ending_on_that_number(browser, pages, name):
    path, data = pages[name]
    b = browser
    b.open(path)
    cells = b.evaluate("""[...document.querySelectorAll('table.charges a.derives')].map((a, i) => {
        const td = a.closest('td'), table = td.closest('table');
        return {i, step: td.closest('section.step').dataset.step, key: td.dataset.key, text: a.innerText,
                row: td.parentElement.rowIndex - 1,
                head: table.tHead.rows[0].cells[td.cellIndex].innerText}; })""")
    steps = {s["id"]: s for s in data["steps"]}
    kinds = set()
    for cell in cells:
        click(b, f"document.querySelectorAll('table.charges a.derives')[{cell['i']}]")
        line = target_line(b)
        assert line["open"] and line["step"] == cell["step"], cell
        unit = cell["head"].split("[")[1].rstrip("]")
        assert (line["result"], line["unit"]) == (cell["text"], unit), (cell, line)
        charge = steps[cell["step"]]["charges"][cell["row"]]
        want = charge[COLUMN[cell["key"]]]
        # the JSON plan's number to the four significant figures printed
        assert float(line["result"]) == float(f"{want / UNIT[unit]:.4g}"), (cell, want)
        assert math.isclose(line["value"], want, rel_tol=1e-12), (cell, line["value"], want)
        assert line["what"] == f"{charge['material']} charged to {cell['step']}"
        assert line["amount"] == {"mol": "n", "mass_kg": "m", "volume_L": "V"}[cell["key"]]
        kinds.add(cell["key"])
    assert kinds == {"mol", "mass_kg", "volume_L"}
    assert len(cells) >= 2 * sum(len(s["charges"]) for s in data["steps"] if s["batches"] > 0)
    assert b.console_errors() == []


def test_each_factor_on_its_own_row_with_unit_and_source(browser, pages):
    path, data = pages["linear"]
    b = browser
    b.open(path)
    click(b, "document.querySelector('section.step[data-step=\"S3\"] details[data-material=\"NaOH50\"] summary')")
    rows = b.evaluate("""[...document.querySelectorAll('section.step[data-step="S3"] details[data-material="NaOH50"] tbody tr')]
        .map(tr => ({result: tr.classList.contains('result'), cells: [...tr.cells].map(td => td.innerText)}))""")
    assert b.evaluate("document.querySelector('section.step[data-step=\"S3\"] details[data-material=\"NaOH50\"]').open")
    factors = [r["cells"] for r in rows if not r["result"]]
    results = [r["cells"] for r in rows if r["result"]]
    assert len(results) == 4 and len(factors) >= 8
    for _line, op, value, unit, what, source in factors:
        assert op in ("", "×", "÷", "+", "−") and float(value) > 0 and what and source
    by_what = {f[4]: f for f in factors}
    # molar mass from the formula and the atomic weights; the solution's numbers from the route file
    assert by_what["molar mass of NaOH50"][2:4] == ["39.9968", "g/mol"]
    assert by_what["molar mass of NaOH50"][5] == "NaOH, CIAAW 2021"
    assert by_what["mass fraction of NaOH50"][1:3] == ["÷", "0.5"]
    assert "hx17-linear.yaml line" in by_what["mass fraction of NaOH50"][5]
    assert by_what["density of the solution of NaOH50"][2:4] == ["1.52", "kg/L"]
    assert by_what["Na-salt charged to S4"][5] == "derived in S4"
    # the last line ends on the plan's volume, as printed in the table
    charge = next(c for c in next(s for s in data["steps"] if s["id"] == "S3")["charges"] if c["material"] == "NaOH50")
    assert results[-1][2:4] == [f"{charge['volume_L']:.4g}", "L"]
    text = b.evaluate("document.querySelector('section.step[data-step=\"S3\"] details[data-material=\"NaOH50\"] .closing').innerText")
    assert text == (f"= {charge['mol']:.4g} mol, {charge['mass_kg']:.4g} kg, {charge['volume_L']:.4g} L "
                    f"NaOH50 charged to S3, as in the plan")


def test_an_amount_of_another_step_links_to_its_derivation(browser, pages):
    path, _data = pages["linear"]
    b = browser
    b.open(path)
    # textContent: the text of a closed derivation is not rendered
    links = b.evaluate("""[...document.querySelectorAll('details.derivation td:nth-child(6) a')]
        .filter(a => a.textContent.startsWith('derived in '))
        .map((a, i) => ({i, what: a.closest('tr').cells[4].textContent,
                         value: parseFloat(a.closest('tr').cells[2].textContent),
                         to: a.textContent.slice('derived in '.length)}))""")
    assert len(links) >= 4
    for link in links:
        anchor = (f"[...document.querySelectorAll('details.derivation td:nth-child(6) a')]"
                  f".filter(a => a.textContent.startsWith('derived in '))[{link['i']}]")
        b.evaluate(f"{anchor}.closest('details').open = true")  # as a reader would, to see the link
        click(b, anchor)
        line = target_line(b)
        assert line["open"] and line["step"] == link["to"] and line["what"] == link["what"], (link, line)
        assert math.isclose(line["value"], link["value"], rel_tol=1e-5)  # shown to 6 figures


def test_a_shared_intermediate_shows_the_sum_of_both_branches(browser, pages):
    path, data = pages["shared"]
    b = browser
    b.open(path)
    click(b, "document.querySelector('section.step[data-step=\"S1\"] details[data-material=\"PhCOOH\"] summary')")
    lines = b.evaluate("""[...document.querySelectorAll('section.step[data-step="S1"] details[data-material="PhCOOH"] tbody')]
        .map(t => [...t.rows].map(tr => [...tr.cells].map(td => td.innerText)))""")
    total = next(rows for rows in lines if rows[-1][4] == "BzCl to make in S1")
    terms = {(r[1], r[4], r[5]) for r in total[:-1]}
    assert terms == {("", "BzCl charged to S3", "derived in S3"), ("+", "BzCl charged to S2", "derived in S2")} \
        or terms == {("", "BzCl charged to S2", "derived in S2"), ("+", "BzCl charged to S3", "derived in S3")}
    charged = {s["id"]: next(c["mol"] for c in s["charges"] if c["material"] == "BzCl")
               for s in data["steps"] if s["id"] in ("S2", "S3")}
    assert float(total[-1][2]) == float(f"{charged['S2'] + charged['S3']:.4g}")
    # each branch opens its own step's derivation
    for step in ("S2", "S3"):
        click(b, f"[...document.querySelectorAll('section.step[data-step=\"S1\"] details[data-material=\"PhCOOH\"] td:nth-child(6) a')]"
                 f".find(a => a.innerText === 'derived in {step}')")
        line = target_line(b)
        assert line["open"] and line["step"] == step and line["what"] == f"BzCl charged to {step}"
        assert math.isclose(line["value"], charged[step], rel_tol=1e-12)


def test_markup_in_the_route_files_name_is_shown_as_text(browser, pages):
    path, _data = pages["hostile"]
    b = browser
    b.open(path)
    click(b, "document.querySelector('details.derivation summary')")
    sources = b.evaluate("[...document.querySelectorAll('details.derivation[open] tbody tr:not(.result) td:nth-child(6)')].map(td => td.innerText)")
    assert any(HOSTILE_NAME in s for s in sources), sources[:5]
    assert b.evaluate("document.querySelectorAll('img').length") == 0
    assert b.evaluate("document.title") != "1"
    assert b.console_errors() == []


def _pdf(b, path: Path) -> tuple[int, str]:
    path.write_bytes(b.pdf(8.2677, 11.6929))  # A4 (ISO 216: 210 x 297 mm)
    info = subprocess.run([PDFINFO, str(path)], capture_output=True, text=True, check=True).stdout
    pages = int(next(x for x in info.splitlines() if x.startswith("Pages:")).split()[1])
    return pages, subprocess.run([PDFTOTEXT, str(path), "-"], capture_output=True, text=True, check=True).stdout


def test_printed_closed_derivations_leave_no_trace_and_an_opened_one_prints(browser, pages, tmp_path):
    if PDFTOTEXT is None or PDFINFO is None:
        missing_tool("pdftotext/pdfinfo (poppler-utils) are not installed: the print check reads the PDF with them")
    b = browser
    b.open(pages["plain"][0])
    plain_pages, _ = _pdf(b, tmp_path / "plain.pdf")
    b.open(pages["linear"][0])
    closed_pages, closed = _pdf(b, tmp_path / "closed.pdf")
    assert closed_pages == plain_pages
    assert "How each number is made" not in closed and "molar mass of NaOH50" not in closed
    click(b, "document.querySelector('section.step[data-step=\"S3\"] details[data-material=\"NaOH50\"] summary')")
    opened_pages, opened = _pdf(b, tmp_path / "opened.pdf")
    flat = " ".join(opened.split())
    assert "molar mass of NaOH50" in flat and "NaOH, CIAAW 2021" in flat
    assert "NaOH50 charged to S3, as in the plan" in flat
    assert opened_pages <= closed_pages + 1
    assert "molar mass of EtOH" not in flat  # the other derivations stay out


# ---------------------------------------------------------------- the page as written (no browser)

def test_every_link_has_one_target_and_numbers_of_the_table_link_their_line(tmp_path):
    from html.parser import HTMLParser

    class Ids(HTMLParser):
        def __init__(self):
            super().__init__()
            self.ids, self.hrefs, self.amounts = [], [], {}

        def handle_starttag(self, tag, attrs):
            a = dict(attrs)
            if "id" in a:
                self.ids.append(a["id"])
                if tag == "tbody" and "data-amount" in a:
                    self.amounts[a["id"]] = a["data-amount"]
            if tag == "a" and a.get("href", "").startswith("#"):
                self.hrefs.append((a["href"][1:], a.get("class")))

    plan = routeplan.plan_route(routeplan.load_route(LINEAR), explain=True)
    from routeplan.export.html import plan_html

    page = Ids()
    page.feed(plan_html(plan))
    assert len(page.ids) == len(set(page.ids))
    ids = set(page.ids)
    assert all(h in ids for h, _c in page.hrefs)
    from_table = [h for h, c in page.hrefs if c == "derives"]
    assert from_table and all(h in page.amounts for h in from_table)
    # every number of the table links its line, a volume carried in from a telescoped step
    # too (the core derives it: what stays in that step's vessel, plan/core.contents)
    assert any(c.carried_from is not None for sp in plan.steps for c in sp.charges)
    assert len(from_table) == sum(
        (c.mol is not None) + 1 + (c.volume is not None)
        for sp in plan.steps if sp.runs for c in sp.charges)


def test_html_alone_has_derivations_json_and_workbook_only_with_explain(tmp_path):
    import openpyxl

    files = {k: tmp_path / f"p.{k}" for k in ("html", "json", "xlsx")}
    r = run_cli("plan", LINEAR, "--html", files["html"], "--json", files["json"], "--xlsx", files["xlsx"], "-q")
    assert r.exit_code == 0, r.output
    assert 'class="derivation"' in files["html"].read_text(encoding="utf-8")
    assert '"derivation"' not in files["json"].read_text(encoding="utf-8")
    assert "Derivation" not in openpyxl.load_workbook(files["xlsx"]).sheetnames
    r = run_cli("plan", LINEAR, "--html", files["html"], "--json", files["json"], "--xlsx", files["xlsx"], "-q",
                "--explain")
    assert r.exit_code == 0, r.output
    assert '"derivation"' in files["json"].read_text(encoding="utf-8")
    assert "Derivation" in openpyxl.load_workbook(files["xlsx"]).sheetnames
    # a plan made without an explanation (the library's default) gives a report without
    plain = routeplan.plan_route(routeplan.load_route(LINEAR))
    write_plan_html(plain, files["html"])
    text = files["html"].read_text(encoding="utf-8")
    assert 'class="derivation"' not in text and 'class="derives"' not in text
