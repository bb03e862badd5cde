"""The substitution network as text, JSON, GraphML or a picture.

Each function reads a :class:`~enumerator.routes.network.Network` only:
:func:`network_text` for the terminal, :func:`network_json` (its ``to_dict()``
as JSON text), :func:`network_graphml` for other graph tools (networkx
writer), and :func:`network_picture` (:func:`network_svg` as text), a layered drawing with one column per
step (matplotlib, no pyplot).  SVG output is deterministic: the hash salt is
fixed and no date is written, so the same network gives the same bytes.

>>> from enumerator.routes.network import build_network
>>> net = build_network("Ma6", "Ma4b2")
>>> print(network_text(net).splitlines()[2])
composition  stereoisomers
>>> network_graphml(net).startswith("<graphml")
True
"""

from __future__ import annotations

import io
from typing import Any

from enumerator.render.jsonout import dumps
from enumerator.render.text import table
from enumerator.routes.network import Network

__all__ = ["network_text", "network_json", "network_graphml", "network_svg", "network_picture"]


def network_text(net: Network) -> str:
    """Tables of the compositions, the nodes and the edges, then the cautions.

    Parameters
    ----------
    net : Network

    Returns
    -------
    str
        Lines ending in a newline.
    """
    lines = [f"Network {net.start} -> {net.target} on {net.geometry}", ""]
    lines.append(table(["composition", "stereoisomers"], [[f, str(n)] for f, n in net.compositions]))
    lines.append("")
    rows = []
    for _, attrs in net.nodes:
        n = dict(attrs)
        rows.append(
            [
                str(n["level"]),
                n["formula"],
                n["isomer"],
                n["point_group"],
                n["prefix"] or "-",
                n["descriptor"] or "-",
                n["sites"],
            ]
        )
    lines.append(table(["step", "formula", "isomer", "point group", "prefix", "descriptor", "sites"], rows))
    lines.append("")
    rows = []
    for source, sink, attrs in net.edges:
        e = dict(attrs)
        rows.append([source, sink, f"+{e['entering']} -{e['leaving']}", str(e["weight"]), e["share"], e["sites"]])
    lines.append(table(["from", "to", "replacement", "weight", "share", "leaving sites"], rows))
    if net.safety:
        lines += ["", "Safety:"] + [f"- {x}" for x in net.safety]
    return "\n".join(lines) + "\n"


def network_json(net: Network) -> str:
    """The network's JSON document (:meth:`Network.to_dict`) as deterministic text."""
    return dumps(net.to_dict())


def network_graphml(net: Network) -> str:
    """GraphML text of the network (networkx writer; attributes as in :class:`Network`)."""
    import networkx as nx

    return "\n".join(nx.generate_graphml(net.to_graph())) + "\n"


def _positions(net: Network) -> tuple[dict[str, tuple[float, float]], int, int, int]:
    """Node positions (one column per level, centred), the tallest column, the number of columns and the last level."""
    cols: dict[int, list[str]] = {}
    for nid, attrs in net.nodes:
        cols.setdefault(int(dict(attrs)["level"]), []).append(nid)
    pos: dict[str, tuple[float, float]] = {}
    for lv, items in cols.items():
        for k, nid in enumerate(items):
            pos[nid] = (lv * 3.0, (len(items) - 1) / 2.0 - k)
    return pos, max(len(v) for v in cols.values()), len(cols), max(cols)


def _draw(ax: Any, net: Network, pos: dict[str, tuple[float, float]]) -> None:
    for a, b, attrs in net.edges:
        e = dict(attrs)
        (x0, y0), (x1, y1) = pos[a], pos[b]
        ax.annotate(
            "",
            xy=(x1 - 0.55, y1),
            xytext=(x0 + 0.55, y0),
            arrowprops={"arrowstyle": "->", "lw": 0.3 + 0.4 * e["weight"], "color": "0.45"},
        )
        ax.text((x0 + x1) / 2, (y0 + y1) / 2, str(e["weight"]), fontsize=6, ha="center", va="center", color="0.2")
    for nid, attrs in net.nodes:
        n = dict(attrs)
        x, y = pos[nid]
        tag = f"{n['prefix']}-" if n["prefix"] else ""
        ax.text(
            x,
            y,
            f"{tag}{n['formula']}\n#{n['isomer']} {n['point_group']}",
            fontsize=7,
            ha="center",
            va="center",
            bbox={"boxstyle": "round", "fc": "white", "ec": "0.3", "lw": 0.6},
        )


def network_picture(net: Network, fmt: str = "svg") -> bytes:
    """A layered drawing of the network: one column per step, edges labelled with their statistical weights.

    Parameters
    ----------
    net : Network
    fmt : str
        'svg' or 'png'.

    Returns
    -------
    bytes
        The picture; SVG is byte-identical for the same network.
    """
    import matplotlib
    from matplotlib.figure import Figure

    pos, tall, ncols, last = _positions(net)
    with matplotlib.rc_context({"svg.hashsalt": "isosieve", "svg.fonttype": "none"}):
        fig = Figure(figsize=(3.0 + 2.6 * ncols, 1.0 + 0.9 * tall))
        ax = fig.add_subplot(1, 1, 1)
        ax.set_axis_off()
        _draw(ax, net, pos)
        ax.set_xlim(-1.2, 3.0 * last + 1.2)
        ax.set_ylim(-tall / 2.0 - 0.3, tall / 2.0 + 0.3)
        ax.set_title(f"{net.start} -> {net.target} on {net.geometry} (edge labels: statistical weights)", fontsize=8)
        buf = io.BytesIO()
        meta = {"Date": None} if fmt == "svg" else {}
        fig.savefig(buf, format=fmt, metadata=meta, dpi=150)
    return buf.getvalue()


def network_svg(net: Network) -> str:
    """The drawing of :func:`network_picture` as SVG text."""
    return network_picture(net, "svg").decode("utf-8")
