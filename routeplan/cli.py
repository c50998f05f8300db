"""The ``routeplan`` command line: parse arguments, call the library, write output.

Nothing heavy is imported at module top, so ``routeplan --help`` answers at once.
Every command runs inside one error funnel (:class:`_Funnel`): bad input
(:class:`~routeplan.errors.RouteplanError`) becomes a message on standard error and
exit code 2 without a traceback; anything else is an internal error, exit code 1, with
a hint to rerun with ``--debug``.
"""

from __future__ import annotations

import errno
import gc
import os
import signal
import sys

import click

from routeplan import CAUTION, __version__
from routeplan.errors import RouteplanError

EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 1
EXIT_BROKEN_PIPE = 141  # 128 + SIGPIPE, what a shell reports for a writer whose reader left


def _err(text: str) -> None:
    try:
        click.echo(text, err=True)
    except OSError:  # pragma: no cover - standard error itself cannot be written
        pass


#: Faults of the machine, not of routeplan, met while writing: a full disk (ENOSPC), a
#: file-size limit (EFBIG, e.g. ``ulimit -f``), a disk quota (EDQUOT), a read-only file
#: system (EROFS), a device error (EIO).
_WRITE_FAULTS = {getattr(errno, name) for name in ("ENOSPC", "EFBIG", "EDQUOT", "EROFS", "EIO")
                 if hasattr(errno, name)}


def _write_fault(exc: OSError) -> str:
    """One sentence for a write fault: what happened, where, and that nothing was left half written."""
    where = f" '{exc.filename}'" if exc.filename else " (standard output or an output file)"
    what = {errno.ENOSPC: "the disk is full", errno.EFBIG: "a file-size limit was reached"}.get(
        exc.errno, exc.strerror or "the system refused the write")
    return (f"cannot write{where}: {what} ({exc.strerror or os.strerror(exc.errno)}); the outputs of this run "
            "were not moved into place, so every earlier output is as it was "
            "(free some space or raise the limit, and run again)")


class _Funnel(click.Group):
    """A click group that turns every error into one clear message and an exit code."""

    def invoke(self, ctx: click.Context):  # noqa: D401
        try:
            result = super().invoke(ctx)
            sys.stdout.flush()  # a closed pipe shows here, inside the funnel
            return result
        except RouteplanError as exc:
            _err(f"error: {exc.render()}")
            if getattr(exc, "warnings", ()):  # found in the same pass: every finding in one run
                from routeplan.commands.common import echo_warnings

                echo_warnings(exc.warnings)  # as every command prints warnings: once each, folded on a terminal
            ctx.exit(EXIT_BAD_INPUT)
        except (click.exceptions.Exit, click.exceptions.Abort, click.ClickException):
            raise
        except BrokenPipeError:
            # the reader went away (`routeplan plan ... | head`): stop quietly, as shells expect
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
            ctx.exit(EXIT_BROKEN_PIPE)
        except OSError as exc:
            if exc.errno not in _WRITE_FAULTS:
                if ctx.obj and ctx.obj.get("debug"):
                    raise
                _err(f"internal error: {type(exc).__name__}: {exc}")
                _err("This is a bug in routeplan, not in your file. Rerun with --debug to see the traceback.")
                ctx.exit(EXIT_INTERNAL)
            _err(f"error: {_write_fault(exc)}")
            try:  # what is still buffered for standard output cannot be written either
                devnull = os.open(os.devnull, os.O_WRONLY)
                os.dup2(devnull, sys.stdout.fileno())
            except (OSError, ValueError, AttributeError):  # pragma: no cover - not a real stream
                pass
            ctx.exit(EXIT_BAD_INPUT)
        except KeyboardInterrupt:  # pragma: no cover - interactive
            _err("interrupted")
            ctx.exit(130)
        except Exception as exc:  # noqa: BLE001 - the funnel is the one place for this
            if ctx.obj and ctx.obj.get("debug"):
                raise
            _err(f"internal error: {type(exc).__name__}: {exc}")
            _err("This is a bug in routeplan, not in your file. Rerun with --debug to see the traceback.")
            ctx.exit(EXIT_INTERNAL)


@click.group(cls=_Funnel, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, "--version", prog_name="routeplan")
@click.option("--debug", is_flag=True, help="Show the full traceback of an internal error.")
@click.pass_context
def cli(ctx: click.Context, debug: bool) -> None:
    """Plan the scale-up of a multi-step synthesis route.

    From a route file (YAML) and a target mass, routeplan walks the route backward and
    gives every charge of every step in mol, kg and L, sizes batches to your vessels,
    says what to buy, and reports overall yield, process mass intensity and cost.

    \b
    Examples:
      routeplan check demo_routes/hx17-linear.yaml
      routeplan plan demo_routes/hx17-linear.yaml --target "40 kg"

    Planning estimates only: verify every quantity, assess thermal and chemical
    hazards before scale-up, and follow site procedures, local codes and licensed
    practice.
    """
    ctx.ensure_object(dict)
    ctx.obj["debug"] = debug


def _terminate(signum, frame):  # pragma: no cover - exercised by a subprocess test
    # turn SIGTERM into SystemExit so that open atomic writes remove their temporary files
    raise SystemExit(128 + signum)


def main() -> None:
    """Entry point of the ``routeplan`` console script."""
    signal.signal(signal.SIGTERM, _terminate)
    # A command's data (the route, the plan, the rows) are trees that reference counting
    # frees as soon as they are done with; the cyclic garbage collector would only walk
    # them, the modules and pint's registry again and again: 10-15 % of a command's CPU
    # for a few MiB it might give back.  So the collector is off for the command's run.
    gc.disable()
    try:
        cli(prog_name="routeplan")
    finally:
        # The process ends here, its outputs written and closed.  Python's exit would
        # still walk every object alive once more (60-90 ms for a plan) to free memory
        # the system takes back anyway; frozen objects are skipped.
        gc.freeze()


# Commands live in routeplan/commands/*.py and register themselves on ``cli``;
# importing them is cheap (each imports its heavy modules inside its function).
from routeplan.commands import register_all  # noqa: E402

register_all(cli)
