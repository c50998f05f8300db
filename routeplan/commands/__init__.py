"""Command modules of the command line, one per command; each exposes ``register(cli)``."""

from __future__ import annotations

import importlib

_MODULES = ("check", "plan", "schema", "compare", "explain")


def register_all(cli) -> None:
    """Add every available command to the click group ``cli``."""
    for name in _MODULES:
        try:
            module = importlib.import_module(f"routeplan.commands.{name}")
        except ModuleNotFoundError as exc:
            if exc.name == f"routeplan.commands.{name}":
                continue  # command not written yet
            raise
        module.register(cli)
