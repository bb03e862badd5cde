"""Character tables computed from a group's own operations.

Nothing here is typed in.  Given the 3x3 matrices of a finite point group (an
isomer's stabiliser, or a group built from generators), a table is made in
five steps, each in its own module:

1. the multiplication table and conjugacy classes, and the irreducible
   characters by the Burnside-Dixon method, rounded exactly and with
   complex-conjugate pairs joined into one real E (``Irrep.parts`` 2):
   :mod:`enumerator.symmetry.dixon`;
2. the axes, by one documented rule (:data:`AXIS_RULE`):
   :mod:`enumerator.symmetry.frames`;
3. class labels and Mulliken labels (R. S. Mulliken, *J. Chem. Phys.* 23
   (1955) 1997): :mod:`enumerator.symmetry.labels`;
4. the functions column (x, y, z, rotations, quadratics) by projection:
   :mod:`enumerator.symmetry.functions`;
5. here: the value types, the entry points and their caches.

Named groups come from generators (:mod:`enumerator.symmetry.groups`).

>>> from enumerator.rules.ruleset import load_rules
>>> oc = load_rules().geometry("OC-6")
>>> t = character_table(oc, tuple(range(len(oc.operations))))
>>> t.group, [i.label for i in t.irreps][:5]
('Oh', ['A1g', 'A2g', 'Eg', 'T1g', 'T2g'])
>>> t.species_string(t.reduce([float(sum(1 for i, p in enumerate(op.perm) if p == i)) for op in oc.operations]))
'A1g + Eg + T1u'
>>> named_table("C2v").irreps[2].functions
('x', 'Ry', 'xz')
>>> format_character(named_table("D5h").irreps[2].characters[1])
'2cos72'
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any, Protocol

import numpy as np

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.symmetry import known
from enumerator.symmetry.derive import Vec, derive_operations, derive_operations_afresh
from enumerator.symmetry.dixon import burnside_dixon, conjugacy_classes, multiplication_table, real_species
from enumerator.symmetry.frames import AXIS_RULE, axes_note, choose_frame
from enumerator.symmetry.functions import function_sets
from enumerator.symmetry.groups import GROUP_NAME, group_generators, group_matrices
from enumerator.symmetry.labels import GroupView, class_labels, mulliken_labels
from enumerator.symmetry.operations import SymOp, describe_exact, schoenflies
from enumerator.tolerances import CHARACTER_TOL, FINE_DECIMALS

__all__ = [
    "ConjugacyClass",
    "Irrep",
    "CharacterTable",
    "SiteGeometry",
    "character_table",
    "table_from_matrices",
    "geometry_table_afresh",
    "named_table",
    "format_character",
    # re-exported from the modules that define them
    "group_generators",
    "AXIS_RULE",
    "GROUP_NAME",
]


@frozen_dataclass
class ConjugacyClass:
    """One class: its label ('2C3', '3sigma_v', 'i'), size and member op indices."""

    label: str
    size: int
    members: tuple[int, ...]


@frozen_dataclass
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
        """Whether the species transforms as x, y or z (IR active)."""
        return any(f in ("x", "y", "z") for f in self.functions)

    @property
    def raman_active(self) -> bool:
        """Whether the species transforms as a quadratic function (Raman active)."""
        return any(f[0] in "xyz2" and f not in ("x", "y", "z") for f in self.functions)


@frozen_dataclass
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
        """The species with this Mulliken label.

        Raises
        ------
        KeyError
            If the table has no such species.
        """
        for i in self.irreps:
            if i.label == label:
                return i
        raise KeyError(label)

    def reduce(self, op_characters: Mapping[int, float] | Sequence[float]) -> dict[str, int]:
        """Split a representation into species by the reduction formula.

        n_i = (1/h) sum_g chi(g) chi_i(g), divided by ``parts`` for a joined
        complex pair, so a joined E's multiplicity comes out right.

        Parameters
        ----------
        op_characters : mapping or sequence of float
            One character per operation, keyed by op index or aligned with ``op_indices``.

        Returns
        -------
        dict
            Species label -> multiplicity, for the species present.

        Raises
        ------
        ValueError
            If the count of characters is wrong or a multiplicity is not a
            whole non-negative number (not a representation).
        """
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
            if abs(s - n) > CHARACTER_TOL or n < 0:
                raise ValueError(
                    f"reduction gave {s:.4f} {irr.label}: the characters are not those of a representation"
                )
            if n:
                out[irr.label] = int(n)
        return out

    def species_string(self, mult: Mapping[str, int]) -> str:
        """'2A1 + B1 + B2', in the order of the table ('0' when empty)."""
        parts = []
        for irr in self.irreps:
            n = mult.get(irr.label, 0)
            if n:
                parts.append(irr.label if n == 1 else f"{n}{irr.label}")
        return " + ".join(parts) if parts else "0"

    def to_dict(self) -> dict[str, Any]:
        """Plain data for JSON (the shape of ``isosieve chartable GROUP --json``)."""
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


class SiteGeometry(Protocol):
    """What :func:`character_table` needs of a geometry: its symbol, whether it
    is linear, and its site vectors (from which the operations are derived)."""

    @property
    def symbol(self) -> str: ...

    @property
    def linear(self) -> bool: ...

    @property
    def vectors(self) -> tuple[Vec, ...]: ...


# --------------------------------------------------------------------------
# entry points


def character_table(
    geometry: SiteGeometry, op_indices: tuple[int, ...], ranks: tuple[int, ...] | None = None
) -> CharacterTable:
    """The table of a subgroup of a geometry's operations.

    Parameters
    ----------
    geometry : SiteGeometry
        E.g. a :class:`enumerator.model.geometry.Geometry`; its operations are
        :func:`enumerator.symmetry.derive.derive_operations` of its vectors.
    op_indices : tuple of int
        The subgroup, as indices into those operations (e.g. a stabiliser).
    ranks : tuple of int, optional
        Per site, the formula position of the ligand on it (0 = first), used
        only to break ties in the axis rule.

    Returns
    -------
    CharacterTable

    Raises
    ------
    InputError
        For a linear centre, whose group is infinite.
    """
    if geometry.linear:
        raise InputError(
            f"{geometry.symbol} is linear: its group (D∞h or C∞v) is infinite and has no finite character table",
            "stretch species of a linear centre are given by correlation from D2h / C2v "
            "(see `isosieve isomers ... --geometry L-2`)",
        )
    ops = tuple(int(k) for k in op_indices)
    # groups of order 1 or 2 (C1, Cs, Ci, C2) have one labelling whatever the
    # in-plane axis: the tie-break cannot change them, so they share one
    # cached table instead of one per isomer
    if len(ops) <= 2:
        ranks = None
    return _geometry_table(geometry.vectors, ops, tuple(ranks) if ranks else None)


@cached(maxsize=4096)
def _geometry_table(
    vectors: tuple[Vec, ...], op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
) -> CharacterTable:
    stored = known.table(vectors, op_indices, ranks)
    return _table_of(derive_operations(vectors), vectors, op_indices, ranks) if stored is None else stored


def geometry_table_afresh(
    vectors: tuple[Vec, ...], op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
) -> CharacterTable:
    """The table :func:`character_table` gives for these site vectors, computed now from operations derived now
    (never from a store, not cached): what the built-in geometries' store is written from.

    Parameters
    ----------
    vectors : tuple of (x, y, z)
        The geometry's site vectors (not collinear).
    op_indices : tuple of int
        The subgroup, as indices into :func:`enumerator.symmetry.derive.derive_operations_afresh` of the vectors.
    ranks : tuple of int or None
        As :func:`character_table` passes them on (None for groups of order 1 or 2).

    Returns
    -------
    CharacterTable
    """
    return _table_of(derive_operations_afresh(vectors), vectors, op_indices, ranks)


def _table_of(
    ops: Sequence[SymOp], vectors: tuple[Vec, ...], op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
) -> CharacterTable:
    mats = [ops[k].array for k in op_indices]
    pts = np.array(vectors, dtype=float)
    # sites that span space fix each operation by its permutation: compose those
    perms = [ops[k].perm for k in op_indices] if np.linalg.matrix_rank(pts) == 3 else None
    return _build(mats, op_indices, pts, ranks, perms)


def table_from_matrices(matrices: Sequence[np.ndarray], points: Sequence[Sequence[float]] = ()) -> CharacterTable:
    """The table of a group given by all its matrices.

    Parameters
    ----------
    matrices : sequence of array_like, shape (3, 3)
        Every operation once (e.g. closed from generators, or converted from
        another library).
    points : sequence of (x, y, z), optional
        Site directions for the axis rule.

    Returns
    -------
    CharacterTable
        ``op_indices`` are positions in ``matrices``.
    """
    keys = tuple(tuple(float(x) for x in np.round(np.asarray(m, dtype=float), FINE_DECIMALS).ravel()) for m in matrices)
    pts = tuple(tuple(float(x) for x in p) for p in points)
    return _matrices_table(keys, pts)


@cached(maxsize=512)
def _matrices_table(keys: tuple[tuple[float, ...], ...], pts: tuple[tuple[float, ...], ...]) -> CharacterTable:
    mats = [np.array(k).reshape(3, 3) for k in keys]
    return _build(mats, tuple(range(len(mats))), np.array(pts, dtype=float).reshape(-1, 3), None, None)


@cached(maxsize=128)
def named_table(name: str) -> CharacterTable:
    """The table of a named group, built by closing its generators in the
    standard orientation (:func:`enumerator.symmetry.groups.group_matrices`).

    Parameters
    ----------
    name : str
        A Schoenflies symbol: C2v, D4h, Td, Oh, Ih, D5h, S8 ...

    Returns
    -------
    CharacterTable

    Raises
    ------
    InputError
        For an infinite group, a name that is not a point group, or a second
        name of a group (S2 is Ci).
    """
    return table_from_matrices(group_matrices(name))


# --------------------------------------------------------------------------
# the computation


def _build(
    mats: list[np.ndarray],
    op_indices: tuple[int, ...],
    pts: np.ndarray,
    ranks: tuple[int, ...] | None,
    perms: list[tuple[int, ...]] | None,
) -> CharacterTable:
    name = schoenflies(mats)
    mult, inv, ident = multiplication_table(mats, perms)
    classes = conjugacy_classes(mult, inv, ident)
    species = real_species(burnside_dixon(mult, inv, classes))
    frame = choose_frame(describe_exact(mats), pts, ranks)
    F = frame.axes
    local = [F @ m @ F.T for m in mats]
    view = GroupView.of(name, frame.kind, classes, describe_exact(local), frame.x_element)
    labelled = mulliken_labels(view, species)
    cls_labels = class_labels(view)
    perm = sorted(range(len(classes)), key=lambda c: cls_labels[c][1])
    classes_out = tuple(
        ConjugacyClass(cls_labels[c][0], len(classes[c]), tuple(op_indices[m] for m in classes[c])) for c in perm
    )
    pos = {c: k for k, c in enumerate(perm)}
    funcs = function_sets(local, [s.characters for s in labelled], [s.parts for s in labelled], view.class_of)
    irreps = tuple(
        Irrep(
            s.label,
            s.dimension,
            tuple(float(s.characters[c]) + 0.0 for c in perm),
            tuple(f for x in fs for f in x),
            fs,
            s.parts,
        )
        for s, fs in zip(labelled, funcs)
    )
    x_label = cls_labels[view.class_of[frame.x_element[1]]][0] if frame.x_element else None
    return CharacterTable(
        group=name,
        order=len(mats),
        classes=classes_out,
        irreps=irreps,
        axes_note=axes_note(name, frame, pts, view.ops, x_label),
        op_indices=tuple(op_indices),
        class_of=tuple(pos[view.class_of[k]] for k in range(len(mats))),
        frame=tuple((_fine(row[0]), _fine(row[1]), _fine(row[2])) for row in F),
    )


def _fine(v: float) -> float:
    return float(round(v, FINE_DECIMALS)) + 0.0


def format_character(x: float, golden: bool = False) -> str:
    """A character as exact text: '2', '-1', 'sqrt2', '2cos72', '(1+sqrt5)/2'.

    Parameters
    ----------
    x : float
        A (snapped) character value.
    golden : bool
        Write the golden-ratio values of the icosahedral groups as (1+sqrt5)/2
        and its relatives instead of 2cos72 / 2cos144.

    Returns
    -------
    str
        Exact text where ``x`` is within ``CHARACTER_TOL`` of a known value,
        else four decimals.
    """
    if abs(x - round(x)) < CHARACTER_TOL:
        return str(int(round(x)))
    for val, txt in ((math.sqrt(2), "sqrt2"), (math.sqrt(3), "sqrt3")):
        if abs(x - val) < CHARACTER_TOL:
            return txt
        if abs(x + val) < CHARACTER_TOL:
            return "-" + txt
    if golden:
        s5 = math.sqrt(5)
        for val, txt in (
            ((1 + s5) / 2, "(1+sqrt5)/2"),
            ((1 - s5) / 2, "(1-sqrt5)/2"),
            ((s5 - 1) / 2, "(sqrt5-1)/2"),
            (-(1 + s5) / 2, "-(1+sqrt5)/2"),
        ):
            if abs(x - val) < CHARACTER_TOL:
                return txt
    return _cosine_text(x)


def _cosine_text(x: float) -> str:
    """'2cos72', '-2cos144' ... for the 2cos(360 k/n) values with n from 5 to 12, else four decimals."""
    for n in range(5, 13):
        for k in range(1, n):
            deg = 360 * k / n
            if deg > 180:
                break
            if abs(x - 2 * math.cos(math.radians(deg))) < CHARACTER_TOL:
                return f"2cos{deg:g}"
            if abs(x + 2 * math.cos(math.radians(deg))) < CHARACTER_TOL:
                return f"-2cos{deg:g}"
    return f"{x:.4f}"
