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


# --- with a stock list: the packs cover what is left to buy -------------------------------

STOCK = "demo_routes/stock.yaml"


@pytest.fixture(scope="module")
def stocked():
    return plan_route(load_route(DEMO), stock=STOCK)


def test_with_stock_the_packs_cover_only_what_is_left_to_buy(stocked):
    raws = {r.material: r for r in stocked.raw_materials}
    # demo_routes/stock.yaml: 25 kg of ethyl bromoacetate on hand for a need of 25.93 kg:
    # 0.93 kg to buy, one 5 kg pack (it was 6 packs, 30 kg, for the whole need)
    brome = raws["BrCH2CO2Et"]
    assert brome.stock_m_kg == 25.0
    assert brome.buy_m_kg == pytest.approx(brome.m_kg - 25.0, rel=1e-12)
    assert brome.packs == 1 and brome.ordered.m_as("kg") == 5.0
    # stock that covers the need orders no pack: 30 kg of aminophenol for 16 kg, 200 kg
    # of toluene for 196.5 kg (a pack by volume: 0 L to buy)
    for key in ("aminophenol", "toluene", "K2CO3", "Ac2O"):
        assert raws[key].buy_m_kg == 0.0 and raws[key].packs == 0, key
    assert raws["toluene"].buy_V_L == 0.0
    # not in the stock list: the whole need, packs as without a stock
    plain = {r.material: r for r in plan_route(load_route(DEMO)).raw_materials}
    for key in ("NaOH50", "HCl6M"):
        assert raws[key].stock_m_kg is None and raws[key].packs == plain[key].packs
    # the stock's own "to buy" is the same shortfall
    to_buy = {k: m.m_as("kg") for k, m in stocked.stock.to_buy}
    assert to_buy["BrCH2CO2Et"] == pytest.approx(brome.buy_m_kg, rel=1e-12)
    assert "toluene" not in to_buy


stock_kg = st.floats(min_value=0.0, max_value=600.0, allow_nan=False, allow_infinity=False)


@settings(max_examples=300, deadline=None)
@given(st.dictionaries(st.sampled_from(["aminophenol", "Ac2O", "K2CO3", "BrCH2CO2Et", "NaOH50", "HCl6M",
                                        "toluene"]), stock_kg))
def test_law_packs_cover_need_less_stock_with_the_least_packs(plan, on_hand):
    from routeplan.plan.purchase import with_packs

    for r in with_packs(plan.route, plan.raw_materials, on_hand):
        if r.packs is None:
            continue
        have = on_hand.get(r.material, 0.0)
        if r.pack_unit == "kg":
            left = max(0.0, r.m_kg - have)
        else:  # by volume: the mass left in litres, at the material's density
            left = max(0.0, r.m_kg - have) * r.V_L / r.m_kg
        assert r.packs * r.pack_size >= left * (1 - NEED_REL_TOL) - 1e-12  # they cover it
        if r.packs > 0:
            assert (r.packs - 1) * r.pack_size < left                     # one fewer would not


def test_with_stock_the_purchase_list_says_what_comes_from_stock(stocked, tmp_path):
    rows = {r["material"]: r for r in purchase_rows(stocked)}
    assert rows["BrCH2CO2Et"]["stock_kg"] == 25.0 and rows["BrCH2CO2Et"]["packs"] == 1
    assert rows["NaOH50"]["stock_kg"] == 0.0 and rows["NaOH50"]["buy_L"] == pytest.approx(
        rows["NaOH50"]["need_L"], rel=1e-12)
    result = run_cli("plan", DEMO, "--stock", STOCK, "--json", tmp_path / "p.json", "--csv", tmp_path / "csv")
    assert result.exit_code == 0, result.output
    assert "To order, whole campaign, less the stock on hand" in result.stdout
    raws = {r["material"]: r for r in json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))["raw_materials"]}
    assert raws["BrCH2CO2Et"]["stock_kg"] == 25.0 and raws["BrCH2CO2Et"]["packs"] == 1
    assert raws["toluene"]["to_buy"] == {"mass_kg": 0.0, "volume_L": 0.0} and raws["toluene"]["packs"] == 0
    with open(tmp_path / "csv" / "purchases.csv", encoding="utf-8", newline="") as fh:
        head = next(csv.reader(fh))
    assert head[4:7] == ["from stock [kg]", "to buy [kg]", "to buy [L]"]


def test_with_stock_process_water_is_never_to_buy(stocked):
    # water is 'bought: false' in the demo and not in demo_routes/stock.yaml: it is not
    # to buy, nor "not in stock, to buy in full"; the stock lines say why
    from routeplan.export.json import plan_to_dict
    from routeplan.views.stock_text import stock_lines

    assert "water" not in {k for k, _m in stocked.stock.to_buy}
    lines = stock_lines(stocked)
    assert not any(line.strip().startswith("water:") for line in lines)
    full = next(line for line in lines if "to buy in full" in line)
    assert "water" not in full and "EtOH" in full
    assert any("not bought, so not listed: process water (water)" in line for line in lines)
    data = plan_to_dict(stocked)["stock"]
    assert "water" not in data["not_in_stock"] and "water" not in {r["material"] for r in data["to_buy"]}


def test_process_water_listed_short_in_the_stock_is_still_never_to_buy():
    # a 'bought: false' material that the stock lists with less than the need is still
    # not to buy (it comes from the site's supply); before, only an unlisted one was left out
    from routeplan.plan.planner import plan_route
    from routeplan.route.load import load_route
    from routeplan.units import Q

    plan = plan_route(load_route(DEMO), stock={"water": Q(1, "kg")})
    assert "water" not in {k for k, _m in plan.stock.to_buy}
    assert not next(r for r in plan.raw_materials if r.material == "water").bought
