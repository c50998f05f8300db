"""Laws the plan must obey, whatever the route: scaling, naming, ordering, conservation."""

import io
import math
import random
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from ruamel.yaml import YAML

from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route, load_route_text
from routeplan.units import Q

DEMO = sorted(Path(__file__).resolve().parents[2].joinpath("demo_routes").glob("hx17-*.yaml"))


def numbers(plan):
    """Every mol, mass and volume of a plan, keyed by (step, order, field)."""
    out = {}
    for sp in plan.steps:
        for c in sp.charges:
            for name in ("mol", "mass", "volume"):
                q = getattr(c, name)
                out[(sp.id, c.order, name)] = None if q is None else q.to_base_units().magnitude
        out[(sp.id, 0, "product")] = sp.product_mol.m_as("mol")
    for r in plan.raw_materials:
        out[("raw", r.material, "mass")] = r.mass.m_as("kg")
    return out


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(target=st.floats(min_value=0.01, max_value=5000.0))
def test_doubling_the_target_doubles_every_charge(path, target):
    route = load_route(path)
    one = numbers(plan_route(route, Q(target, "kg")))
    two = numbers(plan_route(route, Q(2 * target, "kg")))
    assert one.keys() == two.keys()
    for key, v in one.items():
        if v is None:
            assert two[key] is None
        else:
            assert math.isclose(two[key], 2 * v, rel_tol=1e-12), key


def _yaml():
    y = YAML(typ="safe", pure=True)
    y.default_flow_style = False
    return y


def _dump(doc) -> str:
    buf = io.StringIO()
    _yaml().dump(doc, buf)
    return buf.getvalue()


def _rename(doc, mapping):
    """Rename material keys everywhere they are used."""
    def term(t):
        parts = t.split()
        parts[-1] = mapping.get(parts[-1], parts[-1])
        return " ".join(parts)

    def side(s):
        return " + ".join(term(t.strip()) for t in s.split("+"))

    doc["materials"] = {mapping.get(k, k): v for k, v in doc["materials"].items()}
    doc["target"]["material"] = mapping[doc["target"]["material"]]
    for st_ in doc["steps"]:
        left, right = st_["equation"].split("->")
        st_["equation"] = side(left) + " -> " + side(right)
        for key in ("limiting", "product"):
            if key in st_:
                st_[key] = mapping[st_[key]]
        for c in st_.get("charges", []):
            c["material"] = mapping[c["material"]]
        if "dosing" in st_:
            st_["dosing"]["material"] = mapping[st_["dosing"]["material"]]
    return doc


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
@settings(max_examples=10, deadline=None)
@given(seed=st.integers(0, 10**6))
def test_renaming_and_reordering_change_no_number(path, seed):
    rng = random.Random(seed)
    base = plan_route(load_route(path))
    doc = _yaml().load(path.read_text())
    keys = list(doc["materials"])
    mapping = {k: f"m{i}_{rng.randrange(1000)}" for i, k in enumerate(keys)}
    doc = _rename(doc, mapping)
    # shuffle materials, steps and the keys inside every mapping (charges keep their order)
    items = list(doc["materials"].items())
    rng.shuffle(items)
    doc["materials"] = dict(items)
    rng.shuffle(doc["steps"])
    doc["steps"] = [dict(rng.sample(list(s.items()), len(s))) for s in doc["steps"]]
    top = list(doc.items())
    rng.shuffle(top)
    other = plan_route(load_route_text(_dump(dict(top)), "shuffled.yaml"))
    back = {v: k for k, v in mapping.items()}
    b = {(sp.id, c.material): c for sp in base.steps for c in sp.charges}
    o = {(sp.id, back[c.material]): c for sp in other.steps for c in sp.charges}
    assert b.keys() == o.keys()
    for key, c in b.items():
        for name in ("mol", "mass", "volume"):
            x, y = getattr(c, name), getattr(o[key], name)
            assert (x is None) == (y is None)
            if x is not None:
                assert math.isclose(x.magnitude, y.m_as(x.units), rel_tol=1e-12), (key, name)
    assert {back[r.material]: r.mass.m_as("kg") for r in other.raw_materials} == pytest.approx(
        {r.material: r.mass.m_as("kg") for r in base.raw_materials}, rel=1e-12)


@settings(max_examples=30, deadline=None)
@given(
    masses=st.lists(st.floats(min_value=20.0, max_value=900.0), min_size=2, max_size=9),
    target=st.floats(min_value=0.001, max_value=1e4),
)
def test_perfect_linear_route_needs_exactly_the_target_moles(masses, target):
    # all yields 100 %, all equiv 1: n(start) = n(target) whatever the molar masses
    n = len(masses) - 1
    lines = [f"route: perfect", f"target: {{material: I{n}, amount: {target!r} kg}}", "materials:"]
    lines += [f"  I{k}: {{molar_mass: {m!r} g/mol}}" for k, m in enumerate(masses)]
    lines.append("steps:")
    lines += [f"  - {{id: S{k}, equation: I{k - 1} -> I{k}, yield: 100 %}}" for k in range(1, n + 1)]
    plan = plan_route(load_route_text("\n".join(lines) + "\n", "perfect.yaml"))
    n_target = target * 1000 / masses[-1]
    (start,) = plan.raw_materials
    assert start.material == "I0"
    assert math.isclose(start.mol.m_as("mol"), n_target, rel_tol=1e-12)
    assert math.isclose(plan.overall_yield.yield_, 1.0)
