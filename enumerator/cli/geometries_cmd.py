"""``isosieve geometries``: the coordination geometries in force."""

from __future__ import annotations

import click

from enumerator.cli.common import emit, rules_of


@click.command("geometries")
@click.option("--json", "as_json", is_flag=True, help="Print JSON instead of a table.")
@click.pass_context
def geometries(ctx, as_json):
    """List the coordination geometries with their derived symmetry groups.

    \b
    Examples:
      isosieve geometries
      isosieve --rules my_rules geometries
    """
    from enumerator.render.jsonout import dumps
    from enumerator.render.text import table
    from enumerator.rules.ruleset import load_rules

    rs = load_rules(rules_of(ctx))
    geos = sorted(rs.geometries.values(), key=lambda g: (g.coordination_number, g.symbol))
    if as_json:
        doc = [
            {
                "symbol": g.symbol,
                "name": g.name,
                "coordination_number": g.coordination_number,
                "point_group": g.point_group,
                "operations": len(g.operations),
                "polyhedron_edges": len(g.edges),
                "fluxional": g.fluxional,
            }
            for g in geos
        ]
        emit(dumps(doc), None)
        return
    rows = [
        [
            g.symbol,
            g.name,
            str(g.coordination_number),
            g.point_group,
            str(len(g.operations)) + ("*" if g.linear else ""),
            str(len(g.edges)),
            "yes" if g.fluxional else "no",
        ]
        for g in geos
    ]
    text = table(["symbol", "name", "CN", "group", "operations", "edges", "often fluxional"], rows)
    if any(g.linear for g in geos):
        text += "\n* a linear centre's group is infinite; its action on the sites is carried by a finite D2h subgroup."
    emit(text + "\n", None)
