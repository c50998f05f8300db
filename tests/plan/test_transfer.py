"""A charge that leaves before the transfer (``leaves: true``): hand-worked numbers and laws.

The route is ``tests/data/routes/telescoped-wash.yaml``: benzoyl chloride + ethanol +
triethylamine in toluene give ethyl benzoate (T1, 95 %, telescoped); a water wash is
separated and discarded; the toluene solution reacts with hydrazine hydrate to
benzohydrazide (T2, 90 %, isolated), 10 kg.  Molar masses below are worked by hand from
the CIAAW 2021 standard atomic weights (abridged values: H 1.008, C 12.011, N 14.007,
O 15.999, Cl 35.45); densities and volumes are the route's inputs.
"""

from __future__ import annotations

import re

import pytest

from conftest import route_text
from route_edits import change
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route, load_route_text
from routeplan.units import Q

WASH = route_text("telescoped-wash.yaml")
LEAVES = ", leaves: true}"

# molar masses [kg/mol], CIAAW 2021 abridged standard atomic weights, summed by hand
M_HYDRAZIDE = (7 * 12.011 + 8 * 1.008 + 2 * 14.007 + 15.999) / 1000   # C7H8N2O 136.154 g/mol
M_BZCL = (7 * 12.011 + 5 * 1.008 + 35.45 + 15.999) / 1000             # C7H5ClO 140.566 g/mol
M_ETOH = (2 * 12.011 + 6 * 1.008 + 15.999) / 1000                     # C2H6O 46.069 g/mol
M_ET3N = (6 * 12.011 + 15 * 1.008 + 14.007) / 1000                    # C6H15N 101.193 g/mol
M_N2H4_H2O = (2 * 14.007 + 6 * 1.008 + 15.999) / 1000                 # N2H4.H2O 50.061 g/mol

# the walk by hand: 10 kg of hydrazide at 90 % (T2) from ester made at 95 % (T1)
N_T2 = 10.0 / M_HYDRAZIDE / 0.90        # 81.607 mol ester charged to T2
N_T1 = N_T2 / 0.95                      # 85.902 mol BzCl charged to T1
M_BZ = N_T1 * M_BZCL                    # 12.075 kg BzCl
V_BZ = M_BZ / 1.21                      # 9.979 L at 1.21 kg/L
V_TOL = 5 * M_BZ                        # 5 L/kg x 12.075 kg = 60.375 L
M_TOL = V_TOL * 0.867                   # 52.345 kg
M_ET = 1.5 * N_T1 * M_ETOH              # 5.936 kg ethanol, 1.5 equiv
V_ET = M_ET / 0.789                     # 7.524 L
M_TEA = 1.2 * N_T1 * M_ET3N             # 10.431 kg triethylamine, 1.2 equiv
V_TEA = M_TEA / 0.726                   # 14.368 L
V_WASH = 3 * M_BZ                       # 3 L/kg x 12.075 kg = 36.225 L of water
M_WASH = V_WASH * 1.00                  # 36.225 kg
V_STAYS = V_BZ + V_TOL + V_ET + V_TEA   # 92.245 L goes on to T2
M_STAYS = M_BZ + M_TOL + M_ET + M_TEA   # 80.787 kg goes on (no gas evolved)
M_HYD = 3 * N_T2 * M_N2H4_H2O           # 12.256 kg hydrazine hydrate, 3 equiv
V_HYD = M_HYD / 1.03                    # 11.899 L


def plan_of(text: str = WASH, target=None):
    return plan_route(load_route_text(text, "telescoped-wash.yaml"), target)


@pytest.fixture(scope="module")
def plan():
    return plan_of()


@pytest.fixture(scope="module")
def kept():
    """The same route with the wash carried on (no ``leaves``): the way it planned before."""
    return plan_of(change(WASH, [(LEAVES, "}")]))


def test_the_telescoped_step_worked_by_hand(plan):
    t1 = plan.step("T1")
    assert t1.limiting_mol.m_as("mol") == pytest.approx(N_T1, rel=1e-4)
    # fullest: the wash is the last line, so every line is in the vessel together once:
    # 92.245 L + 36.225 L = 128.470 L; R150 holds 150 L x 80 % = 120 L: 2 batches
    assert t1.batch.step_V_L == pytest.approx(V_STAYS + V_WASH, rel=1e-4)
    assert V_STAYS + V_WASH == pytest.approx(128.470, abs=1e-3)
    assert t1.batches == 2
    # what goes on: the four lines that stay, 92.245 L and 80.787 kg over the campaign
    assert t1.batch.transfer_V_L == pytest.approx(V_STAYS, rel=1e-4)
    assert t1.batch.transfer_m_kg == pytest.approx(M_STAYS, rel=1e-4)
    assert t1.batch.transfer_volume.m_as("L") == pytest.approx(V_STAYS / 2, rel=1e-4)  # per batch
    assert [c.leaves for c in t1.charges] == [False, False, False, False, True]
    water = t1.charges[-1]
    assert water.V_L == pytest.approx(V_WASH, rel=1e-4) and water.m_kg == pytest.approx(M_WASH, rel=1e-4)


def test_the_next_step_gets_only_what_stays(plan):
    t2 = plan.step("T2")
    ester = t2.charges[0]
    assert ester.carried_from == "T1"
    assert ester.V_L == pytest.approx(V_STAYS, rel=1e-4)  # 92.245 L carried in, the wash not
    # T2: 92.245 L + 11.899 L = 104.144 L <= 120 L: one batch
    assert t2.batch.step_V_L == pytest.approx(V_STAYS + V_HYD, rel=1e-4)
    assert t2.batches == 1
    # reaction mass for the heat screening: the mixture carried in and the hydrazine hydrate
    m = M_STAYS + M_HYD                          # 93.043 kg
    assert t2.batch.reaction_m_kg == pytest.approx(m, rel=1e-4)
    # dTad = -dH n / (m cp) = 40 kJ/mol x 81.607 mol / (93.043 kg x 2.0 kJ/(kg K)) = 17.54 K
    assert t2.safety.thermal.delta_T_ad_K == pytest.approx(40 * N_T2 / (m * 2.0), rel=1e-4)
    assert isinstance(t2.batch.transfer_V_L, type(None))  # isolated: nothing goes on in solution


def test_carried_on_the_wash_would_take_a_second_batch_of_t2(kept):
    # the issue: carried whole, the wash fills T2 to 92.245 + 36.225 + 11.899 = 140.369 L,
    # more than the 120 L R150 takes: two batches where one does
    t2 = kept.step("T2")
    assert t2.batch.step_V_L == pytest.approx(V_STAYS + V_WASH + V_HYD, rel=1e-4)
    assert t2.batches == 2


def test_law_a_leaving_charge_changes_the_next_step_by_exactly_itself(plan, kept):
    # the carried-in volume by its volume, the reaction mass by its mass; nothing else moves
    water = plan.step("T1").charges[-1]
    a, b = plan.step("T2"), kept.step("T2")
    assert b.charges[0].V_L - a.charges[0].V_L == pytest.approx(water.V_L, rel=1e-12)
    assert b.batch.reaction_m_kg - a.batch.reaction_m_kg == pytest.approx(water.m_kg, rel=1e-12)
    assert b.batch.step_V_L - a.batch.step_V_L == pytest.approx(water.V_L, rel=1e-12)
    assert kept.step("T1").batch.transfer_m_kg - plan.step("T1").batch.transfer_m_kg == pytest.approx(
        water.m_kg, rel=1e-12)
    # the wash is the last line of T1: its own fullest volume is the same either way
    assert plan.step("T1").batch.step_V_L == kept.step("T1").batch.step_V_L
    for sa, sb in zip(plan.steps, kept.steps):  # every charge is the same
        assert [(c.n_mol, c.m_kg) for c in sa.charges] == [(c.n_mol, c.m_kg) for c in sb.charges]
    assert [r.m_kg for r in plan.raw_materials] == [r.m_kg for r in kept.raw_materials]


@pytest.mark.parametrize("after, fullest", [
    # a toluene top-up of 1 L/kg after the wash: the vessel is fullest with the wash in
    (1, V_STAYS + V_WASH),
    # one of 4 L/kg: fullest at the end, after the wash has gone
    (4, V_STAYS + 4 * M_BZ),
])
def test_the_fullest_volume_takes_the_wash_out_right_after_it_is_charged(after, fullest):
    text = change(WASH, [("leaves: true}\n", f"leaves: true}}\n      - {{material: toluene, volumes: {after}}}\n")])
    t1 = plan_of(text).step("T1")
    assert t1.batch.step_V_L == pytest.approx(fullest, rel=1e-4)
    assert t1.batch.transfer_V_L == pytest.approx(V_STAYS + after * M_BZ, rel=1e-4)


def test_law_inputs_are_products_and_waste(plan):
    # the wash leaves as T1's aqueous waste; the mass balance of the route still holds
    w = plan.waste
    assert abs(w.balance_error) < 1e-12
    t1 = w.step("T1")
    assert t1.separated_kg == pytest.approx(M_WASH, rel=1e-4) and t1.separated_materials == ("water",)
    assert t1.campaign.aqueous_kg == pytest.approx(M_WASH, rel=1e-4)   # the wash is T1's only water
    assert t1.campaign.organic_kg == pytest.approx(M_TOL, rel=1e-4)    # toluene, the solvent of T1
    assert w.step("T2").separated_kg == 0.0


def test_law_doubling_the_target_doubles_every_volume_and_mass(plan):
    two = plan_of(target=Q(20, "kg"))
    for a, b in zip(plan.steps, two.steps):
        assert b.batch.step_V_L == pytest.approx(2 * a.batch.step_V_L, rel=1e-12)
        assert b.batch.reaction_m_kg == pytest.approx(2 * a.batch.reaction_m_kg, rel=1e-12)
        for x, y in zip(a.charges, b.charges):
            assert y.m_kg == pytest.approx(2 * x.m_kg, rel=1e-12)
            if x.V_L is not None:
                assert y.V_L == pytest.approx(2 * x.V_L, rel=1e-12)
        if not a.isolated:
            assert b.batch.transfer_V_L == pytest.approx(2 * a.batch.transfer_V_L, rel=1e-12)
            assert b.batch.transfer_m_kg == pytest.approx(2 * a.batch.transfer_m_kg, rel=1e-12)


ROUTES = ["demo_routes/hx17-linear.yaml", "demo_routes/hx17-convergent.yaml", "tests/data/routes/good.yaml",
          "tests/data/routes/safety.yaml", "tests/data/routes/hydrogenation.yaml", "tests/data/routes/shelf.yaml"]


@pytest.mark.parametrize("path", ROUTES)
def test_law_a_route_without_the_key_plans_as_before(path):
    # as before the key: a step's volume is the sum of every volume charged, a telescoped
    # mixture comes in whole (its step's volume x the share taken); leaves: false is the
    # same plan as no key at all
    from conftest import ROOT

    route = load_route(ROOT / path)
    plan = plan_route(route)
    for sp in plan.steps:
        assert not any(c.leaves for c in sp.charges)
        assert sp.batch.step_V_L == sum(c.V_L for c in sp.charges if c.V_L is not None)
        for c in sp.charges:
            if c.carried_from is not None:
                src = plan.step(c.carried_from)
                assert c.V_L == pytest.approx(src.batch.step_V_L * c.n_mol / src.product_n_mol, rel=1e-15)
    text = (ROOT / path).read_text(encoding="utf-8")
    if "leaves" not in text:
        explicit = re.sub(r"(?m)^(\s+- )\{material: ", r"\1{leaves: false, material: ", text)
        assert explicit != text
        same = {"source": None}  # the text differs, so its hash; nothing else may
        assert plan_to_dict(plan_route(load_route_text(explicit, str(ROOT / path)))) | same == \
            plan_to_dict(plan) | same


def test_gas_and_a_wash_both_leave_the_mixture():
    # tests/data/routes/safety.yaml as test_safety_plan.py telescopes it: G1 charges 1.0 kg
    # sub, 5.0 kg solvent, 0.6 kg reag and evolves 10 mol CO2 (44.009 g/mol, CIAAW 2021:
    # 12.011 + 2 x 15.999) into G2 (8 mol prod + 1 equiv reag at 50 g/mol = 0.4 kg); here
    # G1 also gets a 2 L/kg water wash that leaves
    from test_safety_plan import TELESCOPED

    text = change(TELESCOPED, [
        ("      - {material: reag, equiv: 1.2}\n",
         "      - {material: reag, equiv: 1.2}\n      - {material: water, volumes: 2, role: workup, leaves: true}\n"),
        ("  CO2:\n", "  water: {formula: H2O, density: 1.0 g/mL}\n  final: {molar_mass: 155.991 g/mol}\n  CO2:\n"),
        ("  material: prod\n  amount: 847.928 g", "  material: final\n  amount: 1247.928 g"),
    ])
    plan = plan_route(load_route_text(text, "safety-wash.yaml"))
    g1, g2 = plan.step("G1"), plan.step("G2")
    co2 = 10.0 * (12.011 + 2 * 15.999) / 1000      # 0.44009 kg
    assert g1.batch.transfer_m_kg == pytest.approx(1.0 + 5.0 + 0.6 - co2, rel=1e-4)
    assert g2.batch.reaction_m_kg == pytest.approx(1.0 + 5.0 + 0.6 - co2 + 0.4, rel=1e-4)
    # volumes: 0.5 L reag + 5 L solvent stay; the 2 L wash was in G1's vessel, not in G2's
    assert g1.batch.step_V_L == pytest.approx(5.0 + 0.5 + 2.0, rel=1e-9)
    assert g1.batch.transfer_V_L == pytest.approx(5.5, rel=1e-9)
    assert g2.charges[0].V_L == pytest.approx(5.5, rel=1e-9)
