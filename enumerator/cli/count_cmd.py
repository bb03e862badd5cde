"""``isosieve count``: how many isomers a formula has, before listing any.

The numbers come from Burnside's lemma (:mod:`enumerator.isomers.counting`): an
average over the symmetry operations of the decorations each one fixes.
Nothing is enumerated, so even a 12-vertex centre with twelve different
ligands answers at once.
"""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, progress_callback, rules_of


@click.command("count")
@click.argument("formula")
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. OC-6, IC-12 (default: chosen from the formula)."
)
@click.option("--all", "every", is_flag=True, help="Count on every geometry with the formula's coordination number.")
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
@click.option("--json", "as_json", is_flag=True, help="Print one JSON document.")
@click.option(
    "--out", type=click.Path(dir_okay=False), help="Write to this file (atomically) instead of standard output."
)
@click.pass_context
def count(ctx, formula, geometry, every, spans, arrangements, as_json, out):
    """Count the geometric isomers and stereoisomers of FORMULA up front
    (Burnside's lemma), without listing them.

    Monodentate letters, chelates (AA)/(AB)/(ABA)/(ABC), tripods {AAA},
    fac/mer limits, span settings and (ring) ligands are all counted exactly.
    A count that takes more than a second shows a progress bar on a terminal.

    \b
    Examples:
      isosieve count Mabcdefghijkl --geometry IC-12
      isosieve count "M(AA)2b2"
      isosieve count Ma4b2 --all
      isosieve count "M(AA)b4" --span AA=trans --json
    """
    from enumerator.render.count import render_count
    from enumerator.workflow.queries import count_formula

    with progress_callback("counting") as progress:
        result = count_formula(
            formula,
            geometry=geometry,
            every=every,
            spans=parse_pairs(spans, "--span", "AA=trans"),
            arrangements=parse_pairs(arrangements, "--arrangement", "AAA=fac"),
            rules=rules_of(ctx),
            progress=progress,
        )
    emit(render_count(result, as_json), out)
