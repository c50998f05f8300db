"""A Route is equal only to itself: identity equality and a matching hash."""

from pathlib import Path

from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route

DEMO = str(Path(__file__).resolve().parents[2] / "demo_routes" / "hx17-linear.yaml")


def test_two_loads_are_two_routes_with_the_same_source():
    a, b = load_route(DEMO), load_route(DEMO)
    assert a == a and a != b and len({a, b, a}) == 2
    assert a.source.sha256 == b.source.sha256  # how to tell they come from the same bytes
    cache = {a: "a"}
    assert cache.get(a) == "a" and cache.get(b) is None


def test_equal_routes_still_plan_equal_numbers():
    a, b = load_route(DEMO), load_route(DEMO)
    pa, pb = plan_route(a), plan_route(b)
    assert [c.mass for sp in pa.steps for c in sp.charges] == [c.mass for sp in pb.steps for c in sp.charges]
