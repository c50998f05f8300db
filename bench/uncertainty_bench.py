"""Benchmark: yield draws of a 30-step route against a bare numpy computation.

Run: ``python bench/uncertainty_bench.py``.  Side by side in one run (best of several
runs each, after the imports are warm):

* routeplan: :func:`routeplan.plan.uncertainty.yield_uncertainty` on a plan of a
  30-step linear route, every step with a yield range, 100 000 draws (percentiles,
  probability, confidence target, purchases and step shares included);
* bare numpy: the same beta-PERT samples (same generator, seed and chunks) and their
  products along the route, and the same percentiles, with nothing else.

It prints both times and their ratio (the aim: within 3x), then the peak memory that
numpy allocates (``tracemalloc``) for 1 000 000 draws, and the process's peak resident
set size.
"""

from __future__ import annotations

import resource
import sys
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from plan_bench import best, linear_route  # noqa: E402

STEPS = 30
DRAWS = 100_000
BIG = 1_000_000


def ranged_route(n: int) -> str:
    """The benchmark's linear route with a yield range on every step."""
    return linear_route(n).replace("yield: 97 %", "yield: {expected: 97 %, low: 90 %, high: 99 %}")


def bare(fw, draws: int, seed: int = 1):
    """The same samples and products in plain numpy: beta-PERT draws, prod(Y / m), percentiles."""
    import numpy as np

    from routeplan.plan.uncertainty import CHUNK, pert_shape

    low = np.array([s.low for s in fw.steps])[:, None]
    high = np.array([s.high for s in fw.steps])[:, None]
    mode = np.array([s.planned_yield for s in fw.steps])[:, None]
    alpha, beta = pert_shape(low, mode, high)
    rng = np.random.default_rng(seed)
    out = np.empty(draws)
    for start in range(0, draws, CHUNK):
        n = min(CHUNK, draws - start)
        y = low + (high - low) * rng.beta(alpha, beta, size=(len(mode), n))
        out[start:start + n] = np.prod(y / mode, axis=0)
    return np.percentile(out, [10, 50, 90])


def main() -> None:
    from routeplan.plan.planner import plan_route
    from routeplan.plan.uncertainty import forward_structure, yield_uncertainty
    from routeplan.route.load import load_route_text

    plan = plan_route(load_route_text(ranged_route(STEPS)))
    fw = forward_structure(plan)
    ours = yield_uncertainty(plan, confidence=0.9, draws=DRAWS)
    ref = bare(fw, DRAWS)
    same = all(abs(a - b * fw.required_kg) <= 1e-9 * fw.required_kg
               for a, b in zip((ours.p10_kg, ours.p50_kg, ours.p90_kg), ref))
    t_ours = best(lambda: yield_uncertainty(plan, confidence=0.9, draws=DRAWS))
    t_bare = best(lambda: bare(fw, DRAWS))
    print(f"{STEPS} steps, {DRAWS} draws: routeplan {t_ours * 1000:.0f} ms, bare numpy {t_bare * 1000:.0f} ms, "
          f"ratio {t_ours / t_bare:.2f} (aim: at most 3); same P10/P50/P90: {same}")

    tracemalloc.start()
    t = time.perf_counter()
    yield_uncertainty(plan, confidence=0.9, draws=BIG)
    elapsed = time.perf_counter() - t
    _current, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # [MiB] (Linux gives KiB)
    print(f"{STEPS} steps, {BIG} draws: {elapsed:.1f} s, peak traced allocation {peak / 2**20:.0f} MiB, "
          f"peak resident set of the process {rss:.0f} MiB")


if __name__ == "__main__":
    main()
