"""Atomic file writing: a temporary file beside the target, then one rename.

A failure part-way leaves no broken output and never destroys an earlier file.
"""

from __future__ import annotations

import os
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Iterator

from routeplan.errors import OutputError

__all__ = ["atomic_path", "write_text_atomic"]


@contextmanager
def atomic_path(target: str | os.PathLike, *, suffix: str = "") -> Iterator[Path]:
    """Yield a temporary path beside ``target``; on success rename it onto ``target``.

    On any exception the temporary file is removed and ``target`` is left untouched.
    """
    target = Path(target)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError(f"cannot write '{target}': folder '{folder}' does not exist", path=str(target))
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix or ".tmp", dir=folder)
    except OSError as exc:
        raise OutputError(f"cannot write '{target}': {exc.strerror}", path=str(target),
                          errno=exc.errno, strerror=exc.strerror) from None
    os.close(fd)
    tmp_path = Path(tmp)
    umask = os.umask(0)
    os.umask(umask)
    os.chmod(tmp_path, 0o666 & ~umask)  # mkstemp makes 0600; give the usual mode
    try:
        yield tmp_path
        try:
            os.replace(tmp_path, target)
        except OSError as exc:
            raise OutputError(f"cannot write '{target}': {exc.strerror}", path=str(target),
                              errno=exc.errno, strerror=exc.strerror) from None
    finally:
        if tmp_path.exists():
            tmp_path.unlink()


def write_text_atomic(target: str | os.PathLike, text: str) -> None:
    """Write ``text`` (UTF-8) to ``target`` atomically."""
    with atomic_path(target) as tmp:
        tmp.write_text(text, encoding="utf-8")
