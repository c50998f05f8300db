"""One finding of a cross-check, before the caller places it in the file.

Shared by :mod:`routeplan.route.checks_plausibility` and
:mod:`routeplan.route.checks_safety`; :mod:`routeplan.route.checks` turns each into a
located :class:`~routeplan.errors.Problem`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.vocab import Severity

__all__ = ["Finding"]


@frozen
class Finding:
    """One plausibility problem, to be located by the caller.

    Parameters
    ----------
    severity : Severity
        :attr:`Severity.ERROR` or :attr:`Severity.WARNING` (equal to ``"error"`` and
        ``"warning"``).
    path : tuple
        Key path in the route file, e.g. ``("materials", "HCl6M", "solution", "molarity")``.
    message, hint : str
        What is wrong, and what would be right.
    """

    severity: "Severity"
    path: tuple
    message: str
    hint: str | None = None
