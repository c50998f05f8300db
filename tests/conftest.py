"""Shared test helpers: write a route file, run the command line in-process.

Use them from any test module::

    from conftest import GOOD_ROUTE, run_cli, write_route
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

#: The repository's root, and the test data (route files with their expected findings).
ROOT = Path(__file__).resolve().parents[1]
DATA = Path(__file__).parent / "data"

#: A valid route (four steps, every charge basis, solutions, vessels); the base of the
#: bad-route tests, which change one thing in it at a time.
GOOD_ROUTE = DATA / "routes" / "good.yaml"


def route_text(name: str) -> str:
    """The text of the test route ``tests/data/routes/NAME``."""
    return (DATA / "routes" / name).read_text(encoding="utf-8")


def write_route(tmp_path: Path, text: str, name: str = "route.yaml") -> Path:
    """Write ``text`` as a route file in ``tmp_path`` and return its path."""
    path = Path(tmp_path) / name
    path.write_text(text, encoding="utf-8")
    return path


def missing_tool(reason: str) -> None:
    """Skip on a developer's machine without an outside tool; under CI (CI set) fail instead."""
    if os.environ.get("CI"):
        pytest.fail(reason)
    pytest.skip(reason)


def words(text: str) -> str:
    """``text`` with every run of spaces and line breaks made one space: what a terminal
    printout says, whatever width it was folded to."""
    return " ".join(text.split())


def run_cli(*args: str):
    """Run ``routeplan ARGS...`` in-process; return click's result.

    ``result.exit_code``, ``result.stdout``, ``result.stderr`` and ``result.output``
    (both streams) are set.  Exceptions the command line does not handle propagate.
    """
    from click.testing import CliRunner

    from routeplan.cli import cli

    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


@pytest.fixture
def good_text() -> str:
    """The text of :data:`GOOD_ROUTE`."""
    return GOOD_ROUTE.read_text(encoding="utf-8")


def run_edited(tmp_path: Path, base: str, edits, *args: str, command: str = "check"):
    """Apply ``edits`` ((old, new) pairs) to the route text ``base``, write it, and run
    ``routeplan COMMAND ROUTE ARGS...``; return (text, path, result)."""
    from route_edits import change

    text = change(base, edits)
    path = write_route(tmp_path, text)
    return text, path, run_cli(command, path, *args)
