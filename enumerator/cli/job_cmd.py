"""``isosieve job FILE``: run a TOML job file of several complexes."""

from __future__ import annotations

import click

from enumerator.cli.common import rules_of
from enumerator.cli.output import register_inputs, write_files
from enumerator.parse.job import FORMATS


@click.command("job")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(FORMATS), default="table", show_default=True)
@click.option(
    "--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output."
)
@click.option(
    "--write", "write_outputs", is_flag=True, help="Write every [[output]] the job file lists (paths relative to it)."
)
@click.pass_context
def job(ctx: click.Context, file: str, fmt: str, out: str | None, write_outputs: bool) -> None:
    """Run every [[complex]] of the job FILE and print or write the tables.

    \b
    Examples:
      isosieve job examples/ruthenium/ru_dicarbonyl.toml
      isosieve job examples/ruthenium/ru_dicarbonyl.toml --format latex --out si_table.tex
      isosieve job examples/iron/fe_cyanide_nitrosyl.toml --write
    """
    from enumerator.cli.progress import bar
    from enumerator.errors import InputError
    from enumerator.render.job import job_files, render_job
    from enumerator.workflow.job import run_job_file

    register_inputs(ctx, file)
    with bar("job") as progress:
        result = run_job_file(file, rules_of(ctx), progress)
    if not write_outputs:
        from enumerator.cli.table_output import emit_table
        from enumerator.render.job import job_cautions

        frame = result.to_dataframe() if fmt == "csv" else None
        emit_table(render_job(result, fmt), out, fmt, frame, title=result.title, cautions=job_cautions(result))
        return
    if not result.outputs:
        raise InputError(
            f"job file '{file}' lists no [[output]]", 'add [[output]] with format = "markdown" and file = "..."'
        )
    files = job_files(result)
    write_files(files, option="[[output]] file")
    for path, _ in files:
        click.echo(f"wrote {path}", err=True)
