"""The plan as the terminal says it: one unit per kind for the whole plan, numbers at 3-4
significant figures, compact yield lines, notes from the charges."""

from __future__ import annotations

import re

import pytest

from conftest import ROOT
from routeplan.export.terminal import render
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from routeplan.views.display_units import SETS, plan_units
from routeplan.views.numbers import QUANTITY_FIGURES, SHARE_FIGURES
from routeplan.views.plan_text import batch_notes, plan_blocks, yield_blocks
from routeplan.views.text_blocks import Grid
from text_helpers import KIND, QUANTITY_RE, significant_figures

LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"
HEADING_UNIT = re.compile(r"\[(mmol|kmol|mol|mg|kg|g|t|mL|L|m³)\]")


@pytest.fixture(scope="module")
def routes():
    return {"linear": load_route(LINEAR), "convergent": load_route(CONVERGENT)}


def _units_seen(plan) -> tuple[dict[str, set[str]], list[str]]:
    """Units of each kind in every table heading and every sentence of the printout (the
    purchase list's pack sizes are as the route file writes them, so left out), and the
    numbers printed with them."""
    seen: dict[str, set[str]] = {"amount": set(), "mass": set(), "volume": set()}
    numbers = []
    blocks = plan_blocks(plan)
    for b in blocks:
        if isinstance(b, Grid):
            for c in b.columns:
                for unit in HEADING_UNIT.findall(c.heading):
                    seen[KIND[unit]].add(unit)
    text = render([b for b in blocks if not (isinstance(b, Grid) and b.title.startswith("To order"))], 1000)
    for number, unit in QUANTITY_RE.findall(text):
        seen[KIND[unit]].add(unit)
        numbers.append(number)
    return seen, numbers


@pytest.mark.parametrize("target, name", [("50 g", "lab"), (None, "kilo"), ("500 kg", "plant")])
def test_one_unit_per_kind_in_every_table_and_sentence(routes, target, name):
    # issue 19: units never jump between tables; the scale of the campaign chooses them once
    plan = plan_route(routes["linear"], target)
    assert plan_units(plan) is SETS[name]
    seen, numbers = _units_seen(plan)
    want = SETS[name]
    assert seen == {"amount": {want.amount.symbol}, "mass": {want.mass.symbol}, "volume": {want.volume.symbol}}
    assert numbers, "no quantity found in the sentences"


def test_scaled_from_50_g_to_500_kg_the_units_change_once_for_the_whole_plan(routes):
    small, large = (plan_route(routes["linear"], t) for t in ("50 g", "500 kg"))
    seen_small, _ = _units_seen(small)
    seen_large, _ = _units_seen(large)
    # every kind has exactly one unit in each plan, and it changed with the scale
    assert all(len(v) == 1 for v in (*seen_small.values(), *seen_large.values()))
    assert seen_small["amount"] == {"mmol"} and seen_large["amount"] == {"kmol"}
    assert seen_small["mass"] == {"g"} and seen_large["mass"] == {"kg"}
    # the units chosen never depend on a table's own numbers: 500 kg has per-batch columns
    # of a few kg and totals of tonnes, both in kg
    grids = [b for b in plan_blocks(large) if isinstance(b, Grid)]
    assert {c.heading for g in grids for c in g.columns if "m/batch" in c.heading} == {"m/batch [kg]"}


@pytest.mark.parametrize("target", ["50 g", None, "500 kg", "3 t"])
def test_every_quantity_has_four_significant_figures(routes, target):
    # issue 19: never more than four significant figures, never fewer than three
    for route in routes.values():
        plan = plan_route(route, target)
        _, numbers = _units_seen(plan)
        for number in numbers:
            if float(number.replace(" ", "")) != 0:
                assert significant_figures(number, QUANTITY_FIGURES) == QUANTITY_FIGURES, number
        for b in plan_blocks(plan):
            if not isinstance(b, Grid):
                continue
            for i, c in enumerate(b.columns):
                figures = QUANTITY_FIGURES if HEADING_UNIT.search(c.heading) or c.heading.startswith("cost") \
                    else SHARE_FIGURES if c.heading == "equiv" else None
                if figures is None:
                    continue
                for row in b.rows:
                    if row[i] not in ("–", "0"):
                        assert significant_figures(row[i], figures) == figures, (c.heading, row[i])


def test_the_units_option_changes_every_table_alike(routes):
    plan = plan_route(routes["linear"])
    blocks = plan_blocks(plan, SETS["lab"])
    headings = {c.heading for b in blocks if isinstance(b, Grid) for c in b.columns if "[" in c.heading}
    assert headings >= {"n [mmol]", "m [g]", "V [mL]", "mass [g]", "volume [mL]", "need [g]", "need [mL]"}
    assert not any(u in h for h in headings for u in ("[mol]", "[kg]", "[L]"))


def test_yields_compact_when_they_agree(routes):
    plan = plan_route(routes["linear"])
    lines = [p.text for p in yield_blocks(plan)]
    assert lines[0].startswith("Overall yield along the longest linear sequence (S1 -> S2 -> S3 -> S4 -> S5): 63.4 %")
    assert lines[1:] == ["the same from its starting material: aminophenol"]


def test_yields_listed_where_they_differ(routes):
    plan = plan_route(routes["convergent"])
    oy = plan.overall_yield
    lines = [p.text for p in yield_blocks(plan)]
    assert len(lines) == 2  # one compact line, whatever the number of starting materials
    differ = {k for k, y in oy.by_raw_material.items() if round(y, 3) != round(oy.yield_, 3)}
    assert differ == set(oy.by_raw_material) == {"aminophenol", "morpholine"}
    assert lines[1] == "from the starting materials: aminophenol 79.1 % · morpholine 70.4 %"


def test_batch_notes_come_from_the_charges(routes):
    # the notes are worded here, from the plan's charges: one per mixture carried in (its
    # volume the charge's, in the plan's units), and one naming the charges without a density
    plan = plan_route(routes["linear"])
    s2, s4 = plan.step("S2"), plan.step("S4")
    assert batch_notes(s2, SETS["kilo"], plan.route) == [
        "the volume leaves out acetamidophenol and K2CO3 (no density in the route file)"]
    carried = next(c for c in s4.charges if c.carried_from)
    assert batch_notes(s4, SETS["lab"], plan.route) == [
        f"Na-salt comes in solution from S3: {SETS['lab'].volume_text(carried.V_L)} of its mixture carried in"]


def test_a_gas_is_not_named_for_its_missing_density(tmp_path):
    # a gas taken up (phase: gas) is never part of the liquid volume: its volume is in the
    # safety lines, so the notes do not ask for its density
    from conftest import route_text
    from routeplan.route.load import load_route_text

    plan = plan_route(load_route_text(route_text("hydrogenation.yaml"), "h.yaml"))
    notes = [n for sp in plan.steps for n in batch_notes(sp, SETS["kilo"], plan.route)]
    assert not any("H2" in n.split("(")[0].split() for n in notes), notes
    gases = [(c.material, c.V_L) for sp in plan.steps for c in sp.charges
             if plan.route.materials[c.material].phase == "gas"]
    assert gases == [("H2", None)]  # charged, with no volume: it would be named if it were a liquid


def test_the_legend_explains_only_the_marks_the_plan_uses(routes):
    from conftest import route_text
    from routeplan.route.load import load_route_text

    linear = plan_blocks(plan_route(routes["linear"]))[1].text
    assert "(S1) after a material" in linear and "in solution" in linear  # S3 is telescoped
    assert "(separated)" not in linear  # no wash leaves in the demo
    washed = plan_route(load_route_text(route_text("telescoped-wash.yaml"), "w.yaml"))
    assert "(separated): run off right after it is charged" in plan_blocks(washed)[1].text


def test_the_marks_are_explained_with_a_step_of_the_route(routes):
    # a newcomer reads "(B1) after a material" in a route whose steps are B1..B3, not S1
    from routeplan.views.schedule_text import schedule_parts

    plan = plan_route(routes["convergent"])
    assert "(B1) after a material: made in step B1" in plan_blocks(plan)[1].text
    head = schedule_parts(plan)[0]
    assert "|B1 marks the start of a batch of B1" in head and "S1" not in head
