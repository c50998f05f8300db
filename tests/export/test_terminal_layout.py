"""The terminal writer: lines folded to the width with a hanging indent, tables fitted,
plain text when the output is not a terminal."""

from __future__ import annotations

import io
import re

import pytest
from click.testing import CliRunner
from hypothesis import given
from hypothesis import strategies as st

from conftest import ROOT, words
from routeplan.cli import cli
from routeplan.export.terminal import _HELD, _NO_BREAK, DEFAULT_WIDTH, output_width, print_plan, render, styled, wrap_text
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route
from routeplan.views.text_blocks import Col, Grid, Para

LINEAR = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"
BOX = re.compile("[\u2500-\u257f]")  # the box-drawing block of Unicode
ESC = "\x1b"


def _cli(*args: str, columns: int | None = None):
    env = {"COLUMNS": str(columns) if columns else None}  # None: unset
    return CliRunner().invoke(cli, [str(a) for a in args], env=env, catch_exceptions=False)


@given(st.lists(st.sampled_from(["word", "a", "longerword", "20.20 kg", "63.4 %", "S1 5.56 ·", "x" * 30]),
                min_size=1, max_size=40), st.integers(20, 140), st.integers(0, 6), st.integers(0, 8))
def test_law_folding_keeps_every_word_and_the_width(pieces, width, indent, hang):
    text = " ".join(pieces)
    lines = wrap_text(text, width, indent=indent, hang=hang)
    assert words("\n".join(lines)) == words(text)  # nothing lost, nothing added
    assert lines[0].startswith(" " * indent) and not lines[0][indent:].startswith(" ")
    for line in lines[1:]:
        assert line.startswith(" " * (indent + hang)) and line[indent + hang] != " "
    for line in lines:  # a line is over the width only when it is one piece that no fold splits:
        # a number with its unit, or a last value with its label ('xxx… 63.4 %' at width 20)
        assert len(line) <= width or " " not in _NO_BREAK.sub(_HELD, line.strip())


def test_a_number_stays_with_its_unit():
    # SI Brochure (BIPM, 9th edition 2019), section 5.4.3: a space separates number and unit
    text = "reaction mass 333.8 kg per batch, MTSR 65.98 °C and 13 190 mmol of water, S1 5.56 · S2 11.4"
    for width in range(12, 60):
        lines = [x.strip() for x in wrap_text(text, width)]
        joined = "\n".join(lines)
        for pair in ("333.8 kg", "65.98 °C", "13 190 mmol", "S1 5.56", "S2 11.4"):
            assert pair in joined, (width, lines)


def test_a_table_fits_by_folding_headings_then_names():
    grid = Grid((Col("#", "right"), Col("material", wrap=True), Col("n [kmol]", "right"), Col("m/batch [kg]", "right")),
                (("1", "Na-salt (S3, in solution)", "2.282", "43.96"), ("2", "water", "87.85", "131.9")))
    wide = render([grid], 80).splitlines()
    assert wide[0] == "  #  material                   n [kmol]  m/batch [kg]"  # one line of headings
    narrow = render([grid], 40).splitlines()
    assert all(len(x) <= 40 for x in narrow), narrow
    assert narrow[:2] == ["                              n  m/batch",  # headings folded, units below
                          "  #  material            [kmol]     [kg]"]
    assert narrow[3:5] == ["  1  Na-salt (S3, in      2.282    43.96", "     solution)"]  # then the name
    assert set(narrow[2].replace(" ", "")) == {"-"}  # the rule is dashes, never box characters


@pytest.mark.parametrize("path, target", [(LINEAR, None), (LINEAR, "500 kg"), (LINEAR, "50 g"), (CONVERGENT, None),
                                          (CONVERGENT, "2 t")])
@pytest.mark.parametrize("width", [80, 120])
def test_the_plan_keeps_to_80_and_120_columns(path, target, width):
    plan = plan_route(load_route(path), target)
    buf = io.StringIO()
    print_plan(plan, file=buf, width=width)
    out = buf.getvalue()
    assert out.endswith("\n") and not out.endswith("\n\n\n")
    too_long = [x for x in out.splitlines() if len(x) > width]
    assert not too_long, too_long
    assert ESC not in out and not BOX.search(out)


@pytest.mark.parametrize("width", [80, 120])
def test_compare_keeps_to_the_width_piped_plain(width):
    result = _cli("compare", LINEAR, CONVERGENT, columns=width)
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert not [x for x in out.splitlines() if len(x) > width]
    assert ESC not in out and not BOX.search(out)
    assert "* best in its row" in out and words(out).endswith("licensed practice.")
    assert "largest single raw material" in out and " kg " in out  # the mass row in the comparison's unit


def test_piped_output_is_plain_at_a_stable_width():
    plain = _cli("plan", LINEAR)
    assert plain.exit_code == 0
    assert ESC not in plain.stdout and not BOX.search(plain.stdout)
    assert max(len(x) for x in plain.stdout.splitlines()) <= DEFAULT_WIDTH
    assert _cli("plan", LINEAR).stdout == plain.stdout  # the same text every time


class _Tty(io.StringIO):
    def isatty(self) -> bool:
        return True

    def fileno(self) -> int:  # no real terminal behind it: its width is not asked for
        raise OSError("not a real terminal")


def test_a_terminal_gets_bold_headings_unless_no_color(monkeypatch):
    monkeypatch.delenv("NO_COLOR", raising=False)
    monkeypatch.setenv("TERM", "xterm")
    tty = _Tty()
    assert styled(tty) and not styled(io.StringIO())
    plan = plan_route(load_route(LINEAR))
    print_plan(plan, file=tty, width=100)
    out = tty.getvalue()
    # ECMA-48 (5th edition 1991), 8.3.117 SGR: 1 bold, 2 faint, 22 normal intensity
    assert "\x1b[1mS1 · N-acetylation" in out and "\x1b[2mn: amount of the compound" in out
    assert "\x1b[1mCAUTION:\x1b[22m Planning estimates only" in out
    assert re.sub(r"\x1b\[\d+m", "", out) == _plain(plan)  # the same text, emphasis aside
    monkeypatch.setenv("NO_COLOR", "1")  # no-color.org
    assert not styled(tty)
    monkeypatch.delenv("NO_COLOR")
    monkeypatch.setenv("TERM", "dumb")
    assert not styled(tty)


def _plain(plan) -> str:
    buf = io.StringIO()
    print_plan(plan, file=buf, width=100)
    return buf.getvalue()


def test_columns_sets_the_width(monkeypatch):
    monkeypatch.setenv("COLUMNS", "72")
    assert output_width(io.StringIO()) == 72
    monkeypatch.setenv("COLUMNS", "10")  # too narrow to lay a table out: raised
    assert output_width(io.StringIO()) == 40
    monkeypatch.delenv("COLUMNS")
    assert output_width(io.StringIO()) == DEFAULT_WIDTH


def test_a_heading_paragraph_folds_with_its_hanging_indent():
    out = render([Para("Overall yield along the longest linear sequence (S1 -> S2 -> S3 -> S4 -> S5): 63.4 % "
                       "(60.6 % to 65.5 % with the steps' low and high yields)")], 80).splitlines()
    assert out == ["Overall yield along the longest linear sequence (S1 -> S2 -> S3 -> S4 -> S5):",
                   "    63.4 % (60.6 % to 65.5 % with the steps' low and high yields)"]
