"""Packs to order (:mod:`routeplan.plan.purchase`) and the purchase list.

Laws: the packs cover the need, and one pack fewer would not (the least packs); doubling
the pack size never needs more packs; a material marked ``bought: false`` gets no packs
and is left out of the purchase list, JSON and CSV, with a note saying so.
"""

from __future__ import annotations

import csv
import json

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import run_cli
from routeplan.plan.planner import plan_route
from routeplan.plan.purchase import NEED_REL_TOL, packs_to_order
from routeplan.route.load import load_route
from routeplan.views.purchase_rows import not_bought_note, purchase_rows

DEMO = "demo_routes/hx17-linear.yaml"

needs = st.floats(min_value=0.0, max_value=1e6, allow_nan=False, allow_infinity=False)
packs = st.floats(min_value=1e-3, max_value=1e4, allow_nan=False, allow_infinity=False)


@settings(max_examples=500, deadline=None)
@given(needs, packs)
def test_packs_cover_the_need_with_the_least_packs(need, pack):
    k = packs_to_order(need, pack)
    assert k >= 0
    assert k * pack >= need * (1 - NEED_REL_TOL)   # they cover it
    if k > 0:
        assert (k - 1) * pack < need                # one fewer would not


@settings(max_examples=200, deadline=None)
@given(needs, packs)
def test_bigger_packs_never_need_more_packs(need, pack):
    assert packs_to_order(need, 2 * pack) <= packs_to_order(need, pack)


def test_whole_packs_are_not_rounded_up_by_noise():
    assert packs_to_order(100.0 * (1 + 1e-12), 25.0) == 4
    assert packs_to_order(100.0 * (1 + 1e-6), 25.0) == 5


@pytest.mark.parametrize("need, pack", [(-1.0, 1.0), (1.0, 0.0), (float("nan"), 1.0)])
def test_bad_numbers_are_refused(need, pack):
    with pytest.raises(ValueError):
        packs_to_order(need, pack)


@pytest.fixture(scope="module")
def plan():
    return plan_route(load_route(DEMO))


def test_plan_packs_follow_the_need(plan):
    raws = {r.material: r for r in plan.raw_materials}
    for key in ("aminophenol", "K2CO3", "BrCH2CO2Et"):  # packs by mass
        r = raws[key]
        assert r.packs == packs_to_order(r.mass.m_as("kg"), r.pack.m_as("kg"))
        assert r.ordered.m_as("kg") >= r.mass.m_as("kg")
    for key in ("Ac2O", "NaOH50", "HCl6M", "toluene"):  # packs by volume: solutions in litres
        r = raws[key]
        assert r.packs == packs_to_order(r.volume.m_as("L"), r.pack.m_as("L"))
        assert r.ordered.m_as("L") >= r.volume.m_as("L")
    assert raws["water"].bought is False and raws["water"].packs is None
    assert raws["acetone"].pack is None and raws["acetone"].packs is None


def test_purchase_list_leaves_out_what_is_not_bought(plan):
    rows = purchase_rows(plan)
    assert "water" not in [r["material"] for r in rows]
    assert len(rows) == len(plan.raw_materials) - 1
    assert "process water (water)" in not_bought_note(plan)
    hcl = next(r for r in rows if r["material"] == "HCl6M")
    assert hcl["need_L"] is not None and hcl["pack"] == "25 L"


def test_json_and_csv_carry_the_packs(tmp_path):
    out = tmp_path / "plan.json"
    result = run_cli("plan", DEMO, "--json", out, "--csv", tmp_path / "csv")
    assert result.exit_code == 0, result.output
    data = json.loads(out.read_text(encoding="utf-8"))
    raws = {r["material"]: r for r in data["raw_materials"]}
    assert raws["K2CO3"]["pack"] == {"mass_kg": 25.0}
    assert raws["HCl6M"]["pack"] == {"volume_L": 25.0}
    assert raws["HCl6M"]["ordered"] == {"volume_L": 25.0 * raws["HCl6M"]["packs"]}
    assert raws["water"]["bought"] is False and raws["water"]["packs"] is None
    with open(tmp_path / "csv" / "purchases.csv", encoding="utf-8", newline="") as fh:
        rows = list(csv.reader(fh))[:-1]  # the last row is the caution
    assert rows[0] == ["key", "material", "needed [kg]", "needed [L]", "pack", "packs to order [-]", "ordered"]
    assert "water" not in [r[0] for r in rows[1:]]
    assert "not bought" in result.stdout or "not bought" in result.output
