"""``routeplan schema``: write the JSON Schema of the route file, for editors."""

from __future__ import annotations

import click

from routeplan.commands.common import write_text_output


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
    from routeplan.route.jsonschema import route_json_schema_text

    write_text_output(route_json_schema_text(), output or "-")


def register(cli: click.Group) -> None:
    """Add ``schema`` to the command line."""
    cli.add_command(schema_cmd)
