"""``isosieve isomers``: every isomer of one formula."""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

import click

from enumerator.cli.common import parse_pairs, progress_callback, rules_of
from enumerator.limits import SIZE_CAP

if TYPE_CHECKING:
    from collections.abc import Callable

    from enumerator.cli.progress import Progress
    from enumerator.isomers.enumeration import Isomer
    from enumerator.parse.request import Request
    from enumerator.workflow.result import Result

__all__ = ["isomers", "SIZE_CAP", "PROGRESS_MIN", "want_progress"]

#: Show a progress bar on a terminal when more stereoisomers than this are expected.
PROGRESS_MIN = 2_000


def want_progress(expected: int | None, stream: object) -> bool:
    """A progress bar only on a terminal, and only for a long run.

    Parameters
    ----------
    expected : int, optional
        The stereoisomers expected.
    stream : file-like
        Where the bar would go (standard error).

    Returns
    -------
    bool
        True above :data:`PROGRESS_MIN` on a terminal.
    """
    isatty = getattr(stream, "isatty", None)
    return expected is not None and expected > PROGRESS_MIN and bool(isatty and isatty())


def _run(req: Request, partial: bool) -> tuple[Result, str | None]:
    """(result, what was kept when interrupted).  The size guard counts first (a progress bar on a terminal
    when that is slow); the enumeration shows progress; with ``partial`` Ctrl-C keeps what was done."""
    from enumerator.isomers.counting import burnside_counts
    from enumerator.workflow.pipeline import prepare, run, run_partial

    with progress_callback("counting") as counted:
        comp, geo, _ = prepare(req, progress=counted)
    expected = None
    if sys.stderr.isatty():
        counts = burnside_counts(comp, geo)
        total = counts[1] if counts else None
        expected = None if total is None else (total if req.limit is None else min(total, req.limit))

    def go(on_isomer: Callable[[Isomer], None] | None, progress: Progress | None) -> tuple[Result, str | None]:
        if partial:
            return run_partial(req, on_isomer=on_isomer, progress=progress)
        return run(req, on_isomer=on_isomer, progress=progress), None

    if expected is not None and want_progress(expected, sys.stderr):
        with click.progressbar(length=expected, label="enumerating", file=sys.stderr) as bar:

            def step(iso: Isomer) -> None:
                bar.update(1)

            def stage(name: str, done: int, total: int) -> None:
                bar.label = f"analysing ({name}, {done}/{total})"
                bar.render_progress()

            return go(step, stage)
    return go(None, None)


def _render(res: Result, fmt: str, partial: bool, stopped: str | None) -> tuple[str, str | None]:
    """The text to write; with ``partial``, Ctrl-C while formatting falls back to the result without analyses."""
    from enumerator.render.result import render_result
    from enumerator.workflow.pipeline import without_analyses

    try:
        return render_result(res, fmt), stopped
    except KeyboardInterrupt:
        if not partial:
            raise
    why = "interrupted while formatting the output: the analyses are left out"
    text = render_result(without_analyses(res, why), fmt)
    return text, "; ".join(n for n in (stopped, why) if n)


@click.command("isomers")
@click.argument("formula")
@click.option(
    "-g",
    "--geometry",
    metavar="SYMBOL",
    help="Polyhedral symbol, e.g. OC-6, TBPY-5, SP-4 (default: chosen from the formula).",
)
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document (schema in the README).")
@click.option(
    "--format",
    "fmt",
    type=click.Choice(["table", "markdown", "csv", "latex", "json"]),
    default="table",
    show_default=True,
    help="Output format.",
)
@click.option(
    "--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output."
)
@click.option(
    "--span", "spans", multiple=True, metavar="LIGAND=SPAN", help="Chelate span: edge, cis, trans or any; repeatable."
)
@click.option(
    "--arrangement",
    "arrangements",
    multiple=True,
    metavar="LIGAND=fac|mer",
    help="Limit a tridentate to fac, mer or 'fac,mer'.",
)
@click.option(
    "--reporter",
    "reporters",
    multiple=True,
    metavar="LETTER=CLASS",
    help="Treat a ligand as a stretch reporter, e.g. a=CO; repeatable.",
)
@click.option("--limit", type=click.IntRange(min=1), help="Stop after this many stereoisomers.")
@click.option(
    "--partial",
    is_flag=True,
    help='On Ctrl-C, write the isomers found so far (marked "complete": false) instead of nothing.',
)
@click.option(
    "--pick",
    metavar="DESCRIPTOR",
    help="Keep only the isomers with this IUPAC descriptor: OC-6-32-C, OC-6-32, 32, cis, trans, fac or mer.",
)
@click.pass_context
def isomers(ctx, formula, geometry, as_json, fmt, out, spans, arrangements, reporters, limit, partial, pick):
    """List every isomer of FORMULA with its point group.

    FORMULA is the abstract notation (lowercase letters for monodentate
    ligands, (AA)/(AB)/(ABA) for chelates, {AAA} for a tripod, (ring) for
    an η-ring on one site)
    or a real condensed formula such as "[RuCl2(CO)2(PPh3)2]" or
    "[Fe(CN)5(NO)]2-" (ligand names: isosieve ligands); a real formula
    also gets its oxidation state, d count and electron count, and a
    default geometry chosen from them.

    \b
    Examples:
      isosieve isomers Ma2b2c2
      isosieve isomers "M(AA)2b2" --json
      isosieve isomers Ma4b2 --geometry TPR-6
      isosieve isomers "M(AA)b4" --span AA=trans
      isosieve isomers "M(AAA)b3" --arrangement AAA=mer
      isosieve isomers "[RuCl2(CO)2(PPh3)2]" --format latex --out si.tex
      isosieve isomers Mabcdefghijkl --geometry IC-12 --limit 100 --partial --json
      isosieve isomers "[Co(NH3)3(NO2)3]" --pick mer
      isosieve isomers Ma2b2c2 --pick OC-6-32-C

    The size is counted first (Burnside's lemma, as 'isosieve count' does);
    more than 200,000 stereoisomers need --limit.  Ctrl-C stops with exit
    status 130 and writes nothing, unless --partial is given: then what was
    done is written -- the isomers found so far, the analyses finished
    before the interruption -- and stderr says what was kept.
    """
    from enumerator.workflow.pipeline import Request

    req = Request(
        formula=formula,
        geometry=geometry,
        spans=parse_pairs(spans, "--span", "AA=trans"),
        arrangements=parse_pairs(arrangements, "--arrangement", "AAA=fac"),
        reporters=parse_pairs(reporters, "--reporter", "a=CO"),
        limit=limit,
        rules=rules_of(ctx),
        pick=pick or None,
    )
    step = "before anything was found"
    try:
        res, stopped = _run(req, partial)
        step = "while formatting the output"
        text, stopped = _render(res, "json" if as_json else fmt, partial, stopped)
        step = "while writing the output (any --out file is unchanged)"
        from enumerator.cli.table_output import emit_result

        emit_result(res, "json" if as_json else fmt, out, text=text)
    except KeyboardInterrupt:
        hint = f"interrupted {step}; nothing written" if partial else "interrupted; nothing written"
        click.echo(f"isosieve: {hint}" + ("" if partial else " (give --partial to keep what was found)"), err=True)
        sys.exit(130)
    if stopped:
        n = len(res.isomer_set.isomers)
        mark = ', marked "complete": false' if not res.isomer_set.complete else ""
        click.echo(f"isosieve: {stopped}; wrote the {n} stereoisomers kept{mark}", err=True)
        sys.exit(130)
