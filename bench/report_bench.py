"""Benchmark: the HTML report of the demo route and of generated routes of 30 steps.

Run: ``python bench/report_bench.py``.  Prints, for each route, the time of load + plan
and the time of the report beyond it (layout, charts, structures, templates), best of a
few runs after a first, warm-up run has loaded matplotlib, RDKit and jinja2; and the
first report's time with those imports, which is what one command waits for.
Budget: the demo report under 1.5 s beyond the plan, 30 steps under 3 s.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _formula(counts: dict[str, int]) -> str:
    order = ["C", "H"] + sorted(k for k in counts if k not in ("C", "H"))
    return "".join(f"{e}{counts[e] if counts[e] != 1 else ''}" for e in order if counts.get(e))


def branched_route(n: int, *, branch: int = 3, telescope_every: int = 4) -> str:
    """A route of ``n`` steps: a main chain that takes in a side branch every few steps.

    Side branches are chains of ``branch`` homologations of 4-alkylphenols (each with a
    SMILES, so their structures are drawn); the main chain alternates a homologation
    with the coupling of a branch's end product (``M + B -> M' + H2O``; formula only).
    Every ``telescope_every``-th homologation of the main chain is telescoped.
    """
    lines = ["route: bench branched", "materials:",
             "  MeOH: {formula: CH4O, density: 0.792 g/mL, price: 0.5}",
             "  H2O: {formula: H2O, density: 1.0 g/mL}",
             "  THF: {formula: C4H8O, density: 0.889 g/mL, price: 3.0}",
             "  M0: {name: 4-methoxyphenol, smiles: COc1ccc(O)cc1, price: 12}"]
    steps: list[str] = []
    main = {"C": 7, "H": 8, "O": 2}
    k = j = h = 0
    while len(steps) < n:
        if (k % 2 == 1) and len(steps) + branch + 1 <= n:
            j += 1
            lines.append(f"  B{j}_0: {{name: phenol {j}, smiles: 'Oc1ccccc1', price: 4}}")
            for b in range(1, branch + 1):
                lines.append(f"  B{j}_{b}: {{name: branch {j} intermediate {b}, smiles: '{'C' * b}c1ccc(O)cc1', assay: 99 %}}")
                steps.append("\n".join([
                    f"  - id: B{j}.{b}", f"    name: homologation {b} of branch {j}",
                    f"    equation: B{j}_{b - 1} + MeOH -> B{j}_{b} + H2O", "    yield: 93 %",
                    "    charges:", f"      - {{material: B{j}_{b - 1}}}", "      - {material: THF, volumes: 5}",
                    "      - {material: MeOH, equiv: 1.3}"]))
            side = {"C": 6 + branch, "H": 6 + 2 * branch, "O": 1}
            new = {e: main.get(e, 0) + side.get(e, 0) - {"H": 2, "O": 1}.get(e, 0) for e in set(main) | set(side)}
            k += 1
            lines.append(f"  M{k}: {{name: coupled intermediate {k}, formula: {_formula(new)}, assay: 98 %}}")
            steps.append("\n".join([
                f"  - id: C{k}", f"    name: coupling with branch {j}",
                f"    equation: M{k - 1} + B{j}_{branch} -> M{k} + H2O", "    yield: 85 %",
                "    charges:", f"      - {{material: M{k - 1}}}", f"      - {{material: B{j}_{branch}, equiv: 1.1}}",
                "      - {material: THF, volumes: 8}"]))
            main = new
        else:
            new = dict(main, C=main["C"] + 1, H=main["H"] + 2)
            k += 1
            lines.append(f"  M{k}: {{name: chain intermediate {k}, formula: {_formula(new)}, assay: 98 %}}")
            h += 1
            telescoped = h % telescope_every == 0 and len(steps) < n - 1
            steps.append("\n".join([
                f"  - id: C{k}", f"    name: homologation {k}", f"    equation: M{k - 1} + MeOH -> M{k} + H2O",
                "    yield: 95 %"] + (["    isolated: false"] if telescoped else []) + [
                "    charges:", f"      - {{material: M{k - 1}}}", "      - {material: THF, volumes: 6}",
                "      - {material: MeOH, equiv: 1.2}", "      - {material: H2O, volumes: 2, role: workup}"]))
            main = new
    head = [f"target: {{material: M{k}, amount: 25 kg}}", "currency: EUR"]
    return "\n".join(lines[:1] + head + lines[1:] + ["steps:"] + steps) + "\n"


def _best(fn, repeat: int = 3) -> tuple[float, float]:
    """Best wall-clock time and best processor time of ``fn`` over ``repeat`` runs [s]."""
    wall = cpu = float("inf")
    for _ in range(repeat):
        t, c = time.perf_counter(), time.process_time()
        fn()
        wall = min(wall, time.perf_counter() - t)
        cpu = min(cpu, time.process_time() - c)
    return wall, cpu


def main() -> int:
    sys.path.insert(0, str(ROOT))
    sys.path.insert(0, str(ROOT / "bench"))
    import routeplan
    from plan_bench import convergent_route, linear_route
    from routeplan.export.html import plan_html
    from routeplan.route.load import load_route, load_route_text

    cases = [("demo hx17-linear", lambda: load_route(ROOT / "demo_routes" / "hx17-linear.yaml")),
             ("demo hx17-convergent", lambda: load_route(ROOT / "demo_routes" / "hx17-convergent.yaml")),
             ("linear 30", lambda: load_route_text(linear_route(30), "linear-30.yaml")),
             ("convergent 30", lambda: load_route_text(convergent_route(30), "convergent-30.yaml")),
             ("branched 30", lambda: load_route_text(branched_route(30), "branched-30.yaml"))]
    plan = routeplan.plan_route(cases[0][1]())
    t = time.perf_counter()
    plan_html(plan)  # the first report loads jinja2, matplotlib and RDKit
    first = time.perf_counter() - t
    print(f"first report (imports of jinja2, matplotlib, RDKit included): {first:.3f} s")
    print("times: wall clock / processor time of this process (the second does not count waiting for a "
          "busy machine)")
    print(f"{'route':<22}{'steps':>6}{'load+plan [s]':>16}{'report [s]':>16}{'size [kB]':>11}"
          f"{'as plan --html [s]':>20}{'size [kB]':>11}")
    for name, load in cases:
        p_wall, p_cpu = _best(lambda: routeplan.plan_route(load()))
        plan = routeplan.plan_route(load())
        h_wall, h_cpu = _best(lambda: plan_html(plan))
        size = len(plan_html(plan).encode()) / 1024
        # what plan --html does: the plan with its derivation, then the report with them
        route = load()
        e_wall, e_cpu = _best(lambda: plan_html(routeplan.plan_route(route, explain=True)))
        e_size = len(plan_html(routeplan.plan_route(route, explain=True)).encode()) / 1024
        print(f"{name:<22}{len(plan.steps):>6}{p_wall:>8.3f}/{p_cpu:<7.3f}{h_wall:>8.3f}/{h_cpu:<7.3f}{size:>11.0f}"
              f"{e_wall:>12.3f}/{e_cpu:<7.3f}{e_size:>11.0f}")
    print("budget: demo report under 1.5 s beyond the plan, 30 steps under 3 s; 'as plan --html' is the plan "
          "with its derivation and the report with them (load not included)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
