"""Standard output and standard error where they meet: in order, each warning once, every
line ended."""

from __future__ import annotations

import os
import subprocess
import sys
from collections import Counter

from conftest import ROOT
from routeplan.commands.common import echo_warnings
from routeplan.errors import Location, Problem
from routeplan.vocab import Severity

DEMO = "demo_routes/hx17-linear.yaml"


def _run(*args: str, merged: bool) -> subprocess.CompletedProcess:
    env = dict(os.environ, COLUMNS="80")
    return subprocess.run([sys.executable, "-m", "routeplan", *args], cwd=ROOT, env=env, capture_output=not merged,
                          stdout=subprocess.PIPE if merged else None,
                          stderr=subprocess.STDOUT if merged else None, text=True, timeout=120)


def test_merged_streams_keep_their_lines_and_each_warning_once():
    # issue 19: at 500 kg the caution ran into a warning ('...licensed practice.warning: ...')
    # and the S2 criticality warning was seen twice
    res = _run("plan", DEMO, "--target", "500 kg", merged=True)
    assert res.returncode == 0, res.stdout
    lines = res.stdout.splitlines()
    assert "practice.warning" not in res.stdout
    assert res.stdout.endswith("and licensed practice.\n")  # the caution is the last thing said
    warnings = [x for x in lines if "warning: " in x]
    assert warnings and all(x.startswith("warning: demo_routes/") for x in warnings)  # each on its own line
    assert max(Counter(warnings).values()) == 1
    assert sum("criticality class 3: MTSR" in x for x in warnings) == 1
    # the warnings come after the tables, before the caution
    first = lines.index(warnings[0])
    assert any(x.startswith("Cost of goods") for x in lines[:first])
    assert lines[-1].endswith("licensed practice.") and not any(x.startswith("warning") for x in lines[first + len(warnings):])


def test_standard_output_ends_with_a_newline():
    res = _run("plan", DEMO, "--target", "500 kg", merged=False)
    assert res.returncode == 0, res.stderr
    assert res.stdout.endswith("\n") and not res.stdout.endswith("\n\n")
    assert res.stderr.endswith("\n")


def test_a_warning_given_twice_is_printed_once(capsys):
    p = Problem(Severity.WARNING, "step S2: criticality class 3", Location("r.yaml", 186, 5, "steps[1]"), "S2")
    other = Problem(Severity.WARNING, "step S5 needs 14 batches", Location("r.yaml", 155, 3, "equipment.R630"))
    echo_warnings([p, other, p])
    err = capsys.readouterr().err.splitlines()
    assert err == [f"warning: {p.render()}", f"warning: {other.render()}"]
