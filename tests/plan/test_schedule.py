"""The schedule: batches placed on vessels by the rules of ROUTE-FORMAT.md ("Time, plant and waste").

Every expected hour below is worked out by hand from the rules, the rule written beside it.
"""

from __future__ import annotations

import random
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import run_cli, write_route
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.plan.schedule import StepTiming, place_steps, schedule_order
from routeplan.route.load import load_route, load_route_text

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"


def test_a_schedule_by_hand_three_steps_two_sharing_a_vessel_one_branch_in_parallel():
    # A1 (R1, 2 batches x 6 h) and B1 (R2, 1 batch x 15 h) are two branches; C1 (R1, 1 x 4 h)
    # takes both products.  R1 is shared by A1 and C1.
    s = place_steps([
        StepTiming("C1", "R1", 1, 4.0, ("A1", "B1")),
        StepTiming("B1", "R2", 1, 15.0),
        StepTiming("A1", "R1", 2, 6.0),
    ])
    assert [x.id for x in s.steps] == ["A1", "B1", "C1"]  # topological, ties by id
    a, b, c = s.step("A1"), s.step("B1"), s.step("C1")
    assert (a.start_h, a.end_h) == (0.0, 12.0)  # nothing feeds A1, R1 free at 0; 2 batches x 6 h back to back
    assert [(x.start_h, x.end_h) for x in a.batches] == [(0.0, 6.0), (6.0, 12.0)]  # one batch at a time
    assert (b.start_h, b.end_h) == (0.0, 15.0)  # the other branch, in another vessel: in parallel from 0
    assert c.ready_h == 15.0  # starts when every feeding step has finished: max(12, 15)
    assert (c.start_h, c.end_h) == (15.0, 19.0)  # R1 free since 12 h, so the feed decides; 1 x 4 h
    assert (c.held_by, c.after) == ("feed", "B1")
    assert s.campaign_h == 19.0  # from the first start (0 h) to the last end (19 h)
    r1 = next(v for v in s.vessels if v.vessel == "R1")
    assert r1.busy_h == 16.0 and r1.idle == ((12.0, 15.0),)  # 2 x 6 + 4 busy; idle while C1 waits for B1
    assert s.critical_chain == ("B1", "C1") and s.pace_step == "B1"  # B1 fixed C1's start; 15 h > 4 h


def test_a_vessel_holds_one_batch_at_a_time_and_a_later_step_waits_for_it():
    # X1 and Y1 feed nothing to each other but share R1: by id X1 goes first, Y1 waits.
    s = place_steps([StepTiming("Y1", "R1", 1, 5.0), StepTiming("X1", "R1", 3, 2.0)])
    assert (s.step("X1").start_h, s.step("X1").end_h) == (0.0, 6.0)  # 3 batches x 2 h
    assert (s.step("Y1").start_h, s.step("Y1").end_h) == (6.0, 11.0)  # R1 next free at 6 h
    assert (s.step("Y1").held_by, s.step("Y1").after) == ("vessel", "X1")
    assert s.campaign_h == 11.0 and s.pace_step == "X1"  # chain X1 -> Y1, X1 holds R1 6 h > 5 h


def test_a_vessels_next_free_time_only_moves_forward():
    # A1 -> B1 in R1 leaves R1 idle from 2 h to 10 h while B1 waits for A0 (R2, 10 h);
    # C1 (R1, independent, after B1 by id) must not fill that earlier gap.
    s = place_steps([StepTiming("A0", "R2", 1, 10.0), StepTiming("A1", "R1", 1, 2.0),
                     StepTiming("B1", "R1", 1, 3.0, ("A0", "A1")), StepTiming("C1", "R1", 1, 1.0)])
    assert (s.step("B1").start_h, s.step("B1").end_h) == (10.0, 13.0)
    assert (s.step("C1").start_h, s.step("C1").end_h) == (13.0, 14.0)  # after B1, not in the gap at 2 h


def test_a_step_without_a_vessel_has_one_of_its_own_and_a_step_that_does_not_run_takes_no_time():
    s = place_steps([StepTiming("A1", None, 2, 3.0), StepTiming("B1", None, 1, 4.0),
                     StepTiming("C1", "R1", 0, 9.0, ("A1",)), StepTiming("D1", "R1", 1, 1.0, ("C1", "B1"))])
    assert (s.step("A1").start_h, s.step("B1").start_h) == (0.0, 0.0)  # own vessels: nothing shared
    assert (s.step("C1").start_h, s.step("C1").end_h) == (6.0, 6.0)  # does not run: no time, after A1
    assert not s.step("C1").batches
    assert (s.step("D1").start_h, s.step("D1").end_h) == (6.0, 7.0)  # R1 never held by C1
    assert {v.vessel for v in s.vessels} == {None, "R1"} and len(s.vessels) == 3


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.integers(1, 9), st.floats(0.25, 48.0)), min_size=1, max_size=8),
       st.booleans())
def test_a_linear_chain_of_identical_batches_lasts_the_sum_of_batches_times_cycle_times(steps, one_vessel):
    # each step waits for the one before it, so nothing runs in parallel and nothing waits
    timings = [StepTiming(f"S{i:02d}", "R1" if one_vessel else f"R{i}", n, ct, (f"S{i - 1:02d}",) if i else ())
               for i, (n, ct) in enumerate(steps)]
    s = place_steps(timings)
    assert s.campaign_h == pytest.approx(sum(n * ct for n, ct in steps), rel=1e-12)


def test_order_is_by_step_id_never_by_file_order():
    a = [StepTiming("B", "R1", 1, 2.0), StepTiming("A", "R1", 1, 3.0), StepTiming("C", "R1", 1, 1.0, ("B",))]
    assert schedule_order(a) == ["A", "B", "C"]
    assert schedule_order(list(reversed(a))) == ["A", "B", "C"]


def _yaml_steps_reversed(text: str) -> str:
    head, _, steps = text.partition("\nsteps:\n")
    blocks = ["  - id:" + b for b in steps.split("  - id:") if b.strip()]
    random.Random(3).shuffle(blocks)
    return head + "\nsteps:\n" + "".join(b if b.endswith("\n") else b + "\n" for b in blocks)


@pytest.mark.parametrize("name", ["hx17-linear.yaml", "hx17-convergent.yaml"])
def test_reordering_the_route_file_changes_the_schedule_not_at_all(name):
    text = (DEMO / name).read_text(encoding="utf-8")
    shuffled = _yaml_steps_reversed(text)
    assert shuffled != text
    one = plan_route(load_route_text(text), "250 kg").schedule
    two = plan_route(load_route_text(shuffled), "250 kg").schedule
    assert one is not None and one == two


def test_the_demo_convergent_route_by_hand():
    # hx17-convergent at its 25 kg target: one batch per step; B1 (R250, 12 h) and B2
    # (R250, 10 h) share a vessel, B3 (R630, 22 h) takes both products.
    plan = plan_route(load_route(DEMO / "hx17-convergent.yaml"))
    assert [sp.batches for sp in plan.steps] == [1, 1, 1]
    s = plan.schedule
    assert (s.step("B1").start_h, s.step("B1").end_h) == (0.0, 12.0)  # first by id, R250 free
    assert (s.step("B2").start_h, s.step("B2").end_h) == (12.0, 22.0)  # R250 next free at 12 h
    assert (s.step("B3").start_h, s.step("B3").end_h) == (22.0, 44.0)  # after both feeds, R630 free
    assert s.campaign_h == 44.0 and s.pace_step == "B3"  # chain B1 -> B2 -> B3; B3 holds R630 22 h


def test_no_schedule_unless_every_step_has_a_cycle_time(tmp_path):
    text = (DEMO / "hx17-linear.yaml").read_text(encoding="utf-8").replace("    cycle_time: 10 h\n", "", 1)
    plan = plan_route(load_route_text(text))
    assert plan.schedule is None
    assert plan_to_dict(plan)["schedule"] is None and plan_to_dict(plan)["schedule_missing_cycle_time"] == ["S3"]
    result = run_cli("plan", write_route(tmp_path, text))
    assert result.exit_code == 0
    assert "schedule incomplete" in result.stdout and "no cycle_time for S3" in result.stdout


def test_json_schedule_follows_the_contract():
    d = plan_to_dict(plan_route(load_route(DEMO / "hx17-linear.yaml")))
    s = d["schedule"]
    assert s["campaign_h"] == 74.0  # 12 + 20 + 10 + 8 + 24 h, one batch each, a linear chain
    assert [x["id"] for x in s["steps"]] == ["S1", "S2", "S3", "S4", "S5"]
    assert {"id", "vessel", "start_h", "end_h"} <= set(s["steps"][0])
    assert s["steps"][1]["vessel"] == "R630"
    assert s["pace_step"] == "S5"


def test_terminal_shows_the_timeline(tmp_path):
    result = run_cli("plan", DEMO / "hx17-convergent.yaml", "--target", "100 kg")
    assert result.exit_code == 0
    out = result.stdout
    assert "Schedule" in out and "R250 |B1" in out and "pace is set by B3" in out
    assert "balance: inputs" in out and "mass balance: inputs" in out
