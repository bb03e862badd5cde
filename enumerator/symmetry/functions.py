"""The functions column of a character table, found by projection.

Nothing is looked up: for each species the projector

    P = (d / parts) / |G| * sum_g chi(g) D(g)

is applied to x, y, z (D the matrices themselves), to the rotations Rx, Ry,
Rz (D = det(g) g, an axial vector) and to the six quadratic monomials (D the
symmetric square).  Named candidates (monomials, then x2+y2, x2+y2+z2,
x2-y2, 2z2-x2-y2) are picked greedily, keeping only those that lie in the
image and are independent of those already kept, until the image is spanned.
A degenerate species' functions are then split into partner sets, each
spanning an invariant subspace, e.g. (x, y) and (Rx, Ry) in Eu / Eg of D4h.

>>> import numpy as np
>>> c2 = np.diag([-1.0, -1.0, 1.0]); sxz = np.diag([1.0, -1.0, 1.0])
>>> mats = [np.eye(3), c2, sxz, c2 @ sxz]
>>> b1 = np.array([1.0, -1.0, 1.0, -1.0])   # one character per class; here each operation is its own class
>>> function_sets(mats, [b1], [1], [0, 1, 2, 3])
((('x',), ('Ry',), ('xz',)),)
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence

import numpy as np

from enumerator.symmetry.operations import GroupIdentificationError
from enumerator.tolerances import PROJECTION_TOL

__all__ = ["function_sets", "DISPLAY_ORDER"]

_LIN = ("x", "y", "z")
_ROT = ("Rx", "Ry", "Rz")
_QUAD_BASIS = ((0, 0), (1, 1), (2, 2), (0, 1), (0, 2), (1, 2))
_QUAD_CANDS = (
    ("x2", [1, 0, 0, 0, 0, 0]),
    ("y2", [0, 1, 0, 0, 0, 0]),
    ("z2", [0, 0, 1, 0, 0, 0]),
    ("xy", [0, 0, 0, 1, 0, 0]),
    ("xz", [0, 0, 0, 0, 1, 0]),
    ("yz", [0, 0, 0, 0, 0, 1]),
    ("x2+y2", [1, 1, 0, 0, 0, 0]),
    ("x2+y2+z2", [1, 1, 1, 0, 0, 0]),
    ("x2-y2", [1, -1, 0, 0, 0, 0]),
    ("2z2-x2-y2", [-1, -1, 2, 0, 0, 0]),
)
#: The order in which functions are listed in a species' row.
DISPLAY_ORDER = (
    "x",
    "y",
    "z",
    "Rx",
    "Ry",
    "Rz",
    "x2+y2+z2",
    "x2+y2",
    "x2",
    "y2",
    "z2",
    "2z2-x2-y2",
    "x2-y2",
    "xy",
    "xz",
    "yz",
)


def _quad_matrix(m: np.ndarray) -> np.ndarray:
    """Action on (x2, y2, z2, xy, xz, yz): coordinate x_i goes to sum_j m[j, i] x_j."""
    out = np.zeros((6, 6))
    for col, (i, k) in enumerate(_QUAD_BASIS):
        poly = np.outer(m[:, i], m[:, k])  # coefficient of x_j x_q
        sym = poly + poly.T
        for row, (j, q) in enumerate(_QUAD_BASIS):
            out[row, col] = poly[j, j] if j == q else sym[j, q]
    return out


def _named_basis(P: np.ndarray, cands) -> list[tuple[str, np.ndarray]]:
    """Candidates in the image of the projector P, independent, until its rank is reached."""
    rank = int(round(float(np.trace(P))))
    if rank <= 0:
        return []
    chosen: list[tuple[str, np.ndarray]] = []
    for nm, v in cands:
        if np.linalg.norm(P @ v - v) > PROJECTION_TOL:
            continue
        trial = np.array([c[1] for c in chosen] + [v])
        if np.linalg.matrix_rank(trial, tol=PROJECTION_TOL) == len(trial):
            chosen.append((nm, v))
        if len(chosen) == rank:
            break
    if len(chosen) != rank:
        raise GroupIdentificationError("basis functions could not be named")
    return chosen


def function_sets(
    mats: Sequence[np.ndarray],
    chars: Sequence[np.ndarray],
    parts: Sequence[int],
    class_of: Sequence[int],
) -> tuple[tuple[tuple[str, ...], ...], ...]:
    """The functions of every species, grouped into partner sets.

    Parameters
    ----------
    mats : sequence of ndarray, shape (3, 3)
        Every operation, in the frame the functions refer to (z the principal axis).
    chars : sequence of ndarray
        Per species, its real characters, one per class.
    parts : sequence of int
        Per species, 1, or 2 for a joined complex-conjugate pair.
    class_of : sequence of int
        Per operation, its class position in ``chars``.

    Returns
    -------
    tuple
        Per species, a tuple of partner sets (tuples of function names), in
        :data:`DISPLAY_ORDER` of their first member.

    Raises
    ------
    GroupIdentificationError
        If a projector's image cannot be spanned by the named candidates.
    """
    g = len(mats)
    reps = [
        ([np.asarray(m) for m in mats], [(n, np.eye(3)[k]) for k, n in enumerate(_LIN)]),
        ([np.linalg.det(m) * np.asarray(m) for m in mats], [(n, np.eye(3)[k]) for k, n in enumerate(_ROT)]),
        ([_quad_matrix(np.asarray(m)) for m in mats], [(n, np.array(v, dtype=float)) for n, v in _QUAD_CANDS]),
    ]
    out = []
    for ch, pa in zip(chars, parts):
        d = int(round(ch[0]))
        sets: list[tuple[str, ...]] = []
        for rep, cands in reps:
            P = sum(ch[class_of[k]] * rep[k] for k in range(g)) * (d / pa) / g
            chosen = _named_basis(P, cands)
            if chosen:
                sets.extend(_partner_sets(chosen, rep, d))
        sets.sort(key=lambda s: min(DISPLAY_ORDER.index(f) for f in s))
        out.append(tuple(sets))
    return tuple(out)


def _partner_sets(chosen, mats, d) -> list[tuple[str, ...]]:
    """Split the chosen functions into invariant sets of size d (partners)."""
    chosen = sorted(chosen, key=lambda c: DISPLAY_ORDER.index(c[0]))
    if d == 1:
        return [(c[0],) for c in chosen]
    left = list(chosen)
    sets = []
    while left:
        found = None
        for combo in itertools.combinations(left, d):
            B = np.array([c[1] for c in combo]).T
            pinv = np.linalg.pinv(B)
            if all(np.linalg.norm(B @ (pinv @ (m @ B)) - m @ B) < PROJECTION_TOL for m in mats):
                found = combo
                break
        if found is None:
            sets.append(tuple(c[0] for c in left))
            break
        sets.append(tuple(c[0] for c in found))
        left = [c for c in left if c not in found]
    return sets
