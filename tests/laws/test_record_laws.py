"""Laws of the campaign record (ROUTE-FORMAT.md, "Campaign record").

* A record whose lots are exactly the plan's batches (planned charge, expected yield,
  nominal assay) re-plans to the plan's own remaining charges and projects the target.
* Recording a lot never changes what finished upstream steps did or must still charge.
* The projected target scales with the mass in hand.
* YAML, CSV and xlsx records of the same lots give the same plan.
"""

import math

import pytest

from record_helpers import CAMP, RECORD_CSV, RECORD_YAML, write_record_xlsx
from routeplan.inputs.record import Lot, Record
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route, load_route_text

REL = 1e-9
DEMO = "demo_routes/hx17-linear.yaml"


def close(a, b, rel=REL):
    return math.isclose(a, b, rel_tol=rel, abs_tol=1e-9)


@pytest.fixture(scope="module")
def hx17():
    return load_route(DEMO)


@pytest.fixture(scope="module")
def camp():
    return load_route_text(CAMP, "camp.yaml")


def planned_lots(plan, step_id, batches=None):
    """Lots exactly as planned: the batch's limiting charge and product, nominal assay."""
    sp = plan.step(step_id)
    n = sp.batches if batches is None else batches
    return [Lot(step=step_id, batch=k, charged_kg=sp.batch.limiting_mass.m_as("kg"),
                isolated_kg=sp.batch.product_mass.m_as("kg")) for k in range(1, n + 1)]


def charges(sp):
    return [(c.material, c.mass.m_as("kg")) for c in sp.charges]


def same_charges(a, b, scale=1.0):
    assert [m for m, _ in charges(a)] == [m for m, _ in charges(b)]
    for (_, x), (_, y) in zip(charges(a), charges(b)):
        assert close(x, scale * y), (a.id, x, scale * y)


def test_lots_as_planned_replan_to_the_plan_and_project_the_target(hx17):
    plan = plan_route(hx17, "100 kg")
    lots = planned_lots(plan, "S1") + planned_lots(plan, "S2") + planned_lots(plan, "S4")  # S4 stands for S3 + S4
    again = plan_route(hx17, "100 kg", record=Record(tuple(lots)))
    for sid in ("S1", "S2", "S3", "S4"):
        assert not again.step(sid).runs, sid
    same_charges(again.step("S5"), plan.step("S5"))
    assert again.step("S5").batches == plan.step("S5").batches
    assert close(again.record.projected_target_kg, 100.0)
    assert abs(again.record.gap_kg) < 1e-6 and again.record.closes == ()
    for r in again.record.lots:
        assert close(r.yield_, r.expected_yield)


def test_part_of_a_step_recorded_leaves_the_rest_as_planned(hx17):
    plan = plan_route(hx17, "100 kg")
    assert plan.step("S1").batches == 2
    again = plan_route(hx17, "100 kg", record=Record(tuple(planned_lots(plan, "S1", 1))))
    same_charges(again.step("S1"), plan.step("S1"), 0.5)       # one of two batches left
    for sid in ("S2", "S3", "S4", "S5"):
        same_charges(again.step(sid), plan.step(sid))
    # half of the acetamidophenol is in hand, and the rest runs forward at expected yields
    assert close(again.record.projected_target_kg, 50.0)


def test_recording_a_lot_never_changes_finished_upstream_steps(camp):
    s1 = [Lot("S1", 1, 20.0, 27.0, 0.96), Lot("S1", 2, 17.0, 25.0, 0.92)]
    before = plan_route(camp, record=Record(tuple(s1)))
    # a lot of S2 at its expected yield: 30 kg of I1 (190 mol at 95 %) -> 0.80 * 190 mol of I2 (200 g/mol)
    at_expected = Lot("S2", 1, 30.0, 0.80 * 30.0 * 0.95 / 0.150 * 0.200)
    after = plan_route(camp, record=Record(tuple(s1 + [at_expected])))
    same_charges(after.step("S1"), before.step("S1"))
    # at any yield, the S1 lots and what they made stay as they were
    for isolated in (10.0, 20.0, 28.0):
        other = plan_route(camp, record=Record(tuple(s1 + [Lot("S2", 1, 30.0, isolated)]))).record
        assert other.lots[:2] == before.record.lots[:2]
        assert close(other.in_hand[0].made_mol, before.record.in_hand[0].made_mol)
    # S1 covered by its lots: it does not run, with or without a later lot of S2
    big = [Lot("S1", 1, 20.0, 29.5, 0.96), Lot("S1", 2, 17.0, 26.0, 0.92)]  # 348.3 mol of I1 >= 333.3
    for extra in ([], [at_expected]):
        sp = plan_route(camp, record=Record(tuple(big + extra))).step("S1")
        assert not sp.runs and all(c.mass.m_as("kg") == 0 for c in sp.charges)


@pytest.mark.parametrize("k", [0.25, 0.5, 1.05])
def test_projected_target_scales_with_the_mass_in_hand(camp, k):
    def lots(f):
        return Record((Lot("S1", 1, 20.0, 27.0 * f, 0.96), Lot("S1", 2, 17.0, 25.0 * f, 0.92)))

    one = plan_route(camp, record=lots(1.0)).record.projected_target_kg
    assert close(plan_route(camp, record=lots(k)).record.projected_target_kg, k * one)


def test_yaml_csv_and_xlsx_records_give_the_same_plan(camp, tmp_path):
    (tmp_path / "r.yaml").write_text(RECORD_YAML, encoding="utf-8")
    (tmp_path / "r.csv").write_text(RECORD_CSV, encoding="utf-8")
    write_record_xlsx(tmp_path / "r.xlsx")
    outs = []
    for name in ("r.yaml", "r.csv", "r.xlsx"):
        d = plan_to_dict(plan_route(camp, record=tmp_path / name))
        d["record"].pop("file")
        outs.append({k: d[k] for k in ("steps", "raw_materials", "record")})
    assert outs[0] == outs[1] == outs[2]


def test_stock_and_record_together(camp, tmp_path):
    # 10 kg of I2 on the shelf (50 mol) adds to the 148.5 mol the record has in hand
    (tmp_path / "r.yaml").write_text(RECORD_YAML, encoding="utf-8")
    (tmp_path / "s.yaml").write_text("I2: 10 kg\nR: 100 kg\n", encoding="utf-8")
    plan = plan_route(camp, record=tmp_path / "r.yaml", stock=tmp_path / "s.yaml")
    n_i2 = 100 / (0.75 * 0.5) - 30.0 * 0.99 / 0.200 - 10.0 / 0.200
    assert close(plan.step("S2").limiting_mol.m_as("mol"), n_i2 / 0.80)
    # the projection counts the shelf's I2 too: (148.5 + 50) * 0.75 / 2 mol of P
    assert close(plan.record.projected_target_kg, (148.5 + 50.0) * 0.75 * 0.5 * 0.400)


@pytest.mark.parametrize("f1,f2", [(1.0, 0.5), (0.3, 1.0), (0.8, 0.8)])
def test_a_step_taking_two_intermediates_is_limited_by_the_scarcer(f1, f2):
    # convergent HX-17: B3 takes acetamidophenol (B1) and chloroamide (B2); with f1 and f2 of
    # their planned product in hand (at expected yields), B3 runs at min(f1, f2) of its plan
    route = load_route("demo_routes/hx17-convergent.yaml")
    plan = plan_route(route)
    lots = []
    for sid, f in (("B1", f1), ("B2", f2)):
        sp = plan.step(sid)
        lots.append(Lot(sid, 1, sp.limiting_mass.m_as("kg") * f, sp.product_mass.m_as("kg") * f))
    rec = plan_route(route, record=Record(tuple(lots))).record
    assert close(rec.projected_target_kg, min(f1, f2) * route.target.amount.m_as("kg"))
    assert rec.done == ("B1", "B2")
