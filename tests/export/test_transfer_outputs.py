"""What a telescoped step passes on, in every output: terminal, JSON, CSV and HTML report.

Route ``tests/data/routes/telescoped-wash.yaml`` (worked by hand in
``tests/plan/test_transfer.py``): T1's water wash leaves; T2 gets 92.245 L of T1's
mixture (46.12 L in each of T1's two batches).
"""

from __future__ import annotations

import json
import re

import pytest

from conftest import DATA, run_cli, words
from routeplan.export.html import plan_html
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route

WASH = DATA / "routes" / "telescoped-wash.yaml"
SENTENCE = "goes on in solution to T2: 46.12 L of mixture (40.39 kg) per batch; " \
           "separated and discarded before the transfer: water"


def test_the_terminal_says_what_goes_on_and_what_is_separated():
    result = run_cli("plan", WASH)
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert SENTENCE in words(out)  # the terminal folds long lines to its width (issue 19)
    assert re.search(r"water \(separated\)\s+workup", out)
    assert "ester (T1, in solution)" in out and "92.25 L of its mixture carried in" in words(out)


def test_json_carries_leaves_and_the_transfer(tmp_path):
    result = run_cli("plan", WASH, "--json", tmp_path / "p.json", "-q")
    assert result.exit_code == 0, result.output
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    t1, t2 = data["steps"]
    assert [c["leaves"] for c in t1["charges"]] == [False, False, False, False, True]
    # per batch, T1 runs in two: 92.245 L and 80.787 kg over the campaign
    assert t1["transfer_volume_L"] == pytest.approx(92.245 / 2, abs=1e-3)
    assert t1["transfer_mass_kg"] == pytest.approx(80.787 / 2, abs=1e-3)
    assert t2["transfer_volume_L"] is None and t2["charges"][0]["carried_from"] == "T1"
    assert t2["charges"][0]["volume_L"] == pytest.approx(92.245, abs=1e-3)
    waste = {s["step"]: s for s in data["waste"]["steps"]}
    assert waste["T1"]["separated_materials"] == ["water"]
    assert waste["T1"]["separated_kg"] == pytest.approx(t1["charges"][4]["mass_kg"], rel=1e-12)


def test_the_html_report_says_what_goes_on():
    html = plan_html(plan_route(load_route(WASH)))
    assert SENTENCE in html
    assert "water (separated)" in html
