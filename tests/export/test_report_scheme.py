"""The scheme's layout: layers by longest path, no box over another, arrows downwards.

Laws checked on the demo routes and on generated routes of 30 steps (linear, convergent
with one-step branches, and branched with three-step side chains and telescoped steps).
The ordered placement is checked against scipy's isotonic regression (reference library).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import routeplan
from routeplan.route.load import load_route_text
from routeplan.views.scheme import pav_positions, scheme_layout

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "bench"))

from plan_bench import convergent_route, linear_route  # noqa: E402
from report_bench import branched_route  # noqa: E402

ROUTES = {
    "demo-linear": lambda: routeplan.load_route(ROOT / "demo_routes" / "hx17-linear.yaml"),
    "demo-convergent": lambda: routeplan.load_route(ROOT / "demo_routes" / "hx17-convergent.yaml"),
    "linear-30": lambda: load_route_text(linear_route(30), "linear-30.yaml"),
    "convergent-30": lambda: load_route_text(convergent_route(30), "convergent-30.yaml"),
    "branched-30": lambda: load_route_text(branched_route(30), "branched-30.yaml"),
}


@pytest.fixture(scope="module", params=sorted(ROUTES))
def laid_out(request):
    plan = routeplan.plan_route(ROUTES[request.param]())
    return plan, scheme_layout(plan)


def _overlap(a, b) -> bool:
    (l1, t1, r1, b1), (l2, t2, r2, b2) = a, b
    return l1 < r2 and l2 < r1 and t1 < b2 and t2 < b1


def test_no_box_overlaps_another_and_all_inside(laid_out):
    _plan, s = laid_out
    boxes = [n for n in s.nodes if n.kind != "bend"]
    for i, a in enumerate(boxes):
        left, top, right, bottom = a.box
        assert left >= 0 and top >= 0 and right <= s.width and bottom <= s.height, a.key
        for b in boxes[i + 1:]:
            assert not _overlap(a.box, b.box), (a.key, b.key)


def test_every_step_and_intermediate_once_and_the_target_last(laid_out):
    plan, s = laid_out
    steps = [n.step for n in s.nodes if n.kind == "step"]
    assert sorted(steps) == sorted(sp.id for sp in plan.steps)
    made = [n.material for n in s.nodes if n.kind == "material"]
    assert sorted(made) == sorted(sp.product for sp in plan.steps)
    target = s.node(f"m:{plan.target_material}")
    assert target.target
    assert target.layer == max(n.layer for n in s.nodes)


def test_arrows_run_down_from_bottom_to_top_through_every_layer(laid_out):
    _plan, s = laid_out
    by_key = {n.key: n for n in s.nodes}
    for e in s.edges:
        src, dst = by_key[e.source], by_key[e.target]
        assert dst.layer > src.layer
        assert e.points[0] == (src.x, src.y + src.height / 2)
        assert e.points[-1] == (dst.x, dst.y - dst.height / 2)
        # one point per layer crossed: a long arrow bends in a lane, never through a box
        assert len(e.points) == dst.layer - src.layer + 1
        ys = [y for _x, y in e.points]
        assert ys == sorted(ys)
        assert e.head == (dst.kind != "step")


def test_layers_follow_the_longest_path(laid_out):
    """Every box is below all its inputs; the longest linear sequence takes two layers a step."""
    plan, s = laid_out
    by_key = {n.key: n for n in s.nodes}
    for e in s.edges:
        assert by_key[e.target].layer >= by_key[e.source].layer + 1
    lls = plan.overall_yield.longest_linear_sequence
    layers = [by_key[f"s:{sid}"].layer for sid in lls]
    assert layers == list(range(layers[0], layers[0] + 2 * len(lls), 2))


def test_the_drawing_stays_readable_at_thirty_steps():
    """At 30 steps the boxes keep their text size (no shrinking) and the page stays a column."""
    plan = routeplan.plan_route(load_route_text(branched_route(30), "b.yaml"))
    s = scheme_layout(plan)
    assert len([n for n in s.nodes if n.kind == "step"]) == 30
    assert s.width < 1400  # fits a wide screen; the height scrolls
    assert min(n.height for n in s.nodes if n.kind != "bend") >= 30


def test_telescoped_steps_and_their_products_are_marked():
    plan = routeplan.plan_route(load_route_text(branched_route(30), "b.yaml"))
    s = scheme_layout(plan)
    telescoped = {sp.id for sp in plan.steps if not sp.isolated}
    assert telescoped
    for n in s.nodes:
        if n.kind == "step":
            assert n.telescoped == (n.step in telescoped)
            assert any("telescoped" in t for _k, t in n.lines) == (n.step in telescoped)


def test_step_block_names_yield_batches_and_reagents():
    plan = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-convergent.yaml"))
    s = scheme_layout(plan)
    b2 = s.node("s:B2")
    text = " ".join(t for _k, t in b2.lines)
    assert "yield 90 %" in text and "1 batch" in text
    for reagent in ("DCM", "Et3N", "ClCH2COCl", "water"):
        assert reagent in text
    assert text.count("water") == 1  # a material charged twice is named once
    # the bought limiting reagent starts the branch, with a box of its own
    assert s.node("r:B2:morpholine").kind == "raw"


def test_reordering_the_route_file_gives_the_same_drawing():
    """A route's steps in another order in the file lay out the same (law)."""
    text = convergent_route(12)
    head, steps = text.split("steps:\n")
    blocks = ["  - id" + b for b in steps.split("  - id")[1:]]
    shuffled = head + "steps:\n" + "".join(blocks[1::2] + blocks[0::2])
    a = scheme_layout(routeplan.plan_route(load_route_text(text, "a.yaml")))
    b = scheme_layout(routeplan.plan_route(load_route_text(shuffled, "b.yaml")))
    geometry = lambda s: sorted((n.key, round(n.x, 6), round(n.y, 6)) for n in s.nodes if n.kind != "bend")  # noqa: E731
    assert geometry(a) == geometry(b)
    assert (a.width, a.height) == (b.width, b.height)


@settings(max_examples=200, deadline=None)
@given(st.lists(st.tuples(st.floats(-500, 500), st.floats(1, 200)), min_size=1, max_size=12),
       st.floats(0, 40))
def test_ordered_placement_is_the_isotonic_regression(items, gap):
    """Reference: scipy.optimize.isotonic_regression on desired - offset, plus offset."""
    import numpy as np
    from scipy.optimize import isotonic_regression

    desired = [d for d, _w in items]
    widths = [w for _d, w in items]
    got = pav_positions(desired, widths, gap)
    offset = np.concatenate([[0.0], np.cumsum([(widths[i - 1] + widths[i]) / 2 + gap for i in range(1, len(widths))])])
    ref = isotonic_regression(np.array(desired) - offset).x + offset
    assert np.allclose(got, ref, atol=1e-6)
    for i in range(1, len(got)):
        assert got[i] - got[i - 1] >= (widths[i - 1] + widths[i]) / 2 + gap - 1e-6


def test_a_route_longer_than_the_recursion_limit_is_laid_out():
    # 1100 steps in a line: deeper than Python's recursion limit (1000 frames); every
    # step gets a box, each below the one before, from the raw materials down
    n = 1100
    plan = routeplan.plan_route(load_route_text(linear_route(n).replace("yield: 97 %", "yield: 99.9 %"),
                                                "long.yaml"))
    layout = scheme_layout(plan)
    steps = [b for b in layout.nodes if b.kind == "step"]
    assert len(steps) == n
    ys = [b.y for b in sorted(steps, key=lambda b: int(b.step[1:]))]
    assert ys == sorted(ys) and len(set(ys)) == n  # each step below the one before
