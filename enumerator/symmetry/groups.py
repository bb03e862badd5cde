"""Named point groups built from generators in the standard orientation.

A named group is never typed in as a table: :func:`group_generators` gives a
few generating matrices (z the principal axis, C2' along x, sigma_v the xz
plane; cubic groups with C4 / S4 / C2 along x, y, z; icosahedral groups with
C2 along x, y, z), :func:`close_group` multiplies them out, and
:func:`group_matrices` checks that the closure is the group asked for.

>>> len(group_matrices("D4h")), len(group_matrices("Ih"))
(16, 120)
>>> bool(GROUP_NAME.match("C2v")), bool(GROUP_NAME.match("Ma4b2"))
(True, False)
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence

import numpy as np

from enumerator.errors import InputError
from enumerator.symmetry.operations import GroupIdentificationError, schoenflies
from enumerator.tolerances import KEY_DECIMALS, MAX_ROTATION_ORDER

__all__ = ["GROUP_NAME", "INFINITE_GROUP_NAMES", "group_generators", "close_group", "group_matrices"]

#: A point-group name as the `chartable` command accepts it.
GROUP_NAME = re.compile(r"^(C\d+[vh]?|Cs|Ci|D\d+[hd]?|S\d+|T[dh]?|Oh?|Ih?)$")

#: Names of the infinite groups of a linear centre, which have no finite table.
INFINITE_GROUP_NAMES = ("Dinfh", "Cinfv", "D∞h", "C∞v")

#: A closure growing past this many operations is not a finite point group (Ih has 120).
_MAX_ORDER = 240


def _rz(t: float) -> np.ndarray:
    c, s = math.cos(t), math.sin(t)
    return np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])


def _rot(axis, t: float) -> np.ndarray:
    a = np.asarray(axis, dtype=float)
    a = a / np.linalg.norm(a)
    k = np.array([[0, -a[2], a[1]], [a[2], 0, -a[0]], [-a[1], a[0], 0]])
    return np.eye(3) + math.sin(t) * k + (1 - math.cos(t)) * (k @ k)


def _mirror(normal) -> np.ndarray:
    n = np.asarray(normal, dtype=float)
    n = n / np.linalg.norm(n)
    return np.eye(3) - 2 * np.outer(n, n)


def _cubic_generators(name: str) -> list[np.ndarray]:
    c3 = _rot([1, 1, 1], 2 * math.pi / 3)
    if name[0] == "I":
        phi = (1 + math.sqrt(5)) / 2
        gens = [_rot([0, 1, phi], 2 * math.pi / 5), c3, _rot([0, 0, 1], math.pi)]
    elif name[0] == "O":
        gens = [_rz(math.pi / 2), c3]
    else:
        gens = [_rz(math.pi), c3]
    if name.endswith("h"):
        gens.append(-np.eye(3))
    if name == "Td":
        gens.append(_mirror([1, -1, 0]))
    return gens


def _axial_generators(name: str) -> list[np.ndarray]:
    m = re.match(r"^([CDS])(\d+)([vhd]?)$", name)
    assert m
    fam, n, suf = m.group(1), int(m.group(2)), m.group(3)
    if n < 1 or (fam == "S" and (n % 2 or n < 2)) or (fam == "D" and n < 2) or (fam == "S" and suf):
        raise InputError(
            f"'{name}' is not a point group", "S groups have even order (S4, S6, S8); D groups need n >= 2"
        )
    axis = 2 * n if (fam, suf) == ("D", "d") else n  # D_nd holds S_2n
    if axis > MAX_ROTATION_ORDER:
        raise InputError(
            f"'{name}' has a {axis}-fold axis; operations are identified up to {MAX_ROTATION_ORDER}-fold",
            f"ask for a group with n up to {MAX_ROTATION_ORDER} ({MAX_ROTATION_ORDER // 2} for Dnd)",
        )
    sh, sxz, c2x = _mirror([0, 0, 1]), _mirror([0, 1, 0]), _rot([1, 0, 0], math.pi)
    if fam == "S":
        return [_rz(2 * math.pi / n) @ sh]
    cn = _rz(2 * math.pi / n)
    if fam == "C":
        return [cn] + ({"v": [sxz], "h": [sh], "": []}[suf])
    if suf == "d":
        return [_rz(math.pi / n) @ sh, c2x]
    return [cn, c2x] + ([sh] if suf == "h" else [])


def group_generators(name: str) -> list[np.ndarray]:
    """Generators of a named point group in the standard orientation.

    z is the principal axis, C2' along x, sigma_v the xz plane; cubic groups
    have C4 / S4 / C2 along x, y, z; icosahedral groups C2 along x, y, z.

    Parameters
    ----------
    name : str
        A Schoenflies symbol matching :data:`GROUP_NAME` (C2v, D4h, S8, Td, Ih ...).

    Returns
    -------
    list of ndarray, shape (3, 3)

    Raises
    ------
    InputError
        If ``name`` is not a point-group name, or names no group (S3, D1).
    """
    if not GROUP_NAME.match(name):
        raise InputError(f"'{name}' is not a point-group name", "write e.g. C2v, D4h, Td, Oh, Ih, S8, D5d")
    if name == "C1":
        return [np.eye(3)]
    if name == "Cs":
        return [_mirror([0, 0, 1])]
    if name == "Ci":
        return [-np.eye(3)]
    if name in {"T", "Td", "Th", "O", "Oh", "I", "Ih"}:
        return _cubic_generators(name)
    return _axial_generators(name)


def close_group(gens: Sequence[np.ndarray]) -> list[np.ndarray]:
    """Every product of the generators: the group they generate.

    Parameters
    ----------
    gens : sequence of ndarray, shape (3, 3)

    Returns
    -------
    list of ndarray
        Each operation once, sorted by its rounded elements.

    Raises
    ------
    GroupIdentificationError
        If the products grow past any finite point group.
    """

    def key(m):
        return tuple(np.round(m, KEY_DECIMALS).ravel() + 0.0)

    found = {key(np.eye(3)): np.eye(3)}
    frontier = [np.eye(3)]
    while frontier:
        new = []
        for a in frontier:
            for g in gens:
                p = g @ a
                k = key(p)
                if k not in found:
                    found[k] = p
                    new.append(p)
        frontier = new
        if len(found) > _MAX_ORDER:
            raise GroupIdentificationError("generators do not close into a finite point group")
    return [found[k] for k in sorted(found)]


def group_matrices(name: str) -> list[np.ndarray]:
    """Every operation of a named group in the standard orientation.

    Parameters
    ----------
    name : str
        A Schoenflies symbol (see :func:`group_generators`).

    Returns
    -------
    list of ndarray, shape (3, 3)

    Raises
    ------
    InputError
        If the group is infinite (D∞h, C∞v), the name is not a point group, or
        it names a group that has another usual name (e.g. S2 is Ci).
    """
    if name in INFINITE_GROUP_NAMES:
        raise InputError(
            f"{name} is infinite and has no finite character table",
            "use a finite group, e.g. D2h or C2v, its subgroups used for linear centres",
        )
    mats = close_group(group_generators(name))
    got = schoenflies(mats)
    if got != name:
        raise InputError(f"'{name}' is not a distinct point group (it is {got})", f"ask for {got}")
    return mats
