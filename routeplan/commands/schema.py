"""``routeplan schema``: write the JSON Schema of the route file, for editors."""

from __future__ import annotations

import click

from routeplan.commands.common import echo_err


@click.command("schema")
@click.option("-o", "--output", "output", metavar="FILE",
              help="Write the schema to FILE instead of standard output.")
def schema_cmd(output: str | None) -> None:
    """Write the JSON Schema of the route file (format 1).

    Point your editor's YAML support at it to have route files checked and completed as
    you type, e.g. with a first line

    \b
      # yaml-language-server: $schema=routeplan-route.schema.json

    The schema checks shape and spelling only; run 'routeplan check' for units,
    references and chemistry.
    """
    from routeplan.errors import Location, OutputError
    from routeplan.route.jsonschema import route_json_schema_text

    text = route_json_schema_text()
    if output is None or output == "-":
        click.echo(text, nl=False)
        return
    try:
        with open(output, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
    except OSError as exc:
        raise OutputError(f"cannot write the schema: {exc.strerror or exc}",
                          location=Location(file=output)) from None
    echo_err(f"wrote {output}")


def register(cli: click.Group) -> None:
    """Add ``schema`` to the command line."""
    cli.add_command(schema_cmd)
