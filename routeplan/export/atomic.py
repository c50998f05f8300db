"""Atomic file writing: a temporary file beside the target, then one rename.

A failure part-way leaves no broken output and never destroys an earlier file.  The
outputs of one run (``--json A --xlsx B --csv D``) are one unit, an :class:`OutputSet`:
all are written to temporaries first, and moved into place only when all are complete.
"""

from __future__ import annotations

import os
import re
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Iterator

from routeplan.errors import OutputError

__all__ = ["atomic_path", "write_text_atomic", "OutputSet", "CSV_PLAN_FILES"]


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


# ----------------------------------------------------------------------------- output sets

#: Names of the files a plan's CSV folder holds (``routeplan plan --csv DIR``); only files
#: of these names are ever removed from an existing folder.
CSV_PLAN_FILES = re.compile(r"^(?:summary|steps|raw-materials|materials|stock|record-lots|record-in-hand|schedule"
                            r"|vessels|waste|purchases|safety"
                            r"|charges-\d{2,}-[A-Za-z0-9._-]+)\.csv$")


class OutputSet:
    """The outputs of one run, written as one unit.

    Every output is first written completely to a temporary file (or folder) beside its
    target; only when all of them are complete are they moved into place, one rename
    each.  A failure while writing any of them removes every temporary and leaves every
    earlier output as it was.  Use it as a context manager::

        with OutputSet() as out:
            out.text("plan.json", text)
            write_workbook(plan, out.file("sheets.xlsx"))
            write_csv(plan, out.folder("tables"))
        for line in out.report:
            print(line)

    A folder (``--csv DIR``) is one unit too: a new folder is written beside ``DIR``;
    when ``DIR`` does not exist, or holds nothing but files of an earlier plan
    (:data:`CSV_PLAN_FILES`), the new folder takes its place and the old one is removed;
    when ``DIR`` also holds other files, the new files are moved in one by one and the
    earlier plan's files that the new one does not write are removed (never other
    files); :attr:`report` says which.
    """

    def __init__(self) -> None:
        self._files: list[tuple[Path, Path]] = []      # (temporary, target)
        self._folders: list[tuple[Path, Path]] = []
        self.report: list[str] = []

    # -- staging
    def file(self, target: str | os.PathLike, *, suffix: str = "") -> Path:
        """A temporary path beside ``target`` to write the whole output to."""
        target = Path(target)
        folder = target.parent if str(target.parent) else Path(".")
        if not folder.is_dir():
            raise OutputError(f"cannot write '{target}': folder '{folder}' does not exist")
        try:
            fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix or target.suffix or ".tmp",
                                       dir=folder)
        except OSError as exc:
            raise OutputError(f"cannot write '{target}': {exc.strerror}") from None
        os.close(fd)
        os.unlink(tmp)  # the writer makes it (atomically, with its own temporary file)
        self._files.append((Path(tmp), target))
        return Path(tmp)

    def text(self, target: str | os.PathLike, text: str) -> None:
        """Write ``text`` (UTF-8) as the output ``target``."""
        tmp = self.file(target)
        write_text_atomic(tmp, text)

    def folder(self, target: str | os.PathLike) -> Path:
        """A new, empty temporary folder beside ``target`` to write the whole folder to."""
        target = Path(target)
        if target.exists() and not target.is_dir():
            raise OutputError(f"'{target}' is a file, not a folder", hint="give --csv a folder name")
        parent = target.parent if str(target.parent) else Path(".")
        try:
            parent.mkdir(parents=True, exist_ok=True)
            tmp = Path(tempfile.mkdtemp(prefix=f".{target.name}.", dir=parent))
        except OSError as exc:
            raise OutputError(f"cannot make folder '{target}': {exc.strerror}") from None
        self._folders.append((tmp, target))
        return tmp

    # -- the transaction
    def __enter__(self) -> "OutputSet":
        return self

    def __exit__(self, kind, exc, tb) -> None:
        try:
            if kind is None:
                self.commit()
        finally:
            self.discard()

    def discard(self) -> None:
        """Remove every temporary that was not moved into place."""
        import shutil

        for tmp, _target in self._files:
            if tmp.exists() or tmp.is_symlink():
                tmp.unlink()
        for tmp, _target in self._folders:
            if tmp.exists():
                shutil.rmtree(tmp, ignore_errors=True)

    def commit(self) -> None:
        """Move every completed output into place (files first, then folders)."""
        for tmp, target in self._files:
            if not tmp.exists():
                raise OutputError(f"cannot write '{target}': its content was not written")  # pragma: no cover
        for tmp, target in self._files:
            try:
                os.replace(tmp, target)
            except OSError as exc:
                raise OutputError(f"cannot write '{target}': {exc.strerror}") from None
            self.report.append(f"wrote {target}")
        for tmp, target in self._folders:
            self._swap_in(tmp, target)

    def _swap_in(self, new: Path, target: Path) -> None:
        import shutil

        names = sorted(p.name for p in new.iterdir())
        stale: list[str] = []
        try:
            if not target.exists():
                os.replace(new, target)
            else:
                old = sorted(target.iterdir())
                ours = [p for p in old if p.is_file() and not p.is_symlink() and CSV_PLAN_FILES.match(p.name)]
                stale = [p.name for p in ours if p.name not in names]
                if len(ours) == len(old):
                    # nothing but an earlier plan: the new folder takes its place
                    parked = Path(tempfile.mkdtemp(prefix=f".{target.name}.old.", dir=target.parent))
                    os.replace(target, parked / "old")
                    os.replace(new, target)
                    shutil.rmtree(parked, ignore_errors=True)
                else:
                    for name in names:
                        os.replace(new / name, target / name)
                    for name in stale:
                        (target / name).unlink()
                    new.rmdir()
        except OSError as exc:
            raise OutputError(f"cannot write folder '{target}': {exc.strerror}") from None
        self.report += [f"wrote {target / name}" for name in names]
        if stale:
            self.report.append(f"removed from {target} the files of the earlier plan that this plan does not write: "
                               f"{', '.join(stale)} (other files are kept)")
