"""The arithmetic core proven dimensionally: the same walk on floats, pint Quantities and numpy arrays.

``routeplan.plan.core`` is written once with plain arithmetic.  Compiled with every
constant carrying its unit (``compile_route(..., quantity=Q)``), the same walk runs on
pint Quantities: every expression must then be dimensionally consistent (pint raises on
adding kg to L) and every result must come out in the unit its name promises (mol, kg,
L), equal to the float plan.  The same code on numpy arrays gives, element by element,
the float plan of each target.  Units from NIST SP 811 (pint's definitions).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from routeplan.plan.core import compile_route, contents, target_amount, walk
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from routeplan.units import Q, registry

DEMO = Path(__file__).resolve().parents[2] / "demo_routes"
ROUTES = sorted(DEMO.glob("hx17-*.yaml")) + sorted((DEMO.parent / "tests" / "data" / "routes").glob("*.yaml"))


def _same(q, f, dim, unit):
    """``q`` (pint) has dimension ``dim`` and equals the float ``f`` in ``unit``; both None or neither."""
    assert (q is None) == (f is None), (q, f)
    if q is not None:
        assert q.check(dim), (q, dim)
        assert q.m_as(unit) == pytest.approx(f, rel=1e-12)


def _walk_both(route, amount_kg):
    plain = compile_route(route)
    proof = compile_route(route, quantity=Q)
    n_plain = target_amount(amount_kg, plain.overage, plain.target_kg_per_mol_pure)
    n_proof = target_amount(Q(amount_kg, "kg"), proof.overage, proof.target_kg_per_mol_pure)
    return walk(plain, n_plain), walk(proof, n_proof), n_plain, n_proof


@pytest.mark.parametrize("path", ROUTES, ids=lambda p: p.stem)
def test_every_expression_of_the_walk_is_dimensionally_consistent(path):
    route = load_route(path)
    floats, quants, n_plain, n_proof = _walk_both(route, 25.0)
    ureg = registry()
    assert n_proof.dimensionality == ureg.mol.dimensionality
    assert n_proof.m_as("mol") == pytest.approx(n_plain, rel=1e-12)
    for sid, wq in quants.items():
        wf = floats[sid]
        assert wq.n_lim.check("[substance]") and wq.m_lim.check("[mass]")
        assert wq.n_lim.m_as("mol") == pytest.approx(wf.n_lim, rel=1e-12)
        assert wq.m_lim.m_as("kg") == pytest.approx(wf.m_lim, rel=1e-12)
        for (nq, mq, Vq), (nf, mf, Vf) in zip(wq.charges, wf.charges):
            assert mq.check("[mass]"), (sid, mq)
            assert mq.m_as("kg") == pytest.approx(mf, rel=1e-12)
            assert (nq is None) == (nf is None) and (Vq is None) == (Vf is None)
            if nq is not None:
                assert nq.check("[substance]"), (sid, nq)
                assert nq.m_as("mol") == pytest.approx(nf, rel=1e-12)
            if Vq is not None:
                assert Vq.check("[volume]"), (sid, Vq)
                assert Vq.m_as("L") == pytest.approx(Vf, rel=1e-12)


@pytest.mark.parametrize("path", ROUTES, ids=lambda p: p.stem)
def test_what_each_vessel_holds_is_dimensionally_consistent(path):
    # the volumes and masses of the vessels (fullest volume, the mixture a telescoped step
    # passes on, the volume it brings into the next step, the reaction mass) from the same
    # core on pint Quantities: each in its dimension and equal to the float plan
    route = load_route(path)
    floats, quants, _, _ = _walk_both(route, 25.0)
    plain = contents(compile_route(route), floats)
    proof = contents(compile_route(route, quantity=Q), quants)
    plan = plan_route(route, Q(25.0, "kg"))
    for sid, hq in proof.items():
        hf = plain[sid]
        _same(hq.fullest_V, hf.fullest_V, "[volume]", "L")
        _same(hq.transfer_V, hf.transfer_V, "[volume]", "L")
        _same(hq.transfer_m, hf.transfer_m, "[mass]", "kg")
        _same(hq.reaction_m, hf.reaction_m, "[mass]", "kg")
        _same(hq.gas_m, hf.gas_m, "[mass]", "kg")
        for Vq, Vf in zip(hq.lines_V, hf.lines_V):
            _same(Vq, Vf, "[volume]", "L")
        for mq, mf in zip(hq.lines_m, hf.lines_m):
            _same(mq, mf, "[mass]", "kg")
        # and the plan is made of these numbers
        sp = plan.step(sid)
        assert sp.batch.step_V_L == pytest.approx(hq.fullest_V.m_as("L") if hq.fullest_V is not None else 0.0,
                                                  rel=1e-12)
        assert sp.batch.reaction_m_kg == pytest.approx(hq.reaction_m.m_as("kg"), rel=1e-12)
        for c, Vq in zip(sp.charges, hq.lines_V):
            if c.carried_from is not None:
                assert c.V_L == pytest.approx(Vq.m_as("L"), rel=1e-12)


def test_a_slip_in_an_expression_would_be_caught():
    # the proof has teeth: adding a mass to a volume, as a wrong expression would, raises
    with pytest.raises(Exception, match="[Cc]annot convert|dimension"):
        Q(1.0, "kg") + Q(1.0, "L")


@pytest.mark.parametrize("path", ROUTES, ids=lambda p: p.stem)
def test_the_core_on_arrays_is_the_float_plan_element_by_element(path):
    route = load_route(path)
    core = compile_route(route)
    targets = np.array([5.0, 25.0, 40.0])
    arrays = walk(core, target_amount(targets, core.overage, core.target_kg_per_mol_pure))
    for i, t in enumerate(targets):
        plan = plan_route(route, Q(float(t), "kg"))
        for sp in plan.steps:
            w = arrays[sp.id]
            assert w.n_lim[i] == pytest.approx(sp.limiting_n_mol, rel=1e-12)
            for c, (n, m, _V) in zip(sp.charges, w.charges):
                assert m[i] == pytest.approx(c.m_kg, rel=1e-12)
                if n is not None:
                    assert n[i] == pytest.approx(c.n_mol, rel=1e-12)


@pytest.mark.parametrize("path", ROUTES, ids=lambda p: p.stem)
def test_what_each_vessel_holds_on_arrays_is_the_float_plan(path):
    route = load_route(path)
    core = compile_route(route)
    targets = np.array([5.0, 25.0, 40.0])
    held = contents(core, walk(core, target_amount(targets, core.overage, core.target_kg_per_mol_pure)))
    for i, t in enumerate(targets):
        plan = plan_route(route, Q(float(t), "kg"))
        for sp in plan.steps:
            h = held[sp.id]
            assert h.fullest_V[i] == pytest.approx(sp.batch.step_V_L, rel=1e-12)
            assert h.reaction_m[i] == pytest.approx(sp.batch.reaction_m_kg, rel=1e-12)
            if not sp.isolated:
                assert h.transfer_V[i] == pytest.approx(sp.batch.transfer_V_L, rel=1e-12)
                assert h.transfer_m[i] == pytest.approx(sp.batch.transfer_m_kg, rel=1e-12)
            for c, V in zip(sp.charges, h.lines_V):
                if c.carried_from is not None:
                    assert V[i] == pytest.approx(c.V_L, rel=1e-12)


def test_a_route_longer_than_the_recursion_limit_plans():
    # a linear chain longer than Python's recursion limit (1000 frames); bench/engine_bench.py
    # plans 10 000 steps and measures the growth
    import sys

    sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "bench"))
    from plan_bench import linear_route

    from routeplan.route.load import load_route_text

    n = 1500
    route = load_route_text(linear_route(n).replace("yield: 97 %", "yield: 99.9 %"), "long.yaml")
    plan = plan_route(route)
    assert len(plan.steps) == n
    # 0.999 per step: the first step charges 1 / 0.999**n of the target's moles
    first = plan.steps[0]
    assert math.log(first.limiting_n_mol / plan.target_n_mol) == pytest.approx(-n * math.log(0.999), rel=1e-9)
