"""``isosieve report``: an HTML report (plus LaTeX and CSV tables) from a job file."""

from __future__ import annotations

import re
from pathlib import Path

import click

from enumerator.cli.common import rules_of, write_atomic


def _slug(text: str) -> str:
    s = re.sub(r"[^A-Za-z0-9]+", "_", text).strip("_")
    return s or "complex"


def _pairs(value, where: str, example: str) -> tuple[tuple[str, str], ...]:
    from enumerator.errors import InputError

    if value is None:
        return ()
    if not isinstance(value, dict) or not all(isinstance(v, str) for v in value.values()):
        raise InputError(f'{where} must be a table of NAME = "VALUE"', f"write e.g. {example}")
    return tuple(sorted((str(k), v) for k, v in value.items()))


def load_requests(path: str, rules: tuple[str, ...]):
    """(title, [Request, ...]) from a job file.

    Uses :mod:`enumerator.workflow.job` when it is present; otherwise reads the
    minimal form: ``title = "..."`` (optional) and one ``[[complex]]`` table
    per complex with ``formula`` and optional ``geometry``, ``limit`` and
    ``reporters`` / ``spans`` / ``arrangements`` tables (NAME = "VALUE").
    """
    from enumerator.errors import InputError
    from enumerator.rules.ruleset import check_keys, read_toml
    from enumerator.workflow.pipeline import Request

    try:  # the job-file module of issue 4, once it exists
        from enumerator import jobfile  # type: ignore[attr-defined]
    except ImportError:
        jobfile = None
    if jobfile is not None and hasattr(jobfile, "load_job"):
        job = jobfile.load_job(path, rules=rules)
        reqs = [e.request for e in job.entries]
        return str(job.title or Path(path).stem), reqs
    p = Path(path)
    if not p.is_file():
        raise InputError(f"job file '{path}' not found", "give the path of a TOML job file")
    doc = read_toml(p)
    complexes = doc.get("complex")
    if not isinstance(complexes, list) or not complexes:
        raise InputError(f"{path}: no [[complex]] tables", 'add e.g. [[complex]] formula = "[Mo(CO)4(PPh3)2]"')
    out = []
    for n, c in enumerate(complexes, 1):
        where = f"{path}: complex {n}"
        if not isinstance(c, dict):
            raise InputError(f"{where} is not a table", 'write [[complex]] followed by formula = "..."')
        check_keys(
            c,
            where,
            required=("formula",),
            optional=("geometry", "limit", "reporters", "spans", "arrangements", "title", "name"),
        )
        limit = c.get("limit")
        if limit is not None and (not isinstance(limit, int) or limit < 1):
            raise InputError(f"{where}: limit must be a positive whole number", "write e.g. limit = 100")
        out.append(
            Request(
                formula=str(c["formula"]),
                geometry=c.get("geometry"),
                spans=_pairs(c.get("spans"), f"{where}: spans", 'spans = { AA = "trans" }'),
                arrangements=_pairs(c.get("arrangements"), f"{where}: arrangements", 'arrangements = { AAA = "fac" }'),
                reporters=_pairs(c.get("reporters"), f"{where}: reporters", 'reporters = { a = "CO" }'),
                limit=limit,
                rules=rules,
            )
        )
    return str(doc.get("title") or p.stem), out


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
    from enumerator.workflow.pipeline import run

    rules = rules_of(ctx)
    name, reqs = load_requests(job, rules)
    results = [run(r) for r in reqs]
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
