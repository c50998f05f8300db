"""The route graph: materials and steps as a networkx directed graph.

Nodes are ``("material", key)`` and ``("step", id)``.  Edges run material -> step
for every material a step charges (attribute ``charge``: the :class:`Charge`), and
step -> material for the step's main product (attribute ``product=True``) and each
by-product (``product=False``).  Step nodes carry ``step`` (the :class:`Step`);
material nodes carry ``material`` (the :class:`Material`).

networkx is imported inside the functions, never at module top.  The planner's own
questions (the execution order, the longest linear sequence, the steps upstream of a
step, whether the steps form a cycle) need only who feeds whom, which
:class:`StepLinks` holds in two plain dicts: building a networkx graph for them cost
more than answering them.
"""

from __future__ import annotations

import heapq
from typing import TYPE_CHECKING

from routeplan.frozen import kept

if TYPE_CHECKING:  # pragma: no cover
    import networkx as nx

    from routeplan.route.model import Route

__all__ = [
    "build_graph",
    "step_graph",
    "StepLinks",
    "step_links",
    "route_step_links",
    "keep_step_links",
    "upstream",
    "find_step_cycle",
    "execution_order",
    "topological_order",
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


class StepLinks:
    """Who feeds whom among the steps, as :func:`step_graph` has it, in two plain dicts.

    ``pred[B]`` and ``succ[A]`` hold an entry ``A`` and ``B`` when B charges A's main
    product (the value is the material).  Both dicts have every step, in the order
    given; each inner dict is in the order the edges were met, as networkx keeps them,
    so :func:`topological_order` reads it as it reads a ``DiGraph``.
    """

    __slots__ = ("succ", "pred")

    def __init__(self, succ: dict, pred: dict) -> None:
        self.succ, self.pred = succ, pred


def step_links(steps) -> StepLinks:
    """:class:`StepLinks` of ``steps``: the edges of :func:`step_graph`, without networkx.

    Parameters
    ----------
    steps : iterable
        Objects with ``id``, ``product`` and ``charges`` (each with ``material``).
    """
    steps = list(steps)
    made_by: dict[str, str] = {}
    for s in steps:
        made_by.setdefault(s.product, s.id)
    succ: dict[str, dict] = {s.id: {} for s in steps}
    pred: dict[str, dict] = {s.id: {} for s in steps}
    for s in steps:
        sid, into = s.id, pred[s.id]
        for c in s.charges:
            src = made_by.get(c.material)
            if src is not None:
                succ[src][sid] = into[src] = c.material
    return StepLinks(succ, pred)


#: Where a Route keeps its step links (in its ``__dict__``; a Route is frozen).
_LINKS = "_step_links"


def route_step_links(route: "Route") -> StepLinks:
    """:func:`step_links` of ``route.steps``, built once per route (a Route is frozen; the
    loader keeps those its cycle check built, :func:`keep_step_links`); read them, never
    change them."""
    return kept(route, _LINKS, lambda: step_links(route.steps))


def keep_step_links(route: "Route", links: StepLinks) -> None:
    """Keep ``links`` (the step links of ``route.steps``, built before the Route was) on the
    route, for :func:`route_step_links` to read."""
    route.__dict__[_LINKS] = links


def upstream(links: StepLinks, step_id: str) -> set[str]:
    """Ids of the steps upstream of ``step_id`` (``networkx.ancestors``), without it."""
    pred = links.pred
    seen: set[str] = set()
    todo = [step_id]
    while todo:
        for p in pred[todo.pop()]:
            if p not in seen:
                seen.add(p)
                todo.append(p)
    seen.discard(step_id)  # on a cycle through it, as networkx: a node is not its own ancestor
    return seen


def _reaching_a_cycle(g) -> list:
    """Nodes of ``g`` (a :class:`StepLinks` or a ``DiGraph``) from which a cycle can be
    reached, in ``g``'s node order.

    Peels off, one pass and no recursion, every node whose successors are all peeled
    (a DAG peels off completely).
    """
    out_degree = {n: len(s) for n, s in g.succ.items()}
    pred = g.pred
    todo = [n for n, d in out_degree.items() if d == 0]
    while todo:
        n = todo.pop()
        for p in pred[n]:
            out_degree[p] -= 1
            if out_degree[p] == 0:
                todo.append(p)
    return [n for n in g.pred if out_degree[n] > 0]


def find_step_cycle(steps, links: StepLinks | None = None) -> list[str] | None:
    """Return one cycle of steps as ``[S3, S5, S3]``, or None when there is none.

    Steps that cannot reach a cycle are set aside first, in linear time and on plain
    dicts, so a long route without a cycle costs one pass; only a route with a cycle
    gets its networkx graph, and the cycle reported is the one a depth-first search from
    the first remaining step (in file order) meets.  ``links``: the steps'
    :func:`step_links`, when the caller has them already.
    """
    steps = list(steps)
    left = _reaching_a_cycle(step_links(steps) if links is None else links)
    if not left:
        return None
    import networkx as nx

    cycle = nx.find_cycle(step_graph(steps).subgraph(left))
    nodes = [u for u, _v in cycle]
    return nodes + [nodes[0]]


def execution_order(route: "Route") -> list[str]:
    """Step ids in an order in which every step runs after the steps feeding it.

    Ties are broken by the order of the steps in the file, so the order is stable.
    Worked out once per route (a Route is frozen).  A file that already lists every
    step after the steps feeding it (the usual way of writing a route) is its own
    order: the sort would give it back, so one pass over the links checks it instead.
    """
    def make() -> tuple[str, ...]:
        links = route_step_links(route)
        position = {s.id: i for i, s in enumerate(route.steps)}
        if all(position[p] < position[sid] for sid, into in links.pred.items() for p in into):
            return tuple(position)
        return tuple(topological_order(links, position.__getitem__))

    return list(kept(route, "_execution_order", make))


def topological_order(g: "nx.DiGraph | StepLinks", key) -> list:
    """The nodes of ``g`` in topological order, ties to the smallest ``key(node)``.

    Kahn's algorithm with the ready nodes in a heap: the order
    ``networkx.lexicographical_topological_sort(g, key=key)`` gives, at a fraction of its
    cost (it spends about 4 us a node on wrapping and dispatch, which a plan of 10 000
    steps pays more than once).  ``g`` must have no cycle (the loader refuses one).
    """
    succ, pred = g.succ, g.pred
    rank = {n: (key(n), i) for i, n in enumerate(pred)}  # ties on the key: the graph's node order
    waiting = {n: len(p) for n, p in pred.items()}
    ready = [(rank[n], n) for n, k in waiting.items() if k == 0]
    heapq.heapify(ready)
    out = []
    while ready:
        _rank, n = heapq.heappop(ready)
        out.append(n)
        for m in succ[n]:
            waiting[m] -= 1
            if waiting[m] == 0:
                heapq.heappush(ready, (rank[m], m))
    if len(out) < len(waiting):  # the loader refuses a cycle; kept as a guard
        raise ValueError("the steps form a cycle")
    return out


def steps_leading_to(route: "Route", step_id: str) -> set[str]:
    """Ids of ``step_id`` and every step upstream of it."""
    return upstream(route_step_links(route), step_id) | {step_id}


def longest_linear_sequence(route: "Route") -> list[str]:
    """The longest chain of steps that ends at the step making the target.

    The longest linear sequence counts steps, not yields.  Among chains of equal length
    the one with the **lowest overall expected yield** is taken (the product of the steps'
    ``yield.expected`` [-] along the chain, from its first step on), then the one whose
    tuple of step ids is lexicographically smallest.  The answer depends on the route
    alone, never on the order of steps or materials in the file, and it does not change
    with ``--yields`` (the rule reads the expected yields).

    The search is a single pass over the steps in execution order with a parent pointer
    per step (no recursion), so a route of any length is fine; it runs once per route.

    Parameters
    ----------
    route : Route
        Anything with ``steps`` (``id``, ``product``, ``charges``, ``yield_.expected``)
        and ``target.material``.

    Returns
    -------
    list of str
        Step ids from the first step of the chain to the step making the target.

    Examples
    --------
    Two branches of two steps meet in ``S5``; branch ``A`` (0.9 x 0.8 = 0.72) yields less
    than branch ``B`` (0.85 x 0.85 = 0.7225), so it is the longest linear sequence:

    >>> from types import SimpleNamespace as NS
    >>> def step(id, product, feeds, y):
    ...     return NS(id=id, product=product, charges=[NS(material=m) for m in feeds],
    ...               yield_=NS(expected=y))
    >>> steps = [step("B1", "b1", ["rb"], 0.85), step("B2", "b2", ["b1"], 0.85),
    ...          step("A1", "a1", ["ra"], 0.9), step("A2", "a2", ["a1"], 0.8),
    ...          step("S5", "p", ["a2", "b2"], 0.95)]
    >>> longest_linear_sequence(NS(steps=steps, target=NS(material="p")))
    ['A1', 'A2', 'S5']
    """
    return list(kept(route, "_longest_linear_sequence", lambda: tuple(_longest_chain(route))))


def _longest_chain(route: "Route") -> list[str]:
    """:func:`longest_linear_sequence` worked out (see there)."""
    links = route_step_links(route)
    final = next(s.id for s in route.steps if s.product == route.target.material)
    keep = upstream(links, final) | {final}
    expected = {s.id: s.yield_.expected for s in route.steps}
    length: dict[str, int] = {}
    overall: dict[str, float] = {}  # product of expected yields along the chosen chain [-]
    parent: dict[str, str | None] = {}

    def ids_first_smaller(a: str, b: str) -> bool:
        """True when the chain ending at ``a`` has smaller ids than the one at ``b``.

        Both chains are equally long: walk back in step until they meet; the difference
        nearest to the chains' start decides.
        """
        first_a = first_b = None
        while a is not None and a != b:
            first_a, first_b = a, b
            a, b = parent[a], parent[b]
        return first_a is not None and first_a < first_b

    for sid in execution_order(route):
        if sid not in keep:
            continue
        best = None
        for p in links.pred[sid]:
            if p not in keep:
                continue
            if (best is None or length[p] > length[best]
                    or (length[p] == length[best]
                        and (overall[p] < overall[best]
                             or (overall[p] == overall[best] and ids_first_smaller(p, best))))):
                best = p
        parent[sid] = best
        length[sid] = 1 if best is None else length[best] + 1
        overall[sid] = expected[sid] if best is None else overall[best] * expected[sid]
    chain: list[str] = []
    at: str | None = final
    while at is not None:
        chain.append(at)
        at = parent[at]
    return chain[::-1]
