"""``isosieve ligands``: the ligand catalogue in force."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("ligands")
@click.argument("name", required=False)
@click.option("--json", "as_json", is_flag=True, help="Print JSON instead of a table.")
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table", show_default=True)
@click.pass_context
def ligands(ctx: click.Context, name: str | None, as_json: bool, fmt: str) -> None:
    """List the ligand catalogue, or show one ligand NAME (name or alias;
    exact first, then a unique case-insensitive match).

    \b
    Examples:
      isosieve ligands
      isosieve ligands Cp
      isosieve ligands --format csv
      isosieve --rules my_rules ligands
    """
    from enumerator.render.ligands import render_ligands
    from enumerator.workflow.queries import ligand_catalogue

    emit(render_ligands(ligand_catalogue(rules_of(ctx), name), "json" if as_json else fmt), None)
