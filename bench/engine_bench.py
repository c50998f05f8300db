"""The engine's speed targets, each measured as a ratio of two timings taken in one run.

Run: ``python bench/engine_bench.py [--big]``.  Prints, side by side:

1. ``routeplan plan demo --json`` (whole process, CPU seconds from ``/usr/bin/time``
   where present, else wall time) over the import floor of the packages it loads
   (``python -c "import pint, pydantic, ruamel.yaml, networkx, click"``); target 1.2x;
2. ``routeplan --help`` over ``python -c "import click"``; target 1.5x;
3. in process, planning a 200-step route (walk, batches, totals, metrics) over a plain-float
   walk of the same route written out by hand below; target 40x;
4. loading the 200-step route over ruamel's bare compose of its text; target 3x;
5. growth of load + plan from 10 to 10 000 steps, each 5x in steps within 6x in time
   (``--big`` runs 2 000 and 10 000, which take a while);
6. the terminal output of a 200-step plan, in process (plain text, 120 columns), also as a
   ratio over planning it; target under 0.2 s.

Every timing is the best of several runs, so that a busy machine disturbs both sides of a
ratio alike.
"""

from __future__ import annotations

import io
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))
sys.path.insert(0, str(ROOT))

from plan_bench import linear_route  # noqa: E402


def best(fn, repeat: int = 5) -> float:
    out = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        out = min(out, time.perf_counter() - t)
    return out


def process_seconds(args: list[str], repeat: int = 5) -> float:
    """Best user + system CPU seconds of a child process (wall time if unavailable)."""
    out = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        before = os.times()
        subprocess.run(args, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        after = os.times()
        cpu = (after.children_user - before.children_user) + (after.children_system - before.children_system)
        out = min(out, cpu if cpu > 0 else time.perf_counter() - t)
    return out


def plain_float_walk(text_steps: int):
    """The same walk, batches and totals of the linear bench route, in plain floats by hand.

    Molar masses [kg/mol] of C(6+k)H(6+2k)O with CIAAW 2021 abridged weights; one pass
    backward, one forward for volumes and batches, one for the totals.
    """
    C, H, O = 0.012011, 0.001008, 0.015999
    M_meoh, rho_thf, rho_w = C + 4 * H + O, 0.889, 1.0
    M_cat = 3 * H + 0.010806 + 3 * O

    def run():
        n_p = 25.0 * 0.99 / (C * (6 + text_steps) + H * (6 + 2 * text_steps) + O)
        rows = []
        for k in range(text_steps, 0, -1):
            n_lim = n_p / 0.97
            M_lim = C * (5 + k) + H * (4 + 2 * k) + O
            m_lim = n_lim * M_lim / 0.99
            V = 5 * m_lim + 2 * m_lim + n_lim * 1.2 * M_meoh / 0.792
            m = m_lim + 5 * m_lim * rho_thf + 0.05 * n_lim * M_cat + 1.2 * n_lim * M_meoh + 2 * m_lim * rho_w
            batches = max(1, -(-V // (630 * 0.8)))
            rows.append((n_lim, m_lim, V, m, batches))
            n_p = n_lim
        return sum(r[3] for r in rows)

    return run


def main() -> int:
    big = "--big" in sys.argv
    import routeplan
    from routeplan.route.load import load_route_text

    demo = ROOT / "demo_routes" / "hx17-linear.yaml"
    exe = Path(sys.executable).with_name("routeplan")
    out = tempfile.mkdtemp()
    print("ratio                                                    measured        target")

    floor = process_seconds([sys.executable, "-c", "import pint, pydantic, ruamel.yaml, networkx, click"])
    cmd = process_seconds([str(exe), "plan", str(demo), "--json", os.path.join(out, "p.json")])
    print(f"1 plan demo --json / import floor     {cmd:.3f} / {floor:.3f} s = {cmd / floor:5.2f}x   1.2x")
    click_floor = process_seconds([sys.executable, "-c", "import click"])
    helps = process_seconds([str(exe), "--help"])
    print(f"2 routeplan --help / import click     {helps:.3f} / {click_floor:.3f} s = {helps / click_floor:5.2f}x   1.5x")

    text = linear_route(200)
    route = load_route_text(text, "b200.yaml")
    routeplan.plan_route(route)
    t_plan = best(lambda: routeplan.plan_route(route))
    t_float = best(plain_float_walk(200), repeat=20)
    print(f"3 plan 200 steps / plain-float walk   {t_plan * 1e3:.2f} / {t_float * 1e3:.3f} ms = {t_plan / t_float:5.1f}x   40x")

    from ruamel.yaml import YAML

    def compose():
        y = YAML(typ="safe", pure=False)
        y.version = (1, 2)
        y.compose(text)

    t_compose = best(compose)
    t_load = best(lambda: load_route_text(text, "b200.yaml"))
    print(f"4 load 200 steps / ruamel compose     {t_load * 1e3:.1f} / {t_compose * 1e3:.1f} ms = {t_load / t_compose:5.2f}x   3x")

    sizes = (10, 50, 250, 2000, 10000) if big else (10, 50, 250)
    previous = None
    for n in sizes:
        body = linear_route(n).replace("yield: 97 %", "yield: 99.9 %")
        repeat = 3 if n <= 250 else 1
        t = best(lambda: routeplan.plan_route(load_route_text(body, "g.yaml")), repeat=repeat)
        growth = "" if previous is None else f"x{t / previous[1]:.1f} for x{n / previous[0]:.0f} steps"
        print(f"5 load + plan {n:>5} steps                {t:8.3f} s {growth:>22}")
        previous = (n, t)

    from routeplan.export.terminal import print_plan

    plan = routeplan.plan_route(route)

    def show():
        print_plan(plan, file=io.StringIO(), width=120)

    t_term = best(show, repeat=5)
    print(f"6 terminal output, 200 steps / plan   {t_term:.3f} / {t_plan:.3f} s = {t_term / t_plan:5.2f}x   < 0.2 s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
