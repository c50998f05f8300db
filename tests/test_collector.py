"""The cyclic collector is paused while a route loads or a plan is built, and left as the
caller had it afterwards, also when the load or the plan fails."""

from __future__ import annotations

import gc

import pytest

import routeplan
from routeplan.collector import paused
from routeplan.errors import PlanError, RouteError
from routeplan.route.load import load_route_text

from conftest import GOOD_ROUTE


@pytest.fixture
def collector_on():
    was = gc.isenabled()
    gc.enable()
    yield
    if not was:
        gc.disable()


def _seen_inside(monkeypatch, module, name):
    """Wrap ``module.name`` to record whether the collector was on while it ran."""
    seen = []
    inner = getattr(module, name)

    def spy(*args, **kwargs):
        seen.append(gc.isenabled())
        return inner(*args, **kwargs)

    monkeypatch.setattr(module, name, spy)
    return seen


def test_load_and_plan_run_paused_and_restore(collector_on, monkeypatch):
    import routeplan.plan.charges as charges
    import routeplan.route.load as load

    in_load = _seen_inside(monkeypatch, load, "check_parts")
    in_plan = _seen_inside(monkeypatch, charges, "step_plans")
    route = routeplan.load_route(GOOD_ROUTE)
    assert in_load == [False] and gc.isenabled()
    routeplan.plan_route(route)
    assert in_plan == [False] and gc.isenabled()


def test_a_failure_restores_the_collector(collector_on):
    with pytest.raises(RouteError):
        load_route_text("route: x\nsteps: [\n", "bad.yaml")
    assert gc.isenabled()
    route = routeplan.load_route(GOOD_ROUTE)
    with pytest.raises(PlanError):
        routeplan.plan_route(route, "-5 kg")
    assert gc.isenabled()


def test_a_caller_who_turned_it_off_keeps_it_off(collector_on):
    gc.disable()
    routeplan.plan_route(routeplan.load_route(GOOD_ROUTE))
    assert not gc.isenabled()
    with paused():
        with paused():
            assert not gc.isenabled()
        assert not gc.isenabled()
