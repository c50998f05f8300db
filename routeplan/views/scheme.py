"""The route as a scheme: boxes and arrows laid out from the route graph, in pixels.

The scheme reads from the raw materials at the top down to the target at the bottom.
Each step is a block of its own (id, name, yield, batches, reagents, telescoped or not)
with arrows in from its inputs and one arrow out to its product, so that the arrow is
labelled with its step.  An intermediate is drawn once; the bought limiting reagent of
a step (the substrate a branch starts from) has a box of its own in front of that step,
and the other bought charges are named in the step's block.

Layout (our own, small and tested):

1. **Layers** by the longest path from the sources of the scheme graph; then every
   node that feeds later layers only is moved down to just before its first use, so a
   short branch joins the chain where it is used (the longest chain keeps its layers).
   An arrow that still spans several layers bends through a narrow lane in each layer
   it crosses, so no arrow runs through a box.
2. **Order in a layer**: by a depth-first walk from the target up through the inputs
   (branches stay together), then a few sweeps sorting each layer by the mean position
   of its neighbours in the layer above and below (the barycentre heuristic; K.
   Sugiyama, S. Tagawa and M. Toda, IEEE Trans. Syst. Man Cybern. 1981, 11, 109).
3. **Positions**: each node wants the mean x of its neighbours; the nearest positions
   that keep the layer's order and a gap between boxes are found by isotonic
   regression (pool-adjacent-violators), so boxes never overlap.

Only geometry and text are computed here; :mod:`routeplan.export.html_scheme` draws it.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["SchemeNode", "SchemeEdge", "Scheme", "scheme_layout", "text_width", "pav_positions",
           "FONT_PX", "STRUCTURE_SIZE"]

#: Font size of the scheme's text [px]; the drawing uses the same.
FONT_PX = 11.0
#: Estimated advance of one character [px]: 0.62 em, above the mean advance of common
#: sans-serif faces (about 0.5-0.55 em; from memory), so that text fits its box.
_CHAR_PX = 0.62 * FONT_PX
_LINE_PX = 14.0
_PAD = 8.0
_MAX_CHARS = 28
#: Width and height of a structure drawing in a material box [px].
STRUCTURE_SIZE = (150.0, 100.0)
_GAP_X = 22.0
_GAP_Y = 30.0
_LANE = 10.0
_MARGIN = 12.0


@frozen
class SchemeNode:
    """One box of the scheme (or a bend of a long arrow, ``kind == "bend"``).

    Attributes
    ----------
    key : str
        Unique key: ``m:<material>``, ``r:<step>:<material>``, ``s:<step>`` or ``b:<n>``.
    kind : str
        ``"material"`` (made in the route), ``"raw"`` (bought, starts a branch), ``"step"``
        or ``"bend"``.
    layer : int
        Layer from the top [-].
    x, y : float
        Centre of the box [px].
    width, height : float
        Size of the box [px].
    lines : tuple of (str, str)
        Text lines as ``(kind, text)``: kind ``"title"``, ``"formula"`` (digits drawn as
        subscripts), ``"text"`` or ``"mark"``.
    material, step : str or None
        The material key or step id the box stands for.
    smiles : str or None
        SMILES of the material, for a structure drawing.
    full_name : str
        The untruncated name (a tooltip).
    target : bool
        True for the target's box.
    telescoped : bool
        A step whose product goes on in solution, or that product.
    structure : tuple of float or None
        ``(left, top, width, height)`` of the structure drawing [px]; None without one.
    baselines : tuple of float
        Baseline of each text line [px].
    """

    key: str
    kind: str
    layer: int
    x: float
    y: float
    width: float
    height: float
    lines: tuple[tuple[str, str], ...] = ()
    material: str | None = None
    step: str | None = None
    smiles: str | None = None
    full_name: str = ""
    target: bool = False
    telescoped: bool = False
    structure: tuple[float, float, float, float] | None = None
    baselines: tuple[float, ...] = ()

    @property
    def box(self) -> tuple[float, float, float, float]:
        """``(left, top, right, bottom)`` [px]."""
        return (self.x - self.width / 2, self.y - self.height / 2,
                self.x + self.width / 2, self.y + self.height / 2)


@frozen
class SchemeEdge:
    """An arrow: a polyline from the bottom of one box to the top of another [px]."""

    source: str
    target: str
    points: tuple[tuple[float, float], ...]
    head: bool


@frozen
class Scheme:
    """A laid-out scheme: boxes, arrows and the size of the drawing [px]."""

    nodes: tuple[SchemeNode, ...]
    edges: tuple[SchemeEdge, ...]
    width: float
    height: float

    def node(self, key: str) -> SchemeNode:
        """The node with ``key``."""
        return next(n for n in self.nodes if n.key == key)


def text_width(text: str) -> float:
    """Estimated width of ``text`` at :data:`FONT_PX` [px]."""
    return len(text) * _CHAR_PX


def _clip(text: str, n: int = _MAX_CHARS) -> str:
    return text if len(text) <= n else text[: n - 1].rstrip() + "…"


def _wrap(text: str, n: int = _MAX_CHARS, lines: int = 2) -> list[str]:
    """``text`` in at most ``lines`` lines of ``n`` characters, the last clipped."""
    words, out, cur = text.split(), [], ""
    for w in words:
        if cur and len(cur) + 1 + len(w) > n:
            out.append(cur)
            cur = w
        else:
            cur = f"{cur} {w}" if cur else w
    if cur:
        out.append(cur)
    if len(out) > lines:
        out = out[: lines - 1] + [" ".join(out[lines - 1:])]
    return [_clip(x, n) for x in out] or [""]


def _yield_text(y: float) -> str:
    return f"yield {100 * y:.3g} %"


def _node_size(lines, structure: bool) -> tuple[float, float]:
    w = max(text_width(t) for _k, t in lines) + 2 * _PAD
    h = len(lines) * _LINE_PX + 2 * _PAD - 4
    if structure:
        w = max(w, STRUCTURE_SIZE[0] + 2 * _PAD)
        h += STRUCTURE_SIZE[1]
    return max(w, 70.0), h


def _material_lines(plan: "Plan", key: str, units: "DisplayUnits", *, made_kg: float | None
                    ) -> list[tuple[str, str]]:
    mat = plan.route.materials[key]
    lines = [("title", t) for t in _wrap(mat.name or key)]
    if mat.name and mat.name != key:
        lines.append(("text", _clip(key)))
    if mat.formula:
        lines.append(("formula", _clip(mat.formula)))
    if key == plan.target_material:
        lines.append(("mark", _clip(f"target · {units.mass_text(plan.target_mass.m_as('kg'))}")))
    elif made_kg is not None:
        lines.append(("text", _clip(f"made {units.mass_text(made_kg)}")))
    return lines


def _step_lines(plan: "Plan", sp, reagents: list[str]) -> list[tuple[str, str]]:
    title = sp.id if not sp.name or sp.name == sp.id else f"{sp.id} · {sp.name}"
    n = sp.batches
    batches = "not run" if not sp.runs else f"{n} batch{'es' if n != 1 else ''}"
    lines = [("title", _clip(title)), ("text", _clip(f"{_yield_text(sp.yield_)} · {batches}"))]
    if reagents:
        lines += [("text", t) for t in _wrap("+ " + ", ".join(reagents), lines=2)]
    if not sp.isolated:
        lines.append(("mark", "telescoped: on in solution"))
    return lines


def _scheme_graph(plan: "Plan", units: "DisplayUnits"):
    """The graph the scheme draws, with node attributes (kind, lines, ...); masses in ``units``."""
    import networkx as nx

    route = plan.route
    rg = route.graph
    g = nx.DiGraph()
    made = {sp.product: sp for sp in plan.steps}
    for sp in plan.steps:
        step = route.step(sp.id)
        reagents = []
        for c in sp.charges:
            if c.material in made and made[c.material].id != sp.id:
                continue
            if c.material == step.limiting:
                continue
            if c.material not in reagents:
                reagents.append(c.material)
        g.add_node(f"s:{sp.id}", kind="step", step=sp.id, lines=_step_lines(plan, sp, reagents),
                   telescoped=not sp.isolated, full_name=f"{sp.id} {sp.name}".strip())
    for sp in plan.steps:
        skey = f"s:{sp.id}"
        step = route.step(sp.id)
        for pred, _s, data in rg.in_edges(("step", sp.id), data=True):
            mkey = pred[1]
            maker = made.get(mkey)
            if maker is not None and maker.id != sp.id:
                g.add_edge(f"m:{mkey}", skey)
            elif mkey == step.limiting:
                rkey = f"r:{sp.id}:{mkey}"
                mat = route.materials[mkey]
                g.add_node(rkey, kind="raw", material=mkey, step=sp.id, smiles=mat.smiles,
                           lines=_material_lines(plan, mkey, units, made_kg=None), full_name=mat.name or mkey)
                g.add_edge(rkey, skey)
        mat = route.materials[sp.product]
        g.add_node(f"m:{sp.product}", kind="material", material=sp.product, step=sp.id, smiles=mat.smiles,
                   lines=_material_lines(plan, sp.product, units, made_kg=sp.product_mass.m_as("kg") if sp.runs else None),
                   target=sp.product == plan.target_material, telescoped=not sp.isolated,
                   full_name=mat.name or sp.product)
        g.add_edge(skey, f"m:{sp.product}")
    return g


def _layers(g, order) -> dict[str, int]:
    """Longest path from the sources, then feeders moved down to just before first use."""
    layer: dict[str, int] = {}
    for n in order:
        layer[n] = max((layer[p] + 1 for p in g.predecessors(n)), default=0)
    for n in reversed(order):
        succ = list(g.successors(n))
        if succ:
            layer[n] = max(layer[n], min(layer[s] for s in succ) - 1)
    return layer


def pav_positions(desired: list[float], widths: list[float], gap: float) -> list[float]:
    """Centres nearest ``desired`` (least squares) keeping order and ``gap`` between boxes [px].

    Pool-adjacent-violators on ``desired[i] - offset[i]``, where ``offset[i]`` is the
    least distance of centre ``i`` from centre 0 (R. E. Barlow et al., *Statistical
    Inference under Order Restrictions*, Wiley 1972: isotonic regression).

    Examples
    --------
    >>> pav_positions([0.0, 0.0], [10.0, 10.0], 2.0)
    [-6.0, 6.0]
    """
    offset = [0.0]
    for i in range(1, len(desired)):
        offset.append(offset[-1] + (widths[i - 1] + widths[i]) / 2 + gap)
    values = [d - o for d, o in zip(desired, offset)]
    blocks: list[list[float]] = []  # [mean, count]
    for v in values:
        blocks.append([v, 1.0])
        while len(blocks) > 1 and blocks[-2][0] > blocks[-1][0]:
            m2, c2 = blocks.pop()
            m1, c1 = blocks.pop()
            blocks.append([(m1 * c1 + m2 * c2) / (c1 + c2), c1 + c2])
    fitted: list[float] = []
    for m, c in blocks:
        fitted += [m] * int(c)
    return [f + o for f, o in zip(fitted, offset)]


def scheme_layout(plan: "Plan", units: "DisplayUnits | None" = None) -> Scheme:
    """Lay out the scheme of ``plan``'s route (see the module notes).

    Parameters
    ----------
    plan : Plan
        A finished plan; its steps give yields, batches and masses made.
    units : DisplayUnits, optional
        The plan's units, for the masses made; default
        :func:`~routeplan.views.display_units.plan_units` (by the target's mass).

    Returns
    -------
    Scheme
        Boxes with centres and sizes [px], arrows as polylines [px], the drawing's size [px].
    """
    import networkx as nx

    from routeplan.route.graph import topological_order
    from routeplan.views.display_units import plan_units

    g = _scheme_graph(plan, units or plan_units(plan))
    position = {f"s:{sp.id}": i for i, sp in enumerate(plan.steps)}

    def rank(n: str) -> tuple:
        d = g.nodes[n]
        return (position.get(f"s:{d.get('step')}", 0), n)

    order = topological_order(g, rank)
    layer = _layers(g, order)

    # long arrows bend through a lane in every layer they cross
    bends = 0
    for u, v in list(g.edges):
        if layer[v] - layer[u] > 1:
            chain = [u]
            for k in range(layer[u] + 1, layer[v]):
                b = f"b:{bends}"
                bends += 1
                g.add_node(b, kind="bend", lines=[])
                layer[b] = k
                chain.append(b)
            chain.append(v)
            g.remove_edge(u, v)
            nx.add_path(g, chain)
    for n, d in g.nodes(data=True):
        if d["kind"] == "bend":
            d["size"] = (_LANE, 0.0)
        else:
            d["drawn"] = _can_draw(d.get("smiles"))
            d["size"] = _node_size(d["lines"], d["drawn"])

    # order: depth-first from the sinks up through the inputs, then barycentre sweeps
    seen: dict[str, int] = {}

    def visit(root: str) -> None:
        # post-order, inputs first; a stack, not recursion: a long linear route is deeper
        # than Python's recursion limit
        stack = [(root, iter(sorted(g.predecessors(root), key=rank)))]
        while stack:
            n, inputs = stack[-1]
            for p in inputs:
                if p not in seen:
                    stack.append((p, iter(sorted(g.predecessors(p), key=rank))))
                    break
            else:
                stack.pop()
                seen[n] = len(seen)

    sinks = sorted((n for n in g if g.out_degree(n) == 0), key=lambda n: (not g.nodes[n].get("target"), rank(n)))
    for s in sinks:
        if s not in seen:
            visit(s)
    n_layers = max(layer.values(), default=-1) + 1
    rows: list[list[str]] = [[] for _ in range(n_layers)]
    for n in sorted(g, key=lambda n: seen[n]):
        rows[layer[n]].append(n)
    for sweep in range(4):
        down = sweep % 2 == 0
        for row in (rows[1:] if down else rows[-2::-1]):
            index = {n: i for r in rows for i, n in enumerate(r)}
            near = g.predecessors if down else g.successors

            def bary(n: str) -> float:
                nb = [index[m] for m in near(n)]
                return sum(nb) / len(nb) if nb else index[n]

            row.sort(key=bary)

    # x: pack each layer, then pull towards neighbours without overlap
    x: dict[str, float] = {}
    for row in rows:
        widths = [g.nodes[n]["size"][0] for n in row]
        for n, c in zip(row, pav_positions([0.0] * len(row), widths, _GAP_X)):
            x[n] = c
    for sweep in range(6):
        down = sweep % 2 == 0
        for row in (rows[1:] if down else rows[-2::-1]):
            near = g.predecessors if down else g.successors
            desired = []
            for n in row:
                nb = [x[m] for m in near(n)]
                desired.append(sum(nb) / len(nb) if nb else x[n])
            widths = [g.nodes[n]["size"][0] for n in row]
            for n, c in zip(row, pav_positions(desired, widths, _GAP_X)):
                x[n] = c
    left = min((x[n] - g.nodes[n]["size"][0] / 2 for n in g), default=0.0)
    right = max((x[n] + g.nodes[n]["size"][0] / 2 for n in g), default=0.0)

    # y: layer bands as tall as their tallest box
    y_top, top = [], _MARGIN
    for row in rows:
        h = max((g.nodes[n]["size"][1] for n in row), default=0.0)
        y_top.append((top, h))
        top += h + _GAP_Y
    height = top - _GAP_Y + _MARGIN

    nodes: dict[str, SchemeNode] = {}
    for n in order + [b for b in g if b.startswith("b:")]:
        d = g.nodes[n]
        w, h = d["size"]
        band_top, band_h = y_top[layer[n]]
        cx, cy = x[n] - left + _MARGIN, band_top + band_h / 2
        top_text = cy - h / 2 + _PAD
        structure = None
        if d.get("drawn"):
            structure = (cx - STRUCTURE_SIZE[0] / 2, top_text, *STRUCTURE_SIZE)
            top_text += STRUCTURE_SIZE[1]
        baselines = tuple(top_text + (i + 1) * _LINE_PX - 4 for i in range(len(d["lines"])))
        nodes[n] = SchemeNode(
            key=n, kind=d["kind"], layer=layer[n], x=cx, y=cy, structure=structure, baselines=baselines,
            width=w, height=h, lines=tuple(d["lines"]), material=d.get("material"), step=d.get("step"),
            smiles=d.get("smiles"), full_name=d.get("full_name", ""), target=bool(d.get("target")),
            telescoped=bool(d.get("telescoped")))

    drawn: list[SchemeEdge] = []
    for n in order:
        for v in g.successors(n):
            chain = [nodes[n]]
            while v.startswith("b:"):
                chain.append(nodes[v])
                v = next(iter(g.successors(v)))
            end = nodes[v]
            pts = [(chain[0].x, chain[0].y + chain[0].height / 2)]
            pts += [(b.x, b.y) for b in chain[1:]]
            pts.append((end.x, end.y - end.height / 2))
            drawn.append(SchemeEdge(source=n, target=v, points=tuple(pts), head=end.kind != "step"))
    ordered = [nodes[n] for n in order] + [nodes[n] for n in nodes if n.startswith("b:")]
    return Scheme(nodes=tuple(ordered), edges=tuple(drawn), width=right - left + 2 * _MARGIN, height=height)


def _can_draw(smiles: str | None) -> bool:
    """True when RDKit is installed and reads ``smiles`` (the box then makes room for it)."""
    if smiles is None:
        return False
    try:
        from rdkit import Chem, RDLogger
    except ImportError:
        return False
    RDLogger.DisableLog("rdApp.*")
    return Chem.MolFromSmiles(smiles) is not None
