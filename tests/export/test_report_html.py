"""The HTML report as written: the Plan's numbers, escaping, self-containment, atomic writes.

Read back with Python's own HTML parser (html.parser, the standard library); the page as
a browser renders it is checked in test_report_chromium.py.
"""

from __future__ import annotations

import json
import math
import re
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

import routeplan
from conftest import run_cli, write_route
from routeplan.export.html import PLOTS_MISSING, plan_html, write_plan_html

ROOT = Path(__file__).resolve().parents[2]
LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"

HOSTILE = '<script>alert("x")</script> & "quoted" \'name\''


class _Page(HTMLParser):
    """Elements with their attributes, the text, and every tag seen."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.elements: list[tuple[str, dict]] = []
        self.text: list[str] = []
        self._stack: list[tuple[str, dict, list[str]]] = []
        self.cells: list[tuple[dict, str]] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.elements.append((tag, a))
        if tag in ("td", "div"):
            self._stack.append((tag, a, []))

    def handle_endtag(self, tag):
        if self._stack and self._stack[-1][0] == tag:
            _t, a, parts = self._stack.pop()
            self.cells.append((a, "".join(parts)))

    def handle_data(self, data):
        self.text.append(data)
        for _t, _a, parts in self._stack:
            parts.append(data)


def parse(html: str) -> _Page:
    p = _Page()
    p.feed(html)
    return p


@pytest.fixture(scope="module")
def demo():
    plan = routeplan.plan_route(routeplan.load_route(CONVERGENT))
    return plan, plan_html(plan)


def test_every_charge_number_is_the_plans(demo):
    """Each charge cell's data-value equals the JSON plan's number, step by step, in order."""
    plan, html = demo
    page = parse(html)
    data = routeplan.plan_to_dict(plan)
    sections = re.split(r'<section class="step" id="step-', html)[1:]
    assert [s.split('"', 1)[0] for s in sections] == [st["id"] for st in data["steps"]]
    for st, text in zip(data["steps"], sections):
        table = text.split("</table>", 1)[0]
        cells = parse(table).cells
        for key, json_key in (("mass_kg", "mass_kg"), ("mol", "mol"), ("volume_L", "volume_L"), ("equiv", "equiv")):
            got = [c[0]["data-value"] for c in cells if c[0].get("data-key") == key]
            want = [ch[json_key] for ch in st["charges"]]
            assert len(got) == len(want)
            for g, w in zip(got, want):
                assert (g == "" and w is None) or math.isclose(float(g), w, rel_tol=1e-12), (st["id"], key)
    assert page  # parsed


def test_summary_numbers_are_the_plans(demo):
    plan, html = demo
    d = routeplan.plan_to_dict(plan)
    facts = {a["data-key"]: a["data-value"] for tag, a in parse(html).elements
             if tag == "div" and "fact" in a.get("class", "")}
    assert math.isclose(float(facts["target_mass_kg"]), d["target"]["mass_kg"], rel_tol=1e-12)
    assert math.isclose(float(facts["target_mol"]), d["target"]["mol"], rel_tol=1e-12)
    assert math.isclose(float(facts["overall_yield"]), d["overall_yield"]["yield"], rel_tol=1e-12)
    assert math.isclose(float(facts["pmi"]), d["metrics"]["pmi"], rel_tol=1e-12)
    assert math.isclose(float(facts["cost_per_kg"]), d["metrics"]["cost_per_kg"], rel_tol=1e-12)


def test_raw_material_totals_are_the_plans(demo):
    plan, html = demo
    raw = html.split('id="raw-materials"', 1)[1].split("</table>", 1)[0]
    masses = [float(a["data-value"]) for a, _t in parse(raw).cells if a.get("data-key") == "mass_kg"]
    assert masses == pytest.approx([r["mass_kg"] for r in routeplan.plan_to_dict(plan)["raw_materials"]], rel=1e-12)


def test_the_page_needs_nothing_from_outside(demo):
    """No script, no external stylesheet, image, font or frame; a policy that forbids fetching."""
    _plan, html = demo
    page = parse(html)
    tags = {t for t, _a in page.elements}
    # no element that fetches or embeds anything (media elements included: "source" is their child tag)
    assert not tags & {"script", "img", "iframe", "object", "embed", "source", "track", "picture"}
    for tag, a in page.elements:
        if tag == "link":
            assert a.get("rel") == "icon" and a.get("href") == "data:,"
        for attr in ("src", "href", "xlink:href"):
            value = a.get(attr)
            assert value is None or value.startswith(("#", "data:")), (tag, attr, value)
    assert "@import" not in html and "url(http" not in html
    csp = next(a["content"] for t, a in page.elements if t == "meta" and a.get("http-equiv") == "Content-Security-Policy")
    assert "default-src 'none'" in csp


def test_caution_on_screen_and_in_the_print_margin(demo):
    _plan, html = demo
    body = html.split("</style>", 1)[1]
    assert body.count(routeplan.CAUTION) == 2  # top and foot of the page
    css = html.split("<style>", 1)[1].split("</style>", 1)[0]
    assert "@bottom-left" in css and f'content: "CAUTION: {routeplan.CAUTION}"' in css


def test_the_steps_with_thermal_data_show_their_safety_block(demo):
    # the demo's thermal steps carry a screening estimate: the report shows each one's
    # MTSR and criticality class beside the charges, as the plan computed them
    plan, html = demo
    screened = [sp for sp in plan.steps if sp.safety is not None and sp.safety.thermal is not None]
    assert screened
    body = html.split("</style>", 1)[1]
    assert "Safety per batch: screening estimates" in body
    assert body.count("MTSR") >= len(screened)
    assert "criticality class" in body


def test_names_are_shown_as_text_never_as_markup(tmp_path, good_text):
    """A route whose names hold markup and quotes: shown literally, no element is made of them."""
    text = good_text.replace("route: test route (acid via the ethyl ester)", f"route: '{HOSTILE.replace(chr(39), chr(39) * 2)}'")
    text = text.replace("    name: ethyl bromoacetate", f"    name: '{HOSTILE.replace(chr(39), chr(39) * 2)}'")
    assert text != good_text
    plan = routeplan.plan_route(routeplan.load_route(write_route(tmp_path, text)))
    html = plan_html(plan)
    page = parse(html)
    assert "script" not in {t for t, _a in page.elements}
    shown = "".join(page.text)
    assert HOSTILE in shown
    assert "<script>alert" not in html
    assert "&lt;script&gt;alert(&#34;x&#34;)&lt;/script&gt;" in html


def test_write_is_atomic_and_keeps_the_earlier_file_on_failure(tmp_path, monkeypatch, demo):
    plan, _html = demo
    out = tmp_path / "report.html"
    out.write_text("earlier report", encoding="utf-8")
    import routeplan.export.html as html_mod

    def broken(*_a, **_k):
        raise RuntimeError("template failed")

    monkeypatch.setattr(html_mod, "plan_html", broken)
    with pytest.raises(RuntimeError):
        html_mod.write_plan_html(plan, out)
    assert out.read_text(encoding="utf-8") == "earlier report"
    monkeypatch.undo()
    write_plan_html(plan, out)
    assert out.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert [p.name for p in tmp_path.iterdir()] == ["report.html"]


def test_without_matplotlib_the_report_says_so_and_still_draws_the_scheme(monkeypatch, demo):
    plan, _html = demo
    monkeypatch.setitem(sys.modules, "matplotlib", None)  # import matplotlib now fails
    monkeypatch.delitem(sys.modules, "routeplan.export.html_charts", raising=False)
    html = plan_html(plan)
    assert PLOTS_MISSING in "".join(parse(html).text)
    assert '<svg class="scheme"' in html and 'id="chart-mass"' not in html


def test_charts_are_inline_svg_with_unique_ids(demo):
    _plan, html = demo
    for chart in ("mass", "cost", "yield"):
        assert f'id="chart-{chart}"' in html
    ids = re.findall(r'\bid="([^"]+)"', html)
    assert len(ids) == len(set(ids)), [i for i in ids if ids.count(i) > 1][:5]
    for ref in re.findall(r'url\(#([^)]+)\)', html):
        assert ref in ids


def test_doubling_the_target_doubles_the_charges_in_the_report():
    """Law: every mass in the charge tables scales with the target."""
    route = routeplan.load_route(LINEAR)
    one = parse(plan_html(routeplan.plan_route(route, "10 kg")))
    two = parse(plan_html(routeplan.plan_route(route, "20 kg")))
    m1 = [float(a["data-value"]) for a, _t in one.cells if a.get("data-key") == "mass_kg"]
    m2 = [float(a["data-value"]) for a, _t in two.cells if a.get("data-key") == "mass_kg"]
    assert m1 and m2 == pytest.approx([2 * m for m in m1], rel=1e-9)


def test_cli_writes_the_plan_and_the_comparison_reports(tmp_path):
    out = tmp_path / "plan.html"
    result = run_cli("plan", LINEAR, "--html", out, "-q")
    assert result.exit_code == 0, result.output
    assert f"wrote {out}" in result.stderr
    html = out.read_text(encoding="utf-8")
    assert "HX-17 route A" in html and 'id="step-S5"' in html
    cmp_out = tmp_path / "compare.html"
    result = run_cli("compare", LINEAR, CONVERGENT, "--html", cmp_out)
    assert result.exit_code == 0, result.output
    page = cmp_out.read_text(encoding="utf-8")
    assert page.count('<svg class="scheme"') == 2
    data = json.loads(run_cli("compare", LINEAR, CONVERGENT, "--json", "-").stdout)
    assert data["tradeoff"] in parse(page).text or data["tradeoff"] in "".join(parse(page).text)
    best = [r for r in data["rows"] if r["best"]]
    assert page.count('class="num best"') == sum(len(r["best"]) for r in best)


@pytest.mark.parametrize("value, fragment", [("-", "cannot go to standard output"),
                                             ("no/such/dir/r.html", "does not exist")])
def test_cli_refuses_a_report_path_that_cannot_work(tmp_path, value, fragment):
    result = run_cli("plan", LINEAR, "--html", value)
    assert result.exit_code == 2 and fragment in result.stderr and "Traceback" not in result.output


def test_notebook_object_shows_summary_and_scheme():
    plan = routeplan.plan_route(routeplan.load_route(CONVERGENT))
    nb = routeplan.report(plan)
    html = nb._repr_html_()
    assert '<svg class="scheme"' in html and "target_mass_kg" in html
    assert routeplan.CAUTION in html and "<html" not in html
    assert str(nb).startswith("<!DOCTYPE html>")


def test_uncertainty_section_shows_the_plans_draws():
    """With --confidence: the facts read back equal the JSON uncertainty block; two charts more."""
    plan = routeplan.plan_route(routeplan.load_route(LINEAR), confidence=0.9, draws=20000)
    html = plan_html(plan)
    section = html.split('<section id="uncertainty"', 1)[1].split("</section>", 1)[0]
    page = parse(section)
    rows = {a["data-key"]: a for t, a in page.elements if t == "tr" and "data-key" in a}
    values = {}
    for key in rows:
        row = section.split(f'data-key="{key}"', 1)[1].split("</tr>", 1)[0]
        nums = re.findall(r'data-value="([^"]*)"', row)
        values[key] = float(nums[0]) if nums and nums[0] else None
    u = routeplan.plan_to_dict(plan)["uncertainty"]
    for q in ("p10", "p50", "p90", "mean"):
        assert math.isclose(values[q], u["delivered_kg"][q], rel_tol=1e-12)
    assert math.isclose(values["probability_of_target"], u["probability_of_target"], rel_tol=1e-12)
    assert math.isclose(values["confidence_target"], u["for_confidence"]["target_kg"], rel_tol=1e-12)
    for r in u["for_confidence"]["raw_materials"]:
        assert math.isclose(values[f"buy:{r['material']}"], r["mass_kg"], rel_tol=1e-12)
    assert 'id="chart-delivery"' in section and 'id="chart-contributions"' in section


def test_without_uncertainty_there_is_no_uncertainty_section(demo):
    _plan, html = demo
    assert 'id="uncertainty"' not in html and "chart-delivery" not in html


def test_recorded_lots_are_shown_under_their_steps_with_the_plans_numbers():
    """With a record: each step lists its lots; the numbers read back are the JSON record's."""
    plan = routeplan.plan_route(routeplan.load_route(LINEAR), record=ROOT / "demo_routes" / "record.yaml")
    html = plan_html(plan)
    lots = routeplan.plan_to_dict(plan)["record"]["lots"]
    assert lots
    assert 'id="record"' in html
    for sid in {lot["step"] for lot in lots}:
        section = html.split(f'<section class="step" id="step-{sid}"', 1)[1].split("</section>", 1)[0]
        block = section.split('class="extra record"', 1)[1]
        cells = parse(block).cells
        for key in ("charged_kg", "mass_kg", "yield", "assay"):
            got = [float(a["data-value"]) for a, _t in cells if a.get("data-key") == key]
            want = [lot[key] for lot in lots if lot["step"] == sid]
            assert got == pytest.approx(want, rel=1e-12), (sid, key)
    without = plan_html(routeplan.plan_route(routeplan.load_route(LINEAR)))
    assert 'id="record"' not in without and "Lots recorded" not in without


def test_schedule_section_shows_the_plans_vessels_and_timeline():
    """With cycle times (the demo has them): the vessels' busy hours read back are the JSON schedule's."""
    plan = routeplan.plan_route(routeplan.load_route(CONVERGENT))
    assert plan.schedule is not None
    html = plan_html(plan)
    section = html.split('<section id="schedule"', 1)[1].split("</section>", 1)[0]
    busy = [float(a["data-value"]) for a, _t in parse(section).cells if a.get("data-key") == "busy_h"]
    assert busy == pytest.approx([v["busy_h"] for v in routeplan.plan_to_dict(plan)["schedule"]["vessels"]], rel=1e-12)
    assert 'id="chart-timeline"' in section
    for v in plan.schedule.vessels:
        assert f">{v.vessel}<" in section


@pytest.mark.parametrize("path", [LINEAR, CONVERGENT], ids=["linear", "convergent"])
def test_summary_leads_with_the_safety_findings(path):
    """The summary names the highest criticality class and the steps not screened, counts the
    warnings, and the warnings come right after it, before the scheme (a reviewer reads them first)."""
    plan = routeplan.plan_route(routeplan.load_route(path))
    html = plan_html(plan)
    d = routeplan.plan_to_dict(plan)
    facts = {a["data-key"]: (a["data-value"], t) for a, t in parse(html).cells if "data-key" in a
             and "fact" in a.get("class", "")}
    classes = [s["safety"]["thermal"]["criticality_class"] for s in d["steps"]
               if s.get("safety") and s["safety"]["thermal"] and s["safety"]["thermal"]["criticality_class"]]
    value, text = facts["max_criticality_class"]
    if classes:
        assert float(value) == max(classes)
        assert f"highest criticality class {max(classes)}" in text
    else:
        assert value == ""
    unscreened = [s["id"] for s in d["steps"] if s.get("safety") and s["safety"]["thermal"] is None]
    for sid in unscreened:
        assert sid in text.split("not screened:", 1)[1]
    assert float(facts["warnings"][0]) == len(d["warnings"])
    if d["warnings"]:
        assert html.index('id="summary"') < html.index('id="warnings"') < html.index('id="scheme"')


def test_no_step_screened_is_said_in_the_summary(tmp_path):
    text = (ROOT / "tests" / "data" / "routes" / "good.yaml").read_text(encoding="utf-8")
    plan = routeplan.plan_route(routeplan.load_route(write_route(tmp_path, text)))
    facts = {a["data-key"]: t for a, t in parse(plan_html(plan)).cells if "fact" in a.get("class", "")}
    assert "no step screened (no thermal data)" in facts["max_criticality_class"]
    assert "screening estimates" not in facts["max_criticality_class"]  # no figures to qualify
