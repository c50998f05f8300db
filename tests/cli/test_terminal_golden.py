"""Golden printouts: what the demo routes print, piped (plain text), at 80 and 120 columns.

Each case runs the command line as a user would (``COLUMNS`` set, output not a terminal)
and compares standard output and standard error with ``tests/data/golden/NAME.txt``.  A
change to the printout is a change to these files, seen in review.

To write the files again after a deliberate change of the printout::

    ROUTEPLAN_GOLDEN=update .venv/bin/python -m pytest -q tests/cli/test_terminal_golden.py

then read the diff (``git diff tests/data/golden``) before committing it.
"""

from __future__ import annotations

import os
import re

import pytest
from click.testing import CliRunner

from conftest import DATA, ROOT
from routeplan.cli import cli

GOLDEN = DATA / "golden"
UPDATE = os.environ.get("ROUTEPLAN_GOLDEN") == "update"
LINEAR = "demo_routes/hx17-linear.yaml"
CONVERGENT = "demo_routes/hx17-convergent.yaml"

CASES = {
    "plan-linear-80": (80, ["plan", LINEAR]),
    "plan-linear-120": (120, ["plan", LINEAR]),
    "plan-convergent-80": (80, ["plan", CONVERGENT]),
    "plan-convergent-120": (120, ["plan", CONVERGENT]),
    "plan-linear-500kg-80": (80, ["plan", LINEAR, "--target", "500 kg"]),
    "plan-linear-50g-120": (120, ["plan", LINEAR, "--target", "50 g"]),
    "compare-80": (80, ["compare", LINEAR, CONVERGENT]),
    "compare-120": (120, ["compare", LINEAR, CONVERGENT]),
    "check-80": (80, ["check", LINEAR, CONVERGENT]),
}


def _run(width: int, args: list[str], monkeypatch) -> str:
    monkeypatch.chdir(ROOT)  # the route files named as a user in the repository names them
    result = CliRunner().invoke(cli, args, env={"COLUMNS": str(width), "NO_COLOR": None},
                                catch_exceptions=False)
    assert result.exit_code == 0, result.output
    return f"$ routeplan {' '.join(args)}\n{result.stdout}---- standard error ----\n{result.stderr}"


@pytest.mark.parametrize("name", sorted(CASES))
def test_printout_is_the_golden_one(name, monkeypatch):
    width, args = CASES[name]
    got = _run(width, args, monkeypatch)
    path = GOLDEN / f"{name}.txt"
    if UPDATE:
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(got, encoding="utf-8")
    assert path.exists(), f"no golden file {path.name}: run with ROUTEPLAN_GOLDEN=update"
    want = path.read_text(encoding="utf-8")
    assert got == want, f"{name}: the printout changed; if on purpose, run with ROUTEPLAN_GOLDEN=update"


@pytest.mark.parametrize("name", sorted(CASES))
def test_golden_files_keep_to_their_width(name):
    width, _ = CASES[name]
    text = (GOLDEN / f"{name}.txt").read_text(encoding="utf-8")
    out, _, err = text.partition("---- standard error ----\n")
    body = out.splitlines()[1:]  # after the command line
    assert not [x for x in body if len(x) > width]
    assert "\x1b" not in text and not re.search("[\u2500-\u257f]", text)  # plain: no colour, no box
    # piped warnings stay one per line, file:line:column first, as editors read them
    assert all(re.match(r"(warning|error): demo_routes/[\w.-]+:\d+:\d+: ", x) for x in err.splitlines())


def test_the_golden_plans_keep_one_unit_per_kind():
    # every table heading of a golden plan names the same unit of each kind
    for name in ("plan-linear-80", "plan-linear-500kg-80", "plan-linear-50g-120"):
        text = (GOLDEN / f"{name}.txt").read_text(encoding="utf-8")
        units = set(re.findall(r"\[(mmol|kmol|mol|mg|kg|g|t|mL|L|m³)\]", text))
        want = {"plan-linear-80": {"mol", "kg", "L"}, "plan-linear-500kg-80": {"kmol", "kg", "L"},
                "plan-linear-50g-120": {"mmol", "g", "mL"}}[name]
        assert units == want, (name, units)
