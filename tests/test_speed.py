"""Planning is never what the user waits for: a loose guard on the benchmark routes.

The engine's targets are measured as ratios in ``bench/engine_bench.py``; this guard only
catches a regression by an order of magnitude (a quadratic loop, a parse in a hot loop).
Every check is a ratio of timings taken side by side in this test, interleaved and best of
several, so that a busy machine slows both sides alike, with margins of 3-5 times what
the engine does today.
"""

import sys
import time
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "bench"))

from engine_bench import compose_text, plain_float_walk  # noqa: E402
from plan_bench import convergent_route, linear_route  # noqa: E402

import routeplan  # noqa: E402
from routeplan.route.load import load_route_text  # noqa: E402


def _timed(fn) -> float:
    t = time.perf_counter()
    fn()
    return time.perf_counter() - t


@pytest.mark.parametrize("build", [linear_route, convergent_route], ids=["linear", "convergent"])
def test_two_hundred_steps_load_and_plan_fast_and_linearly(build):
    small, large = build(50), build(200)
    routeplan.plan_route(load_route_text(build(2), "warm.yaml"))  # warm imports and the unit registry
    best = {"50": float("inf"), "200": float("inf"), "compose 50": float("inf"), "compose 200": float("inf")}
    for _ in range(5):  # interleaved: a load spike hits every side in turn
        best["50"] = min(best["50"], _timed(lambda: routeplan.plan_route(load_route_text(small, "s.yaml"))))
        best["200"] = min(best["200"], _timed(lambda: routeplan.plan_route(load_route_text(large, "l.yaml"))))
        best["compose 50"] = min(best["compose 50"], _timed(lambda: compose_text(small)))
        best["compose 200"] = min(best["compose 200"], _timed(lambda: compose_text(large)))
    # load + plan is about 3x the bare YAML compose today
    assert best["200"] < 12 * best["compose 200"], best
    # 4x the steps: about 4x the time (5x at most for the YAML parser itself); quadratic would be 16x
    assert best["200"] / best["50"] < max(10.0, 2.5 * best["compose 200"] / best["compose 50"]), best


def test_a_plan_costs_a_bounded_multiple_of_the_bare_arithmetic():
    # the whole plan of 200 steps (walk, batches, totals, metrics, safety, waste, cost) is
    # 100-200x a plain-float walk of the same route written out by hand (bench/engine_bench.py)
    text = linear_route(200)
    routeplan.plan_route(load_route_text(text, "warm.yaml"))
    routes = [load_route_text(text, "r.yaml") for _ in range(5)]  # a fresh route per plan
    walk = plain_float_walk(200)
    t_plan = t_walk = float("inf")
    for route in routes:
        t_plan = min(t_plan, _timed(lambda: routeplan.plan_route(route)))
        t_walk = min(t_walk, min(_timed(walk) for _ in range(10)))
    assert t_plan < 800 * t_walk, f"plan {t_plan * 1e3:.2f} ms, plain-float walk {t_walk * 1e3:.3f} ms"


def test_the_plain_float_reference_computes_the_plans_numbers():
    """The bench's line-by-line float reference (row 3c of ``bench/engine_bench.py``) must
    compute what the plan computes, or its ratio says nothing: every bought material's
    campaign mass and volume, and each step's batches, fill and amounts per batch."""
    import math

    from engine_bench import plain_float_lines

    n = 30
    plan = routeplan.plan_route(load_route_text(linear_route(n), "l.yaml"))
    totals, sized = plain_float_lines(n)()
    bought = {rm.material: rm for rm in plan.raw_materials}
    assert set(totals) == set(bought)
    for key, (m_kg, V_L) in totals.items():
        assert math.isclose(bought[key].m_kg, m_kg, rel_tol=1e-12)
        assert math.isclose(bought[key].V_L or 0.0, V_L, rel_tol=1e-12)
    for sp, (n_lim_batch, m_lim_batch, batches, fill, per_batch) in zip(plan.steps, sized):
        assert sp.batch.batches == batches and math.isclose(sp.batch.fill_fraction, fill, rel_tol=1e-12)
        assert math.isclose(sp.batch.limiting_n_mol / batches, n_lim_batch, rel_tol=1e-12)
        for c, (n_b, m_b, V_b) in zip(sp.charges, per_batch):
            assert math.isclose(c.n_mol / batches, n_b, rel_tol=1e-12)
            assert math.isclose(c.m_kg / batches, m_b, rel_tol=1e-12)
            assert (c.V_L is None) == (V_b is None) and (V_b is None or math.isclose(c.V_L / batches, V_b, rel_tol=1e-12))
