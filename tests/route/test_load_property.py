"""Property tests: whatever is done to a valid route file, loading it either gives a Route or
raises our own error (RouteError / RouteplanError), never anything else."""

from __future__ import annotations

import copy
import io
import json

from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from ruamel.yaml import YAML

from conftest import GOOD_ROUTE
from routeplan.errors import RouteError, RouteplanError
from routeplan.route.load import load_route_text
from routeplan.route.model import Route
from routeplan.route.schema import keys_of, model_at
from routeplan.route.yamlpos import read_yaml

TEXT = GOOD_ROUTE.read_text(encoding="utf-8")
DATA, _, _ = read_yaml(TEXT, "good.yaml")

ODD_STRINGS = ["", " ", "1,5 kg", "-3 %", "NaN kg", "1e400 kg", "inf", "0", "0 %", "101 %", "85", "->",
               "2 2 A -> B", "A + + B -> C", "A -> ", "kg", "25 kg kg", "\u221e", "\u00e9\u00e8", "H2O",
               "S1", "C8H7Xq", "Pd(OAc", "1 mol/L", "0.889 g/mL", "!!python/object", "{}", "[]", "null",
               "\t", "a\nb", "\u202e", "\U0001f9ea", "yes", "no", "~"]

SETTINGS = settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _paths(node, prefix=()):
    out = [prefix] if prefix else []
    if isinstance(node, dict):
        for k, v in node.items():
            out += _paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += _paths(v, prefix + (i,))
    return out


PATHS = _paths(DATA)
def _get(node, path):
    for part in path:
        node = node[part]
    return node


MAPPINGS = [p for p in [()] + PATHS if isinstance(_get(DATA, p), dict)]

scalars = st.one_of(st.none(), st.booleans(), st.integers(-10**6, 10**6),
                    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=20),
                    st.sampled_from(ODD_STRINGS))
values = st.recursive(scalars, lambda inner: st.one_of(st.lists(inner, max_size=3),
                                                        st.dictionaries(st.text(max_size=8), inner, max_size=3)),
                      max_leaves=6)


def _dump(data) -> str:
    """Write ``data`` as block-style YAML."""
    yaml = YAML(typ="safe", pure=True)
    out = io.StringIO()
    yaml.dump(data, out)
    return out.getvalue()


def _json(data) -> str:
    """Write ``data`` as JSON, which is also YAML 1.2 (and quicker to read back)."""
    return json.dumps(data, ensure_ascii=False)


def _load(text: str):
    try:
        route = load_route_text(text, "mutant.yaml")
    except RouteError as exc:
        assert exc.problems and all(p.severity == "error" for p in exc.problems)
        assert all(p.render() for p in exc.problems)
        return None
    except RouteplanError:
        return None
    assert isinstance(route, Route)
    return route


def test_the_base_route_is_valid():
    assert _load(TEXT) is not None
    assert _load(_dump(DATA)) is not None  # dumping and reloading keeps it valid
    assert _load(_json(DATA)) is not None


@SETTINGS
@given(path=st.sampled_from(PATHS))
def test_deleting_any_key_or_item(path):
    data = copy.deepcopy(DATA)
    parent = _get(data, path[:-1])
    del parent[path[-1]]
    _load(_json(data))


@SETTINGS
@given(path=st.sampled_from(PATHS), value=values)
def test_replacing_any_value(path, value):
    data = copy.deepcopy(DATA)
    _get(data, path[:-1])[path[-1]] = value
    _load(_dump(data))


@SETTINGS
@given(path=st.sampled_from(MAPPINGS), key=st.one_of(st.text(min_size=1, max_size=12), st.sampled_from(ODD_STRINGS)),
       value=values)
def test_adding_an_unknown_key(path, key, value):
    data = copy.deepcopy(DATA)
    target = _get(data, path)
    model = model_at(path)
    assume(key not in target and (model is None or key not in keys_of(model)))
    target[key] = value
    route = _load(_json(data))
    if route is not None:  # only a new material (or vessel) may be accepted, never a stray key
        assert model is None and path in (("materials",), ("equipment",))


@SETTINGS
@given(position=st.integers(0, len(TEXT)), junk=st.text(max_size=12), cut=st.integers(0, 6))
def test_random_text_edits(position, junk, cut):
    _load(TEXT[:position] + junk + TEXT[position + cut:])
