"""``@frozen`` makes the class ``@dataclass(frozen=True)`` makes, only cheaper to build.

The reference is the standard library's :mod:`dataclasses` itself: each class below is
made twice from the same source, once by each decorator, and every behaviour routeplan
relies on is compared (repr, equality, hash, fields, replace, asdict, signature, pickle,
copy, frozen errors, ``__post_init__``, ``default_factory``).
"""

import copy
import dataclasses
import inspect
import pickle
import sys
import types

import pytest

from routeplan.frozen import frozen

SOURCE = '''
from dataclasses import field
from types import MappingProxyType

class Line:
    """A charge line."""
    material: str
    m_kg: float
    V_L: "float | None" = None
    notes: tuple = ()
    extra: dict = field(default_factory=dict)
    text: str = field(default="", compare=False)
    hidden: int = field(default=0, repr=False)

class Counted:
    """Counts kept read-only, its own hash."""
    counts: dict
    charge: int = 0

    def __post_init__(self):
        if not isinstance(self.counts, MappingProxyType):
            object.__setattr__(self, "counts", MappingProxyType(dict(self.counts)))

    def __hash__(self):
        return hash((tuple(self.counts.items()), self.charge))

class One:
    """One field."""
    x: int

class Nothing:
    """No field."""
'''


def _module(name: str, decorate) -> types.ModuleType:
    """The classes of SOURCE in a module of their own (so that they pickle), decorated."""
    mod = types.ModuleType(name)
    sys.modules[name] = mod
    exec(SOURCE, mod.__dict__)  # noqa: S102 - the test's own source
    for cls in ("Line", "Counted", "One", "Nothing"):
        setattr(mod, cls, decorate(getattr(mod, cls)))
    return mod


REF = _module("_frozen_reference", dataclasses.dataclass(frozen=True))
OURS = _module("_frozen_ours", frozen)
REF_ID = _module("_frozen_reference_identity", dataclasses.dataclass(frozen=True, eq=False))
OURS_ID = _module("_frozen_ours_identity", frozen(eq=False))


def _lines(mod):
    return [mod.Line("water", 1.5), mod.Line("THF", 2.0, 2.25, ("a",), {"k": 1}, "t", 3),
            mod.Line("THF", 2.0, 2.25, ("a",), {"k": 1}, "other text", 3), mod.Line(m_kg=0.5, material="x")]


def _strip(text: str) -> str:
    return text.replace("_frozen_reference", "M").replace("_frozen_ours", "M")


@pytest.mark.parametrize("ref,ours", [(REF, OURS), (REF_ID, OURS_ID)], ids=["eq", "identity"])
def test_same_behaviour_as_the_standard_dataclass(ref, ours):
    a, b = _lines(ref), _lines(ours)
    assert [repr(x) for x in a] == [repr(x) for x in b]
    assert [[x == y for y in a] for x in a] == [[x == y for y in b] for x in b]
    assert [[x != y for y in a] for x in a] == [[x != y for y in b] for x in b]
    assert (a[0] == 1) == (b[0] == 1) is False
    if ref is REF:
        for x in a[0], b[0]:
            with pytest.raises(TypeError, match="unhashable type: 'dict'"):
                hash(x)  # a dict field: unhashable with either decorator
        assert hash(ref.Counted({"C": 1})) == hash(ours.Counted({"C": 1}))
        assert hash(ref.One(3)) == hash(ours.One(3)) and hash(ref.Nothing()) == hash(ours.Nothing())
    else:
        assert ours.One(3) != ours.One(3) and len({ours.One(3), ours.One(3)}) == 2
    assert [f.name for f in dataclasses.fields(ref.Line)] == [f.name for f in dataclasses.fields(ours.Line)]
    assert dataclasses.is_dataclass(b[0]) and ours.Line.__dataclass_params__.frozen
    assert [dataclasses.asdict(x) for x in a] == [dataclasses.asdict(x) for x in b]
    assert repr(dataclasses.replace(a[1], m_kg=9.0)) == repr(dataclasses.replace(b[1], m_kg=9.0))
    assert _strip(str(inspect.signature(ref.Line))) == _strip(str(inspect.signature(ours.Line)))
    assert ours.Line.__init__.__qualname__ == "Line.__init__" and ours.Line.__doc__ == "A charge line."
    for x, y in zip(a, b):
        assert repr(pickle.loads(pickle.dumps(x))) == repr(pickle.loads(pickle.dumps(y)))
        assert repr(copy.deepcopy(x)) == repr(copy.deepcopy(y)) and repr(copy.copy(x)) == repr(copy.copy(y))
    assert b[0].extra is not ours.Line("water", 1.5).extra  # the factory runs for each instance
    assert isinstance(ours.Counted({"C": 1}).counts, types.MappingProxyType)  # __post_init__ ran
    for target in (a[0], b[0]):
        for op, msg in ((lambda t: setattr(t, "m_kg", 2.0), "cannot assign to field 'm_kg'"),
                        (lambda t: setattr(t, "new", 1), "cannot assign to field 'new'"),
                        (lambda t: delattr(t, "m_kg"), "cannot delete field 'm_kg'")):
            with pytest.raises(dataclasses.FrozenInstanceError, match=msg):
                op(target)
    with pytest.raises(TypeError):
        ours.Line("water")  # a required argument left out
    with pytest.raises(TypeError):
        ours.Line("water", 1.0, nothing=1)


def test_a_subclass_of_a_frozen_class_may_set_its_own_attributes():
    @frozen
    class Base:
        x: int

    class Loose(Base):
        pass

    obj = Loose(1)
    obj.y = 2  # as with dataclasses: only the frozen class itself and its fields refuse
    assert obj.y == 2
    with pytest.raises(dataclasses.FrozenInstanceError):
        obj.x = 3


def test_what_it_does_not_offer_is_refused():
    with pytest.raises(TypeError, match="non-default argument 'y' follows default argument"):
        @frozen
        class Order:
            x: int = 0
            y: int

    with pytest.raises(TypeError, match="init=False"):
        @frozen
        class NoInit:
            x: int = dataclasses.field(default=0, init=False)

    with pytest.raises(TypeError, match="InitVar"):
        @frozen
        class Init:
            x: dataclasses.InitVar[int]

    with pytest.raises(TypeError, match="__setattr__"):
        @frozen
        class Own:
            x: int

            def __setattr__(self, name, value):
                pass


def test_routeplan_result_classes_are_frozen_dataclasses():
    from routeplan.plan.model import ChargePlan, Plan, StepPlan

    for cls in (ChargePlan, StepPlan, Plan):
        assert dataclasses.is_dataclass(cls) and cls.__dataclass_params__.frozen
    assert Plan.__eq__ is object.__eq__  # plans compare by identity
