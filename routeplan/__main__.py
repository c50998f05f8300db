"""``python -m routeplan``: the same as the ``routeplan`` command."""

from routeplan.cli import main

if __name__ == "__main__":  # pragma: no cover
    main()
