"""The route graph: ties between equally long chains, and routes of any length.

The rule (docs/metrics.md): among equally long chains ending at the step that makes the
target, the longest linear sequence is the one with the lowest overall expected yield,
then the lexicographically smallest tuple of step ids.  It must not depend on the order of
steps or materials in the file; it is checked here against a brute-force enumeration of
every chain, and on a real plan's JSON.
"""

from __future__ import annotations

import ast
import json
import math
import sys
from pathlib import Path
from types import SimpleNamespace as NS

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import DATA, ROOT
from routeplan.export.json import plan_to_dict
from routeplan.plan.planner import plan_route
from routeplan.route import graph
from routeplan.route.graph import (execution_order, find_step_cycle, longest_linear_sequence,
                                   steps_leading_to)
from routeplan.route.load import load_route_text


def _step(sid, product, feeds, y=0.9):
    return NS(id=sid, product=product, charges=[NS(material=m) for m in feeds], yield_=NS(expected=y))


def _route(steps, target):
    return NS(steps=list(steps), target=NS(material=target))


# ------------------------------------------------------------------ brute force


def _all_chains_to(steps, final):
    """Every chain of steps ending at ``final`` (each step feeding the next), by enumeration."""
    made = {s.product: s.id for s in steps}
    preds = {s.id: sorted({made[c.material] for c in s.charges if c.material in made}) for s in steps}
    chains, todo = [], [(final,)]
    while todo:  # iterative: a chain grows backwards until it reaches a step fed by nothing
        chain = todo.pop()
        ps = preds[chain[0]]
        if not ps:
            chains.append(chain)
        todo += [(p,) + chain for p in ps]
    return chains


def _by_the_rule(steps, final):
    y = {s.id: s.yield_.expected for s in steps}

    def overall(chain):
        out = 1.0
        for sid in chain:
            out *= y[sid]
        return out

    chains = _all_chains_to(steps, final)
    longest = max(len(c) for c in chains)
    return list(min((c for c in chains if len(c) == longest), key=lambda c: (overall(c), c)))


@st.composite
def dags(draw):
    """A small random route graph: step k may be fed by any earlier steps; the last makes the target."""
    n = draw(st.integers(1, 7))
    # dyadic yields: every product is exact, so ties in yield are real ties
    ys = draw(st.lists(st.sampled_from([0.25, 0.5, 0.75, 1.0]), min_size=n, max_size=n))
    names = draw(st.permutations([f"S{k}" for k in range(n)]))  # ids not in topological order
    steps = []
    for k in range(n):
        feeds = draw(st.sets(st.integers(0, k - 1), max_size=3)) if k else set()
        steps.append(_step(names[k], f"m{k}", [f"m{j}" for j in sorted(feeds)] + [f"raw{k}"], ys[k]))
    return steps, draw(st.permutations(range(n)))


@settings(max_examples=300, deadline=None)
@given(dags())
def test_the_choice_is_the_rule_and_ignores_file_order(case):
    steps, perm = case
    final = steps[-1].product
    expected = _by_the_rule(steps, steps[-1].id)
    assert longest_linear_sequence(_route(steps, final)) == expected
    shuffled = [steps[i] for i in perm]
    assert longest_linear_sequence(_route(shuffled, final)) == expected


@settings(max_examples=200, deadline=None)
@given(dags())
def test_execution_order_is_networkx_lexicographic_order_by_file_position(case):
    # reference: networkx.lexicographical_topological_sort, keyed by the position in the file
    import networkx as nx

    steps, perm = case
    for order in (steps, [steps[i] for i in perm]):
        g = graph.step_graph(order)
        position = {s.id: i for i, s in enumerate(order)}
        expected = list(nx.lexicographical_topological_sort(g, key=position.__getitem__))
        assert execution_order(_route(order, steps[-1].product)) == expected


@st.composite
def step_webs(draw):
    """Small random sets of steps, any step fed by any other (cycles and self-feeding included)."""
    n = draw(st.integers(1, 7))
    names = draw(st.permutations([f"S{k}" for k in range(n)]))
    return [_step(names[k], f"m{k}", [f"m{j}" for j in draw(st.lists(st.integers(0, n - 1), max_size=4))]
                  + [f"raw{k}"]) for k in range(n)]


@settings(max_examples=300, deadline=None)
@given(step_webs())
def test_step_links_are_the_networkx_graph_without_networkx(steps):
    # reference: the networkx DiGraph of step_graph (edges and their order), nx.ancestors,
    # nx.is_directed_acyclic_graph
    import networkx as nx

    g = graph.step_graph(steps)
    links = graph.step_links(steps)
    assert {n: list(d) for n, d in links.succ.items()} == {n: list(d) for n, d in g.succ.items()}
    assert {n: list(d) for n, d in links.pred.items()} == {n: list(d) for n, d in g.pred.items()}
    assert list(links.pred) == list(g)
    for s in steps:
        assert graph.upstream(links, s.id) == nx.ancestors(g, s.id)
    cycle = find_step_cycle(steps)
    assert (cycle is None) == nx.is_directed_acyclic_graph(g)
    if cycle is not None:
        assert cycle[0] == cycle[-1] and all(g.has_edge(a, b) for a, b in zip(cycle, cycle[1:]))


def _edges(links):
    return [(n, sorted(into)) for n, into in links.pred.items()], {n: sorted(out) for n, out in links.succ.items()}


@pytest.mark.parametrize("path", sorted((DATA / "routes").glob("*.yaml")) + sorted((ROOT / "demo_routes").glob("hx17-*.yaml"))
                         + [None], ids=lambda p: "bench-convergent" if p is None else p.name)
def test_the_links_the_loader_keeps_are_those_of_the_built_steps(path):
    # the loader's cycle check works on the file's lines and equations; the Route keeps its
    # links, so they must be the links of the built steps (implicit lines included)
    if str(ROOT / "bench") not in sys.path:
        sys.path.insert(0, str(ROOT / "bench"))
    import plan_bench

    text = plan_bench.convergent_route(12) if path is None else path.read_text(encoding="utf-8")
    route = load_route_text(text, "r.yaml")
    kept = route.__dict__[graph._LINKS]
    assert _edges(kept) == _edges(graph.step_links(route.steps))


def test_equal_yields_fall_back_to_step_ids():
    # two branches of two steps with equal overall yields (0.9 * 0.8 = 0.8 * 0.9): ids decide
    steps = [_step("B1", "b1", ["rb"], 0.8), _step("B2", "b2", ["b1"], 0.9),
             _step("A1", "a1", ["ra"], 0.9), _step("A2", "a2", ["a1"], 0.8),
             _step("Z", "p", ["b2", "a2"], 1.0)]
    assert 0.9 * 0.8 == 0.8 * 0.9
    assert longest_linear_sequence(_route(steps, "p")) == ["A1", "A2", "Z"]
    assert longest_linear_sequence(_route(steps[::-1], "p")) == ["A1", "A2", "Z"]


def test_length_comes_before_yield():
    steps = [_step("A1", "a1", ["ra"], 0.1), _step("B1", "b1", ["rb"], 0.99),
             _step("B2", "b2", ["b1"], 0.99), _step("Z", "p", ["a1", "b2"], 1.0)]
    assert longest_linear_sequence(_route(steps, "p")) == ["B1", "B2", "Z"]


# ------------------------------------------------------------------ any length


def test_no_function_in_graph_calls_itself():
    tree = ast.parse(Path(graph.__file__).read_text(encoding="utf-8"))
    for fn in (n for n in ast.walk(tree) if isinstance(n, (ast.FunctionDef, ast.AsyncFunctionDef))):
        called = {c.func.id for c in ast.walk(fn) if isinstance(c, ast.Call) and isinstance(c.func, ast.Name)}
        assert fn.name not in called, f"{fn.name} is recursive"


def test_ten_thousand_linear_steps():
    n = 10_000
    assert sys.getrecursionlimit() < n  # a recursive walk would fail here
    steps = [_step(f"S{k:05d}", f"I{k}", [f"I{k - 1}" if k else "start"], 0.99) for k in range(n)]
    route = _route(steps[::-1], f"I{n - 1}")  # listed last step first
    ids = [s.id for s in steps]
    assert execution_order(route) == ids
    assert longest_linear_sequence(route) == ids
    assert steps_leading_to(route, ids[-1]) == set(ids)
    assert find_step_cycle(route.steps) is None


def test_ten_thousand_steps_in_two_equal_branches():
    n = 5_000
    a = [_step(f"A{k:04d}", f"a{k}", [f"a{k - 1}" if k else "ra"], 0.9) for k in range(n)]
    b = [_step(f"B{k:04d}", f"b{k}", [f"b{k - 1}" if k else "rb"], 0.9) for k in range(n)]
    z = _step("Z", "p", [f"b{n - 1}", f"a{n - 1}"], 1.0)
    # equal yields along both branches: the ids decide, A before B
    assert longest_linear_sequence(_route(b + a + [z], "p")) == [s.id for s in a] + ["Z"]


# ------------------------------------------------------------------ a real plan

MATERIALS = {  # molar masses balance every equation by mass (no formulas needed)
    "RA": "{molar_mass: 100 g/mol, price: 12}", "A1": "{molar_mass: 100 g/mol}",
    "A2": "{molar_mass: 100 g/mol}", "RB": "{molar_mass: 80 g/mol, price: 20}",
    "B1": "{molar_mass: 80 g/mol}", "B2": "{molar_mass: 80 g/mol}", "P": "{molar_mass: 180 g/mol}",
    "toluene": "{formula: C7H8, density: 0.867 g/mL, price: 2}",
}


def _route_text(ya, yb, step_order, material_order):
    steps = {
        "SA1": f"{{id: SA1, equation: RA -> A1, yield: {ya[0]} %}}",
        "SA2": f"{{id: SA2, equation: A1 -> A2, yield: {ya[1]} %}}",
        "SB1": f"{{id: SB1, equation: RB -> B1, yield: {yb[0]} %}}",
        "SB2": f"{{id: SB2, equation: B1 -> B2, yield: {yb[1]} %}}",
        "SC": ("{id: SC, equation: A2 + B2 -> P, limiting: A2, yield: 95 %, "
               "charges: [{material: B2, equiv: 1.1}, {material: toluene, volumes: 5}]}"),
    }
    keys = list(MATERIALS)
    lines = ["route: two equal branches", "currency: EUR", "target: {material: P, amount: 25 kg}", "materials:"]
    lines += [f"  {keys[i]}: {MATERIALS[keys[i]]}" for i in material_order]
    lines += ["steps:"] + [f"  - {steps[k]}" for k in step_order]
    return "\n".join(lines) + "\n"


def _canonical(x):
    """The JSON with every list sorted (the file order of independent steps aside) and floats to 12 digits."""
    if isinstance(x, dict):
        return {k: _canonical(v) for k, v in x.items()}
    if isinstance(x, list):
        return sorted((_canonical(v) for v in x), key=lambda v: json.dumps(v, sort_keys=True))
    if isinstance(x, float) and math.isfinite(x):
        return float(f"{x:.12g}")
    return x


def _plan_json(text):
    data = json.loads(json.dumps(plan_to_dict(plan_route(load_route_text(text, "ties.yaml")))))
    data.pop("source")  # the file's bytes and name
    return data


YIELDS = st.sampled_from([80, 85, 90, 95])


@settings(max_examples=25, deadline=None)
@given(ya=st.tuples(YIELDS, YIELDS), yb=st.tuples(YIELDS, YIELDS),
       steps=st.permutations(["SA1", "SA2", "SB1", "SB2", "SC"]),
       materials=st.permutations(range(len(MATERIALS))))
def test_reordering_the_file_changes_nothing_in_the_plan(ya, yb, steps, materials):
    base = _plan_json(_route_text(ya, yb, ["SA1", "SA2", "SB1", "SB2", "SC"], range(len(MATERIALS))))
    other = _plan_json(_route_text(ya, yb, steps, materials))
    assert base["warnings"] == []
    lls = base["overall_yield"]["longest_linear_sequence"]
    a, b = ya[0] * ya[1], yb[0] * yb[1]
    assert lls == (["SA1", "SA2", "SC"] if a <= b else ["SB1", "SB2", "SC"])  # lowest yield, then ids
    # the sequence, the overall yield and its range are the same numbers, in the same order
    assert other["overall_yield"] == base["overall_yield"]
    assert other["metrics"]["longest_linear_sequence"] == base["metrics"]["longest_linear_sequence"]
    assert _canonical(other) == _canonical(base)
