"""Waste streams, by-products and the cost of goods (ROUTE-FORMAT.md, "Time, plant and waste")."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import GOOD_ROUTE, run_cli, write_route
from routeplan.errors import RouteError
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.plan.waste import stream_of
from routeplan.route.load import load_route, load_route_text
from routeplan.route.model import Material, Solution
from routeplan.units import Q

ROOT = Path(__file__).resolve().parents[2]
DEMO = sorted((ROOT / "demo_routes").glob("hx17-*.yaml"))
DOCS_EXAMPLE = ROOT / "docs" / "route-file.md"

# Standard atomic weights [g/mol], CIAAW 2021 (abridged values for H, C, N, O; Na exact).
H, C, N, O, NA = 1.008, 12.011, 14.007, 15.999, 22.98976928

TWO_STEPS = """
route: two steps to sodium paracetamolate
currency: EUR
target: {material: salt, amount: %(amount)s}
waste_prices: {aqueous: 0.2, organic: 0.9, halogenated: 2.5}
materials:
  aminophenol: {formula: C6H7NO, price: 20}
  Ac2O: {formula: C4H6O3, density: 1.08 g/mL, price: 3}
  AcOH: {formula: C2H4O2}
  water: {formula: H2O, density: 1.00 g/mL, price: 0.01}
  paracetamol: {formula: C8H9NO2}
  NaOH: {formula: NaOH, price: 1}
  EtOH: {formula: C2H6O, density: 0.789 g/mL, price: 1.5}
  DCM: {name: dichloromethane, formula: CH2Cl2, density: 1.33 g/mL, price: 2}
  salt: {formula: C8H8NNaO2}
equipment:
  R1: {volume: 1000 L, rate: 50}
  R2: {volume: 1000 L, rate: 80}
steps:
  - id: S1
    equation: aminophenol + Ac2O -> paracetamol + AcOH
    yield: 100 %%
    vessel: R1
    cycle_time: 10 h
    charges:
      - {material: aminophenol}
      - {material: water, volumes: 2}
      - {material: Ac2O, equiv: 1.0}
  - id: S2
    equation: paracetamol + NaOH -> salt + water
    yield: 100 %%
    vessel: R2
    cycle_time: 6 h
    charges:
      - {material: paracetamol}
      - {material: EtOH, volumes: 5}
      - {material: NaOH, equiv: 1.0}
      - {material: DCM, volumes: 1, role: workup}
"""

M_AMINOPHENOL = 6 * C + 7 * H + N + O
M_AC2O = 4 * C + 6 * H + 3 * O
M_PARACETAMOL = 8 * C + 9 * H + N + 2 * O
M_NAOH = NA + O + H
M_SALT = 8 * C + 8 * H + N + NA + 2 * O
M_ACOH = 2 * C + 4 * H + 2 * O
M_WATER = 2 * H + O


def _two_steps(mol: float = 10.0):
    return plan_route(load_route_text(TWO_STEPS % {"amount": f"{mol * M_SALT / 1000!r} kg"}))


def test_cost_of_goods_by_hand_on_a_two_step_route():
    plan = _two_steps(10.0)  # 10 mol of salt at 100 % yields: 10 mol through both steps
    cog = plan.cost_of_goods
    aminophenol, ac2o = 10 * M_AMINOPHENOL / 1000, 10 * M_AC2O / 1000  # [kg]
    water = 2 * aminophenol * 1.00  # 2 L per kg of limiting reagent x 1.00 kg/L
    paracetamol = 10 * M_PARACETAMOL / 1000
    naoh = 10 * M_NAOH / 1000
    etoh = 5 * paracetamol * 0.789
    dcm = 1 * paracetamol * 1.33
    raw = aminophenol * 20 + ac2o * 3 + water * 0.01 + naoh * 1 + etoh * 1.5 + dcm * 2
    assert cog.raw_materials.amount == pytest.approx(raw, rel=1e-9)
    assert [sp.batches for sp in plan.steps] == [1, 1]  # 1000 L vessels: one batch each
    assert cog.plant.amount == pytest.approx(1 * 10 * 50 + 1 * 6 * 80, rel=1e-12)  # batches x h x rate
    # streams: water (S1 solvent) aqueous, EtOH organic, DCM (work-up) halogenated
    assert cog.waste.amount == pytest.approx(water * 0.2 + etoh * 0.9 + dcm * 2.5, rel=1e-9)
    target = 10 * M_SALT / 1000
    assert cog.per_kg == pytest.approx((raw + 980 + water * 0.2 + etoh * 0.9 + dcm * 2.5) / target, rel=1e-9)
    assert cog.complete and all(not p.unpriced for p in cog.parts.values())
    d = plan_to_dict(plan)["cost_of_goods"]
    assert set(d) >= {"raw_materials", "plant", "waste", "per_kg", "unpriced"}
    # the by-products by hand: 10 mol AcOH in S1, 10 mol water in S2
    w = plan.waste
    assert w.step("S1").by_products_kg == pytest.approx(10 * M_ACOH / 1000, rel=1e-9)
    assert w.step("S2").by_products_kg == pytest.approx(10 * M_WATER / 1000, rel=1e-9)
    # residue of S2 = NaOH + paracetamol - salt = the water formed (full conversion, 100 % yield)
    assert w.step("S2").campaign.residue_kg == pytest.approx(10 * M_WATER / 1000, rel=1e-6)


def test_missing_prices_are_listed_never_counted_as_zero():
    text = TWO_STEPS % {"amount": "1 kg"}
    text = text.replace("  R2: {volume: 1000 L, rate: 80}", "  R2: {volume: 1000 L}")
    text = text.replace("waste_prices: {aqueous: 0.2, organic: 0.9, halogenated: 2.5}",
                        "waste_prices: {aqueous: 0.2}")
    text = text.replace("  NaOH: {formula: NaOH, price: 1}", "  NaOH: {formula: NaOH}")
    cog = plan_route(load_route_text(text)).cost_of_goods
    assert cog.plant.unpriced == ("R2",) and cog.plant.amount == pytest.approx(500.0)
    assert cog.waste.unpriced == ("organic", "halogenated")
    assert cog.raw_materials.unpriced == ("NaOH",)
    assert not cog.complete
    d = plan_to_dict(plan_route(load_route_text(text)))["cost_of_goods"]
    assert d["unpriced"] == {"raw_materials": ["NaOH"], "plant": ["R2"], "waste": ["organic", "halogenated"]}
    # nothing priced in a part: null, not zero
    bare = text.replace("waste_prices: {aqueous: 0.2}\n", "").replace(", rate: 50", "")
    cog = plan_route(load_route_text(bare)).cost_of_goods
    assert cog.plant.amount is None and cog.waste.amount is None and cog.per_kg is not None


def _loadable_routes():
    """Every route file of the demo and the tests that loads (the bad-route tests change good.yaml)."""
    import re

    paths = list(DEMO) + [GOOD_ROUTE]
    out = [(p.name, p.read_text(encoding="utf-8")) for p in paths]
    out.append(("docs example", re.findall(r"```yaml\n(.*?)```", DOCS_EXAMPLE.read_text(encoding="utf-8"),
                                              re.S)[0]))
    out.append(("two steps", TWO_STEPS % {"amount": "3 kg"}))
    return out


ROUTES = _loadable_routes()


@pytest.mark.parametrize("name,text", ROUTES, ids=[n for n, _ in ROUTES])
def test_mass_balance_inputs_equal_product_plus_waste(name, text):
    plan = plan_route(load_route_text(text))
    w = plan.waste
    assert math.isclose(w.inputs_kg, w.product_kg + w.waste_kg, rel_tol=1e-9), name
    assert abs(w.balance_error) < 1e-9
    for sw in w.steps:  # each step: everything charged = product taken on + its streams + residue
        assert math.isclose(sw.inputs_kg, sw.product_kg + sw.campaign.total_kg, rel_tol=1e-9, abs_tol=1e-12)
        # the by-products from the equation are at most the waste
        assert sw.by_products_kg <= sw.waste_kg * (1 + 1e-9) + 1e-12, sw.step
    # the complete E-factor is waste per kg of product (Roschangar, Sheldon and
    # Senanayake, Green Chem. 2015, 17, 752: cEF = PMI - 1, everything but the product)
    assert math.isclose(w.waste_kg / w.product_kg, plan.metrics.e_factor_complete, rel_tol=1e-9)


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
@settings(max_examples=10, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(target=st.floats(min_value=0.05, max_value=2000.0))
def test_doubling_the_target_doubles_every_stream(path, target):
    route = load_route(path)
    one, two = plan_route(route, Q(target, "kg")).waste, plan_route(route, Q(2 * target, "kg")).waste
    for a, b in zip(one.steps + (one,), two.steps + (two,)):
        x, y = (a.campaign, b.campaign) if hasattr(a, "campaign") else (a.total, b.total)
        for name in ("aqueous_kg", "organic_kg", "halogenated_kg", "residue_kg"):
            assert math.isclose(getattr(y, name), 2 * getattr(x, name), rel_tol=1e-9, abs_tol=1e-12), name


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
def test_a_batchs_waste_times_the_batches_is_the_steps_waste(path):
    plan = plan_route(load_route(path), "400 kg")  # several batches in every step
    for sw in plan.waste.steps:
        assert sw.batches > 1, sw.step
        for name in ("aqueous_kg", "organic_kg", "halogenated_kg", "residue_kg"):
            assert math.isclose(sw.batches * getattr(sw.per_batch, name), getattr(sw.campaign, name),
                                rel_tol=1e-9, abs_tol=1e-12), (sw.step, name)


def test_stream_of_follows_the_formula():
    # a chlorinated solvent is halogenated, water and aqueous solutions aqueous (ROUTE-FORMAT readings)
    assert stream_of(Material(key="DCM", name="dichloromethane", formula="CH2Cl2")) == "halogenated"
    assert stream_of(Material(key="PhCF3", name="trifluorotoluene", formula="C7H5F3")) == "halogenated"
    assert stream_of(Material(key="water", name="water", formula="H2O")) == "aqueous"
    brine = Material(key="brine", name="brine", formula="NaCl", solution=Solution(density=Q(1.2, "g/mL"),
                                                                                  mass_fraction=0.26))
    assert stream_of(brine) == "aqueous"
    hcl = Material(key="HCl6M", name="hydrochloric acid", formula="HCl",
                   solution=Solution(density=Q(1.1, "g/mL"), molarity=Q(6, "mol/L")))
    assert stream_of(hcl) == "aqueous"  # a solution is aqueous, whatever its solute
    assert stream_of(Material(key="toluene", name="toluene", formula="C7H8")) == "organic"
    assert stream_of(Material(key="celite", name="filter aid")) is None  # residue
    assert stream_of(Material(key="Na2SO4", name="sodium sulfate", formula="Na2SO4")) is None
    assert stream_of(Material(key="DCM", name="DCM", formula="CH2Cl2", stream="organic")) == "organic"


def test_telescoped_solvents_are_waste_of_the_telescoped_step():
    plan = plan_route(load_route(ROOT / "demo_routes" / "hx17-linear.yaml"))
    s3 = plan.waste.step("S3")  # telescoped: EtOH and water stay with the sodium salt, yet are S3's waste
    assert s3.stream_materials == {"aqueous": ("water",), "organic": ("EtOH",)}
    s4 = plan.step("S4")
    carried = next(c for c in s4.charges if c.material == "Na-salt")
    assert carried.mass.m_as("kg") == pytest.approx(plan.step("S3").product_mass.m_as("kg"), rel=1e-12)


def test_by_products_above_the_waste_are_warned(tmp_path):
    # 80 mol of water per mole of salt at 100 % yield: more by-product than everything charged less the product
    text = TWO_STEPS % {"amount": "1 kg"}
    text = text.replace("equation: paracetamol + NaOH -> salt + water",
                        "equation: paracetamol + NaOH -> salt + 80 water")
    result = run_cli("plan", write_route(tmp_path, text))
    assert "by-products from its equation" in result.stderr
    assert "check the equation's coefficients and the step's yield" in result.stderr


@pytest.mark.parametrize("change,where,says", [
    ("    cycle_time: 10 h\n", "    cycle_time: 10 kg\n", ("steps[0].cycle_time", "a time such as '4 h'")),
    ("    cycle_time: 10 h\n", "    cycle_time: -3 h\n", ("steps[0].cycle_time", "positive")),
    ("  R1: {volume: 1000 L, rate: 50}", "  R1: {volume: 1000 L, rate: 50 EUR/h}",
     ("equipment.R1.rate", "a plain number")),
    ("  R1: {volume: 1000 L, rate: 50}", "  R1: {volume: 1000 L, rate: -5}", ("equipment.R1.rate", "0 or more")),
    ("halogenated: 2.5}", "halogenated: 2.5, solids: 3}",
     ("waste_prices.solids", "valid keys here: aqueous, organic, halogenated")),
    ("halogenated: 2.5}", "halogen: 2.5}", ("waste_prices.halogen", "did you mean 'halogenated'?")),
    ("  DCM: {name: dichloromethane,", "  DCM: {stream: chlorinated, name: dichloromethane,",
     ("materials.DCM.stream", "must be one of aqueous, organic, halogenated")),
])
def test_bad_keys_through_the_command_line_exit_2_located(tmp_path, change, where, says):
    text = (TWO_STEPS % {"amount": "1 kg"})
    assert change in text
    path = write_route(tmp_path, text.replace(change, where, 1))
    result = run_cli("check", path)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    line = next(x for x in result.stderr.splitlines() if says[0] in x)
    assert f"{path}:" in line and says[1] in line
    with pytest.raises(RouteError):
        load_route(path)


def test_rates_without_a_currency_are_warned(tmp_path):
    text = (TWO_STEPS % {"amount": "1 kg"}).replace("currency: EUR\n", "")
    result = run_cli("check", write_route(tmp_path, text))
    assert "have a rate but the route has no currency" in result.stderr
    assert "waste prices but no currency" in result.stderr
