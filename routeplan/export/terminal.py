"""The terminal writer: lays text blocks out to a width, as plain text.

Reads only what the views give (:mod:`routeplan.views.plan_text`,
:mod:`routeplan.views.compare_text`): paragraphs are wrapped with a hanging indent,
tables get columns as wide as their cells (headings folded, then names and lists folded,
when the width is short), a timeline is written as it is.  Nothing is computed here.

* Width: the terminal's, or ``COLUMNS`` when set; when standard output is not a terminal
  (a file, a pipe) and ``COLUMNS`` is not set, a stable :data:`DEFAULT_WIDTH`, so that the
  same plan always gives the same text.
* Style: on a terminal, headings and the strongest cells are bold and legends faint, by
  the SGR control sequences of ECMA-48 (5th edition, 1991, section 8.3.117); never when
  the output is not a terminal, when ``NO_COLOR`` is set (no-color.org) or when
  ``TERM=dumb``.  No box characters anywhere: rules are ``-``.
"""

from __future__ import annotations

import functools
import os
import re
import sys
import textwrap
from typing import TYPE_CHECKING, TextIO

from routeplan.views.text_blocks import Grid, Para, Pre

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits
    from routeplan.views.text_blocks import Block

__all__ = ["DEFAULT_WIDTH", "MIN_WIDTH", "is_terminal", "output_width", "styled", "render", "wrap_text", "print_plan",
           "print_blocks"]

#: Columns of output that is not a terminal, when ``COLUMNS`` is not set [-].
DEFAULT_WIDTH = 100

#: Narrowest layout [-]: a smaller width (a tiny ``COLUMNS``) is raised to it.
MIN_WIDTH = 40

_GAP = "  "  # between two columns of a table

#: Spaces a line is never broken at: between a number and its unit, as the SI Brochure
#: (BIPM, 9th edition 2019, section 5.4.3) writes them (``20.20 kg``, ``63.4 %``,
#: ``56 °C``, ``9.93 L/min``); between the groups of a large number (``13 190``); and
#: between a name and its value in a list (``S1 5.56 · S2 11.4``); before a closing mark
#: (``21.4 *``).
_NO_BREAK = re.compile(r"(?<=\d) (?=[A-Za-zµ°%³][A-Za-zµ°%³/]{0,7}(?![\w/]))"
                       r"|(?<=\d) (?=\d{3}(?!\d))"
                       r"|(?<=[^\s·]) (?=[-+]?\d[\d.]*(?: %)?(?: ·|[,;]|$))"
                       r"| (?=\*$)")
_HELD = "\u00a0"  # a no-break space while a text is folded
_SGR = {"heading": ("\x1b[1m", "\x1b[22m"), "strong": ("\x1b[1m", "\x1b[22m"), "dim": ("\x1b[2m", "\x1b[22m")}


def _columns_env() -> int | None:
    text = os.environ.get("COLUMNS", "").strip()
    return int(text) if text.isdigit() and int(text) > 0 else None


def is_terminal(stream: TextIO) -> bool:
    """True when ``stream`` is a terminal (not a file, a pipe or a closed stream)."""
    try:
        return stream.isatty()
    except (AttributeError, ValueError):  # a closed or unusual stream
        return False


def output_width(stream: TextIO | None = None) -> int:
    """Columns to lay out to for ``stream`` (standard output by default) [-].

    ``COLUMNS`` when set, else the terminal's width, else :data:`DEFAULT_WIDTH`; never
    below :data:`MIN_WIDTH`.
    """
    stream = sys.stdout if stream is None else stream
    width = _columns_env()
    if width is None and is_terminal(stream):
        try:
            width = os.get_terminal_size(stream.fileno()).columns
        except (OSError, ValueError, AttributeError):
            width = None
    return max(MIN_WIDTH, width or DEFAULT_WIDTH)


def styled(stream: TextIO | None = None) -> bool:
    """True when ``stream`` is a terminal that takes bold and faint text."""
    stream = sys.stdout if stream is None else stream
    return (is_terminal(stream) and "NO_COLOR" not in os.environ
            and os.environ.get("TERM", "") != "dumb")


def _sgr(text: str, style: str | None, on: bool) -> str:
    if not on or not style or not text.strip():
        return text
    start, end = _SGR[style]
    body = text.lstrip(" ")
    return text[: len(text) - len(body)] + start + body + end


@functools.lru_cache(maxsize=64)
def _wrapper(width: int, first: int, rest: int) -> textwrap.TextWrapper:
    # breaks only at ordinary spaces, so that a held space (_HELD) never ends a line
    return textwrap.TextWrapper(width=width, initial_indent=" " * first, subsequent_indent=" " * rest,
                                break_long_words=False, break_on_hyphens=False)


def wrap_text(text: str, width: int, *, indent: int = 0, hang: int = 4) -> list[str]:
    """``text`` folded to ``width`` columns: the first line indented by ``indent``, the
    others by ``indent + hang`` (a hanging indent).  A word longer than a line stays whole.

    >>> wrap_text("one two three four", 12, hang=2)
    ['one two', '  three four']
    >>> wrap_text("a mass of 20.20 kg", 16)
    ['a mass of', '    20.20 kg']
    """
    if len(text) + indent <= width:
        return [" " * indent + text]
    lines = _wrapper(width, indent, indent + hang).wrap(_NO_BREAK.sub(_HELD, text)) or [""]
    return [x.replace(_HELD, " ") for x in lines]


def _para_lines(p: Para, width: int, on: bool) -> list[str]:
    if not p.text and not p.label:
        return [""]
    text = f"{p.label} {p.text}" if p.label else p.text
    lines = wrap_text(text, width, indent=p.indent, hang=p.hang)
    if p.label and on:
        lines[0] = lines[0].replace(p.label, _sgr(p.label, "strong", on), 1)
    return [_sgr(x, p.style, on) for x in lines] if p.style else lines


def _words_width(text: str) -> int:
    """The longest piece of ``text`` that no fold splits [-]."""
    return max((len(w) for w in _NO_BREAK.sub(_HELD, text).split()), default=0)


def _fit(grid: Grid, room: int) -> tuple[list[int], list[list[str]]]:
    """Column widths within ``room`` columns, and each heading's lines.

    Columns first take their widest cell and heading; when that is too wide, headings fold
    at their spaces; when still too wide, the foldable columns (``wrap``) give up columns,
    the widest first, down to their longest word.  What cannot fit overflows.
    """
    cols = grid.columns
    cell_lines = [[line for row in grid.rows for line in row[i].split("\n")] for i in range(len(cols))]
    cells = [max((len(x) for x in lines), default=0) for lines in cell_lines]
    widths = [max(len(c.heading), w) for c, w in zip(cols, cells)]
    if sum(widths) > room:
        widths = [max(_words_width(c.heading), w) for c, w in zip(cols, cells)]
    least = [max(_words_width(c.heading), max((_words_width(x) for x in lines), default=0)) if c.wrap else widths[i]
             for i, (c, lines) in enumerate(zip(cols, cell_lines))]
    excess = sum(widths) - room
    while excess > 0:
        free = [i for i in range(len(cols)) if widths[i] > least[i]]
        if not free:
            break
        i = max(free, key=lambda k: widths[k])
        widths[i] -= 1
        excess -= 1
    natural = [max(len(c.heading), w) for c, w in zip(cols, cells)]
    # room to spare: unfold whole headings, the cheapest first; then widen the foldable
    # columns, the one folded the most first (a part of a heading's width is no gain)
    for i in sorted(range(len(cols)), key=lambda k: (natural[k] - widths[k], k)):
        if 0 < natural[i] - widths[i] <= -excess:
            excess += natural[i] - widths[i]
            widths[i] = natural[i]
    while excess < 0:
        short = [i for i in range(len(cols)) if cols[i].wrap and widths[i] < natural[i]]
        if not short:
            break
        i = max(short, key=lambda k: (natural[k] - widths[k], -k))
        widths[i] += 1
        excess += 1
    heads = [wrap_text(c.heading, w, hang=0) for c, w in zip(cols, widths)]
    return widths, heads


def _grid_lines(grid: Grid, width: int, on: bool) -> list[str]:
    cols = grid.columns
    pad = " " * grid.indent
    out = [] if not grid.title else _para_lines(Para(grid.title, style="heading"), width, on)
    widths, heads = _fit(grid, width - grid.indent - len(_GAP) * (len(cols) - 1))
    depth = max(len(h) for h in heads)

    def join(cells: list[str], strong: set[int] = frozenset()) -> str:
        parts = []
        for i, (c, w, text) in enumerate(zip(cols, widths, cells)):
            cell = text.rjust(w) if c.align == "right" else text.ljust(w)
            parts.append(_sgr(cell, "strong", on and i in strong))
        return (pad + _GAP.join(parts)).rstrip()

    for k in range(depth):
        out.append(join([h[k - depth + len(h)] if k >= depth - len(h) else "" for h in heads]))
    out.append(pad + _GAP.join("-" * w for w in widths))
    for r, row in enumerate(grid.rows):
        folded = []
        for c, w, text in zip(cols, widths, row):
            lines = []
            for line in text.split("\n"):
                lines += wrap_text(line, w, hang=0) if c.wrap else [line]
            folded.append(lines)
        strong = {i for i in range(len(cols)) if (r, i) in grid.strong}
        for k in range(max(len(x) for x in folded)):
            out.append(join([x[k] if k < len(x) else "" for x in folded], strong if k == 0 else set()))
    return out


def render(blocks: "list[Block]", width: int, *, style: bool = False) -> str:
    """The blocks laid out to ``width`` columns, as one text ending in a newline.

    Parameters
    ----------
    blocks : list of Para, Grid and Pre
    width : int
        Columns [-].
    style : bool
        Bold headings and faint legends (terminal control sequences).
    """
    lines: list[str] = []
    for b in blocks:
        if isinstance(b, Para):
            lines += _para_lines(b, width, style)
        elif isinstance(b, Grid):
            lines += _grid_lines(b, width, style)
        elif isinstance(b, Pre):
            lines += b.text.split("\n")
        else:  # pragma: no cover - a view gave something else
            raise TypeError(f"not a text block: {b!r}")
    return "\n".join(lines) + "\n"


def print_blocks(blocks: "list[Block]", *, file: TextIO | None = None, width: int | None = None,
                 style: bool | None = None) -> None:
    """Lay ``blocks`` out for ``file`` (standard output by default) and write them at once.

    ``width`` and ``style`` default to :func:`output_width` and :func:`styled` of the file.
    A reader that went away (``BrokenPipeError``) is left to the command line's funnel.
    """
    stream = sys.stdout if file is None else file
    stream.write(render(blocks, output_width(stream) if width is None else width,
                        style=styled(stream) if style is None else style))
    stream.flush()


def print_plan(plan: "Plan", *, file: TextIO | None = None, width: int | None = None,
               units: "DisplayUnits | None" = None, caution: bool = True, style: bool | None = None) -> None:
    """Print the plan (standard output by default), in one set of units, to a width.

    Parameters
    ----------
    plan : Plan
    file : text stream, optional
        Where to write; standard output by default.
    width : int, optional
        Columns [-]; default :func:`output_width` of the stream.
    units : DisplayUnits, optional
        Default: chosen by the target's mass (:func:`routeplan.views.display_units.plan_units`).
    caution : bool
        False when the caller prints the safety caution itself (the command line prints
        the warnings first, then the caution).
    style : bool, optional
        Bold and faint text; default only on a terminal (:func:`styled`).
    """
    from routeplan.views.plan_text import caution_block, plan_blocks

    stream = sys.stdout if file is None else file
    w = output_width(stream) if width is None else max(MIN_WIDTH, width)
    blocks = plan_blocks(plan, units, width=w)
    if caution:
        blocks.append(caution_block())
    print_blocks(blocks, file=stream, width=w, style=style)
