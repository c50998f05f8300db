"""The HTML report shows a plan in the terminal's one set of units (``--units``, or by the target).

Each number shown is checked against the JSON plan written in the same run (its fixed
units: kg, L, mol), divided by the unit's size in those units from the SI prefixes
(NIST SP 811, 2008: milli 1e-3, kilo 1e3), and written by the rule of
:mod:`routeplan.views.numbers` (4 significant figures).  Read back with the standard
library's html.parser; the page in a browser is checked in test_report_chromium.py.
"""

from __future__ import annotations

import html as htmllib
import json
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest

from conftest import run_cli
from routeplan.views.numbers import sig

ROOT = Path(__file__).resolve().parents[2]
LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"

#: Size of each unit shown in mol, kg or L: SI prefixes, NIST SP 811 (2008), tables 5 and 6.
SIZE = {"mmol": 1e-3, "mol": 1.0, "kmol": 1e3, "g": 1e-3, "kg": 1.0, "mL": 1e-3, "L": 1.0}
#: The column key of the charge table -> the kind the JSON plan gives it in.
COLUMN_KIND = {"mol": "amount", "mass_kg": "mass", "volume_L": "volume",
               "batch_mass_kg": "mass", "batch_volume_L": "volume"}


class _Cells(HTMLParser):
    """Every numeric table cell (its data-key, data-value and text) and every heading, by step
    (a step's id, else the id of the section they are in)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.step: str | None = None
        self.cells: list[tuple[str | None, str, float | None, str]] = []
        self.heads: dict[str | None, list[str]] = {}
        self._cell: list | None = None
        self._th: list[str] | None = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "section" and a.get("class") == "step":
            self.step = a["data-step"]
        elif tag == "section":
            self.step = a.get("id")
        if tag == "td" and a.get("class") == "num":
            value = a.get("data-value")
            self._cell = [self.step, a["data-key"], float(value) if value else None, []]
        if tag == "th":
            self._th = []

    def handle_endtag(self, tag):
        if tag == "td" and self._cell is not None:
            step, key, value, parts = self._cell
            self.cells.append((step, key, value, "".join(parts)))
            self._cell = None
        if tag == "th" and self._th is not None:
            self.heads.setdefault(self.step, []).append("".join(self._th))
            self._th = None

    def handle_data(self, data):
        if self._cell is not None:
            self._cell[3].append(data)
        if self._th is not None:
            self._th.append(data)


def _cells(page: str) -> _Cells:
    p = _Cells()
    p.feed(page)
    return p


def _write(tmp_path: Path, name: str, *options: str):
    """The report and the JSON plan of one run of ``plan``, and what it printed (no ``-q``)."""
    page, plan_json = tmp_path / f"{name}.html", tmp_path / f"{name}.json"
    r = run_cli("plan", LINEAR, "--html", page, "--json", plan_json, *options)
    assert r.exit_code == 0, r.output
    return page.read_text(encoding="utf-8"), json.loads(plan_json.read_text(encoding="utf-8")), r.output


def _summary(page: str, key: str) -> str:
    m = re.search(rf'<div class="fact" data-key="{key}"[^>]*><dt>[^<]*</dt><dd>([^<]*)</dd>', page)
    assert m, key
    return htmllib.unescape(m.group(1))


def _fact(page: str, step: str, label: str) -> str:
    section = page.split(f'<section class="step" id="step-{step}"', 1)[1].split("</dl>", 1)[0]
    m = re.search(rf"<dt>{label}</dt><dd>([^<]*)</dd>", section)
    assert m, (step, label)
    return htmllib.unescape(m.group(1))


def _shown(value: float, unit: str) -> str:
    return f"{sig(value / SIZE[unit])} {unit}"


def _check_units(page: str, data: dict, amount: str, mass: str, volume: str) -> None:
    """Summary, each step's facts, charge table and per-batch columns, raw materials and the
    scheme's masses read in the one set given, to the JSON plan's numbers."""
    unit = {"amount": amount, "mass": mass, "volume": volume}
    target = data["target"]
    assert _summary(page, "target_mass_kg").startswith(f"{_shown(target['mass_kg'], mass)} of HX17 (")
    assert _summary(page, "target_mol") == _shown(target["mol"], amount)
    assert _summary(page, "units").startswith(f"n [{amount}], m [{mass}], V [{volume}] (--units ")
    cells = _cells(page)
    n_checked = 0
    for st in data["steps"]:
        sid = st["id"]
        product = st["product"]
        assert _fact(page, sid, "makes").startswith(
            f"{_shown(product['mol'], amount)} {product['material']} ({_shown(product['mass_kg'], mass)} ")
        n = st["batches"]
        assert _fact(page, sid, "batches").startswith(
            f"{n} batch{'es' if n != 1 else ''} of {_shown(st['batch_volume_L'], volume)} in {st['vessel']}")
        heads = cells.heads[sid]
        assert heads[4:7] == [f"n [{amount}]", f"m [{mass}]", f"V [{volume}]"], heads
        if n > 1:
            assert heads[7:9] == [f"m/batch [{mass}]", f"V/batch [{volume}]"], heads
        shown = [(k, v, t) for s, k, v, t in cells.cells if s == sid and k in COLUMN_KIND]
        want = []
        for c in st["charges"]:
            want += [("mol", c["mol"]), ("mass_kg", c["mass_kg"]), ("volume_L", c["volume_L"])]
            if n > 1:
                want += [("batch_mass_kg", c["mass_kg"] / n),
                         ("batch_volume_L", None if c["volume_L"] is None else c["volume_L"] / n)]
        assert [k for k, _v, _t in shown] == [k for k, _v in want], sid
        for (key, value, text), (_k, w) in zip(shown, want):
            if w is None:
                assert value is None and text == "–"
                continue
            assert value == pytest.approx(w, rel=1e-12), (sid, key)  # the number behind stays in mol, kg, L
            assert text == sig(w / SIZE[unit[COLUMN_KIND[key]]]), (sid, key, text, w)
            n_checked += 1
    assert n_checked >= 2 * sum(len(st["charges"]) for st in data["steps"])  # a volume needs a density
    assert cells.heads["raw-materials"][:4] == ["material", "name", f"mass [{mass}]", f"volume [{volume}]"]
    raw = [(v, t) for s, k, v, t in cells.cells if s == "raw-materials" and k == "mass_kg"]
    assert [t for _v, t in raw] == [sig(r["mass_kg"] / SIZE[mass]) for r in data["raw_materials"]]
    # the scheme: each product's mass made, and the target's
    made = [htmllib.unescape(x) for x in re.findall(r'class="text">made ([^<]*)</text>', page)]
    intermediates = [st["product"]["mass_kg"] for st in data["steps"] if st["product"]["material"] != "HX17"]
    assert made == [_shown(kg, mass) for kg in intermediates]
    assert re.search(rf'class="mark">target · {re.escape(_shown(target["mass_kg"], mass))}</text>', page)


def test_a_50_g_plan_shows_grams_millimoles_and_millilitres_throughout(tmp_path):
    page, data, _out = _write(tmp_path, "lab", "--target", "50 g", "-q")
    _check_units(page, data, "mmol", "g", "mL")
    # 50 g asked, 2 % overage (the demo route's): the summary as the terminal's header writes it
    assert _summary(page, "target_mass_kg") == "51.00 g of HX17 (50.00 g + 2 % overage)"
    # no amount, mass or volume of the plan left in kg, L or mol in the summary, facts or scheme
    fixed = re.compile(r"\d (?:kg|L|mol|kmol)\b(?!/)")
    for key in ("target_mass_kg", "target_mol"):
        assert not fixed.search(_summary(page, key))
    steps = [st["id"] for st in data["steps"]]
    for sid in steps:
        for label in ("makes", "batches"):
            assert not fixed.search(_fact(page, sid, label)), (sid, label)
    scheme = page.split('<svg class="scheme"', 1)[1].split("</svg>", 1)[0]
    assert not fixed.search(htmllib.unescape(re.sub(r"<[^>]+>", " ", scheme)))


def test_a_500_kg_plan_counts_moles_in_kilomoles(tmp_path):
    page, data, _out = _write(tmp_path, "plant", "--target", "500 kg", "-q")
    _check_units(page, data, "kmol", "kg", "L")


def test_units_asked_on_the_command_line_reach_the_report(tmp_path):
    """``--units g,mmol,mL`` on a 25 kg plan: the report's units are those the terminal prints."""
    page, data, out = _write(tmp_path, "asked", "--target", "25 kg", "--units", "g,mmol,mL")
    _check_units(page, data, "mmol", "g", "mL")
    legend = re.search(r"units of the whole plan: (.*)", out).group(1).strip()
    assert _summary(page, "units") == legend
    assert "m [g]" in out and "n [mmol]" in out
    # the same plan in its own units (kilo at 25 kg): the numbers behind are the same, the
    # text a thousandth (4 significant figures of the same number)
    kilo, kilo_data, _ = _write(tmp_path, "kilo", "--target", "25 kg", "-q")
    _check_units(kilo, kilo_data, "mol", "kg", "L")
    asked, own = _cells(page).cells, _cells(kilo).cells
    assert [(s, k, v) for s, k, v, _t in asked] == [(s, k, v) for s, k, v, _t in own]
    for (_s, key, value, text), (_s2, _k, _v, text2) in zip(asked, own):
        if key in COLUMN_KIND and value:
            assert float(text.replace(" ", "")) == pytest.approx(1000 * float(text2.replace(" ", "")), rel=1e-3)


def test_the_notebook_block_and_the_library_default_follow_the_target():
    """``plan_html`` without units takes the set by the target's mass, as ``plan`` without --units."""
    import routeplan
    from routeplan.export.html import plan_html
    from routeplan.views.display_units import SETS

    plan = routeplan.plan_route(routeplan.load_route(LINEAR), "50 g")
    assert "m [g]" in plan_html(plan) and "m [kg]" not in plan_html(plan)
    assert "n [mol]" in plan_html(plan, units=SETS["kilo"])
    block = routeplan.report(plan)._repr_html_()
    assert "(--units lab)" in block and "51.00 g of HX17" in block
