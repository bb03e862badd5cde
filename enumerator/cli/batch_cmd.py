"""``isosieve batch FILE``: screen many formulas, one result row each."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("batch")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option(
    "--workers", type=click.IntRange(min=1), default=1, show_default=True, help="Processes for the distinct patterns."
)
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Use this geometry for every formula (default: chosen per formula)."
)
@click.option(
    "--format", "fmt", type=click.Choice(["table", "csv", "json", "markdown"]), default="table", show_default=True
)
@click.option("--out", type=click.Path(dir_okay=False), help="Write to this file (atomically).")
@click.option("--limit", type=click.IntRange(min=1), help="Stop each enumeration after this many stereoisomers.")
@click.pass_context
def batch(
    ctx: click.Context, file: str, workers: int, geometry: str | None, fmt: str, out: str | None, limit: int | None
) -> None:
    """Screen every formula in FILE: one row each, in input order.

    FILE has one formula a line ('#' starts a comment), or is a CSV file
    with a 'formula' column (and optionally 'label').  A bad row is reported
    in its 'error' cell and the rest go on; the exit status is then 2.
    Formulas with the same pattern share one enumeration.

    \b
    Examples:
      isosieve batch formulas.txt
      isosieve batch screen.csv --workers 2 --format csv --out results.csv
    """
    from enumerator.cli.progress import bar
    from enumerator.errors import InputError
    from enumerator.render.batch import render_batch
    from enumerator.workflow.batch import screen_file

    with bar("batch") as progress:
        result = screen_file(
            file, rules=rules_of(ctx), workers=workers, geometry=geometry, limit=limit, progress=progress
        )
    emit(render_batch(result, fmt), out)
    if result.failed:
        bad = ", ".join(str(r.index + 1) for r in result.failed)
        raise InputError(
            f"{len(result.failed)} of {len(result.rows)} rows could not be analysed (row {bad})", "see the error column"
        )
