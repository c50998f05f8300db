"""Edits of a route text for the bad-route tests: one change at a time, located by a marker.

The base is the valid route ``tests/data/routes/good.yaml``; each case replaces one piece of
its text and expects a message at the line that holds a marker.
"""

from __future__ import annotations

import re


def change(text: str, edits) -> str:
    """Apply (old, new) replacements; each ``old`` must occur (once, unless given a count)."""
    for edit in edits:
        old, new = edit[0], edit[1]
        count = edit[2] if len(edit) > 2 else 1
        assert text.count(old) >= 1, f"test bug: {old!r} is not in the base route"
        if count == 1:
            assert text.count(old) == 1, f"test bug: {old!r} is not unique in the base route"
        text = text.replace(old, new, count if count > 0 else -1)
    return text


def line_of(text: str, marker) -> int:
    """Line number (1-based) of the first line containing ``marker``, or of the line
    ``offset`` lines after it when ``marker`` is ``(text, offset)``."""
    marker, offset = marker if isinstance(marker, tuple) else (marker, 0)
    return next(i for i, t in enumerate(text.splitlines(), 1) if marker in t) + offset


def problem_lines(stderr: str, severity: str, path, line: int, key: str | None) -> list[str]:
    """Lines of ``stderr`` reporting a ``severity`` (``"error"``, ``"warning"``) at
    ``path:line:column:`` for the key path ``key`` (any key, or none, when ``key`` is None)."""
    pattern = re.escape(f"{severity}: {path}:{line}:") + r"\d+: " + (re.escape(key) + ": " if key else "")
    return [t for t in stderr.splitlines() if re.match(pattern, t)]
