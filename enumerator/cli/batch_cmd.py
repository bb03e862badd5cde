"""``isosieve batch FILE``: screen many formulas, one result row each."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


def read_formulas(path: str) -> list[tuple[str, str]]:
    """(formula, label) pairs from a text file (one formula a line; '#'
    comments and blank lines skipped) or a CSV file with a 'formula' column
    (and an optional 'label' column)."""
    import csv
    import io

    from enumerator.errors import InputError

    try:
        with open(path, encoding="utf-8-sig", newline="") as fh:
            text = fh.read()
    except OSError as exc:
        raise InputError(f"cannot read '{path}' ({exc.strerror})", "check the path") from None
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise InputError(f"'{path}' holds no formulas", "write one formula a line, or a CSV with a 'formula' column")
    head = [h.strip().lower() for h in next(csv.reader([lines[0]]))]
    if "formula" in head:
        rows = list(csv.reader(io.StringIO("\n".join(lines))))
        fi = head.index("formula")
        li = head.index("label") if "label" in head else None
        out = []
        for k, r in enumerate(rows[1:], start=2):
            f = r[fi].strip() if fi < len(r) else ""
            out.append((f, r[li].strip() if li is not None and li < len(r) else ""))
        return out
    return [(ln.strip(), "") for ln in lines]


def render_rows(rows, fmt: str) -> str:
    from enumerator.workflow.batch import HEADER, row_cells, row_to_dict

    if fmt == "json":
        from enumerator.render.jsonout import dumps

        return dumps({"rows": [row_to_dict(r) for r in rows]})
    cells = [row_cells(r) for r in rows]
    if fmt == "csv":
        from enumerator.render.tables import write_csv

        return write_csv(HEADER, cells)
    if fmt == "markdown":
        esc = lambda s: s.replace("|", "\\|")
        out = ["| " + " | ".join(HEADER) + " |", "|" + "|".join("---" for _ in HEADER) + "|"]
        out += ["| " + " | ".join(esc(c) for c in r) + " |" for r in cells]
        return "\n".join(out) + "\n"
    from enumerator.render.text import table

    return table(HEADER, cells) + "\n"


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
def batch(ctx, file, workers, geometry, fmt, out, limit):
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
    from enumerator.errors import InputError
    from enumerator.workflow.batch import screen

    items = read_formulas(file)
    rows = list(screen(items, rules=rules_of(ctx), workers=workers, geometry=geometry, limit=limit))
    emit(render_rows(rows, fmt), out)
    bad = [str(r.index + 1) for r in rows if r.error]
    if bad:
        raise InputError(
            f"{len(bad)} of {len(rows)} rows could not be analysed (row {', '.join(bad)})", "see the error column"
        )
