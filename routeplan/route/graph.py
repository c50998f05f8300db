"""The route graph: materials and steps as a networkx directed graph.

Nodes are ``("material", key)`` and ``("step", id)``.  Edges run material -> step
for every material a step charges (attribute ``charge``: the :class:`Charge`), and
step -> material for the step's main product (attribute ``product=True``) and each
by-product (``product=False``).  Step nodes carry ``step`` (the :class:`Step`);
material nodes carry ``material`` (the :class:`Material`).

networkx is imported inside the functions, never at module top.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    import networkx as nx

    from routeplan.route.model import Route

__all__ = [
    "build_graph",
    "step_graph",
    "find_step_cycle",
    "execution_order",
    "longest_linear_sequence",
    "steps_leading_to",
]


def build_graph(route: "Route") -> "nx.DiGraph":
    """Build the material/step graph of ``route``."""
    import networkx as nx

    g = nx.DiGraph()
    for key, mat in route.materials.items():
        g.add_node(("material", key), kind="material", material=mat)
    for s in route.steps:
        g.add_node(("step", s.id), kind="step", step=s)
        for c in s.charges:
            g.add_edge(("material", c.material), ("step", s.id), charge=c)
        for t in s.equation.products:
            g.add_edge(("step", s.id), ("material", t.key), product=(t.key == s.product))
    return g


def step_graph(steps) -> "nx.DiGraph":
    """Graph of steps only: an edge A -> B when B charges A's main product.

    Parameters
    ----------
    steps : iterable
        Objects with ``id``, ``product`` and ``charges`` (each with ``material``);
        works on the domain :class:`Step` and on anything shaped like it.
    """
    import networkx as nx

    steps = list(steps)
    made_by = {}
    for s in steps:
        made_by.setdefault(s.product, s.id)
    g = nx.DiGraph()
    for s in steps:
        g.add_node(s.id)
    for s in steps:
        for c in s.charges:
            src = made_by.get(c.material)
            if src is not None:
                g.add_edge(src, s.id, material=c.material)
    return g


def find_step_cycle(steps) -> list[str] | None:
    """Return one cycle of steps as ``[S3, S5, S3]``, or None when there is none."""
    import networkx as nx

    g = step_graph(steps)
    if nx.is_directed_acyclic_graph(g):  # linear time; find_cycle is far slower on a large DAG
        return None
    try:
        cycle = nx.find_cycle(g)
    except nx.NetworkXNoCycle:
        return None
    nodes = [u for u, _v in cycle]
    return nodes + [nodes[0]]


def execution_order(route: "Route") -> list[str]:
    """Step ids in an order in which every step runs after the steps feeding it.

    Ties are broken by the order of the steps in the file, so the order is stable.
    """
    import networkx as nx

    g = step_graph(route.steps)
    position = {s.id: i for i, s in enumerate(route.steps)}
    return list(nx.lexicographical_topological_sort(g, key=lambda n: position[n]))


def steps_leading_to(route: "Route", step_id: str) -> set[str]:
    """Ids of ``step_id`` and every step upstream of it."""
    import networkx as nx

    g = step_graph(route.steps)
    return set(nx.ancestors(g, step_id)) | {step_id}


def longest_linear_sequence(route: "Route") -> list[str]:
    """The longest chain of steps that ends at the step making the target.

    The longest linear sequence counts steps, not yields; among chains of equal length
    the one whose steps come first in execution order is taken, so the answer is stable.
    """
    import networkx as nx

    g = step_graph(route.steps)
    order = execution_order(route)
    final = next(s.id for s in route.steps if s.product == route.target.material)
    keep = set(nx.ancestors(g, final)) | {final}
    best: dict[str, list[str]] = {}
    for sid in order:
        if sid not in keep:
            continue
        preds = [p for p in g.predecessors(sid) if p in keep]
        chain: list[str] = []
        for p in sorted(preds, key=order.index):
            if len(best[p]) > len(chain):
                chain = best[p]
        best[sid] = chain + [sid]
    return best[final]
