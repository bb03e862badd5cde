"""The substitution network between two compositions, as data.

Every composition between a start and a target (each leaving ligand's count
between its start and target values, likewise each entering ligand's)
contributes all its stereoisomers as nodes.  From every node, replacing one
leaving ligand by one entering ligand gives one edge per distinct product,
weighted by the number of leaving sites that give it (its statistical
weight), so the weights out of a node for one (entering, leaving) pair sum to
the number of sites the leaving ligand holds.

:func:`build_network` returns a frozen :class:`Network`; ``to_dict()`` is its
JSON document (networkx node-link data), ``to_graph()`` a networkx DiGraph
for other tools.  Text, GraphML and pictures are drawn by
:mod:`enumerator.render.network`.

>>> net = build_network("Ma6", "Ma4b2")
>>> [dict(a)["formula"] for _, a in net.nodes]
['Ma6', 'Ma5b', 'Ma4b2', 'Ma4b2']
>>> [(b, dict(e)["weight"]) for a, b, e in net.edges if a == "Ma5b #1"]
[('Ma4b2 #1', 4), ('Ma4b2 #2', 1)]
"""

from __future__ import annotations

import itertools
from collections.abc import Iterator, Mapping, Sequence
from fractions import Fraction
from typing import Any

from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.isomers.occupancy import occupancy
from enumerator.routes.naming import name_isomer
from enumerator.routes.prediction import predict_in_space
from enumerator.routes.space import Endpoints, Species, prepare_endpoints, safety_lines
from enumerator.rules.ruleset import load_rules
from enumerator.rules.substitution import SubstitutionRules

__all__ = ["Network", "build_network", "node_id"]

#: Attributes of a node or an edge, as (key, value) pairs in a fixed order.
Attributes = tuple[tuple[str, Any], ...]

# Every site alike: the network shows statistical weights whatever rule sets are in force.
_STATISTICAL = SubstitutionRules("statistical", "", "", ("*",), "none", (), "statistical")


@frozen_dataclass
class Network:
    """Every isomer of every composition between a start and a target, and
    one edge per single replacement.

    ``nodes``: (node id, attributes) with 'formula', 'isomer',
    'geometric_isomer', 'point_group', 'chiral', 'prefix', 'descriptor',
    'level' (replacements made from the start) and 'sites'; ``edges``:
    (from, to, attributes) with 'entering', 'leaving', 'weight' (the number
    of leaving sites giving that product: statistical weight), 'share' and
    'sites'.  ``compositions`` holds (formula, number of stereoisomers).
    """

    geometry: str
    start: str
    target: str
    nodes: tuple[tuple[str, Attributes], ...]
    edges: tuple[tuple[str, str, Attributes], ...]
    compositions: tuple[tuple[str, int], ...]
    safety: tuple[str, ...] = ()

    def to_graph(self) -> Any:
        """The network as a networkx DiGraph (node and edge attributes as above).

        Returns
        -------
        networkx.DiGraph
            Graph attributes 'geometry', 'start' and 'target'.
        """
        import networkx as nx

        g = nx.DiGraph(geometry=self.geometry, start=self.start, target=self.target)
        for nid, attrs in self.nodes:
            g.add_node(nid, **dict(attrs))
        for a, b, attrs in self.edges:
            g.add_edge(a, b, **dict(attrs))
        return g

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve network --json``: networkx node-link
        data (keys 'nodes' and 'edges') plus 'compositions' and 'safety'."""
        import networkx as nx

        doc: dict[str, Any] = nx.node_link_data(self.to_graph(), edges="edges")
        doc["compositions"] = [{"formula": f, "stereoisomers": n} for f, n in self.compositions]
        doc["safety"] = list(self.safety)
        return doc


def node_id(formula: str, isomer_id: str) -> str:
    """The id of a network node: '[PtCl3(NH3)]- #1'."""
    return f"{formula} #{isomer_id}"


def _levels(ends: Endpoints) -> dict[int, list[dict[str, int]]]:
    """Every intermediate's ligand counts by level: remove x_L of each leaving
    ligand, add y_E of each entering one, with sum x = sum y = level."""
    lev_names, ent_names = sorted(ends.leaving), sorted(ends.entering)
    levels: dict[int, list[dict[str, int]]] = {}
    for xs in itertools.product(*[range(ends.leaving[n] + 1) for n in lev_names]):
        for ys in itertools.product(*[range(ends.entering[n] + 1) for n in ent_names]):
            if sum(xs) != sum(ys):
                continue
            c = dict(ends.start_counts)
            for n, x in zip(lev_names, xs):
                c[n] -= x
            for n, y in zip(ent_names, ys):
                c[n] = c.get(n, 0) + y
            levels.setdefault(sum(xs), []).append(c)
    return levels


def _node(sp: Species, iso: Isomer, level: int) -> tuple[str, Attributes]:
    prefix, desc = name_isomer(iso, sp.composition)
    attrs: Attributes = (
        ("formula", sp.formula),
        ("isomer", iso.id),
        ("geometric_isomer", iso.number),
        ("point_group", iso.point_group),
        ("chiral", iso.chiral),
        ("prefix", prefix or ""),
        ("descriptor", desc or ""),
        ("level", level),
        ("sites", occupancy(iso)),
    )
    return node_id(sp.formula, iso.id), attrs


def _replacements(ends: Endpoints, counts: Mapping[str, int]) -> Iterator[tuple[str, str]]:
    """(entering, leaving) pairs still open from these counts towards the target."""
    for entering in sorted(ends.entering):
        if counts.get(entering, 0) >= ends.target_counts.get(entering, 0):
            continue
        for leaving in sorted(ends.leaving):
            if counts.get(leaving, 0) > ends.target_counts.get(leaving, 0):
                yield entering, leaving


def _edges_from(
    ends: Endpoints, sp: Species, iso: Isomer, counts: Mapping[str, int]
) -> Iterator[tuple[str, str, Attributes]]:
    """One edge per (entering, leaving, product) out of one node, weighted by its leaving sites."""
    for entering, leaving in _replacements(ends, counts):
        p = predict_in_space(ends.space, sp, iso, entering, (leaving,), _STATISTICAL)
        per: dict[str, list[int]] = {}
        for ch in p.sites:
            per.setdefault(ch.product.isomer, []).append(ch.site)
        pform = p.sites[0].product.formula
        for pid in sorted(per, key=lambda x: (len(x), x)):
            yield (
                node_id(sp.formula, iso.id),
                node_id(pform, pid),
                (
                    ("entering", entering),
                    ("leaving", leaving),
                    ("weight", len(per[pid])),
                    ("share", str(Fraction(len(per[pid]), len(p.sites)))),
                    ("sites", ",".join(str(s + 1) for s in sorted(per[pid]))),
                ),
            )


def build_network(
    start_text: str, target_text: str, *, geometry: str | None = None, rules: Sequence[str] = ()
) -> Network:
    """The substitution network from the start's composition to the target's.

    Descriptors written on the formulas are ignored here: every stereoisomer
    of every composition on the way is a node.

    Parameters
    ----------
    start_text, target_text : str
        Formulas, e.g. '[PtCl4]2-' and '[PtCl2(NH3)2]'.
    geometry : str, optional
        Polyhedral symbol (default: chosen from the start).
    rules : sequence of str
        User rule folders (``--rules DIR``).

    Returns
    -------
    Network

    Raises
    ------
    InputError
        As :func:`~enumerator.routes.space.prepare_endpoints`.
    """
    ends = prepare_endpoints(start_text, target_text, geometry, load_rules(rules))
    levels = _levels(ends)
    last = max(levels)
    nodes: list[tuple[str, Attributes]] = []
    edges: list[tuple[str, str, Attributes]] = []
    comps: list[tuple[str, int]] = []
    for level in sorted(levels):
        for counts in sorted(levels[level], key=lambda c: sorted(c.items())):
            sp = ends.space.species(counts)
            comps.append((sp.formula, sp.isomer_set.stereoisomers))
            for iso in sp.isomer_set.isomers:
                nodes.append(_node(sp, iso, level))
                if level != last:
                    edges.extend(_edges_from(ends, sp, iso, counts))
    return Network(
        ends.geometry.symbol,
        ends.start.formula,
        ends.target.formula,
        tuple(nodes),
        tuple(edges),
        tuple(comps),
        safety_lines(ends.space.kinds.values()),
    )
