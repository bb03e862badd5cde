"""Coordination geometries: ideal site directions, the symmetry group derived
from them, and the site graph.

The symmetry group of a geometry is never typed in: the operations and the
polyhedron edges are derived from the site vectors by
:mod:`enumerator.symmetry.derive` (pure functions of the vectors, cached by
their values); this module holds the geometry as a value and the relations
chemists read off it (cis/trans, chelate spans, the site graph).

>>> from enumerator.rules.ruleset import load_rules
>>> oc = load_rules().geometry("OC-6")
>>> len(oc.operations), oc.point_group
(48, 'Oh')
>>> sorted({d["relation"] for _, _, d in oc.site_graph().edges(data=True)})
['cis', 'trans']
"""

from __future__ import annotations

import itertools
from functools import cached_property
from typing import Any

import numpy as np

from enumerator.frozen import frozen_dataclass
from enumerator.symmetry.derive import Vec, derive_operations, is_collinear, polyhedron_edges
from enumerator.symmetry.operations import SymOp, schoenflies
from enumerator.tolerances import TRANS_ANGLE_DEG

# derive_operations and polyhedron_edges are re-exported: they live in enumerator.symmetry.derive
__all__ = ["Geometry", "derive_operations", "polyhedron_edges", "SPANS", "TRANS_ANGLE"]

#: Pairs of sites at or above this angle (degrees) are trans; see :data:`enumerator.tolerances.TRANS_ANGLE_DEG`.
TRANS_ANGLE = TRANS_ANGLE_DEG
#: The span settings a chelate link may take.
SPANS = ("edge", "cis", "trans", "any")


@frozen_dataclass
class Geometry:
    """An ideal coordination polyhedron.

    ``vectors`` are unit site directions from the metal, in the order of the
    rule file; sites are numbered 0..n-1 in the API and 1..n in tables.
    ``adjusted`` says how the rule file's vectors were symmetrised when they
    were read (empty when they were used as given).
    """

    symbol: str
    name: str
    vectors: tuple[Vec, ...]
    default_span: str = "edge"
    fluxional: bool = False
    note: str = ""
    default_for_abstract: bool = False
    source: str = ""
    adjusted: str = ""

    @property
    def coordination_number(self) -> int:
        """The number of sites."""
        return len(self.vectors)

    @cached_property
    def linear(self) -> bool:
        """All sites on one line: the group is infinite (D∞h or C∞v)."""
        return is_collinear(self.vectors)

    @cached_property
    def operations(self) -> tuple[SymOp, ...]:
        """Every symmetry operation (proper and improper), identity first."""
        return derive_operations(self.vectors)

    @cached_property
    def proper_operations(self) -> tuple[SymOp, ...]:
        """The rotations among :attr:`operations` (determinant +1), identity first."""
        return tuple(op for op in self.operations if op.proper)

    @cached_property
    def point_group(self) -> str:
        """Point group of the bare polyhedron (all sites alike)."""
        if self.linear:
            return "Dinfh"
        return schoenflies([op.array for op in self.operations])

    @cached_property
    def angles(self) -> np.ndarray:
        """n x n matrix of inter-site angles in degrees (read-only)."""
        v = np.array(self.vectors)
        c = np.clip(v @ v.T, -1.0, 1.0)
        out = np.degrees(np.arccos(c))
        out.setflags(write=False)
        return out

    @cached_property
    def edges(self) -> frozenset[tuple[int, int]]:
        """Polyhedron edges as sorted site pairs."""
        return polyhedron_edges(self.vectors)

    def relation(self, i: int, j: int) -> str:
        """Whether two distinct sites are trans or cis.

        Parameters
        ----------
        i, j : int
            Site indices (0-based).

        Returns
        -------
        str
            'trans' at or above :data:`TRANS_ANGLE` degrees, else 'cis'.
        """
        return "trans" if self.angles[i, j] >= TRANS_ANGLE else "cis"

    def span_ok(self, span: str, i: int, j: int) -> bool:
        """Whether a chelate link with the given span setting may join two sites.

        Parameters
        ----------
        span : str
            'edge' (along a polyhedron edge), 'cis', 'trans' or 'any'.
        i, j : int
            Site indices (0-based).

        Returns
        -------
        bool
            False for ``i == j``.
        """
        if i == j:
            return False
        if span == "edge":
            return (min(i, j), max(i, j)) in self.edges
        if span == "cis":
            return self.relation(i, j) == "cis"
        if span == "trans":
            return self.relation(i, j) == "trans"
        return True

    def site_graph(self) -> Any:
        """The site graph.

        Returns
        -------
        networkx.Graph
            One node per site with its ``position``; one edge per pair with
            ``angle`` (degrees), ``relation`` ('cis' or 'trans') and
            ``polyhedron_edge`` (bool).
        """
        import networkx as nx

        g = nx.Graph(symbol=self.symbol)
        for i, v in enumerate(self.vectors):
            g.add_node(i, position=v)
        for i, j in itertools.combinations(range(len(self.vectors)), 2):
            g.add_edge(
                i,
                j,
                angle=round(float(self.angles[i, j]), 4),
                relation=self.relation(i, j),
                polyhedron_edge=(i, j) in self.edges,
            )
        return g
