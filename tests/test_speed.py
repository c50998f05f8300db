"""Planning is never what the user waits for: a loose guard on the benchmark routes.

The ratios of the engine's targets are measured in bench/engine_bench.py; this guard
compares load + plan of 200 steps with ruamel's bare compose of the same file, timed
side by side so that a busy machine slows both, and checks that the growth from 50 to
200 steps stays about linear.
"""

import sys
import time
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "bench"))

from plan_bench import convergent_route, linear_route  # noqa: E402

import routeplan  # noqa: E402
from routeplan.route.load import load_route_text  # noqa: E402


def _best(text: str, repeat: int = 3, *, compose_only: bool = False) -> float:
    from ruamel.yaml import YAML

    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        if compose_only:
            yaml = YAML(typ="safe", pure=False)
            yaml.version = (1, 2)
            yaml.compose(text)
        else:
            routeplan.plan_route(load_route_text(text, "bench.yaml"))
        best = min(best, time.perf_counter() - t)
    return best


@pytest.mark.parametrize("build", [linear_route, convergent_route], ids=["linear", "convergent"])
def test_two_hundred_steps_plan_fast_and_linearly(build):
    _best(build(2), repeat=1)  # warm imports and the unit registry
    t50 = _best(build(50))
    t200 = _best(build(200))
    compose = _best(build(200), compose_only=True)
    assert t200 < max(0.5, 8 * compose), f"load + plan of 200 steps took {t200:.3f} s, compose {compose:.3f} s"
    assert t200 / t50 < 8.0, f"200 vs 50 steps: x{t200 / t50:.1f} (linear would be x4)"
