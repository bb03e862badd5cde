"""Irreducible characters of a finite matrix group by the Burnside-Dixon method.

Given every matrix of a finite point group, this module

1. builds the multiplication table (:func:`multiplication_table`) and the
   conjugacy classes (:func:`conjugacy_classes`);
2. finds the irreducible characters as the common eigenvectors of Burnside's
   class-multiplication matrices, diagonalised together as J. D. Dixon,
   *Numer. Math.* 10 (1967) 446 describes (:func:`burnside_dixon`);
3. rounds each character exactly onto the nearest algebraic integer of the
   kind point groups have: integers, sqrt2, sqrt3, 2cos(2 pi k/n)
   (:func:`snap_character`), and joins complex-conjugate pairs into one real
   species, as chemists write them (:func:`real_species`).

>>> import numpy as np
>>> c2 = np.diag([-1.0, -1.0, 1.0]); sxz = np.diag([1.0, -1.0, 1.0])
>>> mult, inv, ident = multiplication_table([np.eye(3), c2, sxz, c2 @ sxz])
>>> classes = conjugacy_classes(mult, inv, ident)
>>> classes
((0,), (1,), (2,), (3,))
>>> sorted(tuple(int(x) for x in ch) for ch, _ in real_species(burnside_dixon(mult, inv, classes)))
[(1, -1, -1, 1), (1, -1, 1, -1), (1, 1, -1, -1), (1, 1, 1, 1)]
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from enumerator.symmetry.operations import GroupIdentificationError
from enumerator.tolerances import (
    CHARACTER_TOL,
    DIXON_RESIDUAL_TOL,
    EIGENVALUE_GAP_TOL,
    EXACT_VALUE_TOL,
    OPERATION_MATCH_TOL,
)

__all__ = ["multiplication_table", "conjugacy_classes", "burnside_dixon", "snap_character", "real_species"]

#: Matrices are matched on a grid of OPERATION_MATCH_TOL: elements times this, rounded to integers.
_KEY_SCALE = round(1 / OPERATION_MATCH_TOL)


def _mkey(m: np.ndarray) -> bytes:
    return np.round(np.asarray(m, dtype=float) * _KEY_SCALE).astype(np.int64).tobytes()


def multiplication_table(
    mats: Sequence[np.ndarray], perms: Sequence[tuple[int, ...]] | None = None
) -> tuple[np.ndarray, np.ndarray, int]:
    """The group's multiplication table, inverses and identity.

    Parameters
    ----------
    mats : sequence of array_like, shape (3, 3)
        Every operation of the group, once each.
    perms : sequence of tuple of int, optional
        The site permutation of each operation (``mats[k]`` sends site ``i``
        to site ``perms[k][i]``), when the sites span space so that an
        operation is fixed by its permutation: the product is then found by
        composing permutations instead of multiplying and matching matrices.

    Returns
    -------
    mult : ndarray of int, shape (g, g)
        ``mult[a, b]`` is the index of the product ``mats[a] @ mats[b]``.
    inv : ndarray of int, shape (g,)
        The index of each operation's inverse.
    identity : int
        The index of the identity.

    Raises
    ------
    GroupIdentificationError
        If a product is not among the matrices (they are not a group).
    """
    g = len(mats)
    if perms is not None:
        return _permutation_table(mats, perms)
    index = {_mkey(m): k for k, m in enumerate(mats)}
    arr = np.array(mats)
    prod = np.einsum("aij,bjk->abik", arr, arr)
    mult = np.empty((g, g), dtype=np.int64)
    for a in range(g):
        for b in range(g):
            k = index.get(_mkey(prod[a, b]))
            if k is None:
                raise GroupIdentificationError("the operations given are not closed under multiplication")
            mult[a, b] = k
    ident = next(k for k, m in enumerate(mats) if np.allclose(m, np.eye(3)))
    inv = np.array([int(np.nonzero(mult[a] == ident)[0][0]) for a in range(g)])
    return mult, inv, ident


def _permutation_table(
    mats: Sequence[np.ndarray], perms: Sequence[tuple[int, ...]]
) -> tuple[np.ndarray, np.ndarray, int]:
    """:func:`multiplication_table` by composing site permutations: (a b) sends i to a[b[i]]."""
    if len(set(perms)) != len(perms):
        raise GroupIdentificationError("two operations permute the sites alike: give the matrices alone")
    mult = compose_permutations(np.array(perms, dtype=np.int64))
    ident = next(k for k, m in enumerate(mats) if np.allclose(m, np.eye(3)))
    inv = np.array([int(np.nonzero(mult[a] == ident)[0][0]) for a in range(len(perms))])
    return mult, inv, ident


def compose_permutations(perms: np.ndarray) -> np.ndarray:
    """The multiplication table of distinct site permutations: ``[a, b]`` is the index of the permutation
    sending site ``i`` to ``perms[a][perms[b][i]]``, all g² products in a few array operations.

    Parameters
    ----------
    perms : ndarray of int, shape (g, n)
        Pairwise distinct permutations of ``range(n)``.

    Returns
    -------
    ndarray of int64, shape (g, g)

    Raises
    ------
    GroupIdentificationError
        If a product is not among them (they are not a group).
    """
    g, n = perms.shape
    weights = np.int64(n) ** np.arange(n, dtype=np.int64)  # a permutation read as a number in base n
    codes = perms.astype(np.int64) @ weights
    order = np.argsort(codes)
    ranked = codes[order]
    products = perms[:, perms].astype(np.int64) @ weights
    at = np.minimum(np.searchsorted(ranked, products), g - 1)
    if not np.array_equal(ranked[at], products):
        raise GroupIdentificationError("the operations given are not closed under multiplication")
    return order[at].astype(np.int64)


def conjugacy_classes(mult: np.ndarray, inv: np.ndarray, identity: int) -> tuple[tuple[int, ...], ...]:
    """The conjugacy classes, the identity's first, then in operation order.

    Parameters
    ----------
    mult, inv, identity
        As returned by :func:`multiplication_table`.

    Returns
    -------
    tuple of tuple of int
        Each class as the sorted indices of its members.
    """
    g = len(mult)
    seen = [False] * g
    classes: list[tuple[int, ...]] = []
    for a in [identity] + [k for k in range(g) if k != identity]:
        if seen[a]:
            continue
        members = tuple(sorted({int(mult[mult[x, a], inv[x]]) for x in range(g)}))
        for m in members:
            seen[m] = True
        classes.append(members)
    return tuple(classes)


_WEIGHTS = tuple(
    math.sqrt(p) for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89)
)


def _class_matrices(mult: np.ndarray, inv: np.ndarray, classes: Sequence[Sequence[int]]) -> np.ndarray:
    """A[j][k, l] = #{x in C_j : x^-1 z_l in C_k}, z_l a representative of C_l."""
    r = len(classes)
    cls_of = np.empty(len(mult), dtype=np.int64)
    for c, mem in enumerate(classes):
        cls_of[list(mem)] = c
    A = np.zeros((r, r, r))
    for j, mem in enumerate(classes):
        for col in range(r):
            z = classes[col][0]
            for x in mem:
                A[j, cls_of[mult[inv[x], z]], col] += 1
    return A


def _common_eigenvectors(A: np.ndarray, shift: int) -> np.ndarray | None:
    """Eigenvectors of one generic combination of the A_j, scaled to omega = 1 on
    the identity class, if they are eigenvectors of every A_j; else None."""
    r = len(A)
    w = [_WEIGHTS[(j + shift * 5) % len(_WEIGHTS)] / (1 + shift) for j in range(r)]
    M = np.tensordot(np.array(w), A, axes=1)
    vals, vecs = np.linalg.eig(M)
    if r > 1:
        gaps = np.abs(vals[:, None] - vals[None, :])
        np.fill_diagonal(gaps, np.inf)
        if gaps.min() < EIGENVALUE_GAP_TOL:
            return None
    omegas = vecs / vecs[0:1, :]  # row 0 is the identity class: omega = 1 there
    for j in range(r):
        res = A[j] @ omegas - omegas * omegas[j : j + 1, :]
        if np.abs(res).max() > DIXON_RESIDUAL_TOL:
            return None
    return omegas


def burnside_dixon(mult: np.ndarray, inv: np.ndarray, classes: Sequence[Sequence[int]]) -> np.ndarray:
    """Irreducible characters by Burnside's class-multiplication matrices,
    diagonalised together as in J. D. Dixon, *Numer. Math.* 10 (1967) 446.

    Every irreducible character gives a common eigenvector w of all class
    matrices A_j; they are found by diagonalising one generic combination with
    fixed sqrt(prime) weights (other weights are tried if eigenvalues
    coincide).  The degree follows from d^2 = |G| / sum_k |w_k|^2 / h_k and the
    character from chi = d w / h.

    Parameters
    ----------
    mult, inv
        As returned by :func:`multiplication_table`.
    classes : sequence of sequence of int
        As returned by :func:`conjugacy_classes` (identity class first).

    Returns
    -------
    ndarray of complex, shape (r, r)
        One row per irreducible character, one column per class, in no
        particular order.

    Raises
    ------
    GroupIdentificationError
        If no combination could be diagonalised with distinct eigenvalues.
    """
    g = len(mult)
    h = np.array([len(m) for m in classes], dtype=float)
    A = _class_matrices(mult, inv, classes)
    for shift in range(6):
        omegas = _common_eigenvectors(A, shift)
        if omegas is None:
            continue
        chars = []
        for col in range(len(classes)):
            om = omegas[:, col]
            d = math.sqrt(g / float(np.sum(np.abs(om) ** 2 / h)))
            chars.append(d * om / h)
        return np.array(chars)
    raise GroupIdentificationError("class-multiplication matrices could not be diagonalised together")


def _snap_values() -> np.ndarray:
    """Integers up to 12 and every cos(2 pi k/n), 2cos(2 pi k/n) (n <= 12) shifted by an integer."""
    vals = set()
    for n in range(1, 13):
        for k in range(n):
            vals.add(round(2 * math.cos(2 * math.pi * k / n), 12))
            vals.add(round(math.cos(2 * math.pi * k / n), 12))
    out = set()
    for v in vals:
        for m in range(-6, 7):
            out.add(round(v + m, 12))
    out |= {float(m) for m in range(-12, 13)}
    arr = np.array(sorted(out))
    arr.flags.writeable = False
    return arr


_SNAP = _snap_values()


def snap_character(x: float) -> float:
    """Round a computed character exactly onto the algebraic integers point groups have.

    Parameters
    ----------
    x : float
        A character value from floating-point work.

    Returns
    -------
    float
        The nearest tabulated exact value if within ``CHARACTER_TOL`` (an exact
        integer where it is one), else ``x`` rounded to 10 places.
    """
    k = int(np.argmin(np.abs(_SNAP - x)))
    if abs(_SNAP[k] - x) < CHARACTER_TOL:
        v = float(_SNAP[k])
        r = round(v)
        return float(r) if abs(v - r) < EXACT_VALUE_TOL else v
    return round(x, 10)


def real_species(raw: np.ndarray) -> tuple[tuple[np.ndarray, int], ...]:
    """Real species from complex characters: a complex-conjugate pair is joined
    into one separably degenerate E (``parts`` 2), as is usual in chemistry.

    Parameters
    ----------
    raw : ndarray of complex, shape (r, r)
        Characters as returned by :func:`burnside_dixon`.

    Returns
    -------
    tuple of (ndarray, int)
        Each species' real characters (snapped, see :func:`snap_character`) and
        its number of parts (1, or 2 for a joined pair), in the order of ``raw``.
    """
    r = len(raw)
    done = [False] * r
    species: list[tuple[np.ndarray, int]] = []
    for a in range(r):
        if done[a]:
            continue
        done[a] = True
        if np.abs(raw[a].imag).max() < CHARACTER_TOL:
            species.append((raw[a].real, 1))
            continue
        b = next(b for b in range(r) if not done[b] and np.abs(raw[b] - np.conj(raw[a])).max() < CHARACTER_TOL)
        done[b] = True
        species.append(((raw[a] + raw[b]).real, 2))
    return tuple((np.array([snap_character(float(x)) for x in ch]), parts) for ch, parts in species)
