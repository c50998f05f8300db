"""Load a route file: read, validate, cross-check, and build the frozen :class:`Route`.

The steps are

1. read the bytes (at most :data:`MAX_BYTES`; text, UTF-8) and hash them;
2. compose the YAML with positions (:mod:`routeplan.route.yamlpos`);
3. validate against the schema (:mod:`routeplan.route.schema`); where that fails, keep
   the pieces that did validate;
4. cross-check (:mod:`routeplan.route.checks`);
5. when no error was found, build the domain objects (:mod:`routeplan.route.model`),
   completing every step's charge lines.

Every error of a file is collected and raised together as one
:class:`~routeplan.errors.RouteError`; warnings go into :attr:`Route.warnings`.
"""

from __future__ import annotations

import functools
import hashlib
import os
from types import SimpleNamespace
from typing import Annotated, Any

from pydantic import TypeAdapter, ValidationError

from routeplan.collector import paused
from routeplan.errors import Location, Problem, RouteError, not_a_regular_file
from routeplan.route.checks import Facts, Parts, _default_role, check_parts
from routeplan.route.graph import keep_step_links
from routeplan.route.model import (DEFAULT_CHARGE_TOLERANCE, Charge, Conditions, Control, Dosing, Material, Route,
                                   Solution, Source, Step, Target, Thermal, Vessel, WastePrices, Yield)
from routeplan.route.schema import (ChargeModel, MaterialModel, RouteFile, StepModel, TargetModel, VesselModel,
                                    WastePricesModel, describe_value,
                                    keys_of, validation_problems)
from routeplan.route.yamlpos import Positions, read_yaml
from routeplan.units import unit
from routeplan.vocab import GIVEN_BASES, Basis, Role, Severity

__all__ = ["load_route", "load_route_text", "MAX_BYTES"]

#: Largest route file read [bytes] (5 MB); a real route file is a few kB.
MAX_BYTES = 5 * 1024 * 1024


def load_route(path: str | os.PathLike) -> Route:
    """Read, check and build the route in the file ``path``.

    Parameters
    ----------
    path : str or path-like
        The route file (YAML).

    Returns
    -------
    Route
        The checked route; ``Route.warnings`` holds what is worth a look but not wrong,
        and ``Route.source`` the file name and the SHA-256 of its bytes.

    Raises
    ------
    RouteError
        Listing every problem found, each with file, line, column and key path.
    """
    name = os.fspath(path)
    odd = not_a_regular_file(name)
    if odd is not None and not os.path.isdir(name):
        raise _one(name, odd, "give the route file itself (YAML text)")
    try:
        size = os.path.getsize(name)
        if size > MAX_BYTES:
            raise _one(name, f"the file is {size / 1e6:.1f} MB; a route file may be at most "
                             f"{MAX_BYTES // (1024 * 1024)} MB", "is this the right file?")
        with open(name, "rb") as fh:
            data = fh.read(MAX_BYTES + 1)
    except FileNotFoundError:
        raise _one(name, "no such file") from None
    except IsADirectoryError:
        raise _one(name, "is a directory, not a route file") from None
    except OSError as exc:
        raise _one(name, f"cannot be read: {exc.strerror or exc}") from None
    if len(data) > MAX_BYTES:
        raise _one(name, f"the file is larger than {MAX_BYTES // (1024 * 1024)} MB; a route file is far smaller")
    return _load_bytes(data, name)


def load_route_text(text: str, filename: str = "<route>") -> Route:
    """Check and build a route from its YAML text.

    Parameters
    ----------
    text : str
        The route file's content.
    filename : str
        Name used in messages and in ``Route.source`` (whose hash is that of the text
        encoded as UTF-8).

    Returns
    -------
    Route

    Raises
    ------
    RouteError
        Listing every problem found.
    """
    if not isinstance(text, str):
        raise _one(filename, f"route text must be a string, got {type(text).__name__}")
    try:
        data = text.encode("utf-8")
    except UnicodeEncodeError as exc:
        raise _one(filename, f"the text holds a character that cannot be written as UTF-8 at "
                             f"position {exc.start}") from None
    if len(data) > MAX_BYTES:
        raise _one(filename, f"the text is larger than {MAX_BYTES // (1024 * 1024)} MB; a route file is far smaller")
    return _load_bytes(data, filename)


def _one(file: str, message: str, hint: str | None = None) -> RouteError:
    return RouteError([Problem(Severity.ERROR, message, Location(file), hint=hint)], file=file)


@paused()
def _load_bytes(data: bytes, file: str) -> Route:
    sha = hashlib.sha256(data).hexdigest()
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise _one(file, "the file is UTF-16 text, not UTF-8", "save it as UTF-8")
    if b"\x00" in data:
        raise _one(file, "this is a binary file, not a route file (YAML text)")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise RouteError([Problem(Severity.ERROR, f"the file is not UTF-8 text (byte 0x{data[exc.start]:02x} at "
                                  f"line {line})", Location(file, line), hint="save it as UTF-8")],
                         file=file) from None
    text = text.removeprefix("\ufeff")
    doc, pos, problems = read_yaml(text, file)
    if problems and doc is None:
        raise RouteError(_sorted(problems), file=file)
    if doc is None:
        raise _one(file, "the file is empty",
                   "a route file needs at least route, target, materials and steps; see docs/route-file.md")
    if not isinstance(doc, dict):
        raise RouteError([Problem(Severity.ERROR, f"a route file must be a mapping of keys (route, target, materials, "
                                  f"steps, ...), but this one is {describe_value(doc)}", pos.at(()))], file=file)
    if not set(doc) & set(keys_of(RouteFile)):
        raise RouteError([Problem(Severity.ERROR, "this is not a route file: it has none of the keys route, target, "
                                  "materials, steps", pos.at(()), hint="see docs/route-file.md")], file=file)
    try:
        model = RouteFile.model_validate(doc)
        parts = _parts_of(model)
    except ValidationError as exc:
        reported = {(p.location.line, p.location.column) for p in problems if p.location}
        problems += [p for p in validation_problems(exc, pos)
                     if (p.location.line, p.location.column) not in reported]
        parts = _salvage(doc)
    found, facts = check_parts(parts, pos)
    problems += found
    from routeplan.route.checks_buying import buying_problems

    problems += buying_problems(parts, facts, pos)
    from routeplan.route.checks_transfer import leaving_problems

    problems += leaving_problems(parts, facts, pos)
    errors = [p for p in problems if p.severity == Severity.ERROR]
    warnings = tuple(_sorted([p for p in problems if p.severity == Severity.WARNING]))
    if errors:
        raise RouteError(_sorted(errors), file=file, warnings=warnings)
    return _build(model, facts, pos, Source(file, sha), warnings)


def _sorted(problems: list[Problem]) -> list[Problem]:
    def key(p: Problem):
        loc = p.location or Location()
        return (loc.line or 0, loc.column or 0)

    return sorted(problems, key=key)


def _parts_of(model: RouteFile) -> Parts:
    return Parts(material_keys=list(model.materials), materials=dict(model.materials),
                 equipment=dict(model.equipment or {}), steps=list(model.steps), target=model.target,
                 currency=model.currency, waste_prices=model.waste_prices)


@functools.lru_cache(maxsize=None)
def _adapter(model: type, name: str) -> TypeAdapter:
    f = model.model_fields[name]
    return TypeAdapter(Annotated[(f.annotation, *f.metadata)] if f.metadata else f.annotation)


def _salvage_one(model: type, raw: Any):
    """Validate ``raw`` as ``model``; where that fails, validate key by key.

    Returns the model instance, or a :class:`types.SimpleNamespace` with the same
    attribute names, ``None`` for every key that does not validate (named in ``bad``),
    or None when ``raw`` is not a mapping at all.
    """
    try:
        return model.model_validate(raw)
    except ValidationError:
        pass
    if not isinstance(raw, dict):
        return None
    values: dict[str, Any] = {}
    bad: set[str] = set()
    for name, f in model.model_fields.items():
        alias = f.alias or name
        if alias not in raw:
            values[name] = None if f.is_required() else f.get_default(call_default_factory=True)
            if f.is_required():
                bad.add(name)
            continue
        value = raw[alias]
        if model is StepModel and name == "charges" and isinstance(value, list):
            values[name] = [_try(ChargeModel, c) for c in value]
            continue
        try:
            values[name] = _adapter(model, name).validate_python(value)
        except ValidationError:
            values[name] = None
            bad.add(name)
    return SimpleNamespace(**values, bad=frozenset(bad), partial=True)


def _try(model, value: Any):
    try:
        return model.model_validate(value)
    except ValidationError:
        return None


def _salvage(doc: dict) -> Parts:
    """The pieces of a document that validate on their own, for the cross-checks."""
    parts = Parts()
    materials = doc.get("materials")
    if isinstance(materials, dict):
        parts.material_keys = [str(k) for k in materials]
        parts.materials = {str(k): _salvage_one(MaterialModel, v) for k, v in materials.items()}
    equipment = doc.get("equipment")
    if isinstance(equipment, dict):
        parts.equipment = {str(k): _try(VesselModel, v) for k, v in equipment.items()}
    steps = doc.get("steps")
    if isinstance(steps, list):
        parts.steps = [_salvage_one(StepModel, s) for s in steps]
    parts.target = _salvage_one(TargetModel, doc.get("target"))
    parts.currency = doc.get("currency")
    parts.waste_prices = _try(WastePricesModel, doc.get("waste_prices")) if "waste_prices" in doc else None
    return parts


# ----------------------------------------------------------------------------- building

def _build(model: RouteFile, facts: Facts, pos: Positions, source: Source, warnings: tuple) -> Route:
    materials = {key: _material(key, m, facts, pos) for key, m in model.materials.items()}
    equipment = {key: Vessel(key=key, volume=v.volume.to(unit("L")), max_fill=v.max_fill,
                             location=pos.at(("equipment", key), key=True), rate=v.rate)
                 for key, v in (model.equipment or {}).items()}
    steps = tuple(_step(i, s, facts, pos) for i, s in enumerate(model.steps))
    t = model.target
    target = Target(material=t.material, amount=t.amount.to(unit("kg")), overage=t.overage, location=pos.at(("target",)))
    tolerance = model.charge_tolerance if model.charge_tolerance is not None else DEFAULT_CHARGE_TOLERANCE
    wp = model.waste_prices
    waste_prices = None if wp is None else WastePrices(wp.aqueous, wp.organic, wp.halogenated)
    route = Route(name=model.route, target=target, materials=materials, steps=steps, equipment=equipment,
                  currency=model.currency, format=model.format, source=source, warnings=warnings,
                  waste_prices=waste_prices, charge_tolerance=tolerance)
    if facts.step_links is not None:  # who feeds whom, as the cycle check found it
        keep_step_links(route, facts.step_links)
    return route


def _material(key: str, m: MaterialModel, facts: Facts, pos: Positions) -> Material:
    solution = None
    density = m.density.to(unit("g/mL")) if m.density is not None else None
    if m.solution is not None:
        s = m.solution
        solution = Solution(density=s.density.to(unit("g/mL")),
                            molarity=s.molarity.to(unit("mol/L")) if s.molarity is not None else None,
                            mass_fraction=s.mass_fraction)
        density = solution.density
    return Material(
        key=key, name=m.name if m.name is not None else key, formula=facts.formulas.get(key, m.formula),
        smiles=m.smiles, molar_mass=facts.molar_masses.get(key), assay=m.assay if m.assay is not None else 1.0,
        density=density, solution=solution, price=m.price, hazards=tuple(m.hazards or ()), notes=m.notes,
        starting_material=m.starting_material,
        location=pos.at(("materials", key), key=True), phase=m.phase, stream=m.stream, pack=_pack_unit(m.pack),
        bought=m.bought)


def _pack_unit(q):
    """A pack size in kg (a mass) or L (a volume), or None."""
    if q is None:
        return None
    return q.to(unit("kg")) if q.check("[mass]") else q.to(unit("L"))


def _step(i: int, s: StepModel, facts: Facts, pos: Positions) -> Step:
    eq = facts.equations[i]
    limiting = facts.limiting[i]
    nu_lim = eq.coefficient(limiting)
    reactants = {t.key: t.coefficient / nu_lim for t in eq.reactants}
    listed = list(s.charges or ())
    charged = {c.material for c in listed}
    # reactants without a line come first, the limiting reagent before the others
    order = sorted(reactants, key=lambda key: key != limiting)
    lines = [Charge(material=key, basis=Basis.STOICHIOMETRIC, value=reactants[key], role=Role.REACTANT, implicit=True,
                    location=pos.at(("steps", i, "equation")))
             for key in order if key not in charged]
    for j, c in enumerate(listed):
        basis = next((b for b in GIVEN_BASES if getattr(c, b) is not None), None)
        if basis is None:  # a reactant of the equation (the checks made sure)
            basis, value = Basis.STOICHIOMETRIC, reactants[c.material]
        else:
            value = getattr(c, basis)
        role = c.role if c.role is not None else _default_role(basis, c.material in reactants)
        lines.append(Charge(material=c.material, basis=basis, value=float(value), role=role,
                            location=pos.at(("steps", i, "charges", j)), tolerance=c.tolerance,
                            leaves=bool(c.leaves)))
    y = s.yield_
    return Step(
        id=s.id, name=s.name if s.name is not None else s.id, equation=eq, equation_text=s.equation,
        limiting=limiting, product=facts.product[i], yield_=Yield(y.expected, y.low, y.high),
        charges=tuple(lines), isolated=s.isolated, vessel=s.vessel,
        demonstrated_batch=s.demonstrated_batch.to(unit("kg")) if s.demonstrated_batch is not None else None,
        notes=s.notes, location=pos.at(("steps", i)),
        cycle_time=s.cycle_time.to(unit("h")) if s.cycle_time is not None else None,
        controls=tuple(Control(point=k.point, check=k.check, limit=k.limit) for k in (s.controls or ())),
        **_safety_parts(i, s, pos))


def _kelvin(q):
    return None if q is None else q.to(unit("K"))


def _safety_parts(i: int, s: StepModel, pos: Positions) -> dict:
    """The step's conditions, dosing and thermal data as domain objects (None where not given)."""
    here = ("steps", i)
    out: dict = {}
    if s.conditions is not None:
        c = s.conditions
        out["conditions"] = Conditions(temperature=_kelvin(c.temperature),
                                       pressure=None if c.pressure is None else c.pressure.to(unit("bar")),
                                       location=pos.at(here + ("conditions",)))
    if s.dosing is not None:
        out["dosing"] = Dosing(material=s.dosing.material, time=s.dosing.time.to(unit("h")),
                               location=pos.at(here + ("dosing",)))
    if s.thermal is not None:
        t = s.thermal
        out["thermal"] = Thermal(
            reaction_enthalpy=t.reaction_enthalpy.to(unit("kJ/mol")), heat_capacity=t.heat_capacity.to(unit("kJ/(kg*K)")),
            process_temperature=_kelvin(t.process_temperature),
            max_technical_temperature=_kelvin(t.max_technical_temperature),
            decomposition_temperature_24h=_kelvin(t.decomposition_temperature_24h),
            accumulation=t.accumulation, location=pos.at(here + ("thermal",)))
    return out
