"""The report's charts as SVG: well-formed, ids kept apart, every series drawn.

The SVG is read back with the standard library's XML parser (xml.etree).
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from dataclasses import replace
from pathlib import Path

import routeplan
from routeplan.export.html_charts import charts, svg_for_page
from routeplan.views.report import chart_data

ROOT = Path(__file__).resolve().parents[2]
SVG = "{http://www.w3.org/2000/svg}"


def _texts(svg: str) -> list[str]:
    return ["".join(e.itertext()) for e in ET.fromstring(svg).iter(f"{SVG}text")]


def test_ids_are_prefixed_and_references_follow():
    svg = '<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg"><defs><clipPath id="p1"/></defs>' \
          '<g id="g1" clip-path="url(#p1)"><use href="#g1"/></g></svg>'
    out = svg_for_page(svg, "c-")
    assert out.startswith("<svg") and 'id="c-p1"' in out and 'url(#c-p1)' in out and 'href="#c-g1"' in out
    assert 'id="p1"' not in out


def test_every_chart_is_well_formed_and_names_its_series():
    plan = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-convergent.yaml"))
    data = chart_data(plan)
    out = charts(data)
    assert set(out) == {"mass", "cost", "yield"} | ({"timeline"} if plan.schedule is not None else set())
    for svg in out.values():
        ET.fromstring(svg)
    mass = _texts(out["mass"])
    assert "whole route" in mass and all(f"step {sp.id}" in mass for sp in plan.steps)
    cost = _texts(out["cost"])
    assert all(r.material in cost for r in plan.raw_materials if r.cost is not None)
    assert all(sid in _texts(out["yield"]) for sid in plan.overall_yield.longest_linear_sequence)
    # the last point of the yield line is the overall yield
    assert f"{100 * plan.overall_yield.yield_:.1f} %" in _texts(out["yield"])


def test_mass_bars_add_up_to_the_pmi():
    """Law: the whole-route bar (by material) and the sum of the step bars are the route PMI."""
    plan = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-linear.yaml"))
    data = chart_data(plan)
    assert abs(sum(v for _m, v in data.mass_by_material) - plan.metrics.pmi) < 1e-9 * plan.metrics.pmi
    assert abs(sum(v for _s, parts in data.mass_by_step for _m, v in parts) - plan.metrics.pmi) < 1e-9 * plan.metrics.pmi


def test_timeline_draws_one_bar_per_batch_in_its_vessel_lane():
    plan = routeplan.plan_route(routeplan.load_route(ROOT / "demo_routes" / "hx17-convergent.yaml"))
    timeline = {"campaign_h": 60.0, "pace_step": "B3", "critical_chain": ["B1", "B3"], "lanes": [
        {"lane": "R250", "vessel": "R250", "idle": [], "bars": [
            {"step": "B1", "batch": 1, "start_h": 0.0, "end_h": 12.0, "pace": False, "critical": True},
            {"step": "B2", "batch": 1, "start_h": 12.0, "end_h": 26.0, "pace": False, "critical": False}]},
        {"lane": "R630", "vessel": "R630", "idle": [[0.0, 26.0]], "bars": [
            {"step": "B3", "batch": 1, "start_h": 26.0, "end_h": 60.0, "pace": True, "critical": True}]}]}
    out = charts(replace(chart_data(plan), timeline=timeline))
    texts = _texts(out["timeline"])
    assert {"R250", "R630", "B1·1", "B2·1", "B3·1"} <= set(texts)
    assert "hours from the campaign start" in texts
