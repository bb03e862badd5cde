"""``isosieve report``: an HTML report (plus LaTeX and CSV tables) from a job file."""

from __future__ import annotations

from pathlib import Path

import click

from enumerator.cli.common import rules_of
from enumerator.cli.output import register_inputs, write_files


@click.command("report")
@click.argument("job", type=click.Path(dir_okay=False))
@click.option(
    "--out",
    "out_dir",
    required=True,
    type=click.Path(file_okay=False),
    help="Folder for report.html and the tables (created if missing).",
)
@click.option("--title", help="Page title (default: the job file's title or name).")
@click.pass_context
def report(ctx: click.Context, job: str, out_dir: str, title: str | None) -> None:
    """Write DIR/report.html for the complexes of JOB, with the isomer tables
    beside it as LaTeX (.tex) and plain CSV (.csv, with a .csv-metadata.json
    sidecar holding the cautions and column meanings), one set per complex,
    and a README.txt saying what each file is.

    The files are written all or nothing: each is staged beside its place
    and only when every one is written are they renamed into place.

    On Linux the 3D embeddings run in worker processes, one per CPU, when
    there are two or more; the coordinates are the same as in one process,
    which ISOSIEVE_EMBED_PROCESSES=1 in the environment forces.

    The page needs no network (inline CSS and SVG, no scripts).  JOB is a
    job file as for 'isosieve job'; a minimal one:

    \b
      title = "Ru carbonyl phosphines"
      [[complex]]
      formula = "[RuCl2(CO)2(PPh3)2]"
      [[complex]]
      formula = "Ma3b3"
      reporters = { a = "CO" }

    \b
    Examples:
      isosieve report job.toml --out si
      isosieve --rules mylib report job.toml --out si --title "SI tables"
    """
    from enumerator.cli.progress import bar
    from enumerator.parse.text import check_label_text
    from enumerator.render.report import render_report, table_files
    from enumerator.workflow.report import pending_report

    if title is not None:
        check_label_text(title, "--title")
    register_inputs(ctx, job)
    with bar("report") as progress:
        with pending_report(job, rules_of(ctx), title, progress) as pending:
            files = table_files(pending.head)  # written while the workers embed the 3D structures
            built = pending.finish()
        progress("writing the page", 0, 1)
        files.append(("report.html", render_report(built)))
        progress("writing the page", 1, 1)
    folder = Path(out_dir)
    write_files([(folder / name, text) for name, text in files], folder=folder)
    click.echo(f"{folder / 'report.html'}  ({len(built.complexes)} complex(es)); tables: {', '.join(built.files)}")
