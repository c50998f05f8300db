"""The import map of routeplan: no circle between modules, no arrow running up the data flow.

Data flows one way (DEVELOPERS.md): route/ -> inputs/ -> plan/ -> views/ -> export/.  The
test reads the imports of every module under routeplan/ with ast (imports inside functions
count; imports under ``if TYPE_CHECKING:`` do not, they never run) and fails on

- a circle between modules (a strongly connected group of more than one),
- plan/, route/, chemistry/, inputs/, units or errors importing views/ or export/ (or a
  module outside them that imports a writer's library),
- plan/, route/ or chemistry/ importing a writer's library (rich, xlsxwriter, openpyxl,
  jinja2),
- plan/compare.py holding words: a text field on its rows or comparison, or a string of
  words outside a docstring, an annotation and the functions that word its errors.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "routeplan"

LOWER = ("routeplan.plan", "routeplan.route", "routeplan.chemistry", "routeplan.inputs",
         "routeplan.units", "routeplan.errors")
UPPER = ("routeplan.views", "routeplan.export")
NO_WRITER_LIBRARIES = ("routeplan.plan", "routeplan.route", "routeplan.chemistry")
WRITER_LIBRARIES = {"rich", "xlsxwriter", "openpyxl", "jinja2"}

#: Known arrows up: none are left since the engine refactor; nothing may be added here.
KNOWN_UP: set[tuple[str, str]] = set()


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(PKG.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


MODULES = {_module_name(p): p for p in sorted(PKG.rglob("*.py"))}


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _imported_names(path: Path, name: str):
    """Every dotted name the module imports (absolute), outside TYPE_CHECKING blocks."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = name.split(".") if path.name == "__init__.py" else name.split(".")[:-1]
    todo = [tree]
    while todo:  # iterative walk, skipping the body of `if TYPE_CHECKING:`
        node = todo.pop()
        for child in ast.iter_child_nodes(node):
            if isinstance(child, ast.If) and _is_type_checking(child.test):
                todo.extend(child.orelse)
                continue
            if isinstance(child, ast.Import):
                yield from (a.name for a in child.names)
            elif isinstance(child, ast.ImportFrom):
                base = child.module or ""
                if child.level:
                    up = package[: len(package) - (child.level - 1)]
                    base = ".".join(up + ([base] if base else []))
                yield base
                yield from (f"{base}.{a.name}" for a in child.names)
            todo.append(child)


def _graph():
    """Module -> routeplan modules it imports; module -> third-party top-level names."""
    edges, third = {}, {}
    for name, path in MODULES.items():
        edges[name], third[name] = set(), set()
        for target in _imported_names(path, name):
            third[name].add(target.split(".")[0])
            while target:  # 'routeplan.units.Q' is the module 'routeplan.units'
                if target in MODULES:
                    if target != name:
                        edges[name].add(target)
                    break
                target = target.rpartition(".")[0]
    return edges, third


EDGES, THIRD = _graph()


def _circles(edges):
    """Strongly connected groups of more than one module (Tarjan, iterative)."""
    index, low, stack, on, out, counter = {}, {}, [], set(), [], 0
    for root in sorted(edges):
        if root in index:
            continue
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on.add(root)
        work = [(root, iter(sorted(edges[root])))]
        while work:
            v, it = work[-1]
            for w in it:
                if w not in index:
                    index[w] = low[w] = counter
                    counter += 1
                    stack.append(w)
                    on.add(w)
                    work.append((w, iter(sorted(edges[w]))))
                    break
                if w in on:
                    low[v] = min(low[v], index[w])
            else:
                work.pop()
                if work:
                    low[work[-1][0]] = min(low[work[-1][0]], low[v])
                if low[v] == index[v]:
                    group = []
                    while True:
                        w = stack.pop()
                        on.discard(w)
                        group.append(w)
                        if w == v:
                            break
                    if len(group) > 1:
                        out.append(sorted(group))
    return out


def _up_arrows(edges, third=None):
    """Imports from the lower layers of views/ or export/, or of any module above them that
    imports a writer's library itself."""
    third = THIRD if third is None else third
    return {(m, t) for m, ts in edges.items() if m.startswith(LOWER) for t in ts
            if t.startswith(UPPER) or (not t.startswith(LOWER) and third.get(t, set()) & WRITER_LIBRARIES)}


def test_the_map_sees_the_package():
    # the reader finds function-local imports and skips TYPE_CHECKING ones
    assert len(MODULES) > 40
    assert "routeplan.route.graph" in EDGES["routeplan.route.model"]  # inside Route.graph
    assert "routeplan.plan.model" not in EDGES["routeplan.plan.compare"]  # only under TYPE_CHECKING


def test_no_circle_between_modules():
    assert _circles(EDGES) == []


def test_no_arrow_runs_up():
    assert _up_arrows(EDGES) - KNOWN_UP == set()


def test_the_known_arrows_are_still_there():
    # once the refactor removes one, take it out of KNOWN_UP so it cannot come back
    assert KNOWN_UP <= _up_arrows(EDGES)


@pytest.mark.parametrize("module", sorted(m for m in MODULES if m.startswith(NO_WRITER_LIBRARIES)))
def test_computation_imports_no_writer_library(module):
    assert THIRD[module] & WRITER_LIBRARIES == set()


def test_the_checks_catch_what_they_should():
    # a circle and an arrow up, made up here, are found
    fake = {"routeplan.a": {"routeplan.b"}, "routeplan.b": {"routeplan.a"},
            "routeplan.plan.x": {"routeplan.views.y", "routeplan.c"}, "routeplan.views.y": set(),
            "routeplan.c": set()}
    assert _circles(fake) == [["routeplan.a", "routeplan.b"]]
    assert _up_arrows(fake, {"routeplan.c": {"rich"}}) == {("routeplan.plan.x", "routeplan.views.y"),
                                                           ("routeplan.plan.x", "routeplan.c")}


#: The functions of plan/compare.py that word an error (CompareError) or a route's column
#: label; every other string of words there is a docstring, an annotation or in a ``raise``.
COMPARE_ERROR_WORDS = {"who", "_describe_target", "check_same_target", "_same_formula", "_labels"}


def _worded_strings(tree: ast.Module, allowed_functions: set[str]):
    """(line, text) of every string or f-string with a space between words, outside
    docstrings, annotations, ``raise`` statements and the functions ``allowed_functions``."""
    skip = set()
    for node in ast.walk(tree):
        body = getattr(node, "body", None)
        if isinstance(node, (ast.Module, ast.FunctionDef, ast.ClassDef)) and body and isinstance(body[0], ast.Expr) \
                and isinstance(body[0].value, ast.Constant):
            skip.add(id(body[0].value))
        if isinstance(node, ast.FunctionDef) and node.name in allowed_functions or isinstance(node, ast.Raise):
            skip.update(id(n) for n in ast.walk(node))
        for ann in ([node.annotation] if isinstance(node, (ast.arg, ast.AnnAssign)) and node.annotation else []) \
                + ([node.returns] if isinstance(node, ast.FunctionDef) and node.returns else []):
            skip.update(id(n) for n in ast.walk(ann))
    for node in ast.walk(tree):
        if isinstance(node, ast.JoinedStr):
            skip.update(id(v) for v in node.values)  # judged as a whole, below
    for node in ast.walk(tree):
        if id(node) in skip:
            continue
        if isinstance(node, ast.JoinedStr):
            text = "".join(v.value for v in node.values if isinstance(v, ast.Constant))
        elif isinstance(node, ast.Constant) and isinstance(node.value, str):
            text = node.value.strip()
        else:
            continue
        if " " in text:  # a unit such as f"{currency}/kg" is no sentence
            yield node.lineno, ast.unparse(node)


def _class_fields(tree: ast.Module) -> dict[str, dict[str, str]]:
    return {c.name: {a.target.id: ast.unparse(a.annotation) for a in c.body
                     if isinstance(a, ast.AnnAssign) and isinstance(a.target, ast.Name)}
            for c in tree.body if isinstance(c, ast.ClassDef)}


def test_plan_compare_holds_no_words():
    # plan/ holds data only (issue 10, Deliver 3): a comparison's headings, the texts beside
    # its values, why a row is not ranked and its notes are worded in views/compare_words.py
    tree = ast.parse((PKG / "plan" / "compare.py").read_text(encoding="utf-8"))
    fields = _class_fields(tree)
    for cls in ("CompareRow", "Comparison", "Unranked"):
        assert not {"heading", "short", "note", "labels_text", "text"} & set(fields[cls]), cls
    assert "str" not in fields["Comparison"]["notes"]  # records, not sentences
    assert "str" not in fields["CompareRow"]["unranked"]
    assert list(_worded_strings(tree, COMPARE_ERROR_WORDS)) == []


def test_the_words_check_finds_words():
    tree = ast.parse('''
class Row:
    """A row."""
    heading: str
    note: "str | None"


def f(x: "int | None") -> "str | None":
    """Doc string."""
    raise ValueError(f"bad {x}")


def g(n):
    return f"not ranked: {n}", "a route has no value", "kg", f"{n}/kg"
''')
    assert _class_fields(tree)["Row"] == {"heading": "str", "note": "'str | None'"}
    assert [t for _, t in _worded_strings(tree, set())] == ["f'not ranked: {n}'", "'a route has no value'"]
