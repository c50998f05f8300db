"""The pieces a text view is made of: paragraphs, tables and preformatted lines.

A view (the plan, a comparison) says *what* is shown as a list of blocks; a writer
(:mod:`routeplan.export.terminal`) lays them out to a width: it wraps a paragraph with a
hanging indent, fits a table's columns, and emphasises a heading where it can.  A block
holds no width, no colour and no markup.
"""

from __future__ import annotations

from routeplan.frozen import frozen

__all__ = ["Para", "Col", "Grid", "Pre", "Block", "blank", "para_of_line", "join_words"]


@frozen
class Para:
    """A paragraph: one logical line, wrapped by the writer.

    Attributes
    ----------
    text : str
        The words, without leading spaces; empty for a blank line.
    indent : int
        Spaces before the first line [-].
    hang : int
        Further spaces before every continuation line [-] (a hanging indent).
    style : str or None
        ``"heading"`` (a section's title), ``"dim"`` (a legend) or None.
    label : str
        A leading word shown strongly, e.g. ``"CAUTION:"`` (part of the text's first line).
    """

    text: str
    indent: int = 0
    hang: int = 4
    style: str | None = None
    label: str = ""


@frozen
class Col:
    """A column of a :class:`Grid`.

    Attributes
    ----------
    heading : str
        Heading with its unit, e.g. ``"m/batch [kg]"``; the writer may fold it over lines.
    align : str
        ``"left"`` or ``"right"`` (numbers).
    wrap : bool
        True when the cells may be folded over lines to fit the width (names, lists).
    """

    heading: str
    align: str = "left"
    wrap: bool = False


@frozen
class Grid:
    """A table: columns, then rows of text cells (a cell may hold lines split by ``\\n``).

    Attributes
    ----------
    columns : tuple of Col
    rows : tuple of tuple of str
    title : str
        Shown above the table as a heading ("" for none).
    indent : int
        Spaces before every line of the table [-].
    strong : frozenset of (int, int)
        (row, column) of the cells to emphasise (the best value of a comparison row).
    """

    columns: tuple[Col, ...]
    rows: tuple[tuple[str, ...], ...]
    title: str = ""
    indent: int = 2
    strong: frozenset = frozenset()


@frozen
class Pre:
    """Lines laid out as they are, never wrapped (a timeline whose columns are hours)."""

    text: str


Block = Para | Grid | Pre


def blank() -> Para:
    """An empty line."""
    return Para("")


def para_of_line(line: str, *, style: str | None = None, hang: int = 4) -> Para:
    """A :class:`Para` from a line whose leading spaces are its indent.

    >>> para_of_line("  heat: 80 kg")
    Para(text='heat: 80 kg', indent=2, hang=4, style=None, label='')
    """
    text = line.lstrip(" ")
    return Para(text, indent=len(line) - len(text), hang=hang, style=style)


def join_words(words) -> str:
    """Words joined for a sentence: ``a``, ``a and b``, ``a, b and c`` (empty for none).

    >>> join_words(["S1"]), join_words(["S1", "S2", "S3"]), join_words([])
    ('S1', 'S1, S2 and S3', '')
    """
    words = list(words)
    if len(words) <= 1:
        return "".join(words)
    return ", ".join(words[:-1]) + " and " + words[-1]
