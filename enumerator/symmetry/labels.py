"""Class labels and Mulliken labels of a group in its chosen frame.

Once the axis rule has fixed x, y and z (:mod:`enumerator.symmetry.frames`),
the operations are rewritten in that frame and

* each conjugacy class gets its conventional label ('2C4', 'C2'', 'S6^5',
  '3sigma_v', 'C2(=C4^2)', ...) and its column position (:func:`class_labels`);
* each species gets its Mulliken label: A/B (symmetric/antisymmetric under the
  principal rotation), E/T/G/H by dimension, subscripts 1/2 from C2' or
  sigma_v (or E1, E2 ... from the principal rotation's character), g/u and
  '/'' from i and sigma_h (R. S. Mulliken, *J. Chem. Phys.* 23 (1955) 1997;
  :func:`mulliken_labels`).

>>> import numpy as np
>>> from enumerator.symmetry.dixon import multiplication_table, conjugacy_classes, burnside_dixon, real_species
>>> from enumerator.symmetry.operations import describe_exact
>>> c2 = np.diag([-1.0, -1.0, 1.0]); sxz = np.diag([1.0, -1.0, 1.0])
>>> mats = [np.eye(3), c2, sxz, c2 @ sxz]
>>> mult, inv, ident = multiplication_table(mats)
>>> classes = conjugacy_classes(mult, inv, ident)
>>> view = GroupView.of("C2v", "axial", classes, describe_exact(mats), ("sigma", 2))
>>> [lab for lab, _ in class_labels(view)]
['E', 'C2', 'sigma_v(xz)', "sigma_v'(yz)"]
>>> [s.label for s in mulliken_labels(view, real_species(burnside_dixon(mult, inv, classes)))]
['A1', 'A2', 'B1', 'B2']
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np

from enumerator.frozen import frozen_dataclass
from enumerator.symmetry.frames import along_z
from enumerator.symmetry.operations import ExactOp, GroupIdentificationError
from enumerator.tolerances import ELEMENT_TOL

__all__ = ["GroupView", "Species", "class_labels", "mulliken_labels"]

_LETTERS = "ABETGH"
_DIMENSION_LETTER = MappingProxyType({1: "A", 2: "E", 3: "T", 4: "G", 5: "H"})


@frozen_dataclass(eq=False)
class GroupView:
    """A group as the labelling sees it: its classes and its operations
    described in the chosen frame (z the principal axis, x as the rule says).

    ``kind`` and ``x_element`` are those of :class:`enumerator.symmetry.frames.Frame`;
    ``class_of`` gives each operation's class position."""

    name: str
    kind: str
    classes: tuple[tuple[int, ...], ...]
    ops: tuple[ExactOp, ...]
    class_of: tuple[int, ...]
    x_element: tuple[str, int] | None

    @classmethod
    def of(
        cls,
        name: str,
        kind: str,
        classes: Sequence[Sequence[int]],
        ops: Sequence[ExactOp],
        x_element: tuple[str, int] | None,
    ) -> GroupView:
        """Build a view, working out each operation's class.

        Parameters
        ----------
        name : str
            Schoenflies symbol.
        kind : str
            'cubic', 'low', 'D2' or 'axial' (see :class:`~enumerator.symmetry.frames.Frame`).
        classes : sequence of sequence of int
            Conjugacy classes as operation indices, identity class first.
        ops : sequence of ExactOp
            The operations in the frame's coordinates.
        x_element : (str, int) or None
            The element that fixed x.

        Returns
        -------
        GroupView
        """
        class_of = [0] * len(ops)
        for c, mem in enumerate(classes):
            for m in mem:
                class_of[m] = c
        return cls(name, kind, tuple(tuple(m) for m in classes), tuple(ops), tuple(class_of), x_element)

    def rep(self, c: int) -> ExactOp:
        """The first member of class ``c``."""
        return self.ops[self.classes[c][0]]

    def find_class(self, pred: Callable[[ExactOp], bool]) -> int | None:
        """The first class whose first member satisfies ``pred``, or None."""
        for c in range(len(self.classes)):
            if pred(self.rep(c)):
                return c
        return None


@frozen_dataclass(eq=False)
class Species:
    """A labelled species: Mulliken label, dimension, real characters (one per
    class, in the view's class order) and parts (2 for a joined complex pair)."""

    label: str
    dimension: int
    characters: np.ndarray
    parts: int


# --- class labels ---------------------------------------------------------------


def _axis_deviation(o: ExactOp) -> float:
    """How far an axis is from the nearest frame axis (0 when along x, y or z)."""
    a = o.direction
    return abs(abs(a[int(np.argmax(np.abs(a)))]) - 1)


def _class_power(o: ExactOp, members: Sequence[ExactOp]) -> int:
    """The conventional exponent k of a class of C_n^k or S_n^k (smallest
    over the members; S_n^k with odd n written with odd k)."""
    if o.kind not in "CS":
        return 1
    n = o.order
    best = None
    for m in members:
        p = m.power
        on_z = m.axis is not None and abs(abs(m.axis[2]) - 1) < ELEMENT_TOL
        if on_z and m.axis is not None and m.axis[2] < 0:
            p = n - p
        if len(members) > 1 and on_z:
            p = min(p, n - p) if not (m.kind == "S" and n % 2) else p
        if m.kind == "S" and n % 2 and p % 2 == 0:
            p += n
        best = p if best is None else min(best, p)
    return int(best or 1)


def _cubic_rotation(view: GroupView, c: int, n: int, powtxt: str, pw: int) -> tuple[str, tuple]:
    members = view.classes[c]
    has_c4 = any(o.order == 4 for o in view.ops if o.kind == "C")
    if n == 2 and has_c4 and not any(_axis_deviation(view.ops[m]) > ELEMENT_TOL for m in members):
        return "C2(=C4^2)", (1, 3)
    if n == 2 and view.name in ("O", "Oh"):
        return "C2'", (1, 2)
    return f"C{n}{powtxt}", (1, 0 if n == 3 else 1, -n, pw)


def _rotation_base(view: GroupView, c: int, o: ExactOp, pw: int) -> tuple[str, tuple]:
    """Label and sort key of a class of proper rotations."""
    n = o.order
    powtxt = "" if pw == 1 else f"^{pw}"
    if view.kind == "D2":
        ax = "xyz"[int(np.argmax(np.abs(o.direction)))]
        return f"C2({ax})", (1, 0, "zyx".index(ax))
    if view.kind == "cubic":
        return _cubic_rotation(view, c, n, powtxt, pw)
    if along_z(o):
        return f"C{n}{powtxt}", (1, 0, -n, pw)
    if view.x_element is not None and c == view.class_of[view.x_element[1]]:
        has_z_c2 = any(
            view.rep(k).kind == "C" and view.rep(k).order == 2 and along_z(view.rep(k))
            for k in range(len(view.classes))
        )
        return ("C2'" if has_z_c2 else "C2"), (2,)
    return "C2''", (3,)


def _vertical_mirror(view: GroupView, c: int) -> tuple[str, tuple]:
    """sigma_v, sigma_v(xz), sigma_v'(yz) or sigma_d for a mirror containing z."""
    contains_x = any(
        abs(view.ops[m].direction[0]) < ELEMENT_TOL and abs(view.ops[m].direction[2]) < ELEMENT_TOL
        for m in view.classes[c]
    )
    n_vert = sum(1 for k in range(len(view.classes)) if view.rep(k).kind == "s" and not along_z(view.rep(k)))
    if view.name == "C2v":
        return ("sigma_v(xz)", (8,)) if contains_x else ("sigma_v'(yz)", (9,))
    if view.name.endswith("d"):
        return "sigma_d", (9,)
    if contains_x or n_vert == 1:
        return "sigma_v", (8,)
    return "sigma_d", (9,)


def _mirror_base(view: GroupView, c: int, o: ExactOp) -> tuple[str, tuple]:
    """Label and sort key of a class of reflections."""
    if view.kind == "D2":
        ax = int(np.argmax(np.abs(o.direction)))
        return "sigma(" + {0: "yz", 1: "xz", 2: "xy"}[ax] + ")", (7, 2 - ax)
    if view.kind == "cubic":
        if view.name == "Ih":
            return "sigma", (7,)
        on_axis = all(_axis_deviation(view.ops[m]) < ELEMENT_TOL for m in view.classes[c])
        return ("sigma_h", (7,)) if on_axis else ("sigma_d", (8,))
    if view.kind == "low" or along_z(o):
        return "sigma_h", (7,)
    return _vertical_mirror(view, c)


def _class_base(view: GroupView, c: int) -> tuple[str, tuple]:
    o = view.rep(c)
    pw = _class_power(o, [view.ops[m] for m in view.classes[c]])
    if o.kind == "E":
        return "E", (0,)
    if o.kind == "i":
        return "i", (5,)
    if o.kind == "C":
        return _rotation_base(view, c, o, pw)
    if o.kind == "S":
        powtxt = "" if pw == 1 else f"^{pw}"
        return f"S{o.order}{powtxt}", (6, -o.order if view.kind != "cubic" else o.order, pw)
    return _mirror_base(view, c, o)


def class_labels(view: GroupView) -> tuple[tuple[str, tuple], ...]:
    """The label and column sort key of every class.

    Parameters
    ----------
    view : GroupView

    Returns
    -------
    tuple of (str, tuple)
        Per class (in the view's order), its label ('2C3', "3C2'", 'i',
        'sigma_h', ...) and a key that sorts the columns as tables print them
        (E, rotations, i, improper rotations, mirrors).
    """
    labels: list[str] = []
    out = []
    for c in range(len(view.classes)):
        base, key = _class_base(view, c)
        o = view.rep(c)
        size = len(view.classes[c])
        lab = (str(size) if size > 1 else "") + base
        if lab in labels and o.kind in "CS":  # e.g. T: 4C3 and 4C3^2
            lab = f"{lab}^{o.order - 1}"
        labels.append(lab)
        out.append((lab, key + (c,)))
    return tuple(out)


# --- Mulliken labels --------------------------------------------------------------


@frozen_dataclass
class _KeyClasses:
    """The classes whose characters decide the parts of a Mulliken label."""

    inversion: int | None  # g/u
    sigma_h: int | None  # ' / ''
    principal: int | None  # A/B, and E numbering
    principal_order: int
    subscript: int | None  # 1/2 from C2' or sigma_v (cubic: C4, S4 or C5)
    d2: tuple[tuple[str, int], ...]  # D2: B1, B2, B3 from C2(z), C2(y), C2(x)


def _principal_class(view: GroupView, inversion: int | None, sigma_h: int | None) -> tuple[int | None, int]:
    """The class of the rotation by 2 pi/n about z (an S_n where it outranks C_n/2)."""
    if view.kind == "D2":
        return view.find_class(lambda o: o.kind == "C" and along_z(o)), 2
    if view.kind != "axial":
        return None, 1
    r = range(len(view.classes))
    proper = [c for c in r if view.rep(c).kind == "C" and along_z(view.rep(c))]
    improper = [c for c in r if view.rep(c).kind == "S" and along_z(view.rep(c))]
    cands = proper if (inversion is not None or sigma_h is not None or not improper) else proper + improper
    best = view.rep(
        max(
            cands,
            key=lambda c: (
                view.rep(c).order,
                view.rep(c).kind == "C",
                -min(view.rep(c).power, view.rep(c).order - view.rep(c).power),
            ),
        )
    )
    n, kind = best.order, best.kind
    found = view.find_class(lambda o: o.kind == kind and along_z(o) and o.order == n and min(o.power, n - o.power) == 1)
    return found, n


def _subscript_class(view: GroupView) -> int | None:
    if view.kind == "axial" and view.x_element is not None:
        return view.class_of[view.x_element[1]]
    if view.kind != "cubic":
        return None
    if view.name in ("O", "Oh"):
        return view.find_class(lambda o: o.kind == "C" and o.order == 4)
    if view.name == "Td":
        return view.find_class(lambda o: o.kind == "S" and o.order == 4)
    if view.name in ("I", "Ih"):
        return view.find_class(lambda o: o.kind == "C" and o.order == 5 and min(o.power, 5 - o.power) == 1)
    return None


def _c2_along(ax: int) -> Callable[[ExactOp], bool]:
    """A predicate: a C2 about frame axis ``ax`` (0 = x, 1 = y, 2 = z)."""

    def pred(o: ExactOp) -> bool:
        return o.kind == "C" and o.order == 2 and abs(abs(o.direction[ax]) - 1) < ELEMENT_TOL

    return pred


def _d2_classes(view: GroupView) -> tuple[tuple[str, int], ...]:
    """D2 and D2h: the subscript of B1, B2, B3 and the class of the C2 about z, y, x that decides it."""
    if view.kind != "D2":
        return ()
    out = []
    for ax, lab in ((2, "1"), (1, "2"), (0, "3")):
        c = view.find_class(_c2_along(ax))
        assert c is not None
        out.append((lab, c))
    return tuple(out)


def _key_classes(view: GroupView) -> _KeyClasses:
    inversion = view.find_class(lambda o: o.kind == "i")
    sigma_h = view.find_class(lambda o: o.kind == "s" and along_z(o)) if view.kind != "cubic" else None
    principal, order = _principal_class(view, inversion, sigma_h)
    return _KeyClasses(inversion, sigma_h, principal, order, _subscript_class(view), _d2_classes(view))


def _letter(ch: np.ndarray, d: int, view: GroupView, keys: _KeyClasses) -> str:
    if d == 1 and view.kind == "D2":
        return "A" if all(ch[c] > 0 for _, c in keys.d2) else "B"
    if d == 1 and keys.principal is not None and ch[keys.principal] < 0:
        return "B"
    return _DIMENSION_LETTER[d]


def _subscript(letter: str, ch: np.ndarray, view: GroupView, keys: _KeyClasses) -> str:
    if view.kind == "D2" and letter == "B":
        return next(lab for lab, c in keys.d2 if ch[c] > 0)
    if keys.subscript is not None and (
        (view.kind == "cubic" and (letter == "T" or (letter == "A" and view.name in ("O", "Oh", "Td"))))
        or (view.kind == "axial" and letter in "AB")
    ):
        return "1" if ch[keys.subscript] > 0 else "2"
    if letter == "E" and keys.principal is not None and keys.principal_order >= 5:
        c = max(-1.0, min(1.0, ch[keys.principal] / 2))
        return str(int(round(math.acos(c) * keys.principal_order / (2 * math.pi))))
    return ""


def _parity(ch: np.ndarray, keys: _KeyClasses) -> str:
    if keys.inversion is not None:
        return "g" if ch[keys.inversion] > 0 else "u"
    if keys.sigma_h is not None:
        return "'" if ch[keys.sigma_h] > 0 else "''"
    return ""


@dataclass(eq=False)
class _Draft:
    """A label in the making (the number of a lone E is dropped afterwards)."""

    letter: str
    subscript: str
    parity: str
    characters: np.ndarray
    parts: int
    dimension: int


def mulliken_labels(view: GroupView, species: Sequence[tuple[np.ndarray, int]]) -> tuple[Species, ...]:
    """Label the species by Mulliken's conventions and sort them as tables print them.

    R. S. Mulliken, *J. Chem. Phys.* 23 (1955) 1997: A/B by the character of the
    principal rotation, E/T/G/H by dimension, numeric subscripts from C2' (or
    sigma_v; C4, S4 or C5 in cubic groups), E1, E2, ... from the principal
    rotation's character where the order is 5 or more, g/u from i, '/'' from
    sigma_h.  An E number is dropped where one E of its parity family exists.

    Parameters
    ----------
    view : GroupView
    species : sequence of (ndarray, int)
        Real characters (one per class, in the view's class order) and parts,
        as from :func:`enumerator.symmetry.dixon.real_species`.

    Returns
    -------
    tuple of Species
        In table order: g (or ') before u (or ''), then A, B, E, T, G, H, then
        by subscript.

    Raises
    ------
    GroupIdentificationError
        If two species would get the same label.
    """
    keys = _key_classes(view)
    drafts = []
    for ch, parts in species:
        d = int(round(ch[0]))
        letter = _letter(ch, d, view, keys)
        drafts.append(_Draft(letter, _subscript(letter, ch, view, keys), _parity(ch, keys), ch, parts, d))
    for par in {x.parity for x in drafts}:  # E numbering only where needed
        es = [x for x in drafts if x.letter == "E" and x.parity == par]
        if len(es) == 1:
            es[0].subscript = ""
    pr = keys.principal
    drafts.sort(
        key=lambda x: (
            x.parity in ("u", "''"),
            _LETTERS.index(x.letter),
            int(x.subscript or 0),
            -x.characters[pr] if pr is not None and x.letter == "E" else 0,
        )
    )
    out = tuple(Species(x.letter + x.subscript + x.parity, x.dimension, x.characters, x.parts) for x in drafts)
    labels = [s.label for s in out]
    if len(set(labels)) != len(labels):
        raise GroupIdentificationError(f"{view.name}: Mulliken labels are not unique ({', '.join(labels)})")
    return out
