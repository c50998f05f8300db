"""A mid-campaign record worked by hand on route CAMP (tests/record_helpers.py).

Moles are ``mass * assay / M``; a yield is ``(n_product / n_limiting) * (nu_lim / nu_p)``
(ROUTE-FORMAT.md, "steps": yield on an assay-corrected molar basis, with coefficients).
Every expected number below is written as the formula worked by hand.
"""

import math

import pytest

from record_helpers import CAMP, RECORD_YAML
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text

REL = 1e-9

# S1 lot 1: 20.0 kg of A (100 %) = 200 mol; 27.0 kg of I1 at 96 % = 27.0 * 0.96 / 0.150 = 172.8 mol
N_A1, N_I1_1 = 20.0 / 0.100, 27.0 * 0.96 / 0.150
# S1 lot 2: 17.0 kg of A = 170 mol; 25.0 kg of I1 at 92 % = 25.0 * 0.92 / 0.150 = 153.33 mol
N_A2, N_I1_2 = 17.0 / 0.100, 25.0 * 0.92 / 0.150
# S2 lot 1: 30.0 kg of I1 as charged, counted at the route's 95 %: 30.0 * 0.95 / 0.150 = 190 mol;
# 30.0 kg of I2 at 99 %: 30.0 * 0.99 / 0.200 = 148.5 mol
N_I1_USED, N_I2 = 30.0 * 0.95 / 0.150, 30.0 * 0.99 / 0.200
# in hand: I1 = 172.8 + 153.33 - 190 = 136.13 mol = 136.13 * 0.150 / 0.95 kg (route assay); I2 = 148.5 mol
N_I1_HAND = N_I1_1 + N_I1_2 - N_I1_USED
KG_I1_HAND = N_I1_HAND * 0.150 / 0.95
KG_I2_HAND = N_I2 * 0.200 / 1.0


@pytest.fixture(scope="module")
def route():
    return load_route_text(CAMP, "camp.yaml")


@pytest.fixture(scope="module")
def recorded(route, tmp_path_factory):
    path = tmp_path_factory.mktemp("rec") / "record.yaml"
    path.write_text(RECORD_YAML, encoding="utf-8")
    return path


def close(a, b):
    return math.isclose(a, b, rel_tol=REL, abs_tol=1e-12)


def test_actual_yields_follow_the_route_definition(route, recorded):
    rec = plan_route(route, record=recorded).record
    y = [r.yield_ for r in rec.lots]
    assert close(y[0], N_I1_1 / N_A1)        # 172.8 / 200 = 86.4 % (nu 1:1)
    assert close(y[1], N_I1_2 / N_A2)        # 153.33 / 170 = 90.2 %
    assert close(y[2], N_I2 / N_I1_USED)     # 148.5 / 190 = 78.2 %
    assert [r.expected_yield for r in rec.lots] == [0.90, 0.90, 0.80]
    # pooled actual yield of S1: (172.8 + 153.33) / (200 + 170)
    assert close(rec.actual_yields["S1"], (N_I1_1 + N_I1_2) / (N_A1 + N_A2))


def test_in_hand(route, recorded):
    rec = plan_route(route, record=recorded).record
    hand = {h.material: h for h in rec.in_hand}
    assert close(hand["I1"].mol, N_I1_HAND) and close(hand["I1"].mass_kg, KG_I1_HAND)   # 21.49 kg
    assert close(hand["I2"].mol, N_I2) and close(hand["I2"].mass_kg, KG_I2_HAND)        # 29.70 kg
    # mean assay of the I1 lots, by mass: (27.0 * 0.96 + 25.0 * 0.92) / 52.0
    assert close(hand["I1"].lot_assay, (27.0 * 0.96 + 25.0 * 0.92) / 52.0)


def test_replanned_charges_at_expected_yields(route, recorded):
    plan = plan_route(route, record=recorded)
    # S3 still needs all 100 mol of P (40 kg / 0.400): n(I2) = 100 / (0.75 * 1/2) = 266.67 mol,
    # B = 1.2 * 266.67 = 320 mol = 11.52 kg; nothing of S3 has been run
    s3 = plan.step("S3")
    n_i2 = 100 / (0.75 * 0.5)
    assert close(s3.limiting_mol.m_as("mol"), n_i2)
    assert close(s3.charges[1].mass.m_as("kg"), 1.2 * n_i2 * 0.036)
    # S2 makes what the 148.5 mol in hand does not cover: (266.67 - 148.5) / 0.80 mol of I1
    n_i1 = (n_i2 - N_I2) / 0.80
    assert close(plan.step("S2").limiting_mol.m_as("mol"), n_i1)
    # S1 makes the I1 the 136.13 mol in hand does not cover: (n_i1 - 136.13) / 0.90 mol of A
    assert close(plan.step("S1").limiting_mass.m_as("kg"), (n_i1 - N_I1_HAND) / 0.90 * 0.100)


def test_replanned_charges_at_actual_yields(route, recorded):
    plan = plan_route(route, record=recorded, record_yields="actual")
    y1 = (N_I1_1 + N_I1_2) / (N_A1 + N_A2)
    y2 = N_I2 / N_I1_USED
    n_i1 = (100 / (0.75 * 0.5) - N_I2) / y2
    assert close(plan.step("S2").limiting_mol.m_as("mol"), n_i1)
    assert close(plan.step("S1").limiting_mol.m_as("mol"), (n_i1 - N_I1_HAND) / y1)
    assert plan.step("S3").yield_ == 0.75          # no lots of S3: its expected yield
    assert plan.record.record_yields == "actual"


def test_projected_target_and_gap(route, recorded):
    rec = plan_route(route, record=recorded).record
    # S1 and S2 have lots: they do not run again; S3 runs on the 148.5 mol of I2 in hand:
    # P = 148.5 * 0.75 * (1 / 2) = 55.69 mol = 22.275 kg (no overage)
    projected = N_I2 * 0.75 * 0.5 * 0.400
    assert close(rec.projected_target_kg, projected)
    assert close(rec.gap_kg, 40.0 - projected)
    assert rec.done == ("S1", "S2")
    assert rec.not_counted == ("I1",)            # the I1 in hand waits for more S2 batches
    assert dict(rec.closes) == {"S1": 1, "S2": 1}


def test_json_record_block_has_the_contract_keys(route, recorded):
    d = plan_to_dict(plan_route(route, record=recorded))["record"]
    assert {"lots", "in_hand", "projected_target_kg"} <= set(d)
    assert {"step", "batch", "mass_kg", "mol", "yield", "expected_yield"} <= set(d["lots"][0])
    assert {"material", "mass_kg", "mol"} <= set(d["in_hand"][0])
    assert close(d["lots"][0]["mol"], N_I1_1) and d["lots"][0]["mass_kg"] == 27.0


def test_far_below_low_is_flagged(route, tmp_path):
    # 20 kg of A = 200 mol; 20.0 kg of I1 at 95 % = 126.7 mol: 63 %, far below the low 85 %
    path = tmp_path / "r.yaml"
    path.write_text("lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 20.0 kg}\n", encoding="utf-8")
    plan = plan_route(route, record=path)
    assert plan.record.lots[0].flagged
    assert any("far below" in p.message and p.location.line == 2 for p in plan.warnings)
