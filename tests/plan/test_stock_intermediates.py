"""Intermediates on the shelf: the walk takes them first; worked by hand on a two-step route.

Route SHELF (invented numbers, balanced by molar mass):

    S1: A (153 g/mol) -> I (135 g/mol, isolated at 90 % assay) + W (18),  yield 80 %
        charges A, solv1 5 volumes (0.8 g/mL)
    S2: I + R (83 g/mol) -> P (200 g/mol) + W,  yield 100 %
        charges I, R 1.2 equiv, solv2 2 volumes (1.0 g/mL)

Without stock, for 20 kg of P: n(P) = 20 kg / 200 g/mol = 100 mol; S2 charges 100 mol of
I = 100 mol * 135 g/mol / 0.90 = 15.0 kg, R 120 mol * 83 g/mol = 9.96 kg, solv2
2 L/kg * 15 kg = 30 L = 30 kg.  S1 makes 100 mol of I from 100 / 0.80 = 125 mol of A =
19.125 kg, with solv1 5 L/kg * 19.125 kg = 95.625 L = 76.5 kg.
"""

import math

import pytest

import routeplan

from conftest import route_text
from routeplan.errors import StockError
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from routeplan.units import Q

SHELF = route_text("shelf.yaml")


@pytest.fixture(scope="module")
def route():
    return load_route_text(SHELF, "shelf.yaml")


def kg(n):
    return Q(n, "kg")


def masses(plan):
    return {r.material: r.mass.m_as("kg") for r in plan.raw_materials}


def charges(sp):
    return [(c.material, c.mol.m_as("mol"), c.mass.m_as("kg")) for c in sp.charges]


def test_route_has_no_warnings(route):
    # the hand-worked route is balanced: a test route that warns would hide real warnings
    assert not route.warnings


def test_no_stock_numbers(route):
    plan = plan_route(route)
    assert masses(plan) == pytest.approx({"A": 19.125, "solv1": 76.5, "R": 9.96, "solv2": 30.0})
    assert plan.step("S1").batches == 2  # 95.625 L in 80 L usable: 2 batches
    assert plan.step("S1").from_stock_mol is None and plan.step("S1").runs


def test_thirty_percent_on_the_shelf(route):
    free = plan_route(route)
    # 30 % of the 100 mol of I demanded: 30 mol * 135 g/mol / 0.90 = 4.5 kg as isolated
    plan = plan_route(route, stock={"I": kg(4.5)})
    s1, s2 = plan.step("S1"), plan.step("S2")
    assert s1.from_stock_mol.m_as("mol") == pytest.approx(30.0)
    assert s1.from_stock_mass.m_as("kg") == pytest.approx(4.5)
    assert s1.runs and not s1.covered_by_stock
    # S1 makes the other 70 mol: 87.5 mol of A = 13.3875 kg, solv1 66.9375 L = 53.55 kg
    assert s1.product_mol.m_as("mol") == pytest.approx(70.0)
    assert [m for _k, _n, m in charges(s1)] == pytest.approx([13.3875, 53.55])
    for (_k, n, m), (_k0, n0, m0) in zip(charges(s1), charges(free.step("S1"))):
        assert n == pytest.approx(0.7 * n0, rel=1e-12) and m == pytest.approx(0.7 * m0, rel=1e-12)
    assert s1.batches == 1  # 66.9375 L fits in 80 L
    # S2 is unchanged: it still charges all 100 mol (15 kg) of I, part of it from the shelf
    assert charges(s2) == charges(free.step("S2"))
    assert masses(plan) == pytest.approx({"A": 13.3875, "solv1": 53.55, "R": 9.96, "solv2": 30.0})
    # the yield from A stays the chemistry's: 100 mol P * 0.7 made / 87.5 mol A = 0.8
    assert plan.overall_yield.by_raw_material["A"] == pytest.approx(0.8, rel=1e-12)


def test_stock_covers_the_intermediate(route):
    plan = plan_route(route, stock={"I": kg(20), "R": kg(5)})
    s1 = plan.step("S1")
    # 20 kg is 133.3 mol; 100 mol (15 kg) are taken, the rest stays on the shelf
    assert s1.from_stock_mol.m_as("mol") == pytest.approx(100.0)
    assert s1.from_stock_mass.m_as("kg") == pytest.approx(15.0)
    assert not s1.runs and s1.covered_by_stock and "the stock of I covers it" in s1.not_run
    assert s1.batches == 0 and s1.batch.fill_fraction is None
    assert all(c.mass.m_as("kg") == 0 for c in s1.charges)
    assert masses(plan) == pytest.approx({"R": 9.96, "solv2": 30.0})
    # R: 9.96 - 5 = 4.96 kg; solv2 not in stock: all 30 kg; A and solv1 are not bought
    assert {k: m.m_as("kg") for k, m in plan.stock.to_buy} == pytest.approx({"R": 4.96, "solv2": 30.0})
    assert plan.metrics.pmi_by_step["S1"] is None and plan.metrics.atom_economy_by_step["S1"] is None
    assert plan.metrics.pmi_cumulative_by_step["S2"] == pytest.approx(plan.metrics.pmi, rel=1e-12)


def test_exact_cover_leaves_nothing_to_make(route):
    plan = plan_route(route, stock={"I": kg(15)})
    assert plan.step("S1").not_run is not None
    assert plan.step("S1").product_mol.m_as("mol") == 0


def test_largest_target_by_bisection(route):
    # need of A at target T [kg]: S1 makes 5 T - 30 mol of I (n(P) = 5 T mol, 30 mol on the
    # shelf), so A = 0.153 kg/mol * (5 T - 30) / 0.8 = 0.95625 T - 5.7375 kg.  With 15.3 kg of A
    # on hand: T = (15.3 + 5.7375) / 0.95625 = 22 kg.  Without the I stock it would be
    # 15.3 / 0.95625 = 16 kg.
    s = plan_route(route, stock={"I": kg(4.5), "A": kg(15.3)}).stock
    assert s.limited_by == "A"
    assert s.max_target.m_as("kg") == pytest.approx(22.0, rel=2e-9)
    assert s.max_target.m_as("kg") <= 22.0 * (1 + 1e-12)  # on the covered side
    # law: planning that target with the same stock needs no more A than is on hand
    again = plan_route(route, s.max_target, stock={"I": kg(4.5), "A": kg(15.3)})
    assert masses(again)["A"] <= 15.3 * (1 + 1e-9)
    assert masses(again)["A"] == pytest.approx(15.3, rel=1e-8)
    assert plan_route(route, stock={"A": kg(15.3)}).stock.max_target.m_as("kg") == pytest.approx(16.0, rel=1e-12)


def test_both_paths_agree_where_they_overlap(route):
    from routeplan.plan.stock_limit import largest_target

    # R is charged in S2 only, so its need (1.2 * 5 T mol * 0.083 kg/mol = 0.498 T kg) does not
    # depend on the I stock: 7.47 kg allows T = 15 kg on either path
    closed = plan_route(route, stock={"R": kg(7.47)}).stock
    bisected = plan_route(route, stock={"R": kg(7.47), "I": kg(4.5)}).stock
    assert closed.max_target.m_as("kg") == pytest.approx(15.0, rel=1e-12)
    assert bisected.max_target.m_as("kg") == pytest.approx(closed.max_target.m_as("kg"), rel=2e-9)
    assert closed.limited_by == bisected.limited_by == "R"
    # with an empty shelf the bisection finds the closed form: 15.3 kg of A -> 16 kg
    t, key = largest_target(route, kg(20), {"A": kg(15.3)}, {"I": kg(0)})
    assert key == "A" and t.m_as("kg") == pytest.approx(16.0, rel=2e-9)


def test_no_listed_raw_material_needed(route):
    # only the intermediate and a raw material the route does not use: no largest target
    s = plan_route(route, stock={"I": kg(4.5), "W": kg(1)}).stock
    assert s.max_target is None and s.limited_by is None


def test_more_intermediate_never_needs_more(route):
    # law: more of an intermediate on the shelf never raises any raw-material need
    before = None
    for amount in (0, 0.5, 2, 4.5, 10, 14.99, 15, 30):
        now = masses(plan_route(route, stock={"I": kg(amount)}))
        if before is not None:
            for key, mass in before.items():
                assert now.get(key, 0.0) <= mass * (1 + 1e-12), (amount, key)
        before = now


def test_more_intermediate_never_needs_more_convergent(good_text):
    route = load_route_text(good_text, "good.yaml")
    grid = [0, 1, 4, 12, 40]
    plans = {(p, e): masses(plan_route(route, stock={"paracetamol": kg(p), "ester": kg(e)}))
             for p in grid for e in grid}
    for (p, e), need in plans.items():
        for other in ((q, e) for q in grid if q > p):
            for key, mass in plans[other].items():
                assert mass <= need.get(key, 0.0) * (1 + 1e-12), (p, e, other, key)
        for other in ((p, f) for f in grid if f > e):
            for key, mass in plans[other].items():
                assert mass <= need.get(key, 0.0) * (1 + 1e-12), (p, e, other, key)


def test_upstream_of_a_covered_step_does_not_run(good_text):
    route = load_route_text(good_text, "good.yaml")
    plan = plan_route(route, stock={"ester": kg(1000)})
    # S2 is covered; S1 made paracetamol only for S2, so it does not run either
    assert plan.step("S2").covered_by_stock
    assert plan.step("S1").not_run == "it feeds only S2, which does not run"
    assert not plan.step("S1").covered_by_stock
    assert {sp.id for sp in plan.steps if sp.runs} == {"S3", "S4"}
    raws = {r.material: r for r in plan.raw_materials}
    assert "aminophenol" not in raws and "acetone" not in raws
    assert raws["water"].steps == ("S4",)  # water of S1 is not charged


def test_stock_without_intermediates_changes_nothing(good_text):
    route = load_route_text(good_text, "good.yaml")
    plain = routeplan.plan_to_dict(plan_route(route))
    with_raw = routeplan.plan_to_dict(plan_route(route, stock={"aminophenol": kg(5), "acetone": kg(100)}))
    assert with_raw.pop("stock")["intermediates"] == []
    # only what is left to buy follows the raw stock (and the packs with it): the walk does not
    bought = {r["material"]: (r.pop("stock_kg"), r.pop("to_buy"), r.pop("packs"), r.pop("ordered"))
              for r in with_raw["raw_materials"]}
    for r in plain["raw_materials"]:
        for key in ("stock_kg", "to_buy", "packs", "ordered"):
            r.pop(key)
    need = {r["material"]: r["mass_kg"] for r in plain["raw_materials"]}
    assert bought["aminophenol"][0] == 5.0 and bought["aminophenol"][1]["mass_kg"] == need["aminophenol"] - 5.0
    assert bought["acetone"][0] == need["acetone"] < 100.0 and bought["acetone"][1]["mass_kg"] == 0.0
    assert with_raw == plain
    # an intermediate listed at 0 kg takes nothing: every number is as without stock
    with_zero = routeplan.plan_to_dict(plan_route(route, stock={"paracetamol": kg(0)}))
    with_zero.pop("stock")
    for r in with_zero["raw_materials"]:  # the stock names no raw material: all of it to buy
        assert r.pop("stock_kg") is None and r.pop("to_buy")["mass_kg"] == r["mass_kg"]
        r.pop("packs"), r.pop("ordered")
    assert with_zero["steps"][0].pop("from_stock_mol") == 0.0
    assert with_zero["steps"][0].pop("from_stock_kg") == 0.0
    plain["steps"][0].pop("from_stock_mol"), plain["steps"][0].pop("from_stock_kg")
    assert with_zero == plain


def test_metrics_count_the_stock_as_input(route):
    free = plan_route(route).metrics
    m = plan_route(route, stock={"I": kg(4.5)}).metrics
    # without stock: (19.125 + 76.5 + 9.96 + 30) kg / 20 kg = 6.77925
    assert free.pmi == pytest.approx(135.585 / 20, rel=1e-12)
    # with 4.5 kg of I from stock: raw 13.3875 + 53.55 + 9.96 + 30 = 106.8975 kg, plus 4.5 kg of I
    assert m.pmi == pytest.approx(111.3975 / 20, rel=1e-12)
    assert m.e_factor_complete == pytest.approx(111.3975 / 20 - 1, rel=1e-12)
    # sEF leaves out solvents: (13.3875 + 9.96 + 4.5 - 20) / 20 = 0.392375 (0.167375 if the
    # stock were left out, which would flatter the route)
    assert m.e_factor_simple == pytest.approx(0.392375, rel=1e-12)
    assert dict(m.from_stock_per_kg_target) == pytest.approx({"I": 4.5 / 20})
    assert sum(m.mass_per_kg_target.values()) + sum(m.from_stock_per_kg_target.values()) == pytest.approx(m.pmi)
    # cumulative PMI: S1 is per kg of what it makes, 66.9375 kg / 10.5 kg = 6.375, as without
    # stock (95.625 / 15); at the target step it is the route PMI, the stock included
    assert m.pmi_cumulative_by_step["S1"] == pytest.approx(6.375, rel=1e-12)
    assert m.pmi_cumulative_by_step["S2"] == pytest.approx(m.pmi, rel=1e-12)
    assert dict(free.from_stock_per_kg_target) == {}


@pytest.mark.parametrize(
    "text, fragment",
    [
        ("I: -2 kg\n", "negative"),
        ("I: 5 L\n", "no density"),
        ("P: 5 kg\n", "is the target of the route"),
    ],
)
def test_bad_intermediate_stock(tmp_path, route, text, fragment):
    p = tmp_path / "stock.yaml"
    p.write_text(text)
    with pytest.raises(StockError) as info:
        plan_route(route, stock=p)
    assert fragment in str(info.value) and "stock.yaml:1" in str(info.value)


def test_bad_intermediate_stock_as_mapping(route, good_text):
    with pytest.raises(StockError, match="negative"):
        plan_route(route, stock={"I": kg(-1)})
    with pytest.raises(StockError, match="telescoped step S3"):
        plan_route(load_route_text(good_text, "good.yaml"), stock={"salt": kg(1)})


def test_intermediate_volume_with_density(tmp_path):
    # I given a density of 1.25 g/mL: 3.6 L is 4.5 kg, the same 30 % as above
    route = load_route_text(SHELF.replace("assay: 90 %}", "assay: 90 %, density: 1.25 g/mL}"), "d.yaml")
    p = tmp_path / "stock.csv"
    p.write_text("material,amount,unit\nI,3.6,L\n")
    plan = plan_route(route, stock=p)
    assert math.isclose(plan.step("S1").from_stock_mass.m_as("kg"), 4.5, rel_tol=1e-12)
