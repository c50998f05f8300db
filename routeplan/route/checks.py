"""Cross-checks of a parsed route file: everything one part of the file says about another.

The schema (:mod:`routeplan.route.schema`) checks each value on its own; the checks here
look across the file: that every key referenced exists, that the equation and the
charge lines agree, that the steps make a route to the target; values that cannot be
real (an impossible solution, a density of no substance, an equation that does not
balance by mass) are judged in :mod:`routeplan.route.checks_plausibility`.  Each finding
is a :class:`~routeplan.errors.Problem` located in the file.

The checks also work on a file whose schema validation failed in places
(:class:`Parts` keeps ``None`` for every piece that did not validate), so that a file
shows all of its mistakes at once; checks about the route as a whole run only when every
step is readable.

Definition used throughout routeplan: an *intermediate* is a material that is the main
product (``product``) of some step.  By-products are not intermediates: water, CO2 or
acetic acid released by a step may be charged or bought elsewhere.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from types import SimpleNamespace
from typing import Any

from routeplan.errors import EquationError, FormulaError, Problem
from routeplan.route import checks_plausibility as plausible
from routeplan.route import checks_safety
from routeplan.route.checks_plausibility import MOLAR_MASS_TOLERANCE
from routeplan.route.schema import CHARGE_BASES, MaterialModel, StepModel, TargetModel, VesselModel
from routeplan.route.yamlpos import Positions
from routeplan.units import unit
from routeplan.vocab import Basis, Role, Severity

__all__ = ["Parts", "Facts", "check_parts", "suggest", "MOLAR_MASS_TOLERANCE"]


#: Largest relative difference allowed between a material's density and its solution's [-].
_DENSITY_TOLERANCE = 1e-3

#: Relative tolerance below which a charge counts as at its stoichiometric ratio [-].
_STOICH_TOLERANCE = 1e-9


@dataclass
class Parts:
    """The pieces of a route file that passed schema validation.

    Attributes
    ----------
    material_keys : list of str
        Every key under ``materials``, valid or not (so a reference to a material whose
        definition has a mistake is not reported as unknown).
    materials : dict
        Key -> :class:`MaterialModel`; where it did not validate, a partly valid stand-in
        (a namespace with the same attributes, ``None`` for each key that failed, named in
        its ``bad`` set, and ``partial=True``), or None when it is not a mapping at all.
    equipment : dict
        Key -> :class:`VesselModel` or None.
    steps : list
        :class:`StepModel`, a partly valid stand-in (as for materials; its ``charges``
        hold None for each line that failed), or None; in file order.
    target : TargetModel, a partly valid stand-in, or None
    currency : str or None
    waste_prices : WastePricesModel or None
    """

    material_keys: list[str] = field(default_factory=list)
    materials: dict[str, MaterialModel | None] = field(default_factory=dict)
    equipment: dict[str, VesselModel | None] = field(default_factory=dict)
    steps: list[StepModel | None] = field(default_factory=list)
    target: TargetModel | None = None
    currency: str | None = None
    waste_prices: object | None = None


@dataclass
class Facts:
    """What the checks derived, for building the domain objects.

    Attributes
    ----------
    equations : dict
        Step index -> parsed :class:`~routeplan.chemistry.equation.Equation`.
    limiting, product : dict
        Step index -> key of the limiting reagent / main product.
    molar_masses : dict
        Material key -> molar mass [g/mol] (pint Quantity).
    formulas : dict
        Material key -> formula (as given, or derived from the SMILES).
    """

    equations: dict[int, Any] = field(default_factory=dict)
    limiting: dict[int, str] = field(default_factory=dict)
    product: dict[int, str] = field(default_factory=dict)
    molar_masses: dict[str, Any] = field(default_factory=dict)
    formulas: dict[str, str] = field(default_factory=dict)


def suggest(name: str, choices, *, formulas: dict[str, str] | None = None) -> str | None:
    """A hint naming the valid choice nearest to ``name``, or None.

    Looks for a close spelling (case ignored first), then for a material whose formula is
    ``name`` (``H2O`` -> ``water``).

    Examples
    --------
    >>> suggest("Ac20", ["Ac2O", "AcOH"])
    "did you mean 'Ac2O'?"
    """
    choices = list(choices)
    lower = {c.lower(): c for c in choices}
    if name.lower() in lower:
        return f"did you mean '{lower[name.lower()]}'?"
    near = difflib.get_close_matches(name, choices, n=1, cutoff=0.6)
    if near:
        return f"did you mean '{near[0]}'?"
    for key, formula in (formulas or {}).items():
        if formula.replace(" ", "") == name:
            return f"did you mean '{key}' (formula {formula})?"
    return None


class _Checker:
    def __init__(self, parts: Parts, pos: Positions) -> None:
        self.parts = parts
        self.pos = pos
        self.problems: list[Problem] = []
        self.facts = Facts()
        self.molar_use: dict[str, tuple] = {}  # material -> path of its first molar use

    # -- helpers
    def add(self, severity: Severity, path: tuple, message: str, hint: str | None = None, *,
            key: bool = False, step: str | None = None, show: tuple | None = None) -> None:
        self.problems.append(Problem(severity, message, self.pos.at(path, key=key, show=show), step, hint))

    def unknown_material(self, name: str, path: tuple, what: str, step: str | None = None) -> None:
        from routeplan.route.schema import lookalike_hint

        hint = suggest(name, self.parts.material_keys, formulas=self.facts.formulas)
        near = [k for k in self.parts.material_keys if lookalike_hint(k) and lookalike_hint(k).endswith(f"'{name}'")]
        if near:
            hint = f"the material is defined as '{near[0]}', whose " + lookalike_hint(near[0]).removeprefix("the ")
        elif lookalike_hint(name):
            hint = lookalike_hint(name).replace("the key holds", f"'{name}' holds", 1)
        self.add(Severity.ERROR, path, f"{what} '{name}' is not a material of this route", hint or
                 "add it under 'materials'", step=step)

    def known(self, name: str) -> bool:
        return name in self.parts.materials

    # -- materials
    def materials(self) -> None:
        from routeplan.chemistry.formula import molar_mass

        for key, m in self.parts.materials.items():
            if m is None:
                continue
            here = ("materials", key)
            computed, source = None, None
            if m.formula is not None:
                try:
                    computed, source = molar_mass(m.formula).to(unit("g/mol")), "formula"
                    self.facts.formulas[key] = m.formula
                except FormulaError as exc:
                    self.add(Severity.ERROR, here + ("formula",), exc.message, exc.hint)
            if m.smiles is not None:
                needed = m.formula is None and m.molar_mass is None
                smiles_mass = self.from_smiles(key, m, needed=needed)
                if smiles_mass is not None and m.formula is None:
                    computed, source = smiles_mass, "SMILES"
                elif smiles_mass is not None and computed is not None:
                    self.compare(here + ("smiles",), smiles_mass, "from the SMILES", computed, "formula")
            too_light = m.molar_mass is not None and self.found(
                plausible.molar_mass_findings(here + ("molar_mass",), m.molar_mass))
            if computed is not None and m.molar_mass is not None and not too_light:
                self.compare(here + ("molar_mass",), m.molar_mass.to(unit("g/mol")), "given", computed, source)
            if computed is not None:
                self.facts.molar_masses[key] = computed
            elif m.molar_mass is not None:
                self.facts.molar_masses[key] = m.molar_mass.to(unit("g/mol"))
            if m.density is not None:
                self.found(plausible.density_findings(here + ("density",), m.density))
            if m.assay is not None:
                self.found(plausible.assay_findings(here + ("assay",), m.assay))
            if m.solution is not None:
                self.solution(key, m)
        self.found(checks_safety.gas_findings(self.parts.materials))

    def found(self, findings, step: str | None = None) -> bool:
        """Add plausibility findings (:mod:`routeplan.route.checks_plausibility`); True if any."""
        for f in findings:
            self.add(f.severity, f.path, f.message, f.hint, step=step)
        return bool(findings)

    def compare(self, path: tuple, value, what: str, reference, source: str) -> None:
        """Report ``value`` [g/mol] when it differs from ``reference`` by more than the tolerance."""
        a, b = value.magnitude, reference.magnitude
        rel = abs(a - b) / b
        if rel > MOLAR_MASS_TOLERANCE:
            self.add(Severity.ERROR, path, f"the molar mass {what}, {a:.6g} g/mol, disagrees with {b:.6g} g/mol from the "
                     f"{source} by {_pct(rel)} (more than {_pct(MOLAR_MASS_TOLERANCE)})",
                     "correct one of them" + (", or leave molar_mass out" if path[-1] == "molar_mass" else ""))

    def from_smiles(self, key: str, m: MaterialModel, *, needed: bool):
        """Molar mass [g/mol] from the SMILES via RDKit, or None (an error if ``needed``)."""
        try:
            from rdkit import Chem
            from rdkit.Chem import rdMolDescriptors
        except ImportError:
            if needed:
                self.add(Severity.ERROR, ("materials", key, "smiles"),
                         "reading a SMILES needs RDKit, which is not installed",
                         "install the 'smiles' extra (pip install 'routeplan[smiles]') or give a formula")
            return None
        from routeplan.chemistry.formula import molar_mass
        from routeplan.units import Q

        from rdkit import rdBase

        with rdBase.BlockLogs():  # RDKit's own log lines would bypass our messages
            mol = Chem.MolFromSmiles(m.smiles)
            if mol is None:
                raw = Chem.MolFromSmiles(m.smiles, sanitize=False)
                if raw is None:
                    detail = "it cannot be parsed (check brackets, ring-closure digits and atom symbols)"
                else:
                    found = [p.Message() for p in Chem.DetectChemistryProblems(raw)]
                    detail = "; ".join(found) if found else "RDKit cannot sanitise it"
        if mol is None:
            self.add(Severity.ERROR, ("materials", key, "smiles"), f"'{m.smiles}' is not a valid SMILES: {detail}",
                     "correct the SMILES, or give a formula instead")
            return None
        formula, shift = smiles_formula(mol)
        try:
            mass = molar_mass(formula).to(unit("g/mol")) + Q(shift, "g/mol")
        except FormulaError as exc:  # pragma: no cover - RDKit writes formulas we read
            self.add(Severity.ERROR, ("materials", key, "smiles"), exc.message, exc.hint)
            return None
        self.facts.formulas.setdefault(key, formula)
        return mass

    def solution(self, key: str, m: MaterialModel) -> None:
        here = ("materials", key)
        s = m.solution
        if (s.molarity is None) == (s.mass_fraction is None):
            both = s.molarity is not None
            self.add(Severity.ERROR, here + ("solution",),
                     "gives both molarity and mass_fraction" if both else "gives neither molarity nor mass_fraction",
                     "a solution takes exactly one of them, e.g. {molarity: 2.5 mol/L, density: 0.69 g/mL}")
        if m.assay is not None:
            self.add(Severity.ERROR, here + ("assay",), "assay does not apply to a solution",
                     "give the strength as solution.molarity or solution.mass_fraction and remove assay")
        if m.density is not None:
            a, b = m.density.to(unit("g/mL")).magnitude, s.density.to(unit("g/mL")).magnitude
            if abs(a - b) > _DENSITY_TOLERANCE * b:
                self.add(Severity.ERROR, here + ("density",),
                         f"density {a:g} g/mL differs from solution.density {b:g} g/mL",
                         "a solution's density goes in solution.density only; remove this one")
        if s.density is not None:
            self.found(plausible.density_findings(here + ("solution", "density"), s.density))
        self.found(plausible.solution_findings(key, s, self.facts.molar_masses.get(key)))

    # -- steps
    def steps(self) -> None:
        from routeplan.chemistry.equation import parse_equation

        for i, s in enumerate(self.parts.steps):
            if s is None:
                continue
            here = ("steps", i)
            eq = None
            if s.equation is not None:
                try:
                    eq = parse_equation(s.equation)
                except EquationError as exc:
                    self.add(Severity.ERROR, here + ("equation",), exc.message, exc.hint, step=s.id)
            if eq is not None:
                self.equation(i, s, eq)
            if s.vessel is not None and s.vessel not in self.parts.equipment:
                hint = suggest(s.vessel, self.parts.equipment) if self.parts.equipment else \
                    "the route has no 'equipment'; add the vessel there"
                self.add(Severity.ERROR, here + ("vessel",), f"vessel '{s.vessel}' is not in equipment",
                         hint or "valid vessels: " + ", ".join(self.parts.equipment), step=s.id)
            y = s.yield_
            for which in ("expected", "low", "high"):
                value = getattr(y, which, None) if y is not None else None
                if value is not None:
                    at = here + ("yield",) + ((which,) if self.raw_yield(i) is not None else ())
                    self.found(plausible.yield_findings(at, s.id, which, value), step=s.id)
            for bound, ok in (("low", y is None or y.low is None or y.low <= y.expected),
                              ("high", y is None or y.high is None or y.expected <= y.high)):
                if not ok:
                    self.add(Severity.ERROR, here + ("yield", bound),
                             f"the expected yield {_pct(y.expected)} is outside low..high "
                             f"({_pct(y.low)} to {_pct(y.high)})", "low <= expected <= high", step=s.id)
            self.charges(i, s, eq)
            reactants = [t.key for t in eq.reactants] if i in self.facts.equations else None
            self.found(checks_safety.step_safety_findings(i, s, reactants))

    def equation(self, i: int, s: StepModel, eq) -> None:
        here = ("steps", i)
        ok = True
        for key in eq.species:
            if not self.known(key):
                self.unknown_material(key, here + ("equation",), "the equation's", step=s.id)
                ok = False
        if {"limiting", "product"} & _bad(s):
            return  # reported by the schema; the defaults would mislead the checks below
        reactants = [t.key for t in eq.reactants]
        products = [t.key for t in eq.products]
        limiting = s.limiting if s.limiting is not None else reactants[0]
        product = s.product if s.product is not None else products[0]
        for name, side, other, word, otherword in (("limiting", reactants, products, "reactant", "product"),
                                                    ("product", products, reactants, "product", "reactant")):
            value = limiting if name == "limiting" else product
            if value in side:
                continue
            ok = False
            if value in other:
                msg = f"'{value}' is a {otherword} of the equation, not a {word}"
            elif not self.known(value):
                self.unknown_material(value, here + (name,), f"{name}", step=s.id)
                continue
            else:
                msg = f"'{value}' is not in the equation"
            self.add(Severity.ERROR, here + (name,), msg, f"the {word}s are: " + ", ".join(side), step=s.id)
        if limiting in reactants and product in products:
            self.facts.limiting[i] = limiting
            self.facts.product[i] = product
        if ok:
            self.facts.equations[i] = eq
            for key in eq.species:
                self.molar_use.setdefault(key, here + ("equation",))

    def charges(self, i: int, s: StepModel, eq) -> None:
        here = ("steps", i)
        eq_ok = i in self.facts.equations
        reactants = {t.key: t.coefficient for t in eq.reactants} if eq_ok else {}
        limiting = self.facts.limiting.get(i) if eq_ok else None
        product = self.facts.product.get(i) if eq_ok else None
        seen_limiting = False
        for j, c in enumerate(s.charges or ()):
            at = here + ("charges", j)
            if c is None:
                continue  # reported by the schema
            if not self.known(c.material):
                self.unknown_material(c.material, at + ("material",), "charged material", step=s.id)
                continue
            bases = [b for b in CHARGE_BASES if getattr(c, b) is not None]
            if len(bases) > 1:
                self.add(Severity.ERROR, at + (bases[1],), f"the line of {c.material} gives both {bases[0]} and {bases[1]}",
                         "a charge line takes at most one basis", key=True, step=s.id)
            basis = bases[0] if bases else None
            if basis is not None and len(bases) == 1 and not (eq_ok and c.material == limiting):
                role = c.role or _default_role(basis, c.material in reactants)
                self.found(plausible.charge_findings(at + (basis,), c.material, basis, getattr(c, basis), role),
                           step=s.id)
            if basis in (Basis.EQUIV, Basis.MOL_PERCENT):
                self.molar_use.setdefault(c.material, at + (basis,))
            if basis == Basis.VOLUMES:
                m = self.parts.materials.get(c.material)
                if m is not None and _absent(m, "density") and _absent(m, "solution"):
                    self.add(Severity.ERROR, at + ("volumes",),
                             f"'{c.material}' is charged by volumes but has no density",
                             f"add density (e.g. 'density: 0.889 g/mL') to materials.{c.material}, "
                             "or charge it by mass_ratio", step=s.id)
            if not eq_ok:
                continue
            if c.material == product:
                self.add(Severity.ERROR, at + ("material",), f"'{c.material}' is the product of this step; "
                         "a step cannot charge its own product", step=s.id)
            elif c.material == limiting:
                if seen_limiting:
                    self.add(Severity.ERROR, at + ("material",), f"the limiting reagent '{limiting}' is charged "
                             "twice", "charge it on one line; it is the basis of every other line", step=s.id)
                seen_limiting = True
                if basis is not None and not (basis == Basis.EQUIV and c.equiv == 1):
                    self.add(Severity.ERROR, at + (basis,), f"the limiting reagent '{limiting}' is charged at 1 equiv "
                             f"by definition; it cannot take {basis}: {getattr(c, basis):g}",
                             "remove the basis, or make another reactant 'limiting'", step=s.id)
            elif basis is None and c.material not in reactants:
                self.add(Severity.ERROR, at, f"'{c.material}' is not a reactant of the equation, so its line needs "
                         "a basis", "give one of equiv, mol_percent, volumes or mass_ratio", step=s.id)
        if eq_ok:
            self.stoichiometry(i, s, eq)

    def stoichiometry(self, i: int, s: StepModel, eq) -> None:
        """Warn about a reactant charged below its stoichiometric ratio."""
        limiting = self.facts.limiting[i]
        nu_lim = eq.coefficient(limiting)
        for t in eq.reactants:
            if t.key == limiting:
                continue
            if any(c is None for c in s.charges or ()):
                return
            lines = [(j, c) for j, c in enumerate(s.charges or ()) if c.material == t.key]
            if not lines:
                continue
            ratio = t.coefficient / nu_lim
            total = 0.0
            for _j, c in lines:
                e = self.effective_equiv(c, limiting, ratio)
                if e is None:
                    break
                total += e
            else:
                if total < ratio * (1 - _STOICH_TOLERANCE) - 1e-12:
                    j = lines[0][0]
                    self.add(Severity.WARNING, ("steps", i, "charges", j),
                             f"'{t.key}' is charged at {total:.4g} equiv, below its stoichiometric ratio "
                             f"{ratio:.4g} from the equation; it would be the real limiting reagent",
                             f"charge at least {ratio:.4g} equiv, or make '{t.key}' the limiting reagent",
                             step=s.id)

    def effective_equiv(self, c, limiting: str, ratio: float) -> float | None:
        """Moles of ``c.material`` per mole of limiting reagent on this line, or None if unknown."""
        if c.equiv is not None:
            return c.equiv
        if c.mol_percent is not None:
            return c.mol_percent / 100.0
        if c.volumes is None and c.mass_ratio is None:
            return ratio  # no basis: charged at the stoichiometric ratio
        from routeplan.units import Q

        lim = self.parts.materials.get(limiting)
        mat = self.parts.materials.get(c.material)
        m_lim = _mass_per_mol(lim, self.facts.molar_masses.get(limiting))
        if mat is None or m_lim is None or c.material not in self.facts.molar_masses:
            return None
        if c.mass_ratio is not None:
            mass = Q(c.mass_ratio, "kg/kg") * m_lim
            volume = mass / mat.solution.density if mat.solution is not None else None
        else:
            volume = Q(c.volumes, "L/kg") * m_lim
            density = mat.solution.density if mat.solution is not None else mat.density
            if density is None:
                return None
            mass = volume * density
        n = _moles_in(mat, self.facts.molar_masses[c.material], mass, volume)
        return None if n is None else float(n.to(unit("mol")).magnitude)

    # -- the route as a whole
    def molar_masses(self) -> None:
        for key, path in self.molar_use.items():
            m = self.parts.materials.get(key)
            if m is None or key in self.facts.molar_masses or getattr(m, "partial", False):
                continue  # a material with a schema error: its molar mass may be what is wrong
            if m.formula is not None or (m.smiles is not None and m.molar_mass is None):
                continue  # its formula or SMILES could not be read: reported already
            self.add(Severity.ERROR, ("materials", key),
                     f"'{key}' is used on a molar basis ({_fmt(path)}) but has no molar mass",
                     "give formula, smiles or molar_mass", key=True)

    def currency(self) -> None:
        priced = [k for k, m in self.parts.materials.items() if m is not None and m.price is not None]
        if priced and self.parts.currency is None:
            self.add(Severity.WARNING, ("materials", priced[0], "price"),
                     f"{len(priced)} material(s) have a price but the route has no currency; "
                     "no cost will be computed", "add e.g. 'currency: EUR' at the top level")
        if self.parts.currency is not None:
            return
        rated = [k for k, v in self.parts.equipment.items() if v is not None and v.rate is not None]
        if rated:
            self.add("warning", ("equipment", rated[0], "rate"),
                     f"{len(rated)} vessel(s) have a rate but the route has no currency; "
                     "no plant cost will be computed", "add e.g. 'currency: EUR' at the top level")
        if self.parts.waste_prices is not None:
            self.add("warning", ("waste_prices",),
                     "the route gives waste prices but no currency; no waste cost will be computed",
                     "add e.g. 'currency: EUR' at the top level", key=True)

    def raw_yield(self, i: int):
        """What the file gives as ``steps[i].yield`` (a mapping or a plain value), by position."""
        return "mapping" if ("steps", i, "yield", "expected") in self.pos.values else None

    def target(self) -> None:
        t = self.parts.target
        if t is None:
            return
        if getattr(t, "overage", None):
            self.found(plausible.overage_findings(("target", "overage"), t.overage))
        self.found(plausible.vessel_volume_findings(t.amount, self.parts.equipment))
        if t.material is None:
            return
        if not self.known(t.material):
            self.unknown_material(t.material, ("target", "material"), "the target")

    def route(self) -> None:
        """Checks about the route as a whole; they need every step."""
        if not all(isinstance(s, StepModel) for s in self.parts.steps) or \
                len(self.facts.product) < len(self.parts.steps):
            return
        steps = self.parts.steps
        first_id: dict[str, int] = {}
        for i, s in enumerate(steps):
            if s.id in first_id:
                self.add(Severity.ERROR, ("steps", i, "id"), f"duplicate step id '{s.id}'",
                         f"steps[{first_id[s.id]}] has the same id; step ids must be unique", step=s.id)
            else:
                first_id[s.id] = i
        made_by: dict[str, int] = {}
        for i, s in enumerate(steps):
            p = self.facts.product[i]
            if p in made_by:
                k = made_by[p]
                path = ("steps", i, "product") if s.product is not None else ("steps", i, "equation")
                self.add(Severity.ERROR, path, f"'{p}' is the main product of two steps: {steps[k].id} and {s.id}",
                         "each material is made by at most one step; give them different keys", step=s.id)
            else:
                made_by[p] = i
        if len(first_id) < len(steps) or len(made_by) < len(steps):
            return
        t = self.parts.target
        if t is not None and t.material is not None and self.known(t.material) and t.material not in made_by:
            byproduct = [s.id for i, s in enumerate(steps) if i in self.facts.equations
                         and t.material in [x.key for x in self.facts.equations[i].products]]
            self.add(Severity.ERROR, ("target", "material"), f"no step makes the target '{t.material}' as its product",
                     (f"it is only a by-product of {', '.join(byproduct)}; set that step's 'product'"
                      if byproduct else "add the step that makes it"))
        elif t is not None and t.material in made_by and steps[made_by[t.material]].isolated is False:
            i = made_by[t.material]
            self.add(Severity.ERROR, ("steps", i, "isolated"),
                     f"step {steps[i].id} makes the target '{t.material}' but says 'isolated: false': a product "
                     "that is never isolated cannot be delivered by mass",
                     "remove 'isolated: false' from the target step (the target is isolated at its assay)",
                     step=steps[i].id)
        self.graph(steps, made_by)

    def graph(self, steps: list[StepModel], made_by: dict[str, int]) -> None:
        from routeplan.route.graph import find_step_cycle, step_links, upstream

        stand_ins = []
        for i, s in enumerate(steps):
            eq = self.facts.equations.get(i)
            used = [t.key for t in eq.reactants] if eq is not None else []
            used += [c.material for c in s.charges or () if c.material not in used]
            used = [u for u in used if u != self.facts.product[i]]
            stand_ins.append(SimpleNamespace(id=s.id, product=self.facts.product[i],
                                             charges=[SimpleNamespace(material=u) for u in used]))
        cycle = find_step_cycle(stand_ins)
        if cycle:
            i = next(k for k, s in enumerate(steps) if s.id == cycle[0])
            self.add(Severity.ERROR, ("steps", i, "id"), "the steps form a cycle: " + " -> ".join(cycle),
                     "a step cannot use, directly or through other steps, what it makes itself", step=cycle[0])
            return
        t = self.parts.target
        if t is None or t.material is None or t.material not in made_by:
            return
        final = steps[made_by[t.material]].id
        keep = upstream(step_links(stand_ins), final) | {final}
        for i, s in enumerate(steps):
            if s.id not in keep:
                self.add(Severity.WARNING, ("steps", i, "id"),
                         f"step {s.id} does not lead to the target '{t.material}'; its product "
                         f"'{self.facts.product[i]}' is used by no step on the way",
                         "remove the step or charge its product where it is needed", step=s.id)

    def balance(self) -> None:
        from routeplan.chemistry.balance import describe_imbalance, imbalance

        for i, eq in self.facts.equations.items():
            if not all(k in self.facts.formulas for k in eq.species):
                if all(k in self.facts.molar_masses for k in eq.species):
                    s = self.parts.steps[i]
                    f = plausible.mass_balance_finding(("steps", i, "equation"), s.id, eq, self.facts.molar_masses)
                    if f is not None:
                        self.add(f.severity, f.path, f.message, f.hint, step=s.id)
                continue
            try:
                diff = imbalance(eq, self.facts.formulas)
            except (FormulaError, EquationError):
                continue  # reported with the material
            diff = {el: d for el, d in diff.items() if abs(d) > 1e-9}
            if diff:
                s = self.parts.steps[i]
                self.add(Severity.WARNING, ("steps", i, "equation"), describe_imbalance(diff, s.id),
                         "check the coefficients and the formulas", step=s.id)


def smiles_formula(mol) -> tuple[str, float]:
    """The formula of an RDKit molecule, isotope labels kept, and the mass they add.

    Deuterium and tritium (``[2H]``, ``[3H]``) are written ``D`` and ``T``, which the
    formula parser weighs with their own atomic masses.  Another labelled atom
    (``[13C]``) is counted as its element in the formula (so the atoms still balance),
    and the difference between its isotope's mass and the element's standard atomic
    weight is returned apart.

    Returns
    -------
    tuple
        (formula, mass to add to the formula's molar mass [g/mol]).  Isotope masses are
        from RDKit's periodic table (atomic masses of the isotopes).
    """
    from rdkit import Chem
    from rdkit.Chem import rdMolDescriptors

    from routeplan.chemistry.elements import atomic_weight

    formula = rdMolDescriptors.CalcMolFormula(mol, True, True)  # separate isotopes, H isotopes as D, T
    if "[" not in formula:
        return formula, 0.0
    table = Chem.GetPeriodicTable()
    shift = 0.0
    for atom in mol.GetAtoms():
        iso = atom.GetIsotope()
        if iso and not (atom.GetAtomicNum() == 1 and iso in (2, 3)):
            shift += table.GetMassForIsotope(atom.GetAtomicNum(), iso) - atomic_weight(atom.GetSymbol())
    plain = Chem.Mol(mol)
    for atom in plain.GetAtoms():
        if not (atom.GetAtomicNum() == 1 and atom.GetIsotope() in (2, 3)):
            atom.SetIsotope(0)
    return rdMolDescriptors.CalcMolFormula(plain, True, True), shift


def _default_role(basis: "Basis | None", reactant: bool) -> "Role":
    """The role of a charge line that gives none (route format: a reactant of the equation
    is a reactant, ``mol_percent`` a catalyst, ``volumes`` a solvent, else a reagent)."""
    if reactant:
        return Role.REACTANT
    return {Basis.MOL_PERCENT: Role.CATALYST, Basis.VOLUMES: Role.SOLVENT}.get(basis, Role.REAGENT)


def _bad(m) -> frozenset:
    """Keys of a partly valid piece that did not validate (empty for a valid one)."""
    return getattr(m, "bad", frozenset())


def _absent(m, name: str) -> bool:
    """True when key ``name`` of ``m`` was not given (not when it was given but invalid)."""
    return getattr(m, name) is None and name not in _bad(m)


def _pct(x: float | None) -> str:
    return "-" if x is None else f"{x * 100:.4g} %"


def _fmt(path: tuple) -> str:
    from routeplan.route.yamlpos import format_path

    return format_path(path)


def _mass_per_mol(m: MaterialModel | None, molar_mass):
    """Mass of ``m`` as charged per mole of its compound [kg/mol], or None."""
    from routeplan.units import Q

    if m is None or molar_mass is None:
        return None
    one = Q(1.0, "mol")
    if m.solution is None:
        return (one * molar_mass / (m.assay if m.assay is not None else 1.0)).to(unit("kg"))
    if m.solution.mass_fraction:
        return (one * molar_mass / m.solution.mass_fraction).to(unit("kg"))
    if m.solution.molarity is not None:
        return (one / m.solution.molarity * m.solution.density).to(unit("kg"))
    return None


def _moles_in(m: MaterialModel, molar_mass, mass, volume):
    """Moles of the compound in ``mass`` (and ``volume``) of ``m`` as charged, or None."""
    if m.solution is None:
        return mass * (m.assay if m.assay is not None else 1.0) / molar_mass
    if m.solution.mass_fraction:
        return mass * m.solution.mass_fraction / molar_mass
    if m.solution.molarity is not None and volume is not None:
        return volume * m.solution.molarity
    return None


def check_parts(parts: Parts, pos: Positions) -> tuple[list[Problem], Facts]:
    """Run every cross-check on the validated pieces of a route file.

    Parameters
    ----------
    parts : Parts
        The pieces that passed schema validation.
    pos : Positions
        Where everything is in the file.

    Returns
    -------
    problems : list of Problem
        Errors and warnings, each located.
    facts : Facts
        Parsed equations, limiting reagents, products and molar masses.
    """
    c = _Checker(parts, pos)
    c.materials()
    c.target()
    c.steps()
    c.molar_masses()
    c.currency()
    c.route()
    c.balance()
    return c.problems, c.facts
