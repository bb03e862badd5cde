"""Finite point groups: symmetry operations, their geometric description, and
Schoenflies identification.

A group here is a finite set of 3x3 orthogonal matrices that is closed under
multiplication.  The groups come from geometry (see :mod:`enumerator.model.geometry`);
nothing in this module types a group in.

>>> import numpy as np
>>> c2 = np.diag([-1.0, -1.0, 1.0]); sxz = np.diag([1.0, -1.0, 1.0])
>>> schoenflies([np.eye(3), c2, sxz, c2 @ sxz])
'C2v'
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from enumerator.symmetry.linalg import matrix_key

__all__ = [
    "SymOp",
    "OpInfo",
    "describe",
    "schoenflies",
    "axis_key",
    "GroupIdentificationError",
    "LINEAR_GROUPS",
]

#: ASCII names for the two infinite groups of a linear centre.
LINEAR_GROUPS = ("Dinfh", "Cinfv")


class GroupIdentificationError(RuntimeError):
    """The operations given do not form a recognisable point group (an internal error)."""


@dataclass(frozen=True)
class SymOp:
    """One symmetry operation of a geometry: its Cartesian matrix and the
    permutation it induces on the coordination sites (site ``i`` goes to
    site ``perm[i]``)."""

    matrix: tuple[tuple[float, float, float], tuple[float, float, float], tuple[float, float, float]]
    perm: tuple[int, ...]

    @property
    def array(self) -> np.ndarray:
        return np.array(self.matrix, dtype=float)

    @property
    def proper(self) -> bool:
        return bool(np.linalg.det(self.array) > 0)

    @property
    def info(self) -> OpInfo:
        return describe(self.array)


@dataclass(frozen=True)
class OpInfo:
    """A geometric description of an orthogonal 3x3 matrix.

    ``kind`` is one of ``E``, ``C`` (proper rotation), ``i`` (inversion),
    ``s`` (reflection) and ``S`` (improper rotation).  ``order`` is ``n`` and
    ``power`` is ``k`` in C_n^k or S_n^k (k and n coprime).  ``axis`` is the
    rotation axis, or the normal of a mirror plane, signed so that its first
    non-zero component is positive (None for E and i).
    """

    kind: str
    order: int
    power: int
    axis: tuple[float, float, float] | None

    @property
    def symbol(self) -> str:
        if self.kind == "E":
            return "E"
        if self.kind == "i":
            return "i"
        if self.kind == "s":
            return "sigma"
        base = f"{self.kind}{self.order}"
        return base if self.power == 1 else f"{base}^{self.power}"


def axis_key(v: np.ndarray) -> tuple[float, float, float]:
    """Sign-normalised, rounded axis direction usable as a dict key."""
    v = np.asarray(v, dtype=float)
    v = v / np.linalg.norm(v)
    for x in v:
        if abs(x) > 1e-6:
            if x < 0:
                v = -v
            break
    r = np.round(v, 6) + 0.0
    return (float(r[0]), float(r[1]), float(r[2]))


def _eigvec(m: np.ndarray, value: float) -> np.ndarray:
    w, vecs = np.linalg.eig(m)
    k = int(np.argmin(np.abs(w - value)))
    v = np.real(vecs[:, k])
    return v / np.linalg.norm(v)


def _angle_to_fraction(theta: float) -> tuple[int, int]:
    """theta in (0, 2pi) as k/n of a full turn, in lowest terms (n up to 60)."""
    for n in range(1, 61):
        k = theta * n / (2 * math.pi)
        kr = round(k)
        if abs(k - kr) < 1e-4 and kr > 0:
            g = math.gcd(kr, n)
            return kr // g, n // g
    raise GroupIdentificationError(f"rotation angle {math.degrees(theta):.4f} deg is not a rational fraction of a turn")


def describe(m: np.ndarray) -> OpInfo:
    """Describe an orthogonal matrix as E, C_n^k, i, sigma or S_n^k."""
    m = np.asarray(m, dtype=float)
    det = float(np.linalg.det(m))
    tr = float(np.trace(m))
    if det > 0:
        theta = _turn(m, (tr - 1) / 2)
        if theta < _ANGLE_TOL:
            return OpInfo("E", 1, 1, None)
        axis = _eigvec(m, 1.0)
        # orient the axis so that the rotation is counter-clockwise about it
        s = _rotation_sense(m, axis)
        if s < 0:
            axis = -axis
        k, n = _angle_to_fraction(theta)
        # report the axis in sign-normalised form; fold the power accordingly
        key = axis_key(axis)
        if np.dot(key, axis) < 0:
            k = n - k
        return OpInfo("C", n, k, key)
    if abs(tr + 3) < 1e-6:
        return OpInfo("i", 2, 1, None)
    axis = _eigvec(m, -1.0)
    theta = _turn(m, (tr + 1) / 2)
    if theta < _ANGLE_TOL:
        return OpInfo("s", 2, 1, axis_key(axis))
    s = _rotation_sense(m @ _householder(axis), axis)
    if s < 0:
        axis = -axis
    k, n = _angle_to_fraction(theta)
    key = axis_key(axis)
    if np.dot(key, axis) < 0:
        k = n - k
    return OpInfo("S", n, k, key)


#: Rotation angles below this (radians) count as none: matrices are compared
#: after rounding to 6 decimals, and the smallest true angle here is 2pi/60.
_ANGLE_TOL = 1e-4


def _turn(m: np.ndarray, cos_t: float) -> float:
    """The rotation angle in [0, pi] of a proper rotation, or of the
    rotation part of an improper one, from its cosine and the skew part of m
    (atan2 stays accurate near 0 and pi, where acos of a rounded trace does
    not; a reflection along the axis adds nothing to the skew part)."""
    w = np.array([m[2, 1] - m[1, 2], m[0, 2] - m[2, 0], m[1, 0] - m[0, 1]]) / 2
    return math.atan2(float(np.linalg.norm(w)), max(-1.0, min(1.0, cos_t)))


def _householder(a: np.ndarray) -> np.ndarray:
    a = a / np.linalg.norm(a)
    return np.eye(3) - 2 * np.outer(a, a)


def _rotation_sense(m: np.ndarray, axis: np.ndarray) -> float:
    """+1 if the proper rotation m turns counter-clockwise about axis."""
    ref = np.array([1.0, 0.0, 0.0])
    if abs(np.dot(ref, axis)) > 0.9:
        ref = np.array([0.0, 1.0, 0.0])
    u = ref - np.dot(ref, axis) * axis
    v = m @ u
    return float(np.dot(np.cross(u, v), axis)) or 1.0


def schoenflies(matrices: Iterable[np.ndarray]) -> str:
    """The Schoenflies symbol (ASCII: C2v, D4h, Td, Oh, Ih, ...) of a finite
    point group given as its full list of operations.

    The decision follows the usual flow chart of the trade (high-order
    groups first, then the principal axis, perpendicular C2 axes and mirror
    planes), and the result is checked against the group order.
    """
    mats = [np.asarray(m, dtype=float) for m in matrices]
    return _schoenflies_cached(tuple(sorted(matrix_key(m) for m in mats)))


@lru_cache(maxsize=4096)
def _schoenflies_cached(keys: tuple[tuple[float, ...], ...]) -> str:
    mats = [np.array(k).reshape(3, 3) for k in keys]
    infos = [describe(m) for m in mats]
    order = len(mats)
    name = _identify(infos)
    expected = _group_order(name)
    if expected != order:
        raise GroupIdentificationError(f"identified {name} (order {expected}) from {order} operations")
    return name


def _group_order(name: str) -> int:
    fixed = {"C1": 1, "Cs": 2, "Ci": 2, "T": 12, "Td": 24, "Th": 24, "O": 24, "Oh": 48, "I": 60, "Ih": 120}
    if name in fixed:
        return fixed[name]
    fam = name[0]
    rest = name[1:]
    digits = "".join(ch for ch in rest if ch.isdigit())
    suffix = rest[len(digits) :]
    n = int(digits)
    if fam == "S":
        return n
    if fam == "C":
        return n if suffix == "" else 2 * n
    if fam == "D":
        return 2 * n if suffix == "" else 4 * n
    raise GroupIdentificationError(f"unknown group name {name}")


def _identify(infos: Sequence[OpInfo]) -> str:
    has_inv = any(o.kind == "i" for o in infos)
    mirrors = [o.axis for o in infos if o.kind == "s"]
    axes: dict[tuple[float, float, float], int] = {}
    for o in infos:
        if o.kind == "C":
            assert o.axis is not None
            axes[o.axis] = max(axes.get(o.axis, 1), o.order)
    if not axes:
        if mirrors:
            return "Cs"
        return "Ci" if has_inv else "C1"
    high = [a for a, n in axes.items() if n >= 3]
    if len(high) >= 2:
        orders = set(axes.values())
        if 5 in orders:
            return "Ih" if has_inv else "I"
        if 4 in orders:
            return "Oh" if has_inv else "O"
        if has_inv:
            return "Th"
        return "Td" if mirrors else "T"
    n = max(axes.values())
    c2_axes = [a for a, k in axes.items() if k % 2 == 0]
    if n == 2 and len(c2_axes) == 3:
        if len(infos) == 4:
            return "D2"
        if has_inv:
            return "D2h"
        return "D2d"
    principal = np.array(next(a for a, k in axes.items() if k == n))
    perp_c2 = [a for a in c2_axes if abs(np.dot(a, principal)) < 1e-6]
    sigma_h = any(abs(abs(np.dot(m, principal)) - 1) < 1e-6 for m in mirrors)
    sigma_v = any(abs(np.dot(m, principal)) < 1e-6 for m in mirrors)
    if len(perp_c2) == n:
        if sigma_h:
            return f"D{n}h"
        if sigma_v:
            return f"D{n}d"
        return f"D{n}"
    if sigma_h:
        return f"C{n}h"
    if sigma_v:
        return f"C{n}v"
    s2n = any(
        o.kind in ("S", "i") and (o.axis is None or abs(abs(np.dot(o.axis, principal)) - 1) < 1e-6) and o.order == 2 * n
        for o in infos
    )
    if s2n:
        return f"S{2 * n}"
    return f"C{n}"
