"""Golden comparisons: what ``routeplan compare`` writes as JSON and prints, for cases that
word every kind of note and every reason a row is not ranked.

The demo routes at low yields, and variants of them written here (another target amount
and overage, an unpriced material, a step without a cycle time, a vessel without a rate,
a route without yield ranges, another currency), each run as a user would.  The JSON
(``--json -``) is compared with ``tests/data/golden/NAME.json``, its numbers to 9
significant figures and without the ``generator`` line (the version); the printout
(piped, 100 columns) with ``tests/data/golden/NAME.txt``.

To write the files again after a deliberate change::

    ROUTEPLAN_GOLDEN=update .venv/bin/python -m pytest -q tests/cli/test_compare_golden.py

then read the diff (``git diff tests/data/golden``) before committing it.
"""

from __future__ import annotations

import json
import os

import pytest
from click.testing import CliRunner

from conftest import DATA, ROOT
from routeplan.cli import cli

GOLDEN = DATA / "golden"
UPDATE = os.environ.get("ROUTEPLAN_GOLDEN") == "update"
LINEAR = (ROOT / "demo_routes" / "hx17-linear.yaml").read_text(encoding="utf-8")
CONVERGENT = (ROOT / "demo_routes" / "hx17-convergent.yaml").read_text(encoding="utf-8")


def _edit(text: str, *pairs: tuple[str, str]) -> str:
    for old, new in pairs:
        assert old in text, old
        text = text.replace(old, new)
    return text


#: The route files of each case, written to a folder of their own (the demo's, edited).
FILES = {
    "demo-low": {"hx17-linear.yaml": LINEAR, "hx17-convergent.yaml": CONVERGENT},
    "drawn-unpriced": {
        # no yield range: carries no uncertainty
        "a.yaml": _edit(LINEAR, ("yield: {expected: 92 %, low: 88 %, high: 95 %}", "yield: 92 %")),
        # 30 kg at 5 %; KI without a price; B2 without a cycle time; R630 without a rate
        "b.yaml": _edit(CONVERGENT, ("amount: 25 kg\n  overage: 2 %", "amount: 30 kg\n  overage: 5 %"),
                        ("    formula: KI\n    phase: solid\n    price: 45\n", "    formula: KI\n    phase: solid\n"),
                        ("    vessel: R250\n    cycle_time: 10 h\n", "    vessel: R250\n"),
                        ("    volume: 630 L\n    rate: 95\n", "    volume: 630 L\n")),
    },
    "currencies": {"a.yaml": LINEAR, "c.yaml": _edit(CONVERGENT, ("currency: EUR", "currency: USD"))},
}

CASES = {
    "compare-demo-low": ("demo-low", ["hx17-linear.yaml", "hx17-convergent.yaml", "--yields", "low"]),
    "compare-drawn-unpriced": ("drawn-unpriced", ["a.yaml", "b.yaml", "--confidence", "90 %", "--draws", "500",
                                                  "--seed", "3"]),
    "compare-currencies": ("currencies", ["a.yaml", "c.yaml", "--target", "10 kg"]),
}


def _rounded(x):
    if isinstance(x, float):
        return float(f"{x:.9g}")
    if isinstance(x, list):
        return [_rounded(v) for v in x]
    if isinstance(x, dict):
        return {k: _rounded(v) for k, v in x.items()}
    return x


def _run(args: list[str], width: int = 100):
    result = CliRunner().invoke(cli, ["compare", *args], env={"COLUMNS": str(width), "NO_COLOR": None},
                                catch_exceptions=False)
    assert result.exit_code == 0, result.output
    return result


def _check(path, got: str, what: str) -> None:
    if UPDATE:
        path.write_text(got, encoding="utf-8")
    assert path.exists(), f"no golden file {path.name}: run with ROUTEPLAN_GOLDEN=update"
    assert got == path.read_text(encoding="utf-8"), \
        f"{path.name}: the {what} changed; if on purpose, run with ROUTEPLAN_GOLDEN=update"


@pytest.fixture
def folder(tmp_path, monkeypatch):
    def make(name: str):
        where = tmp_path / name
        where.mkdir()
        for file, text in FILES[name].items():
            (where / file).write_text(text, encoding="utf-8")
        monkeypatch.chdir(where)  # the files named as a user in that folder names them
        return where
    return make


@pytest.mark.parametrize("name", sorted(CASES))
def test_compare_json_is_the_golden_one(name, folder):
    files, args = CASES[name]
    folder(files)
    data = json.loads(_run([*args, "--json", "-"]).stdout)
    assert data.pop("generator").startswith("routeplan ")
    got = json.dumps(_rounded(data), indent=1, ensure_ascii=False) + "\n"
    _check(GOLDEN / f"{name}.json", got, "JSON")


@pytest.mark.parametrize("name", sorted(CASES))
def test_compare_printout_is_the_golden_one(name, folder):
    files, args = CASES[name]
    folder(files)
    result = _run(args)
    got = f"$ routeplan compare {' '.join(args)}\n{result.stdout}---- standard error ----\n{result.stderr}"
    _check(GOLDEN / f"{name}.txt", got, "printout")


def test_the_cases_word_every_reason_and_note():
    # the golden files together say every reason a row is not ranked and every kind of note
    # but NO_VALUE and NOTHING_PRICED and NO_COST, which the plan tests and the views test cover
    text = " ".join((GOLDEN / f"{name}.json").read_text(encoding="utf-8") for name in CASES)
    for words in ("not ranked: the routes give prices in different currencies (EUR, USD)",
                  "not ranked: priced raw materials only, some have no price",
                  "not ranked: priced items only, some have no price",
                  "not ranked: a route has no schedule",
                  "carries no uncertainty (no step gives a yield range)",
                  "have steps without a low yield, planned at their expected yields",
                  "the target amount of the first route", "the routes plan different overages",
                  "every route is planned at its steps' low yields", "have no low yield and are planned at",
                  "step yields are drawn 500 times",
                  "priced materials only", "priced items only", "no yield ranges: carries no uncertainty",
                  "pace: S5", "S1 → S2 → S3 → S4 → S5"):
        assert words in text, words
