"""Symmetry derived from site directions: the operations and the polyhedron edges.

A geometry's group is never typed in.  It is found by asking which orthogonal
maps send the set of site vectors onto itself: a map is fixed by the images of
two non-collinear sites, so only pairs of sites with the same angle need be
tried, each once as a rotation and once as a rotation-reflection.  Everything
here is a pure function of the vectors (cached by their values).

>>> import math
>>> s = 1 / math.sqrt(3)
>>> tetra = ((s, s, s), (s, -s, -s), (-s, s, -s), (-s, -s, s))
>>> len(derive_operations(tetra)), len(polyhedron_edges(tetra))
(24, 6)
>>> derive_operations(tetra)[0].perm
(0, 1, 2, 3)
>>> is_collinear(((0.0, 0.0, 1.0), (0.0, 0.0, -1.0)))
True
"""

from __future__ import annotations

import itertools
import math

import numpy as np

from enumerator.caches import cached
from enumerator.symmetry import known
from enumerator.symmetry.operations import SymOp
from enumerator.tolerances import (
    DEGENERATE_FACE_TOL,
    FACE_TOL,
    KEY_DECIMALS,
    NOISE_FLOOR,
    OPERATION_MATCH_TOL,
    VECTOR_TOL,
)

__all__ = ["derive_operations", "derive_operations_afresh", "polyhedron_edges", "is_collinear", "Vec"]

#: One site direction (a unit vector from the metal).
Vec = tuple[float, float, float]
Matrix = tuple[Vec, Vec, Vec]


def is_collinear(vectors: tuple[Vec, ...]) -> bool:
    """Whether all site vectors lie on one line (a linear centre, whose group is infinite).

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        Site directions.

    Returns
    -------
    bool
        True when the vectors span at most one dimension (rank tolerance ``VECTOR_TOL``).
    """
    v = np.array(vectors)
    return bool(np.linalg.matrix_rank(v, tol=VECTOR_TOL) <= 1)


def _frame(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    e1 = a
    e2 = b - np.dot(a, b) * a
    e2 = e2 / np.linalg.norm(e2)
    return np.column_stack([e1, e2, np.cross(e1, e2)])


def _site_permutation(m: np.ndarray, v: np.ndarray) -> tuple[int, ...] | None:
    img = v @ m.T
    d = np.linalg.norm(img[:, None, :] - v[None, :, :], axis=2)
    perm = np.argmin(d, axis=1)
    if np.any(d[np.arange(len(v)), perm] > OPERATION_MATCH_TOL) or len(set(perm.tolist())) != len(v):
        return None
    return tuple(int(p) for p in perm)


def _clean(m: np.ndarray) -> Matrix:
    r = np.where(np.abs(m) < NOISE_FLOOR, 0.0, m)
    rows = [(float(row[0]), float(row[1]), float(row[2])) for row in r]
    return (rows[0], rows[1], rows[2])


def _linear_candidates(v: np.ndarray) -> list[np.ndarray]:
    """The eight sign changes of a frame with z along the line: the D2h subgroup
    that carries the infinite group's action on the sites."""
    z = v[0] / np.linalg.norm(v[0])
    x = np.cross(z, [1.0, 0.0, 0.0])
    if np.linalg.norm(x) < VECTOR_TOL:
        x = np.cross(z, [0.0, 1.0, 0.0])
    x = x / np.linalg.norm(x)
    y = np.cross(z, x)
    basis = np.column_stack([x, y, z])
    return [basis @ np.diag(d) @ basis.T for d in itertools.product((1, -1), repeat=3)]


def _pair_candidates(v: np.ndarray) -> list[np.ndarray]:
    """Maps sending a fixed non-collinear pair of sites onto every pair with the
    same angle, as a rotation and as a rotation-reflection."""
    n = len(v)
    a = v[0]
    b = next(w for w in v[1:] if np.linalg.norm(np.cross(a, w)) > VECTOR_TOL)
    ab = float(np.dot(a, b))
    e = _frame(a, b)
    mats = []
    for i in range(n):
        for j in range(n):
            if i == j or abs(float(np.dot(v[i], v[j])) - ab) > VECTOR_TOL:
                continue
            f = _frame(v[i], v[j])
            mats.append(f @ e.T)
            f[:, 2] *= -1
            mats.append(f @ e.T)
    return mats


@cached(maxsize=None)
def derive_operations(vectors: tuple[Vec, ...]) -> tuple[SymOp, ...]:
    """All orthogonal maps that send the site set onto itself, with the site
    permutation each induces; cached by the vectors' values.

    For a collinear pair (L-2) the true group D∞h is infinite; its action on
    the two sites is carried by the finite subgroup D2h aligned with the
    axis, and ``Geometry.linear`` tells callers to name groups as the
    infinite ones.

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        Unit site directions.

    Returns
    -------
    tuple of SymOp
        Every operation once, the identity first, then proper before improper
        operations, each group sorted by kind, order, power and permutation.
        Vectors a stored source holds (:mod:`enumerator.symmetry.known`: the built-in geometries) are
        answered from it; the store's test holds it equal to :func:`derive_operations_afresh`.
    """
    stored = known.operations(vectors)
    return derive_operations_afresh(vectors) if stored is None else stored


def derive_operations_afresh(vectors: tuple[Vec, ...]) -> tuple[SymOp, ...]:
    """:func:`derive_operations` derived now, never from a store and not cached (what the store is written from).

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        Unit site directions.

    Returns
    -------
    tuple of SymOp
        As :func:`derive_operations`.
    """
    v = np.array(vectors, dtype=float)
    n = len(v)
    if n == 0:
        return ()
    mats = _linear_candidates(v) if is_collinear(vectors) else _pair_candidates(v)
    found: dict[tuple[float, ...], SymOp] = {}
    for m in mats:
        perm = _site_permutation(m, v)
        if perm is None:
            continue
        key = tuple(np.round(m, KEY_DECIMALS).ravel().tolist())
        if key not in found:
            found[key] = SymOp(_clean(m), perm)
    ident = tuple(range(n))

    def sort_key(op: SymOp):
        info = op.info
        return (op.perm != ident or not op.proper, not op.proper, info.kind, info.order, info.power, op.perm, op.matrix)

    return tuple(sorted(found.values(), key=sort_key))


def _faces(v: np.ndarray) -> set[frozenset[int]]:
    """The tip sets of the hull's faces: planes through three tips with every tip on one side."""
    faces: set[frozenset[int]] = set()
    for i, j, k in itertools.combinations(range(len(v)), 3):
        nrm = np.cross(v[j] - v[i], v[k] - v[i])
        if np.linalg.norm(nrm) < DEGENERATE_FACE_TOL:
            continue
        nrm = nrm / np.linalg.norm(nrm)
        d = v @ nrm - float(np.dot(nrm, v[i]))
        if np.all(d <= FACE_TOL) or np.all(d >= -FACE_TOL):
            faces.add(frozenset(int(x) for x in np.nonzero(np.abs(d) <= FACE_TOL)[0]))
    return faces


def _ring(v: np.ndarray, pts: list[int]) -> list[int]:
    """The tips of one face in order round it (by angle about the face normal)."""
    c = v[pts].mean(axis=0)
    nrm = np.cross(v[pts[1]] - v[pts[0]], v[pts[2]] - v[pts[0]])
    nrm = nrm / np.linalg.norm(nrm)
    u = v[pts[0]] - c
    u = u / np.linalg.norm(u)
    w = np.cross(nrm, u)
    ang = {p: math.atan2(float(np.dot(v[p] - c, w)), float(np.dot(v[p] - c, u))) for p in pts}
    return sorted(pts, key=lambda p: ang[p])


@cached(maxsize=None)
def polyhedron_edges(vectors: tuple[Vec, ...]) -> frozenset[tuple[int, int]]:
    """Edges of the convex polyhedron (or polygon) spanned by the site tips.

    A face is a plane through three tips with every tip on one side; its
    tips, taken in order round the face, give its edges.  Coplanar tips form
    one polygon.  Fewer than three tips have no edges.

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        Unit site directions.

    Returns
    -------
    frozenset of (int, int)
        Edges as sorted pairs of site indices (0-based).
    """
    v = np.array(vectors, dtype=float)
    if len(v) < 3 or is_collinear(vectors):
        return frozenset()
    edges: set[tuple[int, int]] = set()
    for face in _faces(v):
        pts = sorted(face)
        if len(pts) == 2:
            edges.add((pts[0], pts[1]))
            continue
        ring = _ring(v, pts)
        for a, b in zip(ring, ring[1:] + ring[:1]):
            edges.add((min(a, b), max(a, b)))
    return frozenset(edges)
