"""Frozen dataclasses made cheaply: ``@frozen`` for ``@dataclass(frozen=True)``.

Every result object of routeplan is a frozen dataclass, and one command imports some sixty
of their classes.  The standard decorator compiles each generated method from source
apart (``__init__``, ``__repr__``, ``__eq__``, ``__hash__``, ``__setattr__``,
``__delattr__``), which costs about 0.5-0.7 ms a class on CPython 3.11, most of a
command's class-building time.  :func:`frozen` makes the same class for a fraction of
that: it lets :func:`dataclasses.dataclass` read the fields (so :func:`dataclasses.fields`,
:func:`dataclasses.replace` and :func:`dataclasses.asdict` work as before), compiles only
``__init__`` (its signature must be the class's own) and gives the other methods as
closures over the field names (tuples of fields read by :func:`operator.attrgetter`).

What a class gets is what ``@dataclass(frozen=True, eq=eq)`` gives it: the same
``__init__`` signature (defaults, ``default_factory``, ``__post_init__`` called last), the
same ``repr`` (fields with ``repr=False`` left out), equality over the fields with
``compare=True`` as one tuple and, with ``eq``, the matching ``__hash__``; assigning or
deleting an attribute raises :class:`dataclasses.FrozenInstanceError`.  Instances pickle
and copy as before.  ``init=False`` fields, ``InitVar``, ``kw_only``, ``slots`` and
ordering are not offered (routeplan uses none); asking for them is a ``TypeError``.

Examples
--------
>>> @frozen
... class Charge:
...     material: str
...     m_kg: float = 0.0
>>> c = Charge("water", 1.5)
>>> c, c == Charge("water", 1.5), hash(c) == hash(Charge("water", 1.5))
(Charge(material='water', m_kg=1.5), True, True)
>>> c.m_kg = 2.0
Traceback (most recent call last):
dataclasses.FrozenInstanceError: cannot assign to field 'm_kg'
"""

from __future__ import annotations

import dataclasses
import operator

__all__ = ["frozen", "kept"]


class _Factory:
    """The default of a field with a ``default_factory``: the factory is called when it is left out."""

    def __repr__(self) -> str:
        return "<factory>"


_FACTORY = _Factory()


def frozen(cls=None, /, *, eq: bool = True):
    """Make ``cls`` a frozen dataclass (as ``@dataclass(frozen=True, eq=eq)``), compiled once.

    Use bare (``@frozen``) or with ``eq=False`` (``@frozen(eq=False)``: equality and hash
    by identity).
    """
    def wrap(c):
        return _build(c, eq)

    return wrap if cls is None else wrap(cls)


def _getter(names):
    """A function giving the tuple of the attributes ``names`` of an object (C speed)."""
    names = tuple(names)
    if len(names) == 1:
        one = operator.attrgetter(names[0])
        return lambda obj: (one(obj),)
    return operator.attrgetter(*names) if names else (lambda obj: ())


def _build(cls, eq: bool):
    had_doc = cls.__dict__.get("__doc__") is not None
    cls = dataclasses.dataclass(cls, init=False, repr=False, eq=False)
    fields = dataclasses.fields(cls)  # ClassVar pseudo-fields left out
    for f in cls.__dataclass_fields__.values():
        if "InitVar" in str(f.type):
            raise TypeError(f"{cls.__name__}.{f.name}: @frozen takes no InitVar")
    for f in fields:
        if not f.init or f.kw_only is True:
            raise TypeError(f"{cls.__name__}.{f.name}: @frozen takes no init=False or kw_only fields")

    glob = {"__builtins__": __builtins__, "MISSING": _FACTORY, "_set": object.__setattr__}
    params, body = [], []
    seen_default = False
    for f in fields:
        if f.default is not dataclasses.MISSING:
            glob[f"_dflt_{f.name}"] = f.default
            params.append(f"{f.name}=_dflt_{f.name}")
            body.append(f"  _set(self, '{f.name}', {f.name})")
            seen_default = True
        elif f.default_factory is not dataclasses.MISSING:
            glob[f"_factory_{f.name}"] = f.default_factory
            params.append(f"{f.name}=MISSING")  # shown as <factory>, as dataclasses shows it
            body.append(f"  _set(self, '{f.name}', _factory_{f.name}() if {f.name} is MISSING else {f.name})")
            seen_default = True
        elif seen_default:
            raise TypeError(f"non-default argument '{f.name}' follows default argument")
        else:
            params.append(f.name)
            body.append(f"  _set(self, '{f.name}', {f.name})")
    if hasattr(cls, "__post_init__"):
        body.append("  self.__post_init__()")
    names = frozenset(f.name for f in fields)
    shown = tuple(f.name for f in fields if f.repr)
    compared = _getter(f.name for f in fields if f.compare)
    hashed = _getter(f.name for f in fields if (f.compare if f.hash is None else f.hash))
    local: dict = {}
    exec("\n".join([f"def __init__(self{''.join(', ' + p for p in params)}):", *body, "  pass"]),  # noqa: S102
         glob, local)  # our own generated source, as dataclasses does; only __init__ needs one

    def __repr__(self):
        return self.__class__.__qualname__ + "(" + ", ".join(f"{n}={getattr(self, n)!r}" for n in shown) + ")"

    def __setattr__(self, name, value):
        if type(self) is cls or name in names:
            raise dataclasses.FrozenInstanceError(f"cannot assign to field {name!r}")
        super(cls, self).__setattr__(name, value)

    def __delattr__(self, name):
        if type(self) is cls or name in names:
            raise dataclasses.FrozenInstanceError(f"cannot delete field {name!r}")
        super(cls, self).__delattr__(name)

    def __eq__(self, other):
        if other.__class__ is self.__class__:
            return compared(self) == compared(other)
        return NotImplemented

    def __hash__(self):
        return hash(hashed(self))

    made = {"__init__": local["__init__"], "__repr__": __repr__, "__setattr__": __setattr__,
            "__delattr__": __delattr__}
    if eq:
        made.update(__eq__=__eq__, __hash__=__hash__)
    own = cls.__dict__
    for name in ("__setattr__", "__delattr__"):
        if name in own:
            raise TypeError(f"cannot overwrite attribute {name} in class {cls.__name__}")
    # as dataclasses does: a __hash__ of the class's own is kept (Python sets __hash__ = None
    # in a class that defines __eq__; that one does not count)
    own_hash = own.get("__hash__", dataclasses.MISSING)
    explicit_hash = not (own_hash is dataclasses.MISSING or (own_hash is None and "__eq__" in own))
    for name, fn in made.items():
        if name in ("__init__", "__repr__", "__eq__") and name in own:
            continue  # the class's own method stays, as with dataclasses
        if name == "__hash__" and explicit_hash:
            continue
        fn.__qualname__ = f"{cls.__qualname__}.{name}"
        if name == "__init__":
            fn.__annotations__ = {**{f.name: f.type for f in fields}, "return": None}
        setattr(cls, name, fn)
    p = cls.__dataclass_params__
    p.init, p.repr, p.eq, p.frozen = True, True, eq, True
    if not had_doc:
        import inspect

        cls.__doc__ = cls.__name__ + str(inspect.signature(cls)).replace(" -> None", "")
    return cls


def kept(route, name: str, make):
    """``make()``, worked out once per route and kept in its ``__dict__`` under ``name``.

    A Route is frozen, so what is derived from it alone (the execution order, the step
    links, the longest linear sequence, the molar masses in kg/mol, the vessel volumes in
    L, the compiled core) can be kept on it; read what is kept, never change it.  An
    object without a ``__dict__`` gets ``make()`` afresh each time.
    """
    cache = getattr(route, "__dict__", None)
    value = None if cache is None else cache.get(name)
    if value is None:
        value = make()
        if cache is not None:
            cache[name] = value
    return value
