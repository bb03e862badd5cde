"""``isosieve chartable``: the computed character table of a point group or of an isomer."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, parse_pairs, rules_of


@click.command("chartable")
@click.argument("what")
@click.option("--isomer", "isomer_id", metavar="ID", help="Which isomer of the formula (default: every isomer).")
@click.option("-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol for a formula, e.g. OC-6.")
@click.option("--span", "spans", multiple=True, metavar="LIGAND=SPAN", help="Chelate span for a formula; repeatable.")
@click.option("--json", "as_json", is_flag=True, help="Print JSON.")
@click.option("--out", type=click.Path(dir_okay=False), help="Write to this file (atomically).")
@click.pass_context
def chartable(ctx, what, isomer_id, geometry, spans, as_json, out):
    """Print the computed character table of WHAT: a point-group name (C2v,
    D4h, Td, Oh, Ih, D5h, S8, ...) or a formula (then one table per isomer,
    or only --isomer ID).

    A named group is built by closing generators in the standard
    orientation (z principal axis, C2' along x, sigma_v = xz).  An isomer's
    table comes from its own stabiliser, with the axes fixed by the rule in
    the README ('axes' line).  Characters, Mulliken labels and the functions
    column are all computed.

    \b
    Examples:
      isosieve chartable D4h
      isosieve chartable Ih --json
      isosieve chartable "Ma2b2c2" --isomer 2
      isosieve chartable "M(AA)2b2" --geometry OC-6
    """
    from enumerator.render.chartable import render_chartable
    from enumerator.workflow.queries import character_tables

    result = character_tables(
        what,
        geometry=geometry,
        isomer_id=isomer_id,
        spans=parse_pairs(spans, "--span", "AA=trans"),
        rules=rules_of(ctx),
    )
    emit(render_chartable(result, as_json), out)
