"""Finite point groups: symmetry operations, their geometric description, and
Schoenflies identification.

A group here is a finite set of 3x3 orthogonal matrices that is closed under
multiplication.  The groups come from geometry (see :mod:`enumerator.symmetry.derive`);
nothing in this module types a group in.

>>> import numpy as np
>>> c2 = np.diag([-1.0, -1.0, 1.0]); sxz = np.diag([1.0, -1.0, 1.0])
>>> schoenflies([np.eye(3), c2, sxz, c2 @ sxz])
'C2v'
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.tolerances import (
    ANGLE_TOL,
    KEY_DECIMALS,
    MAX_ROTATION_ORDER,
    TURN_FRACTION_TOL,
    VECTOR_TOL,
)

__all__ = [
    "SymOp",
    "OpInfo",
    "ExactOp",
    "describe",
    "describe_exact",
    "schoenflies",
    "axis_key",
    "matrix_key",
    "GroupIdentificationError",
    "LINEAR_GROUPS",
]

#: ASCII names for the two infinite groups of a linear centre.
LINEAR_GROUPS = ("Dinfh", "Cinfv")


class GroupIdentificationError(RuntimeError):
    """The operations given do not form a recognisable point group (an internal error)."""


@frozen_dataclass
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


@frozen_dataclass
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


def matrix_key(m: np.ndarray) -> tuple[float, ...]:
    """A hashable, rounding-stable key for a 3x3 matrix (by value).

    Parameters
    ----------
    m : array_like, shape (3, 3)

    Returns
    -------
    tuple of float
        The nine elements row by row, rounded to ``KEY_DECIMALS`` places (-0.0 written as 0.0).
    """
    r = np.round(np.asarray(m, dtype=float), KEY_DECIMALS) + 0.0
    return tuple(float(x) for x in r.ravel())


def axis_key(v: np.ndarray) -> tuple[float, float, float]:
    """Sign-normalised, rounded axis direction usable as a dict key.

    Parameters
    ----------
    v : array_like, shape (3,)
        Any non-zero direction.

    Returns
    -------
    tuple of float
        The unit vector with its first non-zero component positive, rounded to ``KEY_DECIMALS`` places.
    """
    v = np.asarray(v, dtype=float)
    v = v / np.linalg.norm(v)
    for x in v:
        if abs(x) > VECTOR_TOL:
            if x < 0:
                v = -v
            break
    r = np.round(v, KEY_DECIMALS) + 0.0
    return (float(r[0]), float(r[1]), float(r[2]))


def _eigvec(m: np.ndarray, value: float) -> np.ndarray:
    w, vecs = np.linalg.eig(m)
    k = int(np.argmin(np.abs(w - value)))
    v = np.real(vecs[:, k])
    return v / np.linalg.norm(v)


def _angle_to_fraction(theta: float) -> tuple[int, int]:
    """theta in (0, 2pi) as k/n of a full turn, in lowest terms (n up to MAX_ROTATION_ORDER)."""
    for n in range(1, MAX_ROTATION_ORDER + 1):
        k = theta * n / (2 * math.pi)
        kr = round(k)
        if abs(k - kr) < TURN_FRACTION_TOL and kr > 0:
            g = math.gcd(kr, n)
            return kr // g, n // g
    raise GroupIdentificationError(f"rotation angle {math.degrees(theta):.4f} deg is not a rational fraction of a turn")


def describe(m: np.ndarray) -> OpInfo:
    """Describe an orthogonal matrix as E, C_n^k, i, sigma or S_n^k.

    Parameters
    ----------
    m : array_like, shape (3, 3)
        An orthogonal matrix of finite order.

    Returns
    -------
    OpInfo
        Kind, order, power and the sign-normalised, rounded axis (see :func:`axis_key`).

    Raises
    ------
    GroupIdentificationError
        If the rotation angle is not k/n of a turn with n up to ``MAX_ROTATION_ORDER``.
    """
    m = np.asarray(m, dtype=float)
    if m.shape != (3, 3):
        raise ValueError(f"an operation is a 3x3 matrix, not {m.shape}")
    return _describe(np.ascontiguousarray(m).tobytes())


@cached(maxsize=8192)
def _describe(raw: bytes) -> OpInfo:
    """:func:`describe` of the 3x3 matrix whose float64 values (C order) are ``raw``: keyed by the exact
    values, so an operation described by several callers is worked out once."""
    m = np.frombuffer(raw, dtype=float).reshape(3, 3)
    det = float(np.linalg.det(m))
    tr = float(np.trace(m))
    if det > 0:
        theta = _turn(m, (tr - 1) / 2)
        if theta < ANGLE_TOL:
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
    if abs(tr + 3) < VECTOR_TOL:
        return OpInfo("i", 2, 1, None)
    axis = _eigvec(m, -1.0)
    theta = _turn(m, (tr + 1) / 2)
    if theta < ANGLE_TOL:
        return OpInfo("s", 2, 1, axis_key(axis))
    s = _rotation_sense(m @ _householder(axis), axis)
    if s < 0:
        axis = -axis
    k, n = _angle_to_fraction(theta)
    key = axis_key(axis)
    if np.dot(key, axis) < 0:
        k = n - k
    return OpInfo("S", n, k, key)


@frozen_dataclass(eq=False)
class ExactOp:
    """:class:`OpInfo` with the axis as an unrounded unit vector (an array), for
    geometric work where the rounded key would lose precision.  The axis points
    the same way as the rounded one; it is None for E and i."""

    kind: str
    order: int
    power: int
    axis: np.ndarray | None

    @property
    def direction(self) -> np.ndarray:
        """The axis, for an operation that has one (C, S, sigma).

        Raises
        ------
        ValueError
            For E and i, which have no axis.
        """
        if self.axis is None:
            raise ValueError(f"{self.kind} has no axis")
        return self.axis


def describe_exact(matrices: Sequence[np.ndarray]) -> tuple[ExactOp, ...]:
    """:func:`describe` each matrix, keeping the exact axis.

    Parameters
    ----------
    matrices : sequence of array_like, shape (3, 3)

    Returns
    -------
    tuple of ExactOp
        One per matrix, in order; the axis is the eigenvector of eigenvalue +1
        (rotations) or -1 (reflections, improper rotations), normalised and
        signed like :attr:`OpInfo.axis`.
    """
    out = []
    for m in matrices:
        d = describe(m)
        axis = None
        if d.axis is not None:
            w, v = np.linalg.eig(np.asarray(m, dtype=float))
            target = 1.0 if d.kind == "C" else -1.0
            a = np.real(v[:, int(np.argmin(np.abs(w - target)))])
            a = a / np.linalg.norm(a)
            axis = a if np.dot(a, d.axis) > 0 else -a
        out.append(ExactOp(d.kind, d.order, d.power, axis))
    return tuple(out)


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
    if abs(np.dot(ref, axis)) > 0.9:  # a reference direction well away from the axis
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

    Parameters
    ----------
    matrices : iterable of array_like, shape (3, 3)
        Every operation of the group, once each.

    Returns
    -------
    str
        The Schoenflies symbol.

    Raises
    ------
    GroupIdentificationError
        If the symbol found does not fit the number of operations.
    """
    mats = [np.asarray(m, dtype=float) for m in matrices]
    return _schoenflies_cached(tuple(sorted(matrix_key(m) for m in mats)))


@cached(maxsize=4096)
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


Axis = tuple[float, float, float]


def _identify(infos: Sequence[OpInfo]) -> str:
    """The flow chart: no rotation axis, several high-order axes, three C2 axes, one principal axis."""
    has_inv = any(o.kind == "i" for o in infos)
    mirrors = [o.axis for o in infos if o.kind == "s" and o.axis is not None]
    axes = _axis_orders(infos)
    if not axes:
        if mirrors:
            return "Cs"
        return "Ci" if has_inv else "C1"
    if len([a for a, n in axes.items() if n >= 3]) >= 2:
        return _cubic_group(set(axes.values()), has_inv, bool(mirrors))
    n = max(axes.values())
    c2_axes = [a for a, k in axes.items() if k % 2 == 0]
    if n == 2 and len(c2_axes) == 3:
        if len(infos) == 4:
            return "D2"
        return "D2h" if has_inv else "D2d"
    principal = np.array(next(a for a, k in axes.items() if k == n))
    return _axial_group(infos, n, principal, c2_axes, mirrors)


def _axis_orders(infos: Sequence[OpInfo]) -> dict[Axis, int]:
    """Each proper rotation axis -> the highest order of rotation about it."""
    axes: dict[Axis, int] = {}
    for o in infos:
        if o.kind == "C" and o.axis is not None:
            axes[o.axis] = max(axes.get(o.axis, 1), o.order)
    return axes


def _cubic_group(orders: set[int], has_inv: bool, has_mirror: bool) -> str:
    """T, Td, Th, O, Oh, I or Ih from the rotation orders present."""
    if 5 in orders:
        return "Ih" if has_inv else "I"
    if 4 in orders:
        return "Oh" if has_inv else "O"
    if has_inv:
        return "Th"
    return "Td" if has_mirror else "T"


def _axial_group(
    infos: Sequence[OpInfo], n: int, principal: np.ndarray, c2_axes: list[Axis], mirrors: list[Axis]
) -> str:
    """Dn, Dnh, Dnd, Cn, Cnh, Cnv or S2n about one principal n-fold axis."""
    perp_c2 = [a for a in c2_axes if abs(np.dot(a, principal)) < VECTOR_TOL]
    sigma_h = any(abs(abs(np.dot(m, principal)) - 1) < VECTOR_TOL for m in mirrors)
    sigma_v = any(abs(np.dot(m, principal)) < VECTOR_TOL for m in mirrors)
    if len(perp_c2) == n:
        if sigma_h:
            return f"D{n}h"
        return f"D{n}d" if sigma_v else f"D{n}"
    if sigma_h:
        return f"C{n}h"
    if sigma_v:
        return f"C{n}v"
    s2n = any(
        o.kind in ("S", "i")
        and (o.axis is None or abs(abs(np.dot(o.axis, principal)) - 1) < VECTOR_TOL)
        and o.order == 2 * n
        for o in infos
    )
    return f"S{2 * n}" if s2n else f"C{n}"
