"""The derivation of every number of a plan: the plan's own core, run once on recording numbers.

:func:`routeplan.plan.core.compile_route` builds every constant of the route through a
number factory; here the factory makes a :class:`Traced` number, a pint Quantity that
also remembers what it is, where it came from (the route file's line, the atomic weights
table) and, for a result, the operation and the operands that made it.  The unchanged
core (:func:`~routeplan.plan.core.target_amount`, :func:`~routeplan.plan.core.walk`)
then runs on these numbers, so the derivation is the computation itself, never a second
copy of it.  The tree is cut into lines at the named amounts (moles of target, demand
and limiting reagent of each step, every charge), each line a chain of factors
``start x a / b ...`` or a sum ``a + b - c``.

Data only: sentences are :mod:`routeplan.views.derivation_text`'s.
"""

from __future__ import annotations

import functools
from typing import TYPE_CHECKING, Any, Mapping

from routeplan.frozen import frozen
from routeplan.units import magnitude

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.route.model import Route

__all__ = ["Factor", "Line", "Traced", "Derivation", "derive", "ATOMIC_WEIGHTS_SOURCE"]

#: Where every molar mass computed from a formula comes from (routeplan/chemistry/atomic_weights.csv).
ATOMIC_WEIGHTS_SOURCE = "CIAAW 2021"


class Traced:
    """A pint Quantity that records the operation which made it.

    ``node`` is ``("leaf", what, source)`` for a constant, ``("num",)`` for a plain
    number of the code (1, 0), ``("zero",)`` for the zero of a demand, or
    ``(op, left, right)`` with op one of ``mul div add sub``.
    """

    __slots__ = ("q", "node")

    def __init__(self, q: "pint.Quantity", node: tuple):
        self.q = q
        self.node = node

    # -- arithmetic: exactly the core's operations, each recorded
    @staticmethod
    def _wrap(x: Any) -> "Traced":
        if isinstance(x, Traced):
            return x
        from routeplan.units import Q

        return Traced(Q(float(x), ""), ("num",))

    def _is_zero(self) -> bool:
        return self.node[0] == "zero"

    def __mul__(self, other):
        if not isinstance(other, Traced) and other == 0:
            return Traced(self.q * 0, ("zero",))
        o = self._wrap(other)
        return Traced(self.q * o.q, ("mul", self, o))

    def __rmul__(self, other):
        o = self._wrap(other)
        return Traced(o.q * self.q, ("mul", o, self))

    def __truediv__(self, other):
        o = self._wrap(other)
        return Traced(self.q / o.q, ("div", self, o))

    def __rtruediv__(self, other):
        o = self._wrap(other)
        return Traced(o.q / self.q, ("div", o, self))

    def __add__(self, other):
        o = self._wrap(other)
        if self._is_zero():
            return o
        if o._is_zero():
            return self
        return Traced(self.q + o.q, ("add", self, o))

    def __radd__(self, other):
        return self._wrap(other).__add__(self)

    def __sub__(self, other):
        o = self._wrap(other)
        if o._is_zero():
            return self
        return Traced(self.q - o.q, ("sub", self, o))

    def __rsub__(self, other):
        return self._wrap(other).__sub__(self)

    def __le__(self, other):
        return self.q <= self._wrap(other).q

    def __lt__(self, other):
        return self.q < self._wrap(other).q

    def __ge__(self, other):
        return self.q >= self._wrap(other).q

    def __gt__(self, other):
        return self.q > self._wrap(other).q

    def __repr__(self) -> str:  # pragma: no cover - debugging aid
        return f"Traced({self.q!r}, {self.node[0]})"


@frozen
class Factor:
    """One factor of a line.

    Attributes
    ----------
    op : str
        ``"start"`` (the first), ``"x"``, ``"/"``, ``"+"`` or ``"-"``.
    value : float
        Magnitude in ``unit``.
    unit : str
        pint unit name (``""`` for a pure number [-]).
    what : str
        What the number is (``"overage"``, ``"molar mass of HX17"``, an earlier result).
    source : str
        Where it comes from: ``"route.yaml line 12"``, ``"C14H18N2O4, CIAAW 2021"``, or
        ``"line 2 of this derivation"`` for an earlier result.
    ref : int or None
        Index of the earlier line whose result this factor is, else None.
    line : int or None
        In a chain cut at a step (:meth:`Derivation.step_chain`): index in
        :attr:`Derivation.lines` of the line whose result this factor is, where that
        line is derived with another step; else None.
    """

    op: str
    value: float
    unit: str
    what: str
    source: str
    ref: int | None = None
    line: int | None = None


@frozen
class Line:
    """One line: factors multiplied (or added) out to ``value`` [``unit``], called ``what``."""

    factors: tuple[Factor, ...]
    value: float
    unit: str
    what: str


# display units of the constants and of the results (values inside are SI-like fixed units)
_SHOW = {"kg/mol": "g/mol", "kg/L": "kg/L", "mol/L": "mol/L", "L/kg": "L/kg", "kg/kg": "kg/kg"}


def _where(route: "Route", loc) -> str:
    """``"file line N"`` for a Location, or ``"the route file"``."""
    file = route.source.path if route.source is not None else (loc.file if loc is not None else None)
    name = file if file else "the route file"
    if loc is not None and loc.line is not None:
        return f"{name} line {loc.line}"
    return name


def _label(route: "Route", what: tuple) -> tuple[str, str]:
    """(what it is, where it comes from) for a constant named by the core's ``what``."""
    kind, obj, *rest = what
    if kind == "molar_mass":
        if obj.formula:
            return f"molar mass of {obj.key}", f"{obj.formula}, {ATOMIC_WEIGHTS_SOURCE}"
        if obj.smiles:
            return f"molar mass of {obj.key}", f"SMILES {obj.smiles}, {ATOMIC_WEIGHTS_SOURCE}"
        return f"molar mass of {obj.key}", _where(route, obj.location)
    if kind in ("assay", "mass_fraction", "molarity", "density", "solution_density"):
        words = {"assay": "assay", "mass_fraction": "mass fraction", "molarity": "molarity",
                 "density": "density", "solution_density": "density of the solution"}[kind]
        return f"{words} of {obj.key}", _where(route, obj.location)
    if kind == "overage":
        return "overage", _where(route, obj.location)
    if kind == "yield":
        case = rest[0] if rest else "expected"
        return f"{case} yield of {obj.id}", _where(route, obj.location)
    if kind == "nu_ratio":
        return (f"nu({obj.product}) / nu({obj.limiting}) in {obj.id}",
                _where(route, obj.location) + " (equation)")
    if kind == "gas_ratio":
        return (f"nu({rest[0]}) / nu({obj.limiting}) in {obj.id} (gas evolved)",
                _where(route, obj.location) + " (equation)")
    step, charge = obj, rest[0]
    words = {"volumes": "volumes", "mass_ratio": "mass ratio"}.get(kind, str(charge.basis).replace("_", " "))
    src = _where(route, charge.location)
    if charge.implicit:
        src = _where(route, step.location) + " (equation; no charge line)"
    return f"{words} of {charge.material} in {step.id}", src


def _factory(route: "Route"):
    """The number factory for :func:`routeplan.plan.core.compile_route`: a labelled :class:`Traced`."""
    from routeplan.units import Q

    def quantity(value: float, unit_name: str, what: tuple | None = None) -> Traced:
        text, source = _label(route, what) if what is not None else ("constant", "")
        show = _SHOW.get(unit_name, unit_name)
        q = Q(float(value), unit_name)
        if show != unit_name:
            q = q.to(show)
        return Traced(q, ("leaf", text, source))

    return quantity


@frozen
class Derivation:
    """Every named amount of a plan with the lines that derive it.

    Attributes
    ----------
    lines : tuple of Line
        Every line, each after the lines it refers to.
    named : Mapping[tuple, int]
        ``("target",)``, ``("product", step)``, ``("limiting", step)``,
        ``("limiting_mass", step)``, ``("charge", step, index, "n"|"m"|"V")`` (for a
        line carried in solution, ``"V"`` is the volume of mixture carried in),
        ``("transfer", step, "V"|"m")`` (a telescoped step's mixture that goes on),
        ``("reaction_mass", step)``, ``("raw", material, "m")`` -> index of its line.
    """

    lines: tuple[Line, ...]
    named: Mapping[tuple, int]

    def chain(self, *keys: tuple) -> tuple[Line, ...]:
        """The lines needed for ``keys``, in order, renumbered from 0 (refs follow)."""
        return self.cut(*keys)[1]

    def charge(self, step: str, index: int) -> tuple[Line, ...]:
        """The lines of charge ``index`` (0-based) of ``step``, down to its moles, mass and volume."""
        return self.chain(*self.charge_keys(step, index))

    def charge_keys(self, step: str, index: int) -> tuple[tuple, ...]:
        """The named keys of charge ``index`` of ``step`` that have a line (moles, mass, volume)."""
        return tuple(k for k in (("charge", step, index, x) for x in "nmV") if k in self.named)

    def home(self, i: int) -> str | None:
        """The step with which line ``i`` is derived: the step a charge line charges, the
        step whose limiting reagent or demand the line is; None for a line of no step
        (the target alone, an unnamed part of a line)."""
        return self._homes.get(i)

    @functools.cached_property
    def _homes(self) -> dict[int, str]:
        # a telescoped step's mixture that goes on has no home: it is shown with the charge
        # that carries it in, its terms (that step's charges) linked to where they are derived
        rank = {"charge": 0, "limiting": 1, "limiting_mass": 1, "product": 2}
        best: dict[int, tuple[int, str]] = {}
        for key, i in self.named.items():
            if key[0] in rank and (i not in best or rank[key[0]] < best[i][0]):
                best[i] = (rank[key[0]], key[1])
        return {i: step for i, (_r, step) in best.items()}

    def cut(self, *keys: tuple, step: str | None = None) -> tuple[tuple[int, ...], tuple[Line, ...]]:
        """The lines for ``keys`` (with ``step``: only those derived with that step), renumbered from 0.

        With ``step``, a line derived with another step is not followed: the factor that
        is its result keeps ``ref=None``, cites ``"derived in S4"`` and names the line in
        ``line``, so that a report can link to where that step derives it.  A report that
        shows every charge so grows with the number of charges, not with the depth of
        the route times the number of charges.

        Returns
        -------
        (indices, lines)
            The index in :attr:`lines` of each line shown, and the lines.
        """
        def follow(i: int) -> bool:
            return step is None or self.home(i) in (None, step)

        need: set[int] = set()
        todo = [self.named[k] for k in keys]
        while todo:
            i = todo.pop()
            if i in need:
                continue
            need.add(i)
            todo.extend(f.ref for f in self.lines[i].factors if f.ref is not None and follow(f.ref))
        order = sorted(need)
        new = {old: k for k, old in enumerate(order)}
        out = []
        for old in order:
            line = self.lines[old]
            facs = []
            for f in line.factors:
                if f.ref is None:
                    facs.append(f)
                elif f.ref in new:
                    facs.append(Factor(f.op, f.value, f.unit, f.what, f"line {new[f.ref] + 1} of this derivation",
                                       new[f.ref]))
                else:
                    facs.append(Factor(f.op, f.value, f.unit, f.what, f"derived in {self.home(f.ref)}",
                                       None, f.ref))
            out.append(Line(tuple(facs), line.value, line.unit, line.what))
        return tuple(order), tuple(out)


def _unit_text(q) -> str:
    """The unit of ``q`` in pint's short form (``"g/mol"``), ``""`` for a pure number."""
    return _units_text(q.units)


@functools.lru_cache(maxsize=256)
def _units_text(units) -> str:
    """:func:`_unit_text` of a pint Unit, formatted once per unit."""
    import re

    if units.dimensionless:
        return ""
    return re.sub(r"\bl\b", "L", f"{units:~C}")  # litre as L (NIST SP 811)


class _Builder:
    """Cuts the recorded tree into lines at the named amounts."""

    def __init__(self, route: "Route"):
        self.route = route
        self.lines: list[Line] = []
        self.index: dict[int, int] = {}  # id(Traced) -> its line
        self.names: dict[int, tuple[str, str]] = {}  # id(Traced) -> (what, unit)
        self.keys: list[tuple[tuple, Traced]] = []
        self.keep: list[Traced] = []  # named objects stay alive, so their ids stay unique

    def name(self, key: tuple, t: Traced, what: str, unit: str) -> None:
        """Call ``t`` ``what`` in ``unit`` (the first name of an amount wins)."""
        if id(t) not in self.names:
            self.names[id(t)] = (what, unit)
            self.keep.append(t)
        self.keys.append((key, t))

    def build(self) -> Derivation:
        named = {key: self.line_of(t) for key, t in self.keys}
        return Derivation(tuple(self.lines), named)

    def line_of(self, t: Traced) -> int:
        if id(t) in self.index:
            return self.index[id(t)]
        what, unit = self.names[id(t)]
        if t.node[0] in ("add", "sub") and not _is_overage(t):
            terms = self._terms(t, "+")
        else:
            terms = self._chain(t, "x", root=True)
            lead = next((k for k, f in enumerate(terms) if f.op == "x" and f.unit), None)
            if lead:  # start from the amount with a unit: "106 mol x 1.2", not "1.2 x 106 mol"
                terms.insert(0, terms.pop(lead))
            if not terms or terms[0].op == "/":
                terms.insert(0, Factor("x", 1.0, "", "one", ""))
        facs = tuple(Factor("start" if i == 0 else f.op, f.value, f.unit, f.what, f.source, f.ref)
                     for i, f in enumerate(terms))
        self.lines.append(Line(facs, magnitude(t.q, unit), unit, what))
        self.index[id(t)] = len(self.lines) - 1
        return self.index[id(t)]

    def _ref(self, t: Traced, op: str) -> Factor:
        i = self.line_of(t)
        line = self.lines[i]
        return Factor(op, line.value, line.unit, line.what, f"line {i + 1} of this derivation", i)

    def _auto(self, t: Traced, op: str, what: str) -> Factor:
        """An unnamed compound amount inside a line: a line of its own."""
        if id(t) not in self.names:  # in its simplest unit: mol, not kg*mol/g
            self.names[id(t)] = (what, _unit_text(t.q.to_reduced_units()))
            self.keep.append(t)
        return self._ref(t, op)

    @staticmethod
    def _leaf(t: Traced, op: str) -> Factor:
        if t.node[0] == "leaf":
            return Factor(op, float(t.q.magnitude), _unit_text(t.q), t.node[1], t.node[2])
        if _is_overage(t):
            leaf = t.node[2]
            return Factor(op, float(t.q.m_as("")), "", f"1 + {leaf.node[1]} {leaf.q.m_as(''):.6g}", leaf.node[2])
        return Factor(op, float(t.q.magnitude), _unit_text(t.q), "number", "")

    def _chain(self, t: Traced, op: str, root: bool = False) -> list[Factor]:
        if not root and id(t) in self.names:
            return [self._ref(t, op)]
        kind = t.node[0]
        if kind == "mul":
            return self._chain(t.node[1], op) + self._chain(t.node[2], op)
        if kind == "div":
            return self._chain(t.node[1], op) + self._chain(t.node[2], "/" if op == "x" else "x")
        if kind == "num" and float(t.q.magnitude) == 1.0:
            return []
        if kind in ("add", "sub") and not _is_overage(t):
            return [self._auto(t, op, "sum")]
        return [self._leaf(t, op)]

    def _terms(self, t: Traced, op: str) -> list[Factor]:
        """The terms of the sum ``t``, left to right, without recursion: a raw material
        charged in every step of a long route sums thousands of charges."""
        out: list[Factor] = []
        todo = [(t, op, True)]
        while todo:
            node, sign, top = todo.pop()
            if not top and id(node) in self.names:
                out.append(self._ref(node, sign))
            elif node.node[0] in ("add", "sub") and not _is_overage(node):
                other = sign if node.node[0] == "add" else ("-" if sign == "+" else "+")
                todo.append((node.node[2], other, False))
                todo.append((node.node[1], sign, False))  # popped first: left before right
            elif node.node[0] == "leaf":
                out.append(self._leaf(node, sign))
            else:
                out.append(self._auto(node, sign, _lead_what(node) or "term"))
        return out


def _lead_what(t: Traced) -> str | None:
    """What the first constant of a product is (``"ester on the shelf"``), to name the term it leads."""
    while t.node[0] in ("mul", "div"):
        t = t.node[1]
    return t.node[1] if t.node[0] == "leaf" else None


def _is_overage(t: Traced) -> bool:
    """``1 + overage``: shown as one factor."""
    return t.node[0] == "add" and t.node[1].node[0] == "num" and t.node[2].node[0] == "leaf"


def derive(route: "Route", amount_kg: float, *, yields: str = "expected",
           shelf_kg: Mapping[str, float] | None = None, target_source: str | None = None,
           stock_source: str | None = None, yield_of: Mapping[str, float] | None = None,
           record: Any = None) -> Derivation:
    """Run the plan's core once on :class:`Traced` numbers and cut the result into lines.

    Parameters
    ----------
    route : Route
        A checked route.
    amount_kg : float
        Target amount before overage [kg], as the planner has it.
    yields : {"expected", "low", "high"}
        The yield case of the plan.
    shelf_kg : Mapping[str, float], optional
        Intermediates on the shelf [kg] as the planner has them.
    target_source, stock_source : str, optional
        Where the target mass and the stock came from (default: the route's target line,
        "stock file").
    yield_of : Mapping[str, float], optional
        Step id -> yield [-] from a campaign record, as the planner gives the walk.
    record : optional
        The campaign record (its file is cited for those yields and for what is in hand).
    """
    from routeplan.plan.core import compile_route, contents, target_amount, walk, with_yields
    from routeplan.plan.walk import shelf_moles
    from routeplan.units import Q

    b = _Builder(route)
    core = compile_route(route, yields, quantity=_factory(route))
    record_source = "campaign record" if record is None or not isinstance(record, (str, bytes)) and not hasattr(
        record, "__fspath__") else f"campaign record {record}"
    if yield_of:  # the planner's walk plans these steps at the record's yields (plan/walk.py)
        core = with_yields(core, {sid: Traced(Q(float(y), ""), ("leaf", f"actual yield of {sid}", record_source))
                                  for sid, y in yield_of.items()})
    tgt = route.target
    src = target_source or _where(route, tgt.location)
    amount = Traced(Q(float(amount_kg), "kg"), ("leaf", f"target mass of {tgt.material}", src))
    n_target = target_amount(amount, core.overage, core.target_kg_per_mol_pure)
    shelf = None
    shelf_source = " and ".join(x for x in (stock_source, None if record is None else record_source) if x) \
        or "stock file"
    if shelf_kg is not None:
        on_hand = {k: Traced(Q(float(v), "kg"), ("leaf", f"{k} on the shelf", shelf_source))
                   for k, v in shelf_kg.items()}
        shelf = shelf_moles(route, core, on_hand)
    steps = walk(core, n_target, shelf)
    held = contents(core, steps)
    b.name(("target",), n_target, f"{tgt.material} to make", "mol")
    for sid in reversed(list(steps)):
        w = steps[sid]
        s = w.step
        if isinstance(w.n_product, Traced):
            b.name(("product", sid), w.n_product, f"{s.product} to make in {sid}", "mol")
            b.name(("limiting", sid), w.n_lim, f"{s.limiting} (limiting) in {sid}", "mol")
            b.name(("limiting_mass", sid), w.m_lim, f"{s.limiting} (limiting) in {sid}", "kg")
        for i, (c, (n, m, V)) in enumerate(zip(s.charges, w.charges)):
            if c.carried_from is not None:  # the volume in the plan is the mixture carried in
                V = held[sid].lines_V[i]
            for x, t, unit in (("n", n, "mol"), ("m", m, "kg"), ("V", V, "L")):
                if isinstance(t, Traced):
                    b.name(("charge", sid, i, x), t, f"{c.material} charged to {sid}", unit)
    for sid, h in held.items():
        if not route.step(sid).isolated:
            for x, t, unit in (("V", h.transfer_V, "L"), ("m", h.transfer_m, "kg")):
                if isinstance(t, Traced):
                    b.name(("transfer", sid, x), t, f"mixture of {sid} that goes on", unit)
        if isinstance(h.reaction_m, Traced):
            b.name(("reaction_mass", sid), h.reaction_m, f"reaction mass of {sid}", "kg")
    # raw materials: the masses summed in execution order, as routeplan.plan.totals sums them
    raw: dict[str, Any] = {}
    for sid, w in steps.items():
        for c, (_n, m, _V) in zip(w.step.charges, w.charges):
            if not c.intermediate and isinstance(m, Traced) and m.q.magnitude != 0:
                raw[c.material] = m if c.material not in raw else raw[c.material] + m
    for key, m in raw.items():
        b.name(("raw", key, "m"), m, f"{key} over the campaign", "kg")
    return b.build()


def _close(word: str, names) -> list[str]:
    """The (up to 3) names closest to ``word``, case aside (difflib's ratio, 0.6 or more)."""
    import difflib

    names = list(dict.fromkeys(names))
    by_lower = {n.lower(): n for n in names}
    return [by_lower[n] for n in difflib.get_close_matches(word.lower(), list(by_lower), n=3, cutoff=0.6)]


def _nearest(word: str, names) -> str:
    """``"valid names: A, B"``: the names closest to ``word``, or every name when none is close."""
    names = list(names)
    return "valid names: " + ", ".join(_close(word, names) or names)


def find_charge(route: "Route", step: str, material: str) -> int:
    """The index (0-based) of ``material``'s charge line in ``step``.

    Raises
    ------
    PlanError
        An unknown step, an unknown material, or a material not charged in that step,
        with the nearest valid names in the hint.
    """
    from routeplan.errors import Location, PlanError

    ids = [s.id for s in route.steps]
    if step not in ids:
        raise PlanError(f"no step '{step}' in the route", location=Location(key="STEP"), hint=_nearest(step, ids))
    s = route.step(step)
    charged = [c.material for c in s.charges]
    if material in charged:
        return charged.index(material)
    if material not in route.materials:
        close = _close(material, charged + list(route.materials))  # each name once
        hint = (f"did you mean {', '.join(close)}? " if close else "") \
            + f"charged in {step}: " + ", ".join(charged)
        raise PlanError(f"no material '{material}' in the route", location=Location(key="MATERIAL"),
                        step=step, hint=hint)
    raise PlanError(f"'{material}' is not charged in step {step}", location=Location(key="MATERIAL"),
                    step=step, hint="charged there: " + ", ".join(charged))


def find_raw(route: "Route", material: str, bought) -> str:
    """``material`` if it is a raw material of the plan (``bought``: its keys), else a PlanError."""
    from routeplan.errors import Location, PlanError

    bought = list(bought)
    if material in bought:
        return material
    why = "is an intermediate, made in the route" if material in route.maker else (
        "is not charged in any running step" if material in route.materials else "is not in the route")
    raise PlanError(f"'{material}' {why}, so it is no raw material", location=Location(key="MATERIAL"),
                    hint=_nearest(material, bought))
