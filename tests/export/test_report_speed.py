"""The report is quick to write: a loose guard on the budgets of bench/report_bench.py.

Budget: the demo route's report in under 1.5 s beyond the plan, 30 steps in under 3 s.
The guard allows twice that, and counts the processor time of this process, so that a
machine busy with other work does not fail it.  The first report of a process (imports
of jinja2, matplotlib and RDKit) is made before timing.
"""

import sys
import time
from pathlib import Path

import routeplan
from routeplan.export.html import plan_html
from routeplan.route.load import load_route_text

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "bench"))

from report_bench import branched_route  # noqa: E402


def _cpu(fn) -> float:
    best = float("inf")
    for _ in range(2):
        t = time.process_time()
        fn()
        best = min(best, time.process_time() - t)
    return best


def test_report_time_beyond_the_plan():
    demo = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-linear.yaml"))
    plan_html(demo)  # warm: imports and the template cache
    t_demo = _cpu(lambda: plan_html(demo))
    big = routeplan.plan_route(load_route_text(branched_route(30), "branched-30.yaml"))
    t_big = _cpu(lambda: plan_html(big))
    assert t_demo < 3.0, f"demo report took {t_demo:.2f} s of processor time"
    assert t_big < 6.0, f"30-step report took {t_big:.2f} s of processor time"
