"""Benchmark: load + plan of synthetic linear and convergent routes of 10, 50, 200 steps.

Run: ``python bench/plan_bench.py``.  Prints the time of load and plan for each size
(best of several runs, after the imports are warm) and the growth from size to size,
which should be about linear.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path


def linear_route(n: int) -> str:
    """A linear route of ``n`` methylene-homologation steps with a solvent and a catalyst."""
    lines = ["route: bench linear", "target: {material: I%d, amount: 25 kg}" % n, "materials:",
             "  MeOH: {formula: CH4O, density: 0.792 g/mL}", "  H2O: {formula: H2O, density: 1.0 g/mL}",
             "  THF: {formula: C4H8O, density: 0.889 g/mL}", "  cat: {formula: H3BO3}"]
    for k in range(n + 1):
        lines.append(f"  I{k}: {{formula: C{6 + k}H{6 + 2 * k}O, assay: 99 %}}")
    lines.append("equipment: {R: {volume: 630 L}}")
    lines.append("steps:")
    for k in range(1, n + 1):
        lines += [
            f"  - id: S{k}",
            f"    equation: I{k - 1} + MeOH -> I{k} + H2O",
            "    yield: 97 %",
            "    vessel: R",
            "    charges:",
            f"      - {{material: I{k - 1}}}",
            "      - {material: THF, volumes: 5}",
            "      - {material: cat, mol_percent: 5}",
            "      - {material: MeOH, equiv: 1.2}",
            "      - {material: H2O, volumes: 2, role: workup}",
        ]
    return "\n".join(lines) + "\n"


def convergent_route(n: int) -> str:
    """A convergent route of ``n`` steps: half side steps, half coupling steps."""
    half = n // 2
    lines = ["route: bench convergent", "target: {material: M%d, amount: 25 kg}" % half, "materials:",
             "  H2O: {formula: H2O, density: 1.0 g/mL}", "  THF: {formula: C4H8O, density: 0.889 g/mL}",
             "  M0: {formula: C6H6O}"]
    for k in range(1, half + 1):
        lines.append(f"  A{k}: {{formula: C2H4O2}}")
        lines.append(f"  J{k}: {{formula: C3H6O2, assay: 98 %}}")
        lines.append(f"  M{k}: {{formula: C{6 + 3 * k}H{6 + 4 * k}O{1 + k}, assay: 99 %}}")
        lines.append(f"  B{k}: {{formula: CH4O, density: 0.792 g/mL}}")
    lines.append("steps:")
    for k in range(1, half + 1):
        lines += [
            f"  - id: J{k}",
            f"    equation: A{k} + B{k} -> J{k} + H2O",
            "    yield: 90 %",
            "    charges:",
            f"      - {{material: A{k}}}",
            f"      - {{material: B{k}, equiv: 1.5}}",
            "      - {material: THF, volumes: 4}",
            f"  - id: C{k}",
            f"    equation: M{k - 1} + J{k} -> M{k} + H2O",
            "    yield: 95 %",
            "    charges:",
            f"      - {{material: M{k - 1}}}",
            f"      - {{material: J{k}, equiv: 1.1}}",
            "      - {material: THF, volumes: 6}",
        ]
    return "\n".join(lines) + "\n"


def best(fn, repeat: int = 3, before=None) -> float:
    """Best wall time of ``fn()`` [s] over ``repeat`` runs; ``before()`` runs untimed first."""
    out = float("inf")
    for _ in range(repeat):
        if before is not None:
            before()
        t = time.perf_counter()
        fn()
        out = min(out, time.perf_counter() - t)
    return out


def main() -> int:
    import routeplan
    from routeplan.route.load import load_route_text

    # warm the imports and the unit registry so that only the work is timed
    routeplan.plan_route(load_route_text(linear_route(2), "warm.yaml"))
    print(f"{'route':<12}{'steps':>6}{'load [s]':>11}{'plan [s]':>11}{'total [s]':>11}{'growth':>9}")
    worst = 0.0
    for kind, build in (("linear", linear_route), ("convergent", convergent_route)):
        previous = None
        for n in (10, 50, 200):
            text = build(n)
            t_load = best(lambda: load_route_text(text, f"{kind}-{n}.yaml"))
            route = load_route_text(text, f"{kind}-{n}.yaml")
            t_plan = best(lambda: routeplan.plan_route(route))
            total = t_load + t_plan
            growth = "" if previous is None else f"x{total / previous[1]:.1f}/x{n / previous[0]:.0f}"
            print(f"{kind:<12}{n:>6}{t_load:>11.4f}{t_plan:>11.4f}{total:>11.4f}{growth:>9}")
            previous = (n, total)
            if n == 200:
                worst = max(worst, total)
    print(f"largest 200-step load + plan: {worst:.3f} s (budget: well under 0.5 s)")
    return 0


if __name__ == "__main__":
    sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
    raise SystemExit(main())
