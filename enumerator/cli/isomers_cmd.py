"""``isosieve isomers``: every isomer of one formula."""

from __future__ import annotations

import click

from .common import emit, parse_pairs, rules_of


@click.command("isomers")
@click.argument("formula")
@click.option("-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. OC-6, TBPY-5, SP-4 (default: chosen from the formula).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document (schema in the README).")
@click.option("--format", "fmt", type=click.Choice(["table", "markdown", "csv", "latex", "json"]), default="table", show_default=True, help="Output format.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output.")
@click.option("--span", "spans", multiple=True, metavar="LIGAND=SPAN", help="Chelate span: edge, cis, trans or any; repeatable.")
@click.option("--arrangement", "arrangements", multiple=True, metavar="LIGAND=fac|mer", help="Limit a tridentate to fac, mer or 'fac,mer'.")
@click.option("--reporter", "reporters", multiple=True, metavar="LETTER=CLASS", help="Treat a ligand as a stretch reporter, e.g. a=CO; repeatable.")
@click.option("--limit", type=click.IntRange(min=1), help="Stop after this many stereoisomers.")
@click.pass_context
def isomers(ctx, formula, geometry, as_json, fmt, out, spans, arrangements, reporters, limit):
    """List every isomer of FORMULA with its point group.

    FORMULA is the abstract notation (lowercase letters for monodentate
    ligands, (AA)/(AB)/(ABA) for chelates, (ring) for a face-capping ring).

    \b
    Examples:
      isosieve isomers Ma2b2c2
      isosieve isomers "M(AA)2b2" --json
      isosieve isomers Ma4b2 --geometry TPR-6
      isosieve isomers "M(AA)b4" --span AA=trans
      isosieve isomers "M(AAA)b3" --arrangement AAA=mer
    """
    from ..pipeline import Request, run

    req = Request(
        formula=formula,
        geometry=geometry,
        spans=parse_pairs(spans, "--span", "AA=trans"),
        arrangements=parse_pairs(arrangements, "--arrangement", "AAA=fac"),
        reporters=parse_pairs(reporters, "--reporter", "a=CO"),
        limit=limit,
        rules=rules_of(ctx),
    )
    res = run(req)
    if as_json or fmt == "json":
        from ..render.jsonout import dumps, result_to_dict

        emit(dumps(result_to_dict(res)), out)
    elif fmt == "table":
        from ..render.text import render

        emit(render(res), out)
    else:
        from ..render import tables

        emit(getattr(tables, fmt)(res), out)
