"""``isosieve job FILE``: run a TOML job file of several complexes."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of, write_atomic


@click.command("job")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option(
    "--format",
    "fmt",
    type=click.Choice(["table", "markdown", "csv", "latex", "json"]),
    default="table",
    show_default=True,
)
@click.option(
    "--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output."
)
@click.option(
    "--write", "write_outputs", is_flag=True, help="Write every [[output]] the job file lists (paths relative to it)."
)
@click.pass_context
def job(ctx, file, fmt, out, write_outputs):
    """Run every [[complex]] of the job FILE and print or write the tables.

    \b
    Examples:
      isosieve job examples/ruthenium/ru_dicarbonyl.toml
      isosieve job examples/ruthenium/ru_dicarbonyl.toml --format latex --out si_table.tex
      isosieve job examples/iron/fe_cyanide_nitrosyl.toml --write
    """
    from pathlib import Path

    from enumerator.workflow.job import load_job, render_job, run_job

    j = load_job(file, rules_of(ctx))
    results = run_job(j)
    if write_outputs:
        if not j.outputs:
            from enumerator.errors import InputError

            raise InputError(
                f"job file '{file}' lists no [[output]]", 'add [[output]] with format = "markdown" and file = "..."'
            )
        for f, rel in j.outputs:
            write_atomic(Path(j.folder) / rel, render_job(j, results, f))
            click.echo(f"wrote {Path(j.folder) / rel}", err=True)
        return
    emit(render_job(j, results, fmt), out)
