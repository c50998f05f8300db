"""One exception tree for everything routeplan reports about bad input.

Every error carries where it happened (file, line, column, key path, step) and builds
one sentence: what is wrong, where, and what would be right.  The command line turns a
:class:`RouteplanError` into a message on standard error and exit code 2; anything
else is an internal error (exit code 1).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Location",
    "Problem",
    "RouteplanError",
    "QuantityError",
    "FormulaError",
    "EquationError",
    "RouteError",
    "PlanError",
    "StockError",
    "OutputError",
    "CompareError",
    "not_a_regular_file",
]


@dataclass(frozen=True)
class Location:
    """Where something sits in an input file.

    Parameters
    ----------
    file : str or None
        File name as the user gave it.
    line, column : int or None
        1-based line and column.
    key : str or None
        Key path inside the document, e.g. ``steps[2].charges[1].equiv``.
    """

    file: str | None = None
    line: int | None = None
    column: int | None = None
    key: str | None = None

    def prefix(self) -> str:
        """Return ``file:line:column: key: `` (only the parts that are known)."""
        parts = []
        if self.file is not None:
            pos = self.file
            if self.line is not None:
                pos += f":{self.line}"
                if self.column is not None:
                    pos += f":{self.column}"
            parts.append(pos)
        elif self.line is not None:
            parts.append(f"line {self.line}" + (f", column {self.column}" if self.column else ""))
        if self.key:
            parts.append(self.key)
        return "".join(p + ": " for p in parts)

    def with_key(self, key: str | None) -> "Location":
        """Return a copy with another key path."""
        return Location(self.file, self.line, self.column, key)


class RouteplanError(Exception):
    """Base class of every error routeplan raises on bad input.

    Parameters
    ----------
    message : str
        What is wrong, in one sentence, naming the offending text.
    location : Location, optional
        Where it is.
    step : str, optional
        Id of the step concerned.
    hint : str, optional
        What would be right.
    """

    exit_code = 2

    def __init__(
        self,
        message: str,
        *,
        location: Location | None = None,
        step: str | None = None,
        hint: str | None = None,
    ) -> None:
        self.message = message
        self.location = location
        self.step = step
        self.hint = hint
        super().__init__(self.render())

    def render(self) -> str:
        """The whole message: location prefix, message, hint."""
        text = (self.location.prefix() if self.location else "") + self.message
        if self.hint:
            text += f" ({self.hint})"
        return text

    def located(self, location: Location) -> "RouteplanError":
        """Return the same error placed at ``location`` (keeps the class and fields)."""
        clone = self.__class__.__new__(self.__class__)
        clone.__dict__.update(self.__dict__)
        clone.location = location
        Exception.__init__(clone, clone.render())
        return clone

    def __str__(self) -> str:  # pragma: no cover - trivial
        return self.render()


class QuantityError(RouteplanError):
    """A quantity or percent string that cannot be read, or has the wrong dimension."""


class FormulaError(RouteplanError):
    """A molecular formula that cannot be parsed.

    Attributes
    ----------
    formula : str
        The formula as written.
    token : str or None
        The offending token.
    position : int or None
        1-based position of the token in the formula.
    """

    def __init__(self, message: str, *, formula: str = "", token: str | None = None,
                 position: int | None = None, **kw) -> None:
        self.formula = formula
        self.token = token
        self.position = position
        super().__init__(message, **kw)


class EquationError(RouteplanError):
    """A stoichiometric equation that cannot be parsed."""


@dataclass(frozen=True)
class Problem:
    """One finding about a route file: an error or a warning.

    ``severity`` is ``"error"`` or ``"warning"``.
    """

    severity: str
    message: str
    location: Location | None = None
    step: str | None = None
    hint: str | None = None

    def render(self) -> str:
        text = (self.location.prefix() if self.location else "") + self.message
        if self.hint:
            text += f" ({self.hint})"
        return text


class RouteError(RouteplanError):
    """A route file with one or more errors; ``problems`` lists all of them."""

    def __init__(self, problems: list[Problem] | tuple[Problem, ...], *, file: str | None = None) -> None:
        self.problems = tuple(problems)
        self.file = file
        n = len(self.problems)
        head = f"{file}: " if file else ""
        if n == 1:
            msg = self.problems[0].render()
        else:
            msg = f"{head}{n} errors:\n" + "\n".join("  " + p.render() for p in self.problems)
        super().__init__(msg)

    def render(self) -> str:
        return self.message


class PlanError(RouteplanError):
    """A route that is valid but cannot be planned (e.g. a zero yield)."""


class StockError(RouteplanError):
    """A stock file that cannot be read."""


class OutputError(RouteplanError):
    """An output file that cannot be written."""


class CompareError(RouteplanError):
    """Routes that cannot be compared (different targets, fewer than two routes)."""


def not_a_regular_file(path) -> str | None:
    """Why ``path`` cannot be read as an input file, or None for a regular file (or one
    that does not exist, which the caller reports).

    A named pipe would block the reader until something writes to it, a device may never
    end, a socket cannot be opened: none of them is a route or stock file.

    Examples
    --------
    >>> not_a_regular_file("/dev/null")
    'is a character device, not a regular file'
    """
    import os
    import stat

    try:
        mode = os.stat(path).st_mode
    except OSError:
        return None
    if stat.S_ISREG(mode):
        return None
    kind = ("a folder" if stat.S_ISDIR(mode) else "a named pipe (FIFO)" if stat.S_ISFIFO(mode)
            else "a character device" if stat.S_ISCHR(mode) else "a block device" if stat.S_ISBLK(mode)
            else "a socket" if stat.S_ISSOCK(mode) else "not a file")
    return f"is {kind}, not a regular file"
