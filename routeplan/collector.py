"""The cyclic garbage collector, paused while routeplan builds a route or a plan.

Loading a route and planning it build trees of objects (YAML nodes, the checked route,
the plan) that reference counting frees as soon as they are dropped; hardly any of them
is part of a reference cycle.  The cyclic collector, left on, walks them again and again
while they are being built: its full passes are triggered by the number of objects
that survived earlier ones, so on a long route the time grows faster than the steps
(on CPython 3.11, ruamel's bare compose of a 1 250-step route file is 1.7x slower per
step than of a 250-step one with the collector on, and as fast with it paused;
``bench/engine_bench.py`` row 5).  :func:`paused` turns it off for the duration of one
load or one plan and restores it as it was, so a library user's process keeps its own
policy.  The command line runs with the collector off throughout
(:func:`routeplan.cli.main`).
"""

from __future__ import annotations

import contextlib
import gc

__all__ = ["paused"]


@contextlib.contextmanager
def paused():
    """Pause the cyclic collector for the ``with`` block (or a decorated call).

    Re-enables it afterwards only if it was enabled before, so nested pauses and a
    caller's own ``gc.disable()`` are kept.  Objects left in cycles are collected by the
    collector's next pass after it is on again.

    Examples
    --------
    >>> import gc
    >>> before = gc.isenabled()
    >>> with paused():
    ...     gc.isenabled()
    False
    >>> gc.isenabled() == before
    True
    """
    was_on = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_on:
            gc.enable()
