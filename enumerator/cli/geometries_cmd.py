"""``isosieve geometries``: the coordination geometries in force."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("geometries")
@click.option("--json", "as_json", is_flag=True, help="Print JSON instead of a table.")
@click.pass_context
def geometries(ctx, as_json):
    """List the coordination geometries with their derived symmetry groups.

    \b
    Examples:
      isosieve geometries
      isosieve --rules my_rules geometries
    """
    from enumerator.render.geometries import render_geometries
    from enumerator.workflow.queries import geometry_catalogue

    emit(render_geometries(geometry_catalogue(rules_of(ctx)), as_json), None)
