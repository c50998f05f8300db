"""The comparison workbook printed by a real spreadsheet (LibreOffice headless, to PDF),
read back with poppler's ``pdfinfo`` and ``pdftotext``.

* It prints landscape (every page wider than tall) on at most two pages, fitted to one
  page wide: every route's column is on the first page.
* No heading is clipped: every column heading, every route label and every measure
  shows whole in the printed text (wrapped over lines, never cut at a cell's edge).
"""

from __future__ import annotations

import re
import shutil
import subprocess

import pytest

from routeplan.export.compare_out import write_comparison_xlsx
from routeplan.plan.compare import compare_plans, plan_for_comparison
from routeplan.route.load import load_route
from routeplan.views.compare_words import shown_rows
from conftest import missing_tool
from soffice_helpers import SOFFICE, run_soffice

pytestmark = pytest.mark.slow

ROUTES = ("demo_routes/hx17-linear.yaml", "demo_routes/hx17-convergent.yaml")


@pytest.fixture(scope="module")
def printed(tmp_path_factory):
    if SOFFICE is None or shutil.which("pdftotext") is None or shutil.which("pdfinfo") is None:
        missing_tool("LibreOffice (soffice) and poppler (pdftotext, pdfinfo) are needed to print the comparison")
    base = tmp_path_factory.mktemp("compare-print")
    plans, notes = plan_for_comparison([load_route(p) for p in ROUTES])
    cmp = compare_plans(plans, notes)
    book = base / "compare.xlsx"
    write_comparison_xlsx(cmp, book)
    out = base / "out"
    run_soffice([book], out, base / "profile", to="pdf")
    pdf = out / "compare.pdf"
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
    pages = int(re.search(r"^Pages:\s+(\d+)", info, re.M).group(1))
    size = re.search(r"^Page size:\s+([\d.]+) x ([\d.]+)", info, re.M)
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True,
                          check=True).stdout
    first = subprocess.run(["pdftotext", "-f", "1", "-l", "1", str(pdf), "-"], capture_output=True, text=True,
                           check=True).stdout
    return cmp, pages, (float(size.group(1)), float(size.group(2))), text, first


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_it_prints_landscape_on_few_pages(printed):
    _cmp, pages, (w, h), _text, _first = printed
    assert w > h  # landscape
    assert 1 <= pages <= 2


def test_no_heading_is_clipped(printed):
    cmp, _pages, _size, text, first = printed
    flat_first = _flat(first)
    for heading in ("measure", "unit", "better", "best"):
        assert heading in flat_first, heading
    # a route label wraps within its column; its words all print, in order, on page 1
    words = flat_first.split()
    for label in cmp.labels:
        label_words = label.split()
        at = [i for i, w in enumerate(words) if w == label_words[0]]
        assert any(all(x in words[i:i + 40] for x in label_words) for i in at), label
    flat = _flat(text)
    for row in shown_rows(cmp):
        for word in row.heading.split():
            assert word in flat, (row.heading, word)
