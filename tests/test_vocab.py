"""The closed vocabularies are StrEnums that behave as their words everywhere a word goes.

The route format (ROUTE-FORMAT.md) fixes the words: charge bases, roles, yield cases;
the enums must not change one character of any output (JSON, CSV, workbook, terminal).
"""

from __future__ import annotations

import csv
import json
from datetime import datetime, timezone
from pathlib import Path

import openpyxl
import pydantic
import pytest

from routeplan.errors import Problem
from routeplan.export.csv import write_csv
from routeplan.export.json import plan_to_dict, plan_to_json
from routeplan.export.workbook import write_workbook
from routeplan.plan.compare import HIGHER, LOWER
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from routeplan.route.model import BASES, ROLES
from routeplan.route.schema import CHARGE_BASES
from routeplan.vocab import (GIVEN_BASES, MOLAR_BASES, Basis, BetterIs, Role, Severity, UnrankedReason,
                             ValueKind, ValueQualifier, YieldCase)

DEMO = Path(__file__).resolve().parents[1] / "demo_routes" / "hx17-linear.yaml"
WORDS = {
    Basis: ["equiv", "mol_percent", "volumes", "mass_ratio", "stoichiometric"],
    Role: ["reactant", "reagent", "catalyst", "solvent", "workup"],
    Severity: ["error", "warning"],
    YieldCase: ["expected", "low", "high"],
    BetterIs: ["lower", "higher"],
    ValueKind: ["count", "fraction", "ratio", "money", "mass"],
    ValueQualifier: ["priced-materials-only", "priced-items-only", "no-uncertainty"],
    UnrankedReason: ["no-value", "currencies", "no-cost", "nothing-priced", "unpriced-materials", "unpriced-items",
                     "no-schedule", "no-uncertainty", "yields-without-case"],
}
ENUM_REPR = ("Basis.", "Role.", "Severity.", "YieldCase.", "BetterIs.", "ValueKind.", "ValueQualifier.",
             "UnrankedReason.")


@pytest.fixture(scope="module")
def plan():
    return plan_route(load_route(str(DEMO)))


@pytest.mark.parametrize("enum", list(WORDS), ids=lambda e: e.__name__)
def test_members_are_their_words(enum):
    assert [m.value for m in enum] == WORDS[enum]
    for word in WORDS[enum]:
        m = enum(word)
        assert m == word and str(m) == word and f"{m}" == word and hash(m) == hash(word)
        assert json.dumps(m) == json.dumps(word)
        assert {word: 1}[m] == 1
    with pytest.raises(ValueError):
        enum("no such word")


def test_old_names_are_derived_from_the_enums():
    # route/model.py kept BASES and ROLES for existing imports
    assert BASES == tuple(Basis) and list(BASES) == WORDS[Basis]
    assert ROLES == tuple(Role) and list(ROLES) == WORDS[Role]
    assert CHARGE_BASES == GIVEN_BASES == tuple(BASES[:4])
    assert set(MOLAR_BASES) == {Basis.EQUIV, Basis.MOL_PERCENT, Basis.STOICHIOMETRIC}
    assert (LOWER, HIGHER) == (BetterIs.LOWER, BetterIs.HIGHER)


def test_loaded_charges_hold_members(plan):
    route = load_route(str(DEMO))
    charges = [c for s in route.steps for c in s.charges]
    assert charges and all(type(c.basis) is Basis and type(c.role) is Role for c in charges)
    assert {c.basis for c in charges} >= {Basis.STOICHIOMETRIC, Basis.EQUIV, Basis.VOLUMES}


def test_problem_turns_its_word_into_the_member():
    p = Problem("warning", "a warning")
    assert p.severity is Severity.WARNING


def test_json_writes_the_words(plan):
    text = plan_to_json(plan)
    assert not any(r in text for r in ENUM_REPR)
    data = json.loads(text)
    lines = [c for s in data["steps"] for c in s["charges"]]
    assert lines and {c["basis"] for c in lines} <= set(WORDS[Basis])
    assert {c["role"] for c in lines} <= set(WORDS[Role])
    assert all(type(c["basis"]) is str for c in lines)
    # the dictionary itself holds members, which the standard encoder writes as their words
    assert json.loads(json.dumps(plan_to_dict(plan))) == data


def test_pydantic_validates_and_dumps_the_words():
    class Line(pydantic.BaseModel):
        basis: Basis
        role: Role
        word: str

    line = Line(basis="volumes", role="solvent", word=Role.WORKUP)
    assert line.basis is Basis.VOLUMES
    assert line.model_dump(mode="json") == {"basis": "volumes", "role": "solvent", "word": "workup"}
    assert json.loads(line.model_dump_json()) == {"basis": "volumes", "role": "solvent", "word": "workup"}
    with pytest.raises(pydantic.ValidationError):
        Line(basis="litres", role="solvent", word="x")


def test_workbook_and_csv_write_the_words(plan, tmp_path):
    when = datetime(2026, 1, 2, 3, 4, tzinfo=timezone.utc)
    path = write_workbook(plan, tmp_path / "plan.xlsx", written=when)
    wb = openpyxl.load_workbook(path)
    texts = [c.value for ws in wb.worksheets for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
    assert texts and not any(t.startswith(ENUM_REPR) for t in texts)
    used = {c.role.value for sp in plan.steps for c in sp.charges} - {"reactant"}  # reactants get a note
    assert used and used <= set(texts)
    rows = []
    for f in write_csv(plan, tmp_path / "csv", written=when):
        with open(f, newline="", encoding="utf-8") as fh:
            rows += [cell for row in csv.reader(fh) for cell in row]
    assert rows and not any(cell.startswith(ENUM_REPR) for cell in rows)
    assert used <= set(rows)
