"""``isosieve network``: the substitution network between two compositions.

The command parses its options, calls :func:`enumerator.routes.network.build_network`
and hands the network to a renderer of :mod:`enumerator.render.network`
(text, JSON, GraphML, SVG or PNG).
"""

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
    from enumerator.render.network import network_graphml, network_json, network_picture, network_svg, network_text
    from enumerator.routes.network import build_network

    if as_json:
        fmt = "json"
    if fmt is None:
        ext = Path(out).suffix.lower().lstrip(".") if out else ""
        fmt = ext if ext in _FORMATS else "text"
    if fmt == "png" and not out:
        raise InputError("PNG output is binary", "give --out FILE.png (or use --format svg)")
    net = build_network(start, target, geometry=geometry, rules=rules_of(ctx))
    if fmt == "png":
        write_atomic_bytes(out, network_picture(net, "png"))
        return
    renderers = {
        "json": network_json,
        "graphml": network_graphml,
        "svg": network_svg,
        "text": network_text,
    }
    emit(renderers[fmt](net), out)
