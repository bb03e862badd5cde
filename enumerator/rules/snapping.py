"""Typed-in site vectors made exactly symmetric: find the symmetry they nearly have, and snap to it.

A geometry file written by hand gives its vectors to a few significant
figures (``[-0.5, 0.866, 0]``), and the derivation of its group
(:func:`enumerator.symmetry.derive.derive_operations`, tolerance
:data:`~enumerator.tolerances.OPERATION_MATCH_TOL`) then misses operations:
a trigonal bipyramid typed that way comes out C2v instead of D3h, and every
isomer count made on it is wrong.  This module finds the larger group such
vectors almost have and moves them onto it.

1. **Near-symmetry.**  Every orthogonal map that sends each site tip to
   within :data:`~enumerator.tolerances.SITE_SNAP_TOL` of a tip is found the
   way the exact derivation finds them (a map is fixed by the images of two
   sites), except that each candidate's site permutation is then re-fitted
   over all sites at once (the orthogonal Procrustes problem, solved by a
   singular value decomposition: P. H. Schönemann, *Psychometrika* 31 (1966) 1)
   and kept when every fitted tip lies within the tolerance.
2. **Ambiguity.**  The near-symmetry is refused as ambiguous when the maps
   found do not form a group, or when a looser tolerance
   (:data:`~enumerator.tolerances.SITE_AMBIGUITY_TOL`) finds a larger group
   still: the vectors are then neither clearly that symmetric nor clearly
   not, and the user is asked for more figures or a clearer distortion.
3. **Snapping.**  The vectors are averaged over the group -- each replaced by
   the mean of its images under the fitted operations, every map re-fitted
   and the averaging repeated until nothing moves (the group-averaging,
   Reynolds, projection onto the symmetric configurations, iterated because
   the fitted matrices are themselves approximate) -- then turned back as
   close to the vectors given as a rotation allows.  The exact derivation
   must then find the whole group.

:func:`snap_sites` returns the snapped vectors and how far each moved; the
geometry loader reports them (``Geometry.adjusted``).

>>> import math
>>> typed = ((0, 0, 1), (1, 0, 0), (-0.5, 0.866, 0), (-0.5, -0.866, 0), (0, 0, -1))  # a TBPY-5, 3 figures
>>> unit = tuple(tuple(x / math.hypot(*v) for x in v) for v in typed)
>>> s = snap_sites(unit)
>>> s.exact_order, s.order, f"{max(s.moves):.1e}", abs(s.vectors[2][1] - math.sqrt(3) / 2) < 1e-12
(4, 12, '1.3e-05', True)
"""

from __future__ import annotations

import numpy as np

from enumerator.frozen import frozen_dataclass
from enumerator.symmetry.derive import Vec, derive_operations, is_collinear
from enumerator.tolerances import SITE_AMBIGUITY_TOL, SITE_SNAP_TOL

__all__ = ["Snap", "Ambiguous", "snap_sites", "near_permutations"]

#: Iterations of the averaging before it is given up (it converges in a handful).
_MAX_ROUNDS = 200
#: The averaging stops when no vector moves more than this in a round.
_CONVERGED = 1e-15


class Ambiguous(ValueError):
    """The vectors are near two different symmetries, or near a set of maps that is not a group."""


@frozen_dataclass
class Snap:
    """Vectors made exactly symmetric.

    ``vectors`` are the snapped unit vectors (the ones given when nothing
    moved), ``order`` the order of the group found, ``exact_order`` that of
    the group the vectors had as given, ``moves`` the distance each vector
    moved (in unit-vector lengths).
    """

    vectors: tuple[Vec, ...]
    order: int
    exact_order: int
    moves: tuple[float, ...]

    @property
    def moved(self) -> bool:
        """Whether the vectors were changed (the group found is larger than the one they had)."""
        return self.order > self.exact_order


def _procrustes(a: np.ndarray, b: np.ndarray, improper: bool) -> np.ndarray:
    """The orthogonal matrix R (det -1 when ``improper``) that best sends the rows of ``a`` onto those of ``b``."""
    u, _, vt = np.linalg.svd(b.T @ a)
    d = np.ones(3)
    if (np.linalg.det(u @ vt) < 0) != improper:
        d[2] = -1.0
    return u @ np.diag(d) @ vt


def _frame(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    e2 = b - np.dot(a, b) * a
    e2 = e2 / np.linalg.norm(e2)
    return np.column_stack([a, e2, np.cross(a, e2)])


def _assign(img: np.ndarray, v: np.ndarray, tol: float) -> tuple[int, ...] | None:
    """The site each image lands on (nearest tip within ``tol``), when that is a permutation."""
    d = np.linalg.norm(img[:, None, :] - v[None, :, :], axis=2)
    perm = np.argmin(d, axis=1)
    if np.any(d[np.arange(len(v)), perm] > tol) or len(set(perm.tolist())) != len(v):
        return None
    return tuple(int(p) for p in perm)


def near_permutations(vectors: np.ndarray, tol: float) -> frozenset[tuple[tuple[int, ...], bool]]:
    """The operations, as (site permutation, improper), of orthogonal maps that send every tip within ``tol``
    of a tip.

    Parameters
    ----------
    vectors : ndarray, shape (n, 3)
        Unit site vectors, not all on one line.
    tol : float
        Largest distance of a mapped tip from the tip it lands on, in unit-vector lengths.

    Returns
    -------
    frozenset of (tuple of int, bool)
        Site ``i`` goes to ``perm[i]``; the flag is True for a rotation-reflection.  Sites in one plane have
        every permutation twice, once with each flag (the plane is a mirror).
    """
    v = vectors
    n = len(v)
    a = v[0]
    b = v[int(np.argmax(np.linalg.norm(np.cross(a, v), axis=1)))]  # the best-conditioned partner of site 0
    ab = float(np.dot(a, b))
    e = _frame(a, b)
    found: set[tuple[tuple[int, ...], bool]] = set()
    for i in range(n):
        for j in range(n):
            if i == j or abs(float(np.dot(v[i], v[j])) - ab) > 4 * tol:
                continue
            if np.linalg.norm(np.cross(v[i], v[j])) < 1e-9:
                continue
            f = _frame(v[i], v[j])
            for improper in (False, True):
                g = f.copy()
                if improper:
                    g[:, 2] *= -1
                perm = _assign(v @ (g @ e.T).T, v, 4 * tol)
                if perm is None:
                    continue
                for flag in (False, True):  # the fitted map may come out either way for sites in a plane
                    if (perm, flag) in found:
                        continue
                    r = _procrustes(v, v[list(perm)], flag)
                    if np.max(np.linalg.norm(v @ r.T - v[list(perm)], axis=1)) <= tol:
                        found.add((perm, flag))
    return frozenset(found)


def _is_group(ops: frozenset[tuple[tuple[int, ...], bool]]) -> bool:
    return all((tuple(p[k] for k in q), fp != fq) in ops for p, fp in ops for q, fq in ops)


def _average(v: np.ndarray, ops: frozenset[tuple[tuple[int, ...], bool]]) -> np.ndarray:
    """Iterate the group average until the vectors stop moving."""
    w = v.copy()
    for _ in range(_MAX_ROUNDS):
        acc = np.zeros_like(w)
        for perm, improper in ops:
            target = w[list(perm)]
            r = _procrustes(w, target, improper)
            acc += target @ r  # row i: R^T w_perm(i), the image of site i brought back
        new = acc / len(ops)
        new /= np.linalg.norm(new, axis=1)[:, None]
        step = float(np.max(np.linalg.norm(new - w, axis=1)))
        w = new
        if step < _CONVERGED:
            break
    r = _procrustes(w, v, False)  # turn the snapped set back as near the given one as a rotation allows
    return w @ r.T


def _order_at(v: np.ndarray, tol: float) -> tuple[frozenset[tuple[tuple[int, ...], bool]], bool]:
    ops = near_permutations(v, tol)
    return ops, _is_group(ops)


def snap_sites(vectors: tuple[Vec, ...]) -> Snap:
    """Find the symmetry the site vectors nearly have and make them have it exactly.

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        Unit site directions (as read, normalised), at least two.

    Returns
    -------
    Snap
        The vectors unchanged (``moved`` False) when they already have every near-symmetry.

    Raises
    ------
    Ambiguous
        The maps within :data:`~enumerator.tolerances.SITE_SNAP_TOL` do not form a group, a looser tolerance
        (:data:`~enumerator.tolerances.SITE_AMBIGUITY_TOL`) finds more symmetry, or the averaged vectors do not
        have the whole group; the message says which.
    """
    v = np.array(vectors, dtype=float)
    exact = len(derive_operations(tuple(vectors)))
    if len(v) < 2 or is_collinear(vectors):
        return Snap(tuple(vectors), exact, exact, (0.0,) * len(v))
    axis = np.linalg.svd(v)[2][0]
    off_axis = np.linalg.norm(v - np.outer(v @ axis, axis), axis=1)
    if np.max(off_axis) <= SITE_SNAP_TOL:  # nearly on one line: put them on it
        line = np.outer(np.sign(v @ axis), axis)
        return _snapped(vectors, line, len(derive_operations(_tuple(line))), exact)
    ops, closed = _order_at(v, SITE_SNAP_TOL)
    if not closed:
        raise Ambiguous(
            f"the maps that nearly send the sites onto themselves (within {SITE_SNAP_TOL:g}) do not form a group"
        )
    loose, _ = _order_at(v, SITE_AMBIGUITY_TOL)
    if len(loose) > len(ops):
        raise Ambiguous(
            f"the sites have {len(ops)} symmetry operations within {SITE_SNAP_TOL:g} but "
            f"{len(loose)} within {SITE_AMBIGUITY_TOL:g}"
        )
    if len(ops) <= exact:
        return Snap(tuple(vectors), exact, exact, (0.0,) * len(v))
    w = _average(v, ops)
    return _snapped(vectors, w, len(ops), exact)


def _tuple(w: np.ndarray) -> tuple[Vec, ...]:
    return tuple((float(x), float(y), float(z)) for x, y, z in w)


def _snapped(vectors: tuple[Vec, ...], w: np.ndarray, order: int, exact: int) -> Snap:
    snapped = _tuple(w)
    got = len(derive_operations(snapped))
    if got != order:
        raise Ambiguous(f"the averaged sites have {got} symmetry operations, not the {order} found near them")
    moves = tuple(float(np.linalg.norm(np.array(a) - np.array(b))) for a, b in zip(snapped, vectors))
    if max(moves) > SITE_SNAP_TOL:
        raise Ambiguous(f"making the sites symmetric would move one by {max(moves):.2g}")
    return Snap(snapped, order, exact, moves)
