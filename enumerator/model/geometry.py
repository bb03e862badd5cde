"""Coordination geometries: ideal site directions, the symmetry group derived
from them, and the site graph.

The symmetry group of a geometry is never typed in.  It is found by asking
which orthogonal maps send the set of site vectors onto itself: a map is
fixed by the images of two non-collinear sites, so only pairs of sites with
the same angle need be tried, each once as a rotation and once as a
rotation-reflection.

>>> from enumerator.rules.ruleset import load_rules
>>> oc = load_rules().geometry("OC-6")
>>> len(oc.operations), oc.point_group
(48, 'Oh')
>>> sorted({d["relation"] for _, _, d in oc.site_graph().edges(data=True)})
['cis', 'trans']
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from functools import cache, cached_property

import numpy as np

from enumerator.symmetry.operations import SymOp, schoenflies

__all__ = ["Geometry", "derive_operations", "polyhedron_edges", "SPANS", "TRANS_ANGLE"]

#: Pairs of sites at or above this angle (degrees) are trans.
TRANS_ANGLE = 179.0
#: The span settings a chelate link may take.
SPANS = ("edge", "cis", "trans", "any")

Vec = tuple[float, float, float]


@dataclass(frozen=True)
class Geometry:
    """An ideal coordination polyhedron.

    ``vectors`` are unit site directions from the metal, in the order of the
    rule file; sites are numbered 0..n-1 in the API and 1..n in tables.
    """

    symbol: str
    name: str
    vectors: tuple[Vec, ...]
    default_span: str = "edge"
    fluxional: bool = False
    note: str = ""
    default_for_abstract: bool = False
    source: str = ""

    @property
    def coordination_number(self) -> int:
        return len(self.vectors)

    @cached_property
    def linear(self) -> bool:
        """All sites on one line: the group is infinite (D∞h or C∞v)."""
        return _is_collinear(self.vectors)

    @cached_property
    def operations(self) -> tuple[SymOp, ...]:
        """Every symmetry operation (proper and improper), identity first."""
        return derive_operations(self.vectors)

    @cached_property
    def proper_operations(self) -> tuple[SymOp, ...]:
        return tuple(op for op in self.operations if op.proper)

    @cached_property
    def point_group(self) -> str:
        """Point group of the bare polyhedron (all sites alike)."""
        if self.linear:
            return "Dinfh"
        return schoenflies([op.array for op in self.operations])

    @cached_property
    def angles(self) -> np.ndarray:
        """n x n matrix of inter-site angles in degrees."""
        v = np.array(self.vectors)
        c = np.clip(v @ v.T, -1.0, 1.0)
        return np.degrees(np.arccos(c))

    @cached_property
    def edges(self) -> frozenset[tuple[int, int]]:
        """Polyhedron edges as sorted site pairs."""
        return polyhedron_edges(self.vectors)

    def relation(self, i: int, j: int) -> str:
        """'trans' or 'cis' for two distinct sites."""
        return "trans" if self.angles[i, j] >= TRANS_ANGLE else "cis"

    def span_ok(self, span: str, i: int, j: int) -> bool:
        """Whether a chelate link with the given span setting may join sites i and j."""
        if i == j:
            return False
        if span == "edge":
            return (min(i, j), max(i, j)) in self.edges
        if span == "cis":
            return self.relation(i, j) == "cis"
        if span == "trans":
            return self.relation(i, j) == "trans"
        return True

    def site_graph(self):
        """The site graph (networkx): one node per site with its ``position``;
        one edge per pair with ``angle`` (degrees), ``relation`` ('cis' or
        'trans') and ``polyhedron_edge`` (bool)."""
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


def _is_collinear(vectors: tuple[Vec, ...]) -> bool:
    v = np.array(vectors)
    return bool(np.linalg.matrix_rank(v, tol=1e-6) <= 1)


def _frame(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    e1 = a
    e2 = b - np.dot(a, b) * a
    e2 = e2 / np.linalg.norm(e2)
    return np.column_stack([e1, e2, np.cross(e1, e2)])


def _site_permutation(m: np.ndarray, v: np.ndarray) -> tuple[int, ...] | None:
    img = v @ m.T
    d = np.linalg.norm(img[:, None, :] - v[None, :, :], axis=2)
    perm = np.argmin(d, axis=1)
    if np.any(d[np.arange(len(v)), perm] > 1e-5) or len(set(perm.tolist())) != len(v):
        return None
    return tuple(int(p) for p in perm)


def _clean(m: np.ndarray) -> tuple[tuple[float, float, float], ...]:
    r = np.where(np.abs(m) < 1e-12, 0.0, m)
    return tuple(tuple(float(x) for x in row) for row in r)  # type: ignore[return-value]


@cache
def derive_operations(vectors: tuple[Vec, ...]) -> tuple[SymOp, ...]:
    """All orthogonal maps that send the site set onto itself, with the site
    permutation each induces; cached by the vectors' values.

    For a collinear pair (L-2) the true group D∞h is infinite; its action on
    the two sites is carried by the finite subgroup D2h aligned with the
    axis, and :attr:`Geometry.linear` tells callers to name groups as the
    infinite ones.
    """
    v = np.array(vectors, dtype=float)
    n = len(v)
    if n == 0:
        return ()
    found: dict[tuple[int, ...] | tuple, SymOp] = {}
    if _is_collinear(vectors):
        z = v[0] / np.linalg.norm(v[0])
        x = np.cross(z, [1.0, 0.0, 0.0])
        if np.linalg.norm(x) < 1e-6:
            x = np.cross(z, [0.0, 1.0, 0.0])
        x = x / np.linalg.norm(x)
        y = np.cross(z, x)
        basis = np.column_stack([x, y, z])
        mats = []
        for d in itertools.product((1, -1), repeat=3):
            mats.append(basis @ np.diag(d) @ basis.T)
    else:
        a = v[0]
        b = next(w for w in v[1:] if np.linalg.norm(np.cross(a, w)) > 1e-6)
        ab = float(np.dot(a, b))
        e = _frame(a, b)
        mats = []
        for i in range(n):
            for j in range(n):
                if i == j or abs(float(np.dot(v[i], v[j])) - ab) > 1e-6:
                    continue
                f = _frame(v[i], v[j])
                mats.append(f @ e.T)
                f[:, 2] *= -1
                mats.append(f @ e.T)
    for m in mats:
        perm = _site_permutation(m, v)
        if perm is None:
            continue
        key = tuple(np.round(m, 6).ravel().tolist())
        if key not in found:
            found[key] = SymOp(_clean(m), perm)
    ops = list(found.values())
    ident = tuple(range(n))

    def sort_key(op: SymOp):
        info = op.info
        return (op.perm != ident or not op.proper, not op.proper, info.kind, info.order, info.power, op.perm, op.matrix)

    ops.sort(key=sort_key)
    return tuple(ops)


@cache
def polyhedron_edges(vectors: tuple[Vec, ...]) -> frozenset[tuple[int, int]]:
    """Edges of the convex polyhedron (or polygon) spanned by the site tips.

    A face is a plane through three tips with every tip on one side; its
    tips, taken in order round the face, give its edges.  Coplanar tips form
    one polygon.  Fewer than three tips have no edges.
    """
    v = np.array(vectors, dtype=float)
    n = len(v)
    edges: set[tuple[int, int]] = set()
    if n < 3 or _is_collinear(vectors):
        return frozenset()
    faces: set[frozenset[int]] = set()
    for i, j, k in itertools.combinations(range(n), 3):
        nrm = np.cross(v[j] - v[i], v[k] - v[i])
        if np.linalg.norm(nrm) < 1e-9:
            continue
        nrm = nrm / np.linalg.norm(nrm)
        d = v @ nrm - float(np.dot(nrm, v[i]))
        if np.all(d <= 1e-6) or np.all(d >= -1e-6):
            faces.add(frozenset(int(x) for x in np.nonzero(np.abs(d) <= 1e-6)[0]))
    for face in faces:
        pts = sorted(face)
        if len(pts) == 2:
            edges.add((pts[0], pts[1]))
            continue
        c = v[pts].mean(axis=0)
        nrm = np.cross(v[pts[1]] - v[pts[0]], v[pts[2]] - v[pts[0]])
        nrm = nrm / np.linalg.norm(nrm)
        u = v[pts[0]] - c
        u = u / np.linalg.norm(u)
        w = np.cross(nrm, u)
        ang = {p: math.atan2(float(np.dot(v[p] - c, w)), float(np.dot(v[p] - c, u))) for p in pts}
        ring = sorted(pts, key=lambda p: ang[p])
        for a, b in zip(ring, ring[1:] + ring[:1]):
            edges.add((min(a, b), max(a, b)))
    return frozenset(edges)
