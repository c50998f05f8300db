"""Whole route files with a slip a chemist makes, each stored with the findings it must give.

Every file in ``tests/data/bad_routes/`` is a complete, otherwise valid route with one kind
of slip (a decimal comma, a density in kg, a ratio ten times too big, a zero for the letter
O ...).  Its header says how to check it and what routeplan must answer::

    # command: check --strict
    # exit: 2
    # error: 41:34: steps[1].charges[2].equiv: above the usual range

Each ``# error:`` line is one finding: the line and column of the value at fault, the key
path, and words of the message.  The run must give exactly these findings (no more, no
fewer), exit with the code given, and show no traceback.  A file checked with ``--strict``
holds warnings only: checked without it, the same findings come as warnings and the exit
code is 0 (``--strict`` turns exactly the warnings into errors).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from conftest import DATA, run_cli

FIXTURES = sorted((DATA / "bad_routes").glob("*.yaml"))


def header(path: Path) -> dict:
    """The directives of a fixture's leading comment lines."""
    out: dict = {"error": []}
    for line in path.read_text(encoding="utf-8").splitlines():
        m = re.match(r"# (command|exit|error): (.*)", line)
        if m and m.group(1) == "error":
            loc, key, words = m.group(2).split(": ", 2)
            line_no, col = (int(x) for x in loc.split(":"))
            out["error"].append((line_no, col, key, words))
        elif m:
            out[m.group(1)] = m.group(2).strip()
    return out


def findings(stderr: str, path: Path, kind: str) -> list[tuple[int, int, str, str]]:
    """(line, column, key path, message) of every ``kind:`` line about ``path``."""
    pattern = re.compile(re.escape(f"{kind}: {path}:") + r"(\d+):(\d+): (\S+): (.*)")
    return [(int(m.group(1)), int(m.group(2)), m.group(3), m.group(4))
            for m in map(pattern.match, stderr.splitlines()) if m]


def matches(found, expected) -> bool:
    return len(found) == len(expected) and all(
        (f[0], f[1], f[2]) == (e[0], e[1], e[2]) and e[3] in f[3] for f, e in zip(found, expected))


def test_there_are_fixtures():
    assert len(FIXTURES) >= 12


@pytest.mark.parametrize("path", FIXTURES, ids=[p.stem for p in FIXTURES])
def test_fixture_gives_its_findings(path):
    want = header(path)
    assert want["error"], f"{path.name}: no '# error:' line"
    result = run_cli(*want["command"].split(), path)
    assert result.exit_code == int(want["exit"]), result.output
    assert "Traceback" not in result.output
    found = findings(result.stderr, path, "error")
    assert matches(found, want["error"]), f"expected {want['error']}\ngot {found}\n{result.stderr}"


@pytest.mark.parametrize("path", [p for p in FIXTURES if "--strict" in header(p)["command"]],
                         ids=lambda p: p.stem)
def test_strict_turns_exactly_the_warnings_into_errors(path):
    want = header(path)
    command = [w for w in want["command"].split() if w != "--strict"]
    result = run_cli(*command, path)
    assert result.exit_code == 0, result.output
    assert findings(result.stderr, path, "error") == []
    assert matches(findings(result.stderr, path, "warning"), want["error"]), result.stderr
