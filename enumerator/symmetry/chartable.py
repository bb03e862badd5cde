"""Character tables computed from a group's own operations.

Nothing here is typed in.  Given the 3x3 matrices of a finite point group
(an isomer's stabiliser, or a group built from generators), the module

1. builds the multiplication table and the conjugacy classes;
2. finds the irreducible characters by the Burnside–Dixon method
   (common eigenvectors of the class-multiplication matrices; J. D. Dixon,
   *Numer. Math.* 10 (1967) 446), in floating point, each character then
   rounded exactly onto the nearest algebraic integer of the kind point
   groups have (integers, sqrt2, sqrt3, 2cos(2 pi k/n));
3. joins complex-conjugate pairs into one real E species, as is usual in
   chemistry (``Irrep.parts`` is 2 for such a pair);
4. fixes the axes by one documented rule (see :data:`AXIS_RULE`) and labels
   the species by Mulliken's conventions (R. S. Mulliken, *J. Chem. Phys.*
   23 (1955) 1997);
5. attaches x, y, z, the rotations and the quadratic functions to the
   species by projection, so the functions column is computed too.

>>> from enumerator.rules.ruleset import load_rules
>>> oc = load_rules().geometry("OC-6")
>>> t = character_table(oc, tuple(range(len(oc.operations))))
>>> t.group, [i.label for i in t.irreps][:5]
('Oh', ['A1g', 'A2g', 'Eg', 'T1g', 'T2g'])
>>> t.species_string(t.reduce([float(sum(1 for i, p in enumerate(op.perm) if p == i)) for op in oc.operations]))
'A1g + Eg + T1u'
>>> named_table("C2v").irreps[2].functions
('x', 'Ry', 'xz')
"""

from __future__ import annotations

import itertools
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from enumerator.errors import InputError
from enumerator.symmetry.operations import GroupIdentificationError, describe, schoenflies

__all__ = [
    "ConjugacyClass",
    "Irrep",
    "CharacterTable",
    "character_table",
    "table_from_matrices",
    "named_table",
    "group_generators",
    "format_character",
    "AXIS_RULE",
    "GROUP_NAME",
]

#: The one axis convention used for every label that depends on the axes.
AXIS_RULE = (
    "z is the principal axis (the highest-order proper rotation; for D2 and D2h the C2 axis through the most "
    "donor sites, y the next, x the fewest; for D2d the C2 that is also S4; for Cs the mirror normal).  "
    "x lies along a perpendicular C2 axis where the group has one, else in a vertical mirror plane.  "
    "Among candidate C2 axes the one through the most donor sites wins, then the one whose vertical plane "
    "(with z) holds the most sites; among candidate planes the one holding the most donor sites wins.  "
    "Remaining ties go to the element holding more sites of the first ligand in formula order, then the "
    "second, and so on, and last to the element nearest the geometry file's own x (or z) axis.  "
    "C2' is the class of the C2 along x, C2'' the other perpendicular class; sigma_v(xz) is the vertical "
    "plane through x (in Dnh, Cnv), sigma_d the other vertical class.  In cubic groups x, y, z lie along "
    "the three mutually perpendicular C4 / S4 / C2 axes, in icosahedral groups along three perpendicular C2 axes."
)

#: A point-group name as the `chartable` command accepts it.
GROUP_NAME = re.compile(r"^(C\d+[vh]?|Cs|Ci|D\d+[hd]?|S\d+|T[dh]?|Oh?|Ih?)$")

_TOL = 1e-6
_LETTERS = "ABETGH"


@dataclass(frozen=True)
class ConjugacyClass:
    """One class: its label ('2C3', '3sigma_v', 'i'), size and member op indices."""

    label: str
    size: int
    members: tuple[int, ...]


@dataclass(frozen=True)
class Irrep:
    """One (real) irreducible species.

    ``characters`` has one real value per class of the table.  ``parts`` is
    2 for a separably degenerate E made of a complex-conjugate pair, else 1.
    ``functions`` lists every basis function; ``function_sets`` groups the
    partners of a degenerate species, e.g. (('x', 'y'), ('Rx', 'Ry'))."""

    label: str
    dimension: int
    characters: tuple[float, ...]
    functions: tuple[str, ...]
    function_sets: tuple[tuple[str, ...], ...]
    parts: int = 1

    @property
    def ir_active(self) -> bool:
        return any(f in ("x", "y", "z") for f in self.functions)

    @property
    def raman_active(self) -> bool:
        return any(f[0] in "xyz2" and f not in ("x", "y", "z") for f in self.functions)


@dataclass(frozen=True)
class CharacterTable:
    """A computed character table.  ``op_indices`` are the caller's indices of
    the operations (e.g. into ``geometry.operations``); ``class_of`` gives the
    class position of each of them, in the same order.  ``frame`` holds the
    x, y, z axes (rows) in the caller's coordinates."""

    group: str
    order: int
    classes: tuple[ConjugacyClass, ...]
    irreps: tuple[Irrep, ...]
    axes_note: str
    op_indices: tuple[int, ...]
    class_of: tuple[int, ...]
    frame: tuple[tuple[float, float, float], ...]

    def irrep(self, label: str) -> Irrep:
        for i in self.irreps:
            if i.label == label:
                return i
        raise KeyError(label)

    def reduce(self, op_characters: Mapping[int, float] | Sequence[float]) -> dict[str, int]:
        """The reduction formula n_i = (1/h) sum_g chi(g) chi_i(g) (divided by
        ``parts`` for a joined complex pair).  Input: one character per
        operation, keyed by op index or aligned with ``op_indices``."""
        if isinstance(op_characters, Mapping):
            chars = [float(op_characters[k]) for k in self.op_indices]
        else:
            chars = [float(x) for x in op_characters]
            if len(chars) != self.order:
                raise ValueError(f"{len(chars)} characters given for a group of order {self.order}")
        out: dict[str, int] = {}
        for irr in self.irreps:
            s = sum(c * irr.characters[self.class_of[k]] for k, c in enumerate(chars)) / (self.order * irr.parts)
            n = round(s)
            if abs(s - n) > 1e-6 or n < 0:
                raise ValueError(
                    f"reduction gave {s:.4f} {irr.label}: the characters are not those of a representation"
                )
            if n:
                out[irr.label] = int(n)
        return out

    def species_string(self, mult: Mapping[str, int]) -> str:
        """'2A1 + B1 + B2', in the order of the table."""
        parts = []
        for irr in self.irreps:
            n = mult.get(irr.label, 0)
            if n:
                parts.append(irr.label if n == 1 else f"{n}{irr.label}")
        return " + ".join(parts) if parts else "0"

    def to_dict(self) -> dict:
        """Plain data for JSON."""
        return {
            "group": self.group,
            "order": self.order,
            "axes": self.axes_note,
            "classes": [{"label": c.label, "size": c.size} for c in self.classes],
            "irreps": [
                {
                    "label": i.label,
                    "dimension": i.dimension,
                    "characters": [round(c, 6) + 0.0 for c in i.characters],
                    "functions": [", ".join(s) if len(s) == 1 else "(" + ", ".join(s) + ")" for s in i.function_sets],
                    "ir_active": i.ir_active,
                    "raman_active": i.raman_active,
                }
                for i in self.irreps
            ],
        }


# --------------------------------------------------------------------------
# entry points


def character_table(geometry, op_indices: tuple[int, ...], ranks: tuple[int, ...] | None = None) -> CharacterTable:
    """The table of the subgroup ``op_indices`` of ``geometry.operations``.

    ``ranks`` optionally gives, per site, the formula position of the
    ligand on it (0 = first), used only to break ties in the axis rule.
    A linear centre's group is infinite: raises InputError."""
    if geometry.linear:
        raise InputError(
            f"{geometry.symbol} is linear: its group (D∞h or C∞v) is infinite and has no finite character table",
            "stretch species of a linear centre are given by correlation from D2h / C2v (see `isosieve isomers ... --geometry L-2`)",
        )
    ops = tuple(int(k) for k in op_indices)
    # groups of order 1 or 2 (C1, Cs, Ci, C2) have one labelling whatever the
    # in-plane axis: the tie-break cannot change them, so they share one
    # cached table instead of one per isomer
    if len(ops) <= 2:
        ranks = None
    return _geometry_table(geometry.vectors, ops, tuple(ranks) if ranks else None)


@lru_cache(maxsize=4096)
def _geometry_table(vectors, op_indices, ranks) -> CharacterTable:
    from enumerator.model.geometry import derive_operations

    ops = derive_operations(vectors)
    mats = [ops[k].array for k in op_indices]
    return _build(mats, op_indices, np.array(vectors, dtype=float), ranks)


def table_from_matrices(matrices: Sequence[np.ndarray], points: Sequence[Sequence[float]] = ()) -> CharacterTable:
    """The table of a group given by all its matrices (e.g. built from
    generators, or converted from another library); ``points`` optional
    site directions for the axis rule."""
    keys = tuple(tuple(float(x) for x in np.round(np.asarray(m, dtype=float), 9).ravel()) for m in matrices)
    pts = tuple(tuple(float(x) for x in p) for p in points)
    return _matrices_table(keys, pts)


@lru_cache(maxsize=512)
def _matrices_table(keys, pts) -> CharacterTable:
    mats = [np.array(k).reshape(3, 3) for k in keys]
    return _build(mats, tuple(range(len(mats))), np.array(pts, dtype=float).reshape(-1, 3), None)


# --------------------------------------------------------------------------
# named groups from generators


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


def group_generators(name: str) -> list[np.ndarray]:
    """Generators of a named point group in the standard orientation: z the
    principal axis, C2' along x, sigma_v the xz plane; cubic groups with
    C4 / S4 / C2 along x, y, z; icosahedral groups with C2 along x, y, z."""
    if not GROUP_NAME.match(name):
        raise InputError(f"'{name}' is not a point-group name", "write e.g. C2v, D4h, Td, Oh, Ih, S8, D5d")
    sh, inv, sxz, c2x = _mirror([0, 0, 1]), -np.eye(3), _mirror([0, 1, 0]), _rot([1, 0, 0], math.pi)
    if name == "C1":
        return [np.eye(3)]
    if name == "Cs":
        return [sh]
    if name == "Ci":
        return [inv]
    cubic = {"T", "Td", "Th", "O", "Oh", "I", "Ih"}
    if name in cubic:
        c3 = _rot([1, 1, 1], 2 * math.pi / 3)
        if name[0] == "I":
            phi = (1 + math.sqrt(5)) / 2
            gens = [_rot([0, 1, phi], 2 * math.pi / 5), c3, _rot([0, 0, 1], math.pi)]
        elif name[0] == "O":
            gens = [_rz(math.pi / 2), c3]
        else:
            gens = [_rz(math.pi), c3]
        if name.endswith("h"):
            gens.append(inv)
        if name == "Td":
            gens.append(_mirror([1, -1, 0]))
        return gens
    m = re.match(r"^([CDS])(\d+)([vhd]?)$", name)
    assert m
    fam, n, suf = m.group(1), int(m.group(2)), m.group(3)
    if n < 1 or (fam == "S" and (n % 2 or n < 2)) or (fam == "D" and n < 2) or (fam == "S" and suf):
        raise InputError(
            f"'{name}' is not a point group", "S groups have even order (S4, S6, S8); D groups need n >= 2"
        )
    if fam == "S":
        return [_rz(2 * math.pi / n) @ sh]
    cn = _rz(2 * math.pi / n)
    if fam == "C":
        return [cn] + ({"v": [sxz], "h": [sh], "": []}[suf])
    if suf == "d":
        return [_rz(math.pi / n) @ sh, c2x]
    return [cn, c2x] + ([sh] if suf == "h" else [])


def _closure(gens: Sequence[np.ndarray]) -> list[np.ndarray]:
    key = lambda m: tuple(np.round(m, 6).ravel() + 0.0)
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
        if len(found) > 240:
            raise GroupIdentificationError("generators do not close into a finite point group")
    return [found[k] for k in sorted(found)]


@lru_cache(maxsize=128)
def named_table(name: str) -> CharacterTable:
    """The table of a named group, built by closing its generators
    (:func:`group_generators`) in the standard orientation."""
    if name in ("Dinfh", "Cinfv", "D∞h", "C∞v"):
        raise InputError(
            f"{name} is infinite and has no finite character table",
            "use a finite group, e.g. D2h or C2v, its subgroups used for linear centres",
        )
    mats = _closure(group_generators(name))
    got = schoenflies(mats)
    if got != name:
        raise InputError(f"'{name}' is not a distinct point group (it is {got})", f"ask for {got}")
    return table_from_matrices(mats)


# --------------------------------------------------------------------------
# the computation


def _mkey(m: np.ndarray) -> bytes:
    return np.round(np.asarray(m, dtype=float) * 1e5).astype(np.int64).tobytes()


def _classes(mats: list[np.ndarray]) -> tuple[np.ndarray, np.ndarray, list[list[int]]]:
    g = len(mats)
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
    seen = [-1] * g
    classes: list[list[int]] = []
    # identity class first, then in op order
    for a in [ident] + [k for k in range(g) if k != ident]:
        if seen[a] >= 0:
            continue
        members = sorted({int(mult[mult[x, a], inv[x]]) for x in range(g)})
        for m in members:
            seen[m] = len(classes)
        classes.append(members)
    return mult, inv, classes


_WEIGHTS = [
    math.sqrt(p) for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89)
]


def _burnside_dixon(mult: np.ndarray, inv: np.ndarray, classes: list[list[int]]) -> np.ndarray:
    """Irreducible characters (complex, irreps x classes) by Burnside's
    class-multiplication matrices, diagonalised together as in Dixon (1967)."""
    g = len(mult)
    r = len(classes)
    cls_of = np.empty(g, dtype=np.int64)
    for c, mem in enumerate(classes):
        cls_of[mem] = c
    h = np.array([len(m) for m in classes], dtype=float)
    # A[j][k, l] = #{x in C_j : x^-1 z_l in C_k}, z_l a representative of C_l
    A = np.zeros((r, r, r))
    for j, mem in enumerate(classes):
        for l in range(r):
            z = classes[l][0]
            for x in mem:
                A[j, cls_of[mult[inv[x], z]], l] += 1
    for shift in range(6):
        w = [_WEIGHTS[(j + shift * 5) % len(_WEIGHTS)] / (1 + shift) for j in range(r)]
        M = np.tensordot(np.array(w), A, axes=1)
        vals, vecs = np.linalg.eig(M)
        if r > 1:
            gaps = np.abs(vals[:, None] - vals[None, :]) + np.eye(r) * 1e9
            if gaps.min() < 1e-7:
                continue
        omegas = vecs / vecs[0:1, :]  # row 0 is the identity class: omega = 1 there
        ok = True
        for j in range(r):
            res = A[j] @ omegas - omegas * omegas[j : j + 1, :]
            if np.abs(res).max() > 1e-6:
                ok = False
                break
        if not ok:
            continue
        chars = []
        for col in range(r):
            om = omegas[:, col]
            d = math.sqrt(g / float(np.sum(np.abs(om) ** 2 / h)))
            chars.append(d * om / h)
        return np.array(chars)
    raise GroupIdentificationError("class-multiplication matrices could not be diagonalised together")


def _snap_values() -> list[float]:
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
    return sorted(out)


_SNAP = np.array(_snap_values())


def _snap(x: float) -> float:
    """Exact rounding onto the algebraic integers point groups have."""
    k = int(np.argmin(np.abs(_SNAP - x)))
    if abs(_SNAP[k] - x) < 1e-6:
        v = float(_SNAP[k])
        r = round(v)
        return float(r) if abs(v - r) < 1e-9 else v
    return round(x, 10)


def format_character(x: float, golden: bool = False) -> str:
    """A character as exact text: '2', '-1', 'sqrt2', '2cos72', '(1+sqrt5)/2'."""
    if abs(x - round(x)) < 1e-6:
        return str(int(round(x)))
    for val, txt in ((math.sqrt(2), "sqrt2"), (math.sqrt(3), "sqrt3")):
        if abs(x - val) < 1e-6:
            return txt
        if abs(x + val) < 1e-6:
            return "-" + txt
    if golden:
        s5 = math.sqrt(5)
        for val, txt in (
            ((1 + s5) / 2, "(1+sqrt5)/2"),
            ((1 - s5) / 2, "(1-sqrt5)/2"),
            ((s5 - 1) / 2, "(sqrt5-1)/2"),
            (-(1 + s5) / 2, "-(1+sqrt5)/2"),
        ):
            if abs(x - val) < 1e-6:
                return txt
    for n in range(5, 13):
        for k in range(1, n):
            deg = 360 * k / n
            if deg > 180:
                break
            if abs(x - 2 * math.cos(math.radians(deg))) < 1e-6:
                return f"2cos{deg:g}"
            if abs(x + 2 * math.cos(math.radians(deg))) < 1e-6:
                return f"-2cos{deg:g}"
    return f"{x:.4f}"


# --- frame -------------------------------------------------------------------


def _on_line(p: np.ndarray, u: np.ndarray) -> np.ndarray:
    return np.linalg.norm(np.cross(p, u), axis=1) < 1e-5 if len(p) else np.zeros(0, bool)


def _in_plane(p: np.ndarray, n: np.ndarray) -> np.ndarray:
    return np.abs(p @ n) < 1e-5 if len(p) else np.zeros(0, bool)


def _rank_counts(mask: np.ndarray, ranks) -> tuple[int, ...]:
    if ranks is None or not len(mask):
        return ()
    top = max(ranks) + 1
    return tuple(int(sum(1 for k, m in enumerate(mask) if m and ranks[k] == r)) for r in range(top))


def _unit(v) -> np.ndarray:
    v = np.asarray(v, dtype=float)
    return v / np.linalg.norm(v)


@dataclass
class _Info:
    kind: str
    order: int
    power: int
    axis: np.ndarray | None


def _infos(mats) -> list[_Info]:
    out = []
    for m in mats:
        d = describe(m)
        axis = None
        if d.axis is not None:  # the exact axis (describe rounds it for use as a key)
            w, v = np.linalg.eig(np.asarray(m, dtype=float))
            target = 1.0 if d.kind == "C" else -1.0
            a = np.real(v[:, int(np.argmin(np.abs(w - target)))])
            a = a / np.linalg.norm(a)
            axis = a if np.dot(a, d.axis) > 0 else -a
        out.append(_Info(d.kind, d.order, d.power, axis))
    return out


def _axis_score(u, pts, ranks, z=None, lab=np.array([1.0, 0.0, 0.0])):
    on = _on_line(pts, u)
    plane = _in_plane(pts, _unit(np.cross(u, z))) if z is not None else np.zeros(len(pts), bool)
    return (
        int(on.sum()),
        int(plane.sum()),
        _rank_counts(on, ranks),
        _rank_counts(plane, ranks),
        round(abs(float(np.dot(u, lab))), 6),
        tuple(np.round(u, 6)),
    )


def _plane_score(n, pts, ranks, lab_dir, z):
    inp = _in_plane(pts, n)
    d = _unit(np.cross(z, n))
    return (int(inp.sum()), _rank_counts(inp, ranks), round(abs(float(np.dot(d, lab_dir))), 6), tuple(np.round(n, 6)))


def _frame(mats, infos, pts, ranks):
    """(kind, frame rows x,y,z, principal index, x-element index or None)."""
    ex, ey, ez = np.eye(3)
    rot_axes: dict[tuple, int] = {}
    for k, o in enumerate(infos):
        if o.kind == "C":
            key = tuple(np.round(o.axis, 5))
            if o.order > infos[rot_axes[key]].order if key in rot_axes else True:
                rot_axes[key] = k
    high = [k for k in rot_axes.values() if infos[k].order >= 3]
    high_axes = {tuple(np.round(infos[k].axis, 5)) for k in high}
    if len(high_axes) >= 2:  # cubic or icosahedral
        nmax = max(infos[k].order for k in high)
        if nmax == 5:
            cands = [infos[k].axis for k in rot_axes.values() if infos[k].order == 2]
        else:
            four = [o.axis for o in infos if o.order == 4 and o.kind in ("C", "S")]
            cands = four if four else [infos[k].axis for k in rot_axes.values() if infos[k].order == 2]
        cands = list({tuple(np.round(c, 5)): c for c in cands}.values())
        z = max(cands, key=lambda u: _axis_score(u, pts, ranks, None, ez))
        perp = [c for c in cands if abs(np.dot(c, z)) < 1e-5]
        x = max(perp, key=lambda u: _axis_score(u, pts, ranks, None, ex))
        return "cubic", _orient(x, z), None, None
    if not rot_axes:
        mir = [o.axis for o in infos if o.kind == "s"]
        sax = [o.axis for o in infos if o.kind == "S"]
        z = mir[0] if mir else (sax[0] if sax else ez)
        x = _perp_default(z)
        return "low", _orient(x, z), None, None
    nmax = max(infos[k].order for k in rot_axes.values())
    tops = [k for k in rot_axes.values() if infos[k].order == nmax]
    dihedral2 = False
    if len(tops) > 1:  # three C2 axes: D2, D2h or D2d
        s4 = [o.axis for o in infos if o.kind == "S" and o.order == 4]
        if s4:
            zk = next(k for k in tops if abs(abs(np.dot(infos[k].axis, s4[0])) - 1) < 1e-5)
        else:
            dihedral2 = True
            axes = [infos[k].axis for k in tops]
            order = sorted(axes, key=lambda u: _axis_score(u, pts, ranks, None, ez), reverse=True)
            z = order[0]
            rest = sorted(order[1:], key=lambda u: _axis_score(u, pts, ranks, None, ey), reverse=True)
            y = rest[0]
            x = np.cross(y, z)
            return "D2", _orient(x, z), None, None
        tops = [zk]
    z = infos[tops[0]].axis
    # sign of z: towards more sites, then as given
    perp_c2 = [k for k, o in enumerate(infos) if o.kind == "C" and o.order == 2 and abs(np.dot(o.axis, z)) < 1e-5]
    vmir = [k for k, o in enumerate(infos) if o.kind == "s" and abs(np.dot(o.axis, z)) < 1e-5]
    if perp_c2:
        kx = max(perp_c2, key=lambda k: _axis_score(infos[k].axis, pts, ranks, z, ex))
        x = infos[kx].axis
        return "axial", _orient(x, z), tops[0], ("C2", kx)
    if vmir:
        kx = max(vmir, key=lambda k: _plane_score(infos[k].axis, pts, ranks, ex, z))
        x = _unit(np.cross(z, infos[kx].axis))
        return "axial", _orient(x, z), tops[0], ("sigma", kx)
    return "axial", _orient(_perp_default(z), z), tops[0], None


def _perp_default(z):
    for lab in np.eye(3):
        v = lab - np.dot(lab, z) * z
        if np.linalg.norm(v) > 1e-3:
            return _unit(v)
    raise AssertionError


def _orient(x, z):
    z = _unit(z)
    x = _unit(np.asarray(x) - np.dot(x, z) * z)
    for a in x:
        if abs(a) > 1e-6:
            if a < 0:
                x = -x
            break
    for a in z:
        if abs(a) > 1e-6:
            if a < 0:
                z = -z
            break
    y = np.cross(z, x)
    return np.array([x, y, z])


# --- labels ------------------------------------------------------------------


def _build(mats: list[np.ndarray], op_indices: tuple[int, ...], pts: np.ndarray, ranks) -> CharacterTable:
    g = len(mats)
    name = schoenflies(mats)
    mult, inv, classes = _classes(mats)
    raw = _burnside_dixon(mult, inv, classes)
    r = len(classes)
    # join complex-conjugate pairs
    done = [False] * r
    species: list[tuple[np.ndarray, int]] = []
    for a in range(r):
        if done[a]:
            continue
        done[a] = True
        if np.abs(raw[a].imag).max() < 1e-6:
            species.append((raw[a].real, 1))
            continue
        b = next(b for b in range(r) if not done[b] and np.abs(raw[b] - np.conj(raw[a])).max() < 1e-6)
        done[b] = True
        species.append(((raw[a] + raw[b]).real, 2))
    species = [(np.array([_snap(float(x)) for x in ch]), parts) for ch, parts in species]

    infos = _infos(mats)
    kind, F, principal, xel = _frame(mats, infos, pts, ranks)
    local = [F @ m @ F.T for m in mats]
    linfo = _infos(local)
    cls_of = [0] * g
    for c, mem in enumerate(classes):
        for m in mem:
            cls_of[m] = c

    def rep(c):
        return classes[c][0]

    def find_class(pred) -> int | None:
        for c in range(r):
            if pred(linfo[rep(c)], local[rep(c)]):
                return c
        return None

    along_z = lambda o: o.axis is not None and abs(abs(o.axis[2]) - 1) < 1e-5
    has_i = find_class(lambda o, m: o.kind == "i")
    sig_h = find_class(lambda o, m: o.kind == "s" and along_z(o)) if kind != "cubic" else None
    # principal element for A/B and E numbering
    pr_class = None
    pr_order = 1
    if kind == "axial":
        proper = [c for c in range(r) if linfo[rep(c)].kind == "C" and along_z(linfo[rep(c)])]
        improper = [c for c in range(r) if linfo[rep(c)].kind == "S" and along_z(linfo[rep(c)])]
        cands = proper if (has_i is not None or sig_h is not None or not improper) else proper + improper
        best = max(
            cands,
            key=lambda c: (
                linfo[rep(c)].order,
                linfo[rep(c)].kind == "C",
                -min(linfo[rep(c)].power, linfo[rep(c)].order - linfo[rep(c)].power),
            ),
        )
        # the element of power 1 (rotation by 2pi/n)
        n = linfo[rep(best)].order
        kind_best = linfo[rep(best)].kind
        pr_class = find_class(
            lambda o, m: o.kind == kind_best and along_z(o) and o.order == n and min(o.power, n - o.power) == 1
        )
        pr_order = n
    elif kind == "D2":
        pr_class = find_class(lambda o, m: o.kind == "C" and along_z(o))
        pr_order = 2
    sub_class = None  # C2' or sigma_v for numeric subscripts
    if kind == "axial" and xel is not None:
        sub_class = cls_of[xel[1]]
    if kind == "cubic":
        if name in ("O", "Oh"):
            sub_class = find_class(lambda o, m: o.kind == "C" and o.order == 4)
        elif name == "Td":
            sub_class = find_class(lambda o, m: o.kind == "S" and o.order == 4)
        elif name in ("I", "Ih"):
            sub_class = find_class(lambda o, m: o.kind == "C" and o.order == 5 and min(o.power, 5 - o.power) == 1)
    d2_classes = {}
    if kind == "D2":
        for ax, lab in ((2, "1"), (1, "2"), (0, "3")):
            d2_classes[lab] = find_class(
                lambda o, m, ax=ax: o.kind == "C" and o.order == 2 and abs(abs(o.axis[ax]) - 1) < 1e-5
            )

    labelled = []
    for ch, parts in species:
        d = int(round(ch[0]))
        letter = {1: "A", 2: "E", 3: "T", 4: "G", 5: "H"}[d]
        if d == 1 and kind == "D2":
            letter = "A" if all(ch[c] > 0 for c in d2_classes.values()) else "B"
        elif d == 1 and pr_class is not None and ch[pr_class] < 0:
            letter = "B"
        sub = ""
        if kind == "D2" and letter == "B":
            sub = next(lab for lab, c in d2_classes.items() if ch[c] > 0)
        elif (
            (
                kind == "cubic"
                and (letter == "T" or (letter == "A" and name in ("O", "Oh", "Td")))
                and sub_class is not None
            )
            or kind == "axial"
            and letter in "AB"
            and sub_class is not None
        ):
            sub = "1" if ch[sub_class] > 0 else "2"
        elif letter == "E" and pr_class is not None and pr_order >= 5:
            c = max(-1.0, min(1.0, ch[pr_class] / 2))
            sub = str(int(round(math.acos(c) * pr_order / (2 * math.pi))))
        par = ""
        if has_i is not None:
            par = "g" if ch[has_i] > 0 else "u"
        elif sig_h is not None:
            par = "'" if ch[sig_h] > 0 else "''"
        labelled.append([letter, sub, par, ch, parts, d])
    # E numbering only where needed: drop the number if one E per parity family
    for par in {x[2] for x in labelled}:
        es = [x for x in labelled if x[0] == "E" and x[2] == par]
        if len(es) == 1:
            es[0][1] = ""
    labelled.sort(
        key=lambda x: (
            x[2] in ("u", "''"),
            _LETTERS.index(x[0]),
            int(x[1] or 0),
            -x[3][pr_class] if pr_class is not None and x[0] == "E" else 0,
        )
    )
    labels = [f"{x[0]}{x[1]}{x[2]}" for x in labelled]
    if len(set(labels)) != len(labels):
        raise GroupIdentificationError(f"{name}: Mulliken labels are not unique ({', '.join(labels)})")

    cls_labels, cls_order = _class_labels(name, kind, classes, linfo, xel, cls_of)
    perm = sorted(range(r), key=lambda c: cls_order[c])
    classes_out = tuple(
        ConjugacyClass(cls_labels[c], len(classes[c]), tuple(op_indices[m] for m in classes[c])) for c in perm
    )
    pos = {c: k for k, c in enumerate(perm)}
    funcs = _functions(local, [x[3] for x in labelled], [x[4] for x in labelled], cls_of)
    irreps = tuple(
        Irrep(lab, x[5], tuple(float(x[3][c]) + 0.0 for c in perm), tuple(f for s in fs for f in s), fs, x[4])
        for lab, x, fs in zip(labels, labelled, funcs)
    )
    note = _axes_note(name, kind, F, pts, local, linfo, classes, cls_labels, xel)
    return CharacterTable(
        group=name,
        order=g,
        classes=classes_out,
        irreps=irreps,
        axes_note=note,
        op_indices=tuple(op_indices),
        class_of=tuple(pos[cls_of[k]] for k in range(g)),
        frame=tuple(tuple(float(round(v, 9)) + 0.0 for v in row) for row in F),
    )


def _class_labels(name, kind, classes, linfo, xel, cls_of):
    r = len(classes)
    labels, order = {}, {}
    along_z = lambda o: o.axis is not None and abs(abs(o.axis[2]) - 1) < 1e-5
    has_z_c2 = any(
        linfo[classes[c][0]].kind == "C" and linfo[classes[c][0]].order == 2 and along_z(linfo[classes[c][0]])
        for c in range(r)
    )
    xc = cls_of[xel[1]] if xel else None
    for c in range(r):
        o = linfo[classes[c][0]]
        n = o.order
        pw = _class_power(o, [linfo[m] for m in classes[c]])
        powtxt = "" if pw == 1 else f"^{pw}"
        if o.kind == "E":
            base, key = "E", (0,)
        elif o.kind == "i":
            base, key = "i", (5,)
        elif o.kind == "C":
            if kind == "D2":
                ax = "xyz"[int(np.argmax(np.abs(o.axis)))]
                base, key = f"C2({ax})", (1, 0, "zyx".index(ax))
            elif kind == "cubic":
                if (
                    n == 2
                    and any(linfo[m].order == 4 for m in range(len(linfo)) if linfo[m].kind == "C")
                    and not any(
                        abs(abs(linfo[m].axis[int(np.argmax(np.abs(linfo[m].axis)))]) - 1) > 1e-5 for m in classes[c]
                    )
                ):
                    base, key = "C2(=C4^2)", (1, 3)
                elif n == 2 and name in ("O", "Oh"):
                    base, key = "C2'", (1, 2)
                else:
                    base, key = f"C{n}{powtxt}", (1, 0 if n == 3 else 1, -n, pw)
            elif along_z(o):
                base, key = f"C{n}{powtxt}", (1, 0, -n, pw)
            else:
                if xc is not None and c == xc:
                    base, key = ("C2'" if has_z_c2 else "C2"), (2,)
                else:
                    base, key = "C2''", (3,)
        elif o.kind == "S":
            base, key = f"S{n}{powtxt}", (6, -n if kind != "cubic" else n, pw)
        else:  # mirror
            if kind == "D2":
                ax = int(np.argmax(np.abs(o.axis)))
                base, key = "sigma(" + {0: "yz", 1: "xz", 2: "xy"}[ax] + ")", (7, 2 - ax)
            elif kind == "cubic":
                on_axis = all(
                    abs(abs(linfo[m].axis[int(np.argmax(np.abs(linfo[m].axis)))]) - 1) < 1e-5 for m in classes[c]
                )
                if name == "Ih":
                    base, key = "sigma", (7,)
                else:
                    base, key = ("sigma_h", (7,)) if on_axis else ("sigma_d", (8,))
            elif kind == "low" or along_z(o):
                base, key = "sigma_h", (7,)
            else:
                contains_x = any(abs(linfo[m].axis[0]) < 1e-5 and abs(linfo[m].axis[2]) < 1e-5 for m in classes[c])
                n_vert = sum(
                    1 for cc in range(r) if linfo[classes[cc][0]].kind == "s" and not along_z(linfo[classes[cc][0]])
                )
                if name == "C2v":
                    base, key = ("sigma_v(xz)", (8,)) if contains_x else ("sigma_v'(yz)", (9,))
                elif name.endswith("d"):
                    base, key = "sigma_d", (9,)
                elif contains_x or n_vert == 1:
                    base, key = "sigma_v", (8,)
                else:
                    base, key = "sigma_d", (9,)
        size = len(classes[c])
        lab = (str(size) if size > 1 else "") + base
        if lab in labels.values() and o.kind in "CS":  # e.g. T: 4C3 and 4C3^2
            lab = f"{lab}^{n - 1}"
        labels[c] = lab
        order[c] = key + (c,)
    return labels, order


def _class_power(o, members) -> int:
    """The conventional exponent k of a class of C_n^k or S_n^k (smallest
    over the members; S_n^k with odd n written with odd k)."""
    if o.kind not in "CS":
        return 1
    n = o.order
    best = None
    for m in members:
        p = m.power
        if m.axis is not None and abs(abs(m.axis[2]) - 1) < 1e-5 and m.axis[2] < 0:
            p = n - p
        if len(members) > 1 and m.axis is not None and abs(abs(m.axis[2]) - 1) < 1e-5:
            p = min(p, n - p) if not (m.kind == "S" and n % 2) else p
        if m.kind == "S" and n % 2 and p % 2 == 0:
            p += n
        best = p if best is None else min(best, p)
    return int(best or 1)


# --- functions ---------------------------------------------------------------

_LIN = ["x", "y", "z"]
_ROT = ["Rx", "Ry", "Rz"]
_QUAD_BASIS = [(0, 0), (1, 1), (2, 2), (0, 1), (0, 2), (1, 2)]
_QUAD_CANDS = [
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
]
_DISPLAY = [
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
]


def _quad_matrix(m: np.ndarray) -> np.ndarray:
    """Action on (x2, y2, z2, xy, xz, yz): coordinate x_i goes to sum_j m[j, i] x_j."""
    out = np.zeros((6, 6))
    for col, (i, k) in enumerate(_QUAD_BASIS):
        poly = np.outer(m[:, i], m[:, k])  # coefficient of x_j x_l
        sym = poly + poly.T
        for row, (j, l) in enumerate(_QUAD_BASIS):
            out[row, col] = poly[j, j] if j == l else sym[j, l]
    return out


def _functions(local, chars, parts, cls_of):
    g = len(local)
    reps = [
        ([np.asarray(m) for m in local], [(n, np.eye(3)[k]) for k, n in enumerate(_LIN)]),
        ([np.linalg.det(m) * np.asarray(m) for m in local], [(n, np.eye(3)[k]) for k, n in enumerate(_ROT)]),
        ([_quad_matrix(np.asarray(m)) for m in local], [(n, np.array(v, dtype=float)) for n, v in _QUAD_CANDS]),
    ]
    out = []
    for ch, pa in zip(chars, parts):
        d = int(round(ch[0]))
        sets: list[tuple[str, ...]] = []
        for mats, cands in reps:
            P = sum(ch[cls_of[k]] * mats[k] for k in range(g)) * (d / pa) / g
            rank = int(round(float(np.trace(P))))
            if rank <= 0:
                continue
            chosen: list[tuple[str, np.ndarray]] = []
            for nm, v in cands:
                if np.linalg.norm(P @ v - v) > 1e-7:
                    continue
                trial = np.array([c[1] for c in chosen] + [v])
                if np.linalg.matrix_rank(trial, tol=1e-7) == len(trial):
                    chosen.append((nm, v))
                if len(chosen) == rank:
                    break
            if len(chosen) != rank:
                raise GroupIdentificationError("basis functions could not be named")
            sets.extend(_partner_sets(chosen, mats, d))
        sets.sort(key=lambda s: min(_DISPLAY.index(f) for f in s))
        out.append(tuple(sets))
    return out


def _partner_sets(chosen, mats, d):
    """Split the chosen functions into invariant sets of size d (partners)."""
    chosen = sorted(chosen, key=lambda c: _DISPLAY.index(c[0]))
    if d == 1:
        return [(c[0],) for c in chosen]
    left = list(chosen)
    sets = []
    while left:
        found = None
        for combo in itertools.combinations(left, d):
            B = np.array([c[1] for c in combo]).T
            pinv = np.linalg.pinv(B)
            if all(np.linalg.norm(B @ (pinv @ (m @ B)) - m @ B) < 1e-7 for m in mats):
                found = combo
                break
        if found is None:
            sets.append(tuple(c[0] for c in left))
            break
        sets.append(tuple(c[0] for c in found))
        left = [c for c in left if c not in found]
    return sets


# --- axes note ---------------------------------------------------------------


def _sites_txt(pts, mask) -> str:
    idx = [str(k + 1) for k, m in enumerate(mask) if m]
    return "sites " + ", ".join(idx) if idx else "no sites"


def _vec_txt(v) -> str:
    return "(" + ", ".join(f"{round(float(a), 3) + 0.0:g}" for a in v) + ")"


def _axes_note(name, kind, F, pts, local, linfo, classes, cls_labels, xel) -> str:
    x, y, z = F
    have = len(pts) > 0
    parts = []
    if kind == "low":
        if name == "Cs":
            parts.append(
                f"z = mirror normal {_vec_txt(z)}"
                + (f"; sigma_h holds {_sites_txt(pts, _in_plane(pts, z))}" if have else "")
            )
        else:
            return f"{name}: every species is one-dimensional and no label depends on the axes"
        return "; ".join(parts)
    parts.append(f"z = {_vec_txt(z)}" + (f" through {_sites_txt(pts, _on_line(pts, z))}" if have else ""))
    parts.append(f"x = {_vec_txt(x)}" + (f" through {_sites_txt(pts, _on_line(pts, x))}" if have else ""))
    if kind == "D2":
        parts.append(f"y = {_vec_txt(y)}" + (f" through {_sites_txt(pts, _on_line(pts, y))}" if have else ""))
        return "; ".join(parts)
    if kind == "cubic":
        return "; ".join(parts)
    if xel is not None:
        if xel[0] == "C2":
            lab = cls_labels[[c for c, mem in enumerate(classes) if xel[1] in mem][0]].lstrip("0123456789")
            parts.append(f"{lab} axes include x")
        plane_n = y
        tag = "sigma_v(xz)" if name == "C2v" else "sigma_v"
        has_plane = any(
            linfo[m].kind == "s" and abs(abs(np.dot(linfo[m].axis, [0, 1, 0])) - 1) < 1e-5 for m in range(len(linfo))
        )
        if has_plane and not name.endswith("d"):
            world_n = plane_n
            parts.append(
                f"{tag} is the xz plane" + (f", holding {_sites_txt(pts, _in_plane(pts, world_n))}" if have else "")
            )
    return "; ".join(parts)
