"""The HTML report opened in a real browser: Debian's Chromium, headless.

External check (source: Chromium, run headless and driven through its DevTools protocol,
see tests/chromium_cdp.py; pdftotext and pdfinfo from poppler read the printouts):

* the page loads with no console error or warning and makes no request but the file
  itself (a content security policy would also report any attempt as an error);
* the target mass and every step id are in the rendered text; the masses shown in
  the charge tables, read back from the rendered cells with the unit of their column,
  are the JSON plan's to the four significant figures shown;
* every chart and the scheme have a non-zero rendered size, no two boxes of the scheme
  overlap as drawn, and every line of text stays inside its box (so the layout's
  estimate of text widths holds for the browser's real font);
* a screenshot is not blank (many distinct colours, a good share of non-white pixels);
* printed to PDF on A4 and on Letter, the paper is the size asked and every page
  carries the caution;
* a route whose names hold ``<script>`` and quotes shows them as text and runs nothing.

Under CI (``CI`` set) a missing Chromium or poppler fails these tests; on a developer's
machine without them they are skipped with the reason.
"""

from __future__ import annotations

import io
import math
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

import routeplan
from chromium_cdp import Browser, need_chromium
from conftest import missing_tool as _missing, write_route
from routeplan.export.html import write_compare_html, write_plan_html
from routeplan.route.load import load_route_text

pytestmark = pytest.mark.slow

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "bench"))

from report_bench import branched_route  # noqa: E402

PDFTOTEXT = shutil.which("pdftotext")
PDFINFO = shutil.which("pdfinfo")
HOSTILE = '<script>document.title="owned"</script> "quoted" & more'
#: Paper sizes [in] and their size in PDF points [pt] (ISO 216 A4 210 x 297 mm; ANSI Letter 8.5 x 11 in).
PAPERS = {"A4": ((8.2677, 11.6929), (595.0, 842.0)), "Letter": ((8.5, 11.0), (612.0, 792.0))}
_FACTOR = {"t": 1000.0, "kg": 1.0, "g": 1e-3, "mg": 1e-6}


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    """Reports written to files: the demo plan, the comparison, 30 steps, hostile names."""
    need_chromium()
    base = tmp_path_factory.mktemp("report")
    demo = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-convergent.yaml"))
    write_plan_html(demo, base / "demo.html")
    linear = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-linear.yaml"))
    from routeplan.plan.compare import compare_plans, plan_for_comparison

    plans, notes = plan_for_comparison([linear.route, demo.route])
    cmp = compare_plans(plans, notes)
    write_compare_html(cmp, base / "compare.html")
    big = routeplan.plan_route(load_route_text(branched_route(30), "branched-30.yaml"))
    write_plan_html(big, base / "branched30.html")
    good = (Path(__file__).resolve().parents[1] / "data" / "routes" / "good.yaml").read_text(encoding="utf-8")
    quoted = HOSTILE.replace("'", "''")
    hostile_text = good.replace("    name: ethyl bromoacetate", f"    name: '{quoted}'")
    hostile = routeplan.plan_route(routeplan.load_route(write_route(base, hostile_text, "hostile.yaml")))
    write_plan_html(hostile, base / "hostile.html")
    uncertain = routeplan.plan_route(linear.route, confidence=0.9, draws=20000)
    write_plan_html(uncertain, base / "uncertain.html")
    recorded = routeplan.plan_route(linear.route, record=ROOT / "demo_routes" / "record.yaml")
    write_plan_html(recorded, base / "record.html")
    return {"demo": (demo, base / "demo.html"), "compare": (cmp, base / "compare.html"),
            "uncertain": (uncertain, base / "uncertain.html"), "record": (recorded, base / "record.html"),
            "big": (big, base / "branched30.html"), "hostile": (hostile, base / "hostile.html")}


@pytest.fixture(scope="module")
def browser(tmp_path_factory, pages):
    with Browser(tmp_path_factory.mktemp("chromium-profile")) as b:
        yield b


def _open(browser, path: Path):
    browser.open(path)
    return browser


@pytest.mark.parametrize("name", ["demo", "compare", "big", "hostile", "uncertain", "record"])
def test_loads_without_console_error_or_network_request(browser, pages, name):
    _obj, path = pages[name]
    b = _open(browser, path)
    assert b.console_errors() == []
    assert b.requests() == [path.resolve().as_uri()]
    assert b.evaluate("document.querySelectorAll('script').length") == 0
    # nothing pushes the page wider than the window (wide tables scroll in their own box)
    assert b.evaluate("document.documentElement.scrollWidth <= window.innerWidth")


@pytest.mark.parametrize("name", ["demo", "big"])
def test_rendered_text_has_the_target_mass_and_every_step(browser, pages, name):
    plan, path = pages[name]
    b = _open(browser, path)
    text = b.evaluate("document.body.innerText")
    from routeplan.views.display_units import plan_units

    # in the plan's one set of units, as the terminal prints it (25 kg: kg)
    assert f"{plan_units(plan).mass_text(plan.target_mass.m_as('kg'))} of {plan.target_material}" in text
    headings = b.evaluate("[...document.querySelectorAll('section.step h3')].map(h => h.innerText)")
    assert [h.split(" ·")[0].replace("telescoped", "").strip() for h in headings] == [sp.id for sp in plan.steps]
    drawn = b.evaluate("[...document.querySelectorAll('svg.scheme g.node.step')].map(g => g.dataset.step)")
    assert sorted(drawn) == sorted(sp.id for sp in plan.steps)


def test_masses_shown_are_the_json_plans(browser, pages):
    plan, path = pages["demo"]
    b = _open(browser, path)
    tables = b.evaluate("""[...document.querySelectorAll('section.step')].map(s => ({
        id: s.dataset.step,
        head: [...s.querySelectorAll('table.charges th')].map(th => th.innerText),
        rows: [...s.querySelectorAll('table.charges tbody tr')].map(tr => [...tr.cells].map(td => td.innerText))}))""")
    data = {st["id"]: st for st in routeplan.plan_to_dict(plan)["steps"]}
    for t in tables:
        col = next(i for i, h in enumerate(t["head"]) if h.startswith("m ["))
        factor = _FACTOR[t["head"][col][3:-1]]
        shown = [float(r[col]) * factor for r in t["rows"]]
        want = [c["mass_kg"] for c in data[t["id"]]["charges"]]
        assert len(shown) == len(want)
        for s, w in zip(shown, want):
            assert math.isclose(s, w, rel_tol=5e-4), (t["id"], s, w)  # four significant figures shown


@pytest.mark.parametrize("name", ["demo", "compare", "big", "uncertain"])
def test_every_chart_and_scheme_has_a_size(browser, pages, name):
    _obj, path = pages[name]
    b = _open(browser, path)
    sizes = b.evaluate("""[...document.querySelectorAll('svg.scheme, figure.chart svg')].map(e => {
        const r = e.getBoundingClientRect(); return [e.closest('figure') ? e.closest('figure').id : '', r.width, r.height]; })""")
    schemes = 2 if name == "compare" else 1
    charts = 0
    if name != "compare":
        plan = _obj
        charts = 3 + (plan.schedule is not None)  # mass, cost, yield; the vessel timeline with a schedule
        charts += 2 * (plan.uncertainty is not None and plan.uncertainty.carries_uncertainty)
    assert len(sizes) == schemes + charts
    for fig, w, h in sizes:
        assert w > 50 and h > 50, fig


@pytest.mark.parametrize("name", ["demo", "big"])
def test_scheme_boxes_do_not_overlap_and_text_stays_inside(browser, pages, name):
    _obj, path = pages[name]
    b = _open(browser, path)
    boxes = b.evaluate("""[...document.querySelectorAll('svg.scheme g.node')].map(g => {
        const r = g.querySelector('rect').getBBox();
        const t = [...g.querySelectorAll('text')].map(x => { const q = x.getBBox(); return [q.x, q.y, q.width, q.height]; });
        const all = g.getBBox();
        return {key: g.dataset.key, rect: [r.x, r.y, r.width, r.height], all: [all.x, all.y, all.width, all.height], text: t}; })""")
    assert len(boxes) >= len(_obj.steps) * 2
    for box in boxes:
        x, y, w, h = box["rect"]
        for tx, ty, tw, th in box["text"]:
            assert tx >= x - 0.5 and tx + tw <= x + w + 0.5, (box["key"], "text wider than its box")
            assert ty >= y - 0.5 and ty + th <= y + h + 0.5, (box["key"], "text below its box")
    for i, a in enumerate(boxes):
        ax, ay, aw, ah = a["all"]
        for c in boxes[i + 1:]:
            cx, cy, cw, ch = c["all"]
            assert not (ax < cx + cw and cx < ax + aw and ay < cy + ch and cy < ay + ah), (a["key"], c["key"])


@pytest.mark.parametrize("name", ["demo", "compare"])
def test_screenshot_is_not_blank(browser, pages, name):
    from PIL import Image

    _obj, path = pages[name]
    b = _open(browser, path)
    img = Image.open(io.BytesIO(b.screenshot())).convert("RGB")
    assert img.width >= 1000 and img.height >= 1000
    small = img.resize((img.width // 4, img.height // 4))
    colours = small.getcolors(maxcolors=1 << 20)
    assert len(colours) > 100, "too few colours: a blank or broken page"
    white = sum(n for n, c in colours if min(c) > 245)
    assert white / (small.width * small.height) < 0.97


@pytest.mark.parametrize("paper", sorted(PAPERS))
@pytest.mark.parametrize("name", ["demo", "big"])
def test_printed_every_page_carries_the_caution(browser, pages, tmp_path, name, paper):
    if PDFTOTEXT is None or PDFINFO is None:
        _missing("pdftotext/pdfinfo (poppler-utils) are not installed: the print check reads the PDF with them")
    _obj, path = pages[name]
    b = _open(browser, path)
    (w_in, h_in), (w_pt, h_pt) = PAPERS[paper]
    pdf = tmp_path / f"{name}-{paper}.pdf"
    pdf.write_bytes(b.pdf(w_in, h_in))
    info = subprocess.run([PDFINFO, str(pdf)], capture_output=True, text=True, check=True).stdout
    n_pages = int(next(line for line in info.splitlines() if line.startswith("Pages:")).split()[1])
    size = next(line for line in info.splitlines() if line.startswith("Page size:")).split()
    assert abs(float(size[2]) - w_pt) < 1.5 and abs(float(size[4]) - h_pt) < 1.5
    assert n_pages >= (2 if name == "demo" else 5)
    text = subprocess.run([PDFTOTEXT, str(pdf), "-"], capture_output=True, text=True, check=True).stdout
    pages_text = [p for p in text.split("\f") if p.strip()]
    assert len(pages_text) == n_pages
    caution = " ".join(("CAUTION: " + routeplan.CAUTION).split())
    for i, page in enumerate(pages_text, 1):
        assert caution in " ".join(page.split()), f"page {i} of {n_pages} has no caution"


def test_names_with_markup_are_shown_as_text(browser, pages):
    _plan, path = pages["hostile"]
    b = _open(browser, path)
    assert b.evaluate("document.title") != "owned"
    assert HOSTILE in b.evaluate("document.body.innerText")
    assert b.console_errors() == []
