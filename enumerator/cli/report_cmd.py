"""``isosieve report``: an HTML report (plus LaTeX and CSV tables) from a job file."""

from __future__ import annotations

import re
from pathlib import Path

import click

from enumerator.cli.common import rules_of, write_atomic


def _slug(text: str) -> str:
    s = re.sub(r"[^A-Za-z0-9]+", "_", text).strip("_")
    return s or "complex"


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
def report(ctx, job, out_dir, title):
    """Write DIR/report.html for the complexes of JOB, with the isomer tables
    beside it as LaTeX (.tex) and CSV (.csv), one pair per complex.

    The page needs no network (inline CSS and SVG, no scripts).  A minimal
    job file:

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
    from enumerator.render.report import render_report, tables_csv, tables_latex
    from enumerator.rules.ruleset import load_rules
    from enumerator.workflow.job import load_job
    from enumerator.workflow.pipeline import run

    rules = rules_of(ctx)
    j = load_job(job, rules)
    results = [run(e.request) for e in j.entries]
    name = j.title or Path(job).stem
    folder = Path(out_dir)
    folder.mkdir(parents=True, exist_ok=True)
    names = []
    files = {}
    for n, res in enumerate(results, 1):
        stem = f"{n:02d}_{_slug(res.composition.formula)}"
        files[f"{stem}.csv"] = tables_csv(res)
        files[f"{stem}.tex"] = tables_latex(res)
        names += [f"{stem}.csv", f"{stem}.tex"]
    page = render_report(results, title=title or name, rules=load_rules(rules), files=names)
    for fname, text in files.items():
        write_atomic(folder / fname, text)
    write_atomic(folder / "report.html", page)
    click.echo(f"{folder / 'report.html'}  ({len(results)} complex(es)); tables: {', '.join(names)}")
