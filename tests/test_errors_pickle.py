"""Every routeplan error keeps its class, message and fields through pickling and copying.

An error raised in a worker process (multiprocessing, concurrent.futures) is pickled to
reach the parent; before, ``RouteError`` could not even be unpickled (its constructor
takes problems, not a message).  Each class also derives from the builtin it is a kind
of, so ``except ValueError`` / ``except OSError`` catch it.
"""

from __future__ import annotations

import copy
import errno
import pickle

import pytest

from routeplan import errors as E
from routeplan.route.load import load_route_text
from routeplan.vocab import Severity

HERE = E.Location("route.yaml", 12, 7, "steps[1].charges[0].equiv")
PROBLEM = E.Problem("error", "must be a number, got 'abc'", HERE, step="S2", hint="write e.g. 1.2")
OTHER = E.Problem(Severity.ERROR, "unknown material 'NaCL'", E.Location("route.yaml", 4, 3, "materials"),
                  hint="did you mean 'NaCl'?")

#: One instance of every error class, every field set (the class-specific ones too).
SAMPLES: dict[type, E.RouteplanError] = {
    E.RouteplanError: E.RouteplanError("something is wrong", location=HERE, step="S2", hint="fix it"),
    E.QuantityError: E.QuantityError("'3 kgs' is not a mass", location=HERE, step="S2", key="target.amount",
                                     hint="write e.g. '3 kg'", text="3 kgs", dimension="mass"),
    E.FormulaError: E.FormulaError("formula 'C6H5Xx': unknown element 'Xx'", formula="C6H5Xx", token="Xx",
                                   position=5, location=HERE, step="S1", hint="check the symbol"),
    E.EquationError: E.EquationError("equation 'A + B': no arrow", equation="A + B", location=HERE, step="S3",
                                     hint="write 'A + B -> C'"),
    E.RouteError: E.RouteError([PROBLEM, OTHER], file="route.yaml",
                               warnings=[E.Problem("warning", "price missing", HERE)]),
    E.PlanError: E.PlanError("step S2 has a zero yield", location=HERE, step="S2", hint="give a yield above 0"),
    E.StockError: E.StockError("'toluene' is listed twice", material="toluene",
                               location=E.Location("stock.csv", 5, None, "A5"), hint="give one row per material"),
    E.RecordError: E.RecordError("batch 1 of step S1 is recorded twice", location=E.Location("rec.yaml", 3, 5,
                                 "lots[2].batch"), step="S1", hint="one entry per isolated batch"),
    E.OutputError: E.OutputError("cannot write 'out/plan.json': Permission denied", path="out/plan.json",
                                 errno=errno.EACCES, strerror="Permission denied", hint="choose another folder"),
    E.CompareError: E.CompareError("compare needs at least two routes, got 1", location=HERE,
                                   hint="name two or more route files"),
}

#: The builtin each class is also a kind of.
BUILTIN = {E.RouteplanError: Exception, E.OutputError: OSError}


def _all_error_classes(cls=E.RouteplanError):
    out = {cls}
    for sub in cls.__subclasses__():
        if sub.__module__ == E.__name__:
            out |= _all_error_classes(sub)
    return out


def test_every_error_class_has_a_sample():
    # a new class without a sample here fails this test
    assert set(SAMPLES) == _all_error_classes()
    assert {n for n in E.__all__ if isinstance(getattr(E, n), type) and issubclass(getattr(E, n), E.RouteplanError)
            } == {c.__name__ for c in SAMPLES}


@pytest.mark.parametrize("cls", list(SAMPLES), ids=lambda c: c.__name__)
@pytest.mark.parametrize("how", ["pickle", "copy", "deepcopy"])
def test_round_trip_keeps_class_message_and_fields(cls, how):
    err = SAMPLES[cls]
    for protocol in range(pickle.HIGHEST_PROTOCOL + 1) if how == "pickle" else [None]:
        back = {"pickle": lambda: pickle.loads(pickle.dumps(err, protocol)),
                "copy": lambda: copy.copy(err), "deepcopy": lambda: copy.deepcopy(err)}[how]()
        assert type(back) is cls
        assert str(back) == str(err)
        assert back.args == err.args == (str(err),)
        assert back.message == err.message
        assert back.fields() == err.fields()
        assert back.exit_code == 2


@pytest.mark.parametrize("cls", list(SAMPLES), ids=lambda c: c.__name__)
def test_fields_and_builtin_base(cls):
    err = SAMPLES[cls]
    assert isinstance(err, BUILTIN.get(cls, ValueError))
    assert {"message", "location", "step", "key", "hint"} <= set(cls.FIELDS)
    own = cls.FIELDS[len(E.RouteplanError.FIELDS):]  # the class's own fields, all set in SAMPLES
    assert all(getattr(err, name) is not None for name in ("message", "hint", *own)
               if not (cls is E.RouteError and name == "hint")), err.fields()


def test_messages_are_unchanged():
    # the sentence the command line prints is the same as before the fields were added
    assert str(SAMPLES[E.QuantityError]) == ("route.yaml:12:7: steps[1].charges[0].equiv: '3 kgs' is not a "
                                             "mass (write e.g. '3 kg')")
    assert str(SAMPLES[E.RouteError]) == (
        "route.yaml: 2 errors:\n"
        "  route.yaml:12:7: steps[1].charges[0].equiv: must be a number, got 'abc' (write e.g. 1.2)\n"
        "  route.yaml:4:3: materials: unknown material 'NaCL' (did you mean 'NaCl'?)")
    # an OSError with errno and filename would print '[Errno 13] ...'; ours prints its sentence
    assert str(SAMPLES[E.OutputError]) == ("cannot write 'out/plan.json': Permission denied "
                                           "(choose another folder)")


def test_key_defaults_to_the_location_key():
    assert SAMPLES[E.PlanError].key == "steps[1].charges[0].equiv"
    assert SAMPLES[E.QuantityError].key == "target.amount"  # given explicitly
    assert E.PlanError("no location").key is None


def test_output_error_is_an_oserror_with_its_fields():
    err = SAMPLES[E.OutputError]
    assert (err.errno, err.strerror, err.filename, err.path) == (
        errno.EACCES, "Permission denied", "out/plan.json", "out/plan.json")
    back = pickle.loads(pickle.dumps(err))
    assert (back.errno, back.strerror, back.filename) == (err.errno, err.strerror, err.filename)
    with pytest.raises(OSError):
        raise err


def test_real_output_error_from_a_missing_folder(tmp_path):
    from routeplan.export.atomic import write_text_atomic

    target = tmp_path / "missing" / "plan.json"
    with pytest.raises(OSError) as info:
        write_text_atomic(target, "{}")
    err = info.value
    assert isinstance(err, E.OutputError) and err.path == str(target)
    assert str(pickle.loads(pickle.dumps(err))) == str(err)


def test_single_problem_route_error_carries_its_fields():
    err = E.RouteError([PROBLEM], file="route.yaml")
    assert (err.location, err.step, err.hint, err.key) == (HERE, "S2", "write e.g. 1.2",
                                                           "steps[1].charges[0].equiv")
    assert str(err) == PROBLEM.render()
    back = pickle.loads(pickle.dumps(err))
    assert back.problems == err.problems and back.file == "route.yaml"


def test_a_real_route_error_survives_pickling():
    with pytest.raises(ValueError) as info:  # a RouteError is a ValueError
        load_route_text("route: {name: x}\ntarget: 3\n", "bad.yaml")
    err = info.value
    assert isinstance(err, E.RouteError) and len(err.problems) >= 1
    back = pickle.loads(pickle.dumps(err))
    assert type(back) is E.RouteError and str(back) == str(err) and back.problems == err.problems


def test_located_keeps_class_and_fields():
    err = SAMPLES[E.FormulaError]
    there = E.Location("other.yaml", 3, 1, "materials.x.formula")
    moved = err.located(there)
    assert type(moved) is E.FormulaError and moved.location == there and moved.key == "materials.x.formula"
    assert (moved.formula, moved.token, moved.position) == ("C6H5Xx", "Xx", 5)
    assert str(moved).startswith("other.yaml:3:1: materials.x.formula: ") and moved.args == (str(moved),)
    assert err.location == HERE  # the original is untouched


@pytest.mark.parametrize("obj", [HERE, E.Location(), PROBLEM, OTHER, E.Problem("warning", "w")])
def test_location_and_problem_round_trip(obj):
    back = pickle.loads(pickle.dumps(obj))
    assert back == obj and type(back) is type(obj)
    if isinstance(obj, E.Problem):
        assert back.severity is obj.severity and back.render() == obj.render()


def test_problem_severity_is_the_enum():
    assert PROBLEM.severity is Severity.ERROR and PROBLEM.severity == "error"
    with pytest.raises(ValueError):
        E.Problem("fatal", "no such severity")
