"""``isosieve network``: the substitution network between two compositions."""

from __future__ import annotations

from pathlib import Path

import click

from enumerator.cli.common import emit, rules_of, write_atomic_bytes

_FORMATS = ("text", "json", "graphml", "svg", "png")


@click.command("network")
@click.argument("start")
@click.option(
    "-t",
    "--target",
    required=True,
    metavar="TARGET",
    help='Target composition, e.g. "[PtCl2(NH3)2]" (a descriptor is allowed and ignored).',
)
@click.option(
    "-g", "--geometry", metavar="SYMBOL", help="Polyhedral symbol, e.g. SP-4, OC-6 (default: chosen from the formula)."
)
@click.option(
    "--format", "fmt", type=click.Choice(_FORMATS), help="Output format (default: from the --out extension, else text)."
)
@click.option("--json", "as_json", is_flag=True, help="Same as --format json (networkx node-link data).")
@click.option("--out", type=click.Path(dir_okay=False), help="Write to this file (atomically); needed for png.")
@click.pass_context
def network(ctx, start, target, geometry, fmt, as_json, out):
    """Build the substitution network from START to TARGET.

    Nodes are every isomer of every composition between the two; an edge
    is one replacement of a leaving by an entering ligand, weighted by the
    number of leaving sites that give that product (its statistical
    weight).  Export as GraphML or JSON (networkx) for other tools, or draw
    it as SVG/PNG.

    \b
    Examples:
      isosieve network "[PtCl4]2-" --target "[PtCl2(NH3)2]"
      isosieve network "[Cr(CO)6]" --target "[Cr(CO)3(PPh3)3]" --json
      isosieve network Ma6 --target Ma4b2 --out net.graphml
      isosieve network Ma4 --target Ma2b2 --geometry SP-4 --out net.svg
    """
    from enumerator.errors import InputError
    from enumerator.routes.core import build_network

    if as_json:
        fmt = "json"
    if fmt is None:
        ext = Path(out).suffix.lower().lstrip(".") if out else ""
        fmt = ext if ext in _FORMATS else "text"
    if fmt == "png" and not out:
        raise InputError("PNG output is binary", "give --out FILE.png (or use --format svg)")
    net = build_network(start, target, geometry=geometry, rules=rules_of(ctx))
    if fmt == "json":
        from enumerator.render.jsonout import dumps
        from enumerator.routes.core import network_json

        emit(dumps(network_json(net)), out)
    elif fmt == "graphml":
        from enumerator.routes.core import network_graphml

        emit(network_graphml(net), out)
    elif fmt == "svg":
        from enumerator.routes.core import network_picture

        emit(network_picture(net, "svg").decode("utf-8"), out)
    elif fmt == "png":
        from enumerator.routes.core import network_picture

        write_atomic_bytes(out, network_picture(net, "png"))
    else:
        emit(_text(net), out)


def _text(net) -> str:
    from enumerator.render.text import table

    lines = [f"Network {net.start} -> {net.target} on {net.geometry}", ""]
    lines.append(table(["composition", "stereoisomers"], [[f, str(n)] for f, n in net.compositions]))
    lines.append("")
    rows = []
    for nid, attrs in net.nodes:
        a = dict(attrs)
        rows.append(
            [
                str(a["level"]),
                a["formula"],
                a["isomer"],
                a["point_group"],
                a["prefix"] or "-",
                a["descriptor"] or "-",
                a["sites"],
            ]
        )
    lines.append(table(["step", "formula", "isomer", "point group", "prefix", "descriptor", "sites"], rows))
    lines.append("")
    rows = []
    for a, b, attrs in net.edges:
        e = dict(attrs)
        rows.append([a, b, f"+{e['entering']} -{e['leaving']}", str(e["weight"]), e["share"], e["sites"]])
    lines.append(table(["from", "to", "replacement", "weight", "share", "leaving sites"], rows))
    if net.safety:
        lines += ["", "Safety:"] + [f"- {x}" for x in net.safety]
    return "\n".join(lines) + "\n"
