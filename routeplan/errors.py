"""One exception tree for everything routeplan reports about bad input.

Every error carries where it happened (file, line, column, key path, step) and builds
one sentence: what is wrong, where, and what would be right.  The command line turns a
:class:`RouteplanError` into a message on standard error and exit code 2; anything
else is an internal error (exit code 1).

Each error also derives from the builtin it is a kind of (``ValueError`` for bad input,
``OSError`` for a file that cannot be written), so a caller may catch either; it keeps
its fields as attributes (listed in the class's ``FIELDS``) and survives pickling, so an
error raised in a worker process arrives whole.

Examples
--------
>>> import pickle
>>> err = QuantityError("'3 kgs' is not a mass", location=Location("r.yaml", 4, 9, "target.amount"),
...                     hint="write e.g. '3 kg'", text="3 kgs", dimension="mass")
>>> str(err)
"r.yaml:4:9: target.amount: '3 kgs' is not a mass (write e.g. '3 kg')"
>>> isinstance(err, ValueError), err.key, err.text
(True, 'target.amount', '3 kgs')
>>> back = pickle.loads(pickle.dumps(err))
>>> type(back) is QuantityError and str(back) == str(err) and back.location == err.location
True
"""

from __future__ import annotations

from typing import Any, Callable, ClassVar

from routeplan.frozen import frozen
from routeplan.vocab import Severity

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
    "RecordError",
    "OutputError",
    "CompareError",
    "not_a_regular_file",
]


@frozen
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


def _unpickle(cls: type, args: tuple, state: dict, builtin: dict) -> "RouteplanError":
    """Rebuild a pickled error without calling its ``__init__`` (whose signature varies)."""
    obj = cls.__new__(cls, *args)
    obj.args = args
    obj.__dict__.update(state)
    for name, value in builtin.items():
        setattr(obj, name, value)
    return obj


#: Attributes an ``OSError`` keeps outside ``__dict__`` (in its C structure).
_OSERROR_SLOTS = ("errno", "strerror", "filename", "filename2")


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
    key : str, optional
        Key path concerned, e.g. ``steps[2].charges[1].equiv``; by default the key of
        ``location``.
    hint : str, optional
        What would be right.

    Attributes
    ----------
    FIELDS : tuple of str
        Names of the attributes that describe the error (the class's own ones after the
        common ``message, location, step, key, hint``).
    """

    exit_code = 2
    FIELDS: ClassVar[tuple[str, ...]] = ("message", "location", "step", "key", "hint")

    def __init__(
        self,
        message: str,
        *,
        location: Location | None = None,
        step: str | None = None,
        key: str | None = None,
        hint: str | None = None,
    ) -> None:
        self.message = message
        self.location = location
        self.step = step
        self._key = key
        self.hint = hint
        super().__init__(self.render())

    @property
    def key(self) -> str | None:
        """The key path concerned: as given, else the key of :attr:`location`."""
        if self._key is not None:
            return self._key
        return self.location.key if self.location is not None else None

    def fields(self) -> dict[str, Any]:
        """Every field of :data:`FIELDS` by name."""
        return {name: getattr(self, name) for name in self.FIELDS}

    def render(self) -> str:
        """The whole message: location prefix, message, hint."""
        text = (self.location.prefix() if self.location else "") + self.message
        if self.hint:
            text += f" ({self.hint})"
        return text

    def _builtin_state(self) -> dict[str, Any]:
        if isinstance(self, OSError):
            return {name: getattr(self, name) for name in _OSERROR_SLOTS}
        return {}

    def __reduce__(self):
        return (_unpickle, (type(self), self.args, dict(self.__dict__), self._builtin_state()))

    def located(self, location: Location) -> "RouteplanError":
        """Return the same error placed at ``location`` (keeps the class and fields)."""
        clone = _unpickle(type(self), self.args, dict(self.__dict__), self._builtin_state())
        clone.location = location
        clone.args = (clone.render(),)
        return clone

    def __str__(self) -> str:
        return self.render()


class QuantityError(RouteplanError, ValueError):
    """A quantity or percent string that cannot be read, or has the wrong dimension.

    Attributes
    ----------
    text : object
        The value as written (usually a string), or None.
    dimension : str or None
        The dimension expected (a key of :data:`routeplan.units.DIMENSIONS`), when one was.
    """

    FIELDS = RouteplanError.FIELDS + ("text", "dimension")

    def __init__(self, message: str, *, text: Any = None, dimension: str | None = None,
                 **kw) -> None:
        self.text = text
        self.dimension = dimension
        super().__init__(message, **kw)


class FormulaError(RouteplanError, ValueError):
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

    FIELDS = RouteplanError.FIELDS + ("formula", "token", "position")

    def __init__(self, message: str, *, formula: str = "", token: str | None = None,
                 position: int | None = None, **kw) -> None:
        self.formula = formula
        self.token = token
        self.position = position
        super().__init__(message, **kw)


class EquationError(RouteplanError, ValueError):
    """A stoichiometric equation that cannot be parsed or balanced.

    Attributes
    ----------
    equation : str or None
        The equation as written.
    """

    FIELDS = RouteplanError.FIELDS + ("equation",)

    def __init__(self, message: str, *, equation: str | None = None, **kw) -> None:
        self.equation = equation
        super().__init__(message, **kw)


@frozen
class Problem:
    """One finding about a route file: an error or a warning.

    ``severity`` is a :class:`routeplan.vocab.Severity` (given as the member or its word,
    ``"error"`` or ``"warning"``; another word raises ``ValueError``).

    A finding that names amounts (a mass, a volume, moles) may keep them apart in
    ``parts``: its words as strings and each amount as ``(value, kind)``, the value in the
    plan's fixed units (``kind`` ``"mass"`` [kg], ``"volume"`` [L] or ``"amount"`` [mol]).
    ``message`` then reads them in those units (:meth:`with_amounts`), and a view that
    shows the plan in other units words them in its own (:meth:`render` with
    ``amount_text``).

    >>> p = Problem("warning", "price missing", Location("r.yaml", 3, 5, "materials.nacl"))
    >>> p.severity is Severity.WARNING, p.severity == "warning", p.key
    (True, True, 'materials.nacl')
    """

    severity: Severity
    message: str
    location: Location | None = None
    step: str | None = None
    hint: str | None = None
    parts: tuple = ()

    def __post_init__(self) -> None:
        if not isinstance(self.severity, Severity):
            object.__setattr__(self, "severity", Severity(self.severity))

    @property
    def key(self) -> str | None:
        """Key path of the finding (the key of its location), or None."""
        return self.location.key if self.location is not None else None

    @classmethod
    def with_amounts(cls, severity, parts: tuple, **kw) -> "Problem":
        """A finding whose message is ``parts`` (strings, and ``(value, kind)`` amounts)
        read in the plan's fixed units, 4 significant figures: ``'33.67 kg'``.

        >>> p = Problem.with_amounts("warning", ("a batch charges ", (33.671, "mass"), " of SM"))
        >>> p.message, p.render(lambda value, kind: f"{value * 1000:g} g")
        ('a batch charges 33.67 kg of SM', 'a batch charges 33671 g of SM')
        """
        return cls(severity, _joined(parts, _fixed_units), parts=tuple(parts), **kw)

    def render(self, amount_text: "Callable[[float, str], str] | None" = None) -> str:
        """``file:line:col: key: message (hint)``; with ``amount_text(value, kind)``, the
        amounts of ``parts`` worded by it (a view's units) instead of as in ``message``."""
        message = self.message if amount_text is None or not self.parts else _joined(self.parts, amount_text)
        text = (self.location.prefix() if self.location else "") + message
        if self.hint:
            text += f" ({self.hint})"
        return text


#: The plan's fixed unit of each kind of amount (the units of the JSON plan).
_FIXED_UNITS = {"mass": "kg", "volume": "L", "amount": "mol"}


def _fixed_units(value: float, kind: str) -> str:
    """An amount [kg, L or mol by ``kind``] to 4 significant figures with its unit."""
    return f"{value:.4g} {_FIXED_UNITS[kind]}"


def _joined(parts: tuple, amount_text: "Callable[[float, str], str]") -> str:
    """The words of ``parts`` with each ``(value, kind)`` amount worded by ``amount_text``."""
    return "".join(p if isinstance(p, str) else amount_text(*p) for p in parts)


class RouteError(RouteplanError, ValueError):
    """A route file with one or more errors; ``problems`` lists all of them.

    Attributes
    ----------
    problems : tuple of Problem
        Every error found, in file order.
    file : str or None
        The route file's name as given.
    warnings : tuple of Problem
        The warnings found in the same pass (file order), so that one run shows every
        finding and a fixed file brings no second round of surprises.

    With one problem, ``location``, ``step`` and ``hint`` are that problem's; with several,
    ``location`` names the file only.
    """

    FIELDS = RouteplanError.FIELDS + ("problems", "file", "warnings")

    def __init__(self, problems: list[Problem] | tuple[Problem, ...], *, file: str | None = None,
                 warnings: list[Problem] | tuple[Problem, ...] = ()) -> None:
        self.problems = tuple(problems)
        self.file = file
        self.warnings = tuple(warnings)
        n = len(self.problems)
        head = f"{file}: " if file else ""
        if n == 1:
            msg = self.problems[0].render()
            first = self.problems[0]
            where = dict(location=first.location, step=first.step, hint=first.hint)
        else:
            msg = f"{head}{n} errors:\n" + "\n".join("  " + p.render() for p in self.problems)
            where = dict(location=Location(file) if file else None)
        super().__init__(msg, **where)

    def render(self) -> str:
        return self.message


class PlanError(RouteplanError, ValueError):
    """A route that is valid but cannot be planned (e.g. a zero yield)."""


class StockError(RouteplanError, ValueError):
    """A stock file that cannot be read.

    Attributes
    ----------
    material : str or None
        Key of the material whose line is wrong, when one is.
    """

    FIELDS = RouteplanError.FIELDS + ("material",)

    def __init__(self, message: str, *, material: str | None = None, **kw) -> None:
        self.material = material
        super().__init__(message, **kw)


class RecordError(RouteplanError, ValueError):
    """A campaign record (``--record FILE``) that cannot be read or does not fit the route."""


class OutputError(RouteplanError, OSError):
    """An output file that cannot be written.

    It is an ``OSError`` too: ``errno`` and ``strerror`` are those of the failed system
    call when there was one, ``filename`` (also ``path``) the file or folder concerned.
    ``args`` is ``(message,)`` as for every routeplan error, and ``str()`` the message.

    >>> err = OutputError("cannot write 'out.json': Permission denied", path="out.json",
    ...                   errno=13, strerror="Permission denied")
    >>> str(err), err.args == (str(err),), err.filename, err.errno
    ("cannot write 'out.json': Permission denied", True, 'out.json', 13)
    """

    FIELDS = RouteplanError.FIELDS + ("path", "errno", "strerror")

    def __init__(self, message: str, *, path: str | None = None, errno: int | None = None,
                 strerror: str | None = None, **kw) -> None:
        super().__init__(message, **kw)
        self.errno = errno
        self.strerror = strerror
        self.filename = None if path is None else str(path)

    @property
    def path(self) -> str | None:
        """The file or folder that could not be written (``filename``)."""
        return self.filename


class CompareError(RouteplanError, ValueError):
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
