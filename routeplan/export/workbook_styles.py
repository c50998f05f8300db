"""Cell formats, safe cell writing and column widths for the charge-sheet workbook.

Everything here works on an open xlsxwriter workbook; nothing reads the Plan.  Text is
always written with ``write_string`` (never ``write``), so text from a route file can
never become a formula, a number or a link.
"""

from __future__ import annotations

import math
from typing import Any

__all__ = [
    "WORKBOOK_OPTIONS",
    "Styles",
    "put",
    "decimals_for",
    "text_width",
    "set_widths",
    "escape_header",
    "PERCENT_KEYS",
    "PERCENT_FORMAT",
    "sheet_title",
    "LINE_HEIGHT",
    "px_width",
    "wrapped_lines",
    "lines_height",
    "fit_widths",
]

#: Options of every workbook routeplan writes: strings stay strings.
WORKBOOK_OPTIONS = {
    "strings_to_formulas": False,
    "strings_to_numbers": False,
    "strings_to_urls": False,
}

# Our palette: slate headings, a pale sand band for the caution, pale green cells for
# the plant to fill in, light grey for cells whose entry changes nothing.
_INK = "#1D2B36"
_HEADING_FILL = "#D5DEE5"
_CAUTION_FILL = "#F6E7C8"
_FILL_IN = "#E3F1E1"
_NOT_USED = "#EDEDED"
_BORDER_COLOUR = "#9AA7B1"
_OUTSIDE_FILL = "#F4C7C3"
_OUTSIDE_INK = "#8B1A10"


#: Columns holding fractions (0 to 1) that sheets show as percent.
PERCENT_KEYS = frozenset({"assay", "tolerance", "share", "fill_fraction", "yield", "solution_mass_fraction",
                          "atom_economy", "rme"})

#: The one number format of every percentage the workbook shows (a fraction stored as
#: 0.97525 shows as 97.5%): fill, yield, assay, lot assay, atom economy, overage.
PERCENT_FORMAT = "0.0%"

#: Height of one line of 10-pt text in a row [pt] (a spreadsheet's default row for a
#: 10-11 pt font is about 13-15 pt; common practice, no source).
LINE_HEIGHT = 13.0


def sheet_title(column) -> str:
    """The heading of ``column`` on a sheet: its title, with ``[%]`` for a fraction
    shown as percent."""
    if column.key in PERCENT_KEYS:
        return f"{column.heading} [%]"
    return column.title


def decimals_for(value: float | None, *, significant: int = 4, lowest: int = 1, highest: int = 6) -> int:
    """Decimal places that show ``value`` to at least ``significant`` figures.

    Examples
    --------
    >>> decimals_for(57.02)
    2
    >>> decimals_for(0.4942)
    4
    >>> decimals_for(1234.5)
    1
    """
    if value is None or value == 0 or not math.isfinite(value):
        return 3
    exponent = math.floor(math.log10(abs(value)))
    return max(lowest, min(highest, significant - 1 - exponent))


class Styles:
    """The cell formats of one workbook, made once and shared by its sheets.

    Parameters
    ----------
    workbook : xlsxwriter.Workbook
        The workbook the formats belong to.
    """

    def __init__(self, workbook) -> None:
        self._wb = workbook
        self._cache: dict[tuple, Any] = {}
        base = {"font_name": "Calibri", "font_size": 10, "valign": "top", "font_color": _INK}
        self._base = base
        add = self._make
        self.title = add(bold=True, font_size=14)
        self.subtitle = add(bold=True, font_size=11)
        self.caution = add(bold=True, text_wrap=True, bg_color=_CAUTION_FILL, border=1,
                           border_color=_BORDER_COLOUR)
        self.label = add(bold=True)
        self.text = add()
        self.wrap = add(text_wrap=True)
        self.heading = add(bold=True, text_wrap=True, bg_color=_HEADING_FILL, border=1,
                           border_color=_BORDER_COLOUR, valign="vcenter")
        self.heading_fill_in = add(bold=True, text_wrap=True, bg_color=_FILL_IN, border=1,
                                   border_color=_BORDER_COLOUR, valign="vcenter")
        self.cell_text = add(text_wrap=True, border=1, border_color=_BORDER_COLOUR)
        self.integer = add(num_format="0", border=1, border_color=_BORDER_COLOUR)
        self.ratio = add(num_format="0.0##", border=1, border_color=_BORDER_COLOUR)
        self.molar_mass = add(num_format="0.00", border=1, border_color=_BORDER_COLOUR)
        self.density = add(num_format="0.000", border=1, border_color=_BORDER_COLOUR)
        self.percent = add(num_format=PERCENT_FORMAT, border=1, border_color=_BORDER_COLOUR)
        self.general = add(num_format="General", border=1, border_color=_BORDER_COLOUR)
        self.money = add(num_format="#,##0.00", border=1, border_color=_BORDER_COLOUR)
        self.money_bold = add(num_format="#,##0.00", bold=True, border=1, border_color=_BORDER_COLOUR)
        self.fill_text = add(bg_color=_FILL_IN, border=1, border_color=_BORDER_COLOUR, locked=False)
        self.fill_percent = add(num_format=PERCENT_FORMAT, bg_color=_FILL_IN, border=1,
                                border_color=_BORDER_COLOUR, locked=False)
        self.fill_mass = add(num_format="#,##0.000", bg_color=_FILL_IN, border=1,
                             border_color=_BORDER_COLOUR, locked=False)
        self.fill_titre = add(num_format='0.000" mol/L"', bg_color=_FILL_IN, border=1,
                              border_color=_BORDER_COLOUR, locked=False)
        self.fill_note = add(bg_color=_FILL_IN, border=1, border_color=_BORDER_COLOUR, locked=False,
                             text_wrap=True)
        self.warning = add(text_wrap=True, bold=True, bg_color=_CAUTION_FILL, border=1,
                           border_color=_BORDER_COLOUR)
        # conditional format of an actual mass outside its tolerance: no base font, so
        # the cell keeps its own and only turns red
        self.outside = workbook.add_format({"bg_color": _OUTSIDE_FILL, "font_color": _OUTSIDE_INK, "bold": True})
        self.not_used = add(num_format=PERCENT_FORMAT, bg_color=_NOT_USED, border=1,
                            border_color=_BORDER_COLOUR, locked=False)
        self.value_percent = add(num_format=PERCENT_FORMAT, align="left")
        self.value_text = add(text_wrap=True)
        self.value_money = add(num_format="#,##0.00", align="left")
        self.value_int = add(num_format="0", align="left")
        self.value_ratio = add(num_format="0.0##", align="left")
        self.note = add(italic=True, text_wrap=True)
        self.ref_note = add(italic=True, font_size=9)
        self.fill_sign = add(bg_color=_FILL_IN, border=1, border_color=_BORDER_COLOUR, locked=False,
                             valign="bottom")

    def _make(self, **props):
        merged = dict(self._base)
        merged.update(props)
        return self._wb.add_format(merged)

    def input_quantity(self, value: float | None):
        """Format of a quantity cell a person may type over (unlocked, pale green)."""
        d = decimals_for(value)
        key = ("in", d)
        if key not in self._cache:
            self._cache[key] = self._make(num_format="#,##0." + "0" * d, bg_color=_FILL_IN, border=1,
                                          border_color=_BORDER_COLOUR, locked=False)
        return self._cache[key]

    def quantity(self, value: float | None, *, bold: bool = False, plain: bool = False, content: bool = False):
        """Format of a mass [kg], volume [L] or amount [mol] cell showing at least four
        significant figures of ``value``, with thousands separators.

        ``bold`` marks a quantity to charge; ``plain`` drops the border and aligns left
        (header values); ``content`` shows it in italics, for a mass that is not
        weighed (a compound's content in a mixture carried in)."""
        d = decimals_for(value)
        key = ("q", d, bold, plain, content)
        if key not in self._cache:
            props = {"num_format": "#,##0." + "0" * d}
            if bold:
                props["bold"] = True
            if content:
                props["italic"] = True
            if not plain:
                props.update(border=1, border_color=_BORDER_COLOUR)
            else:
                props["align"] = "left"
            self._cache[key] = self._make(**props)
        return self._cache[key]


def put(ws, row: int, col: int, value: Any, fmt=None) -> None:
    """Write ``value`` at ``(row, col)``: text as text, numbers as numbers, None blank.

    Booleans are written as ``yes``/``no``.  Text goes through ``write_string`` so that
    a string such as ``=HYPERLINK("http://x")`` stays a string.
    """
    if value is None:
        ws.write_blank(row, col, None, fmt)
    elif isinstance(value, bool):
        ws.write_string(row, col, "yes" if value else "no", fmt)
    elif isinstance(value, (int, float)):
        ws.write_number(row, col, value, fmt)
    else:
        ws.write_string(row, col, str(value), fmt)


def text_width(value: Any) -> float:
    """Display width of a cell value in character units (a rough, font-free guess)."""
    if value is None:
        return 0.0
    if isinstance(value, bool):
        return 3.0
    if isinstance(value, int):
        return len(f"{value:,}")
    if isinstance(value, float):
        return len(f"{value:,.{decimals_for(value)}f}")
    return float(max((len(line) for line in str(value).splitlines()), default=0))


def set_widths(ws, columns: list[tuple[str, list[Any]]], *, lowest: float = 5.0,
               highest: float = 42.0) -> list[float]:
    """Set each column's width to fit its heading words and values, within bounds.

    Parameters
    ----------
    ws : xlsxwriter worksheet
    columns : list of (heading, values)
        In column order from column A.
    lowest, highest : float
        Bounds of a width [character units]; longer text wraps.

    Returns
    -------
    list of float
        The widths set.
    """
    widths = []
    for i, (heading, values) in enumerate(columns):
        longest_word = max((len(w) for w in heading.split()), default=0)
        fit = max([longest_word, min(len(heading), 14)] + [text_width(v) for v in values])
        width = max(lowest, min(highest, fit + 2))
        ws.set_column(i, i, width)
        widths.append(width)
    return widths


def escape_header(text: str, limit: int = 80) -> str:
    """Text for a print header or footer: ``&`` doubled (it starts a control code
    there), shortened to ``limit`` characters."""
    if len(text) > limit:
        text = text[: limit - 1] + "…"
    return text.replace("&", "&&")


def px_width(width: float) -> int:
    """Pixels of a column ``width`` [character units] at 100 % zoom, for the default
    font of an xlsxwriter workbook (Calibri 11, maximum digit width 7 px, padding 5 px):
    ``int(7 * width + 0.5) + 5`` for a width of 1 or more (the conversion in
    xlsxwriter's worksheet module)."""
    if width < 1:
        return int(width * 12 + 0.5)
    return int(7 * width + 0.5) + 5


def wrapped_lines(value: Any, width: float, *, bold: bool = False, columns: int = 1) -> int:
    """How many lines ``value`` takes in a wrapping cell ``width`` character units wide
    (for ``columns`` merged cells, the sum of their widths).

    A cautious guess: a character of 10-pt text is taken as 6 px wide (6.3 px in bold),
    a little wider than the average of a proportional font at 96 px per inch (about
    5.5 px), and a word longer than a line is broken.  Numbers take one line.
    """
    import textwrap

    if value is None or not isinstance(value, str) or not value:
        return 1
    room = 7 * width + 5 * columns - 4  # the cells' pixels less the inner margins
    per_line = max(1, int(room / (6.3 if bold else 6.0)))
    return sum(max(1, len(textwrap.wrap(part, per_line, break_long_words=True)))
               for part in value.splitlines() or [""])


def lines_height(lines: int, minimum: float = 0.0) -> float:
    """Row height [pt] for ``lines`` lines of 10-pt text, at least ``minimum``."""
    return max(minimum, LINE_HEIGHT * lines + 3.0)


def fit_widths(ws, columns: list[tuple[str, list[Any], float, float]]) -> list[float]:
    """Set each column's width to fit its heading's longest word and its values, between
    its own bounds; text beyond the upper bound wraps.

    Parameters
    ----------
    ws : xlsxwriter worksheet
    columns : list of (heading, values, lowest, highest)
        In column order from column A; bounds in character units.

    Returns
    -------
    list of float
        The widths set [character units].
    """
    widths = []
    for i, (heading, values, lowest, highest) in enumerate(columns):
        longest_word = max((len(w) for w in heading.split()), default=0)
        words = [len(w) for v in values if isinstance(v, str) for w in v.split()]
        fit = max([longest_word + 2, max(words, default=0) + 1]
                  + [text_width(v) + 2 for v in values])
        width = float(max(lowest, min(highest, fit)))
        ws.set_column(i, i, width)
        widths.append(width)
    return widths
