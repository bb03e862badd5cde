"""The axis rule: which directions are x, y and z in a group's character table.

Labels such as B1/B2, C2'/C2'' or sigma_v/sigma_d depend on the axes.  One
documented rule (:data:`AXIS_RULE`) fixes them for every group, whether it is
an isomer's stabiliser or a group built from generators: :func:`choose_frame`
applies it to the operations (with their exact axes, see
:func:`enumerator.symmetry.operations.describe_exact`) and the site directions,
and :func:`axes_note` says in words where the axes went.

>>> import numpy as np
>>> from enumerator.symmetry.operations import describe_exact
>>> c2 = np.diag([-1.0, -1.0, 1.0]); syz = np.diag([-1.0, 1.0, 1.0])
>>> f = choose_frame(describe_exact([np.eye(3), c2, syz, c2 @ syz]), np.zeros((0, 3)), None)
>>> f.kind, f.x_element, (f.axes + 0.0).tolist()
('axial', ('sigma', 3), [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]])
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from enumerator.frozen import frozen_dataclass
from enumerator.symmetry.operations import ExactOp
from enumerator.tolerances import (
    AXIS_KEY_DECIMALS,
    ELEMENT_TOL,
    KEY_DECIMALS,
    PERPENDICULAR_PART_MIN,
    VECTOR_TOL,
)

__all__ = ["AXIS_RULE", "Frame", "choose_frame", "on_line", "in_plane", "along_z", "axes_note"]

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

_EX, _EY, _EZ = np.eye(3)


@frozen_dataclass(eq=False)
class Frame:
    """The axes chosen by the rule.

    ``kind`` is 'cubic' (several axes of order 3 or more), 'low' (no rotation
    axis: C1, Cs, Ci), 'D2' (three perpendicular C2 axes without S4) or
    'axial' (one principal axis).  ``axes`` holds x, y, z as rows, in the
    caller's coordinates.  ``principal`` is the index of the principal
    rotation (axial groups), ``x_element`` the element that fixed x:
    ('C2', index) or ('sigma', index), or None."""

    kind: str
    axes: np.ndarray
    principal: int | None = None
    x_element: tuple[str, int] | None = None


def on_line(p: np.ndarray, u: np.ndarray) -> np.ndarray:
    """Which points lie on the line along the unit vector ``u`` (within ``ELEMENT_TOL``).

    Parameters
    ----------
    p : ndarray, shape (n, 3)
    u : ndarray, shape (3,)

    Returns
    -------
    ndarray of bool, shape (n,)
    """
    return np.linalg.norm(np.cross(p, u), axis=1) < ELEMENT_TOL if len(p) else np.zeros(0, bool)


def in_plane(p: np.ndarray, n: np.ndarray) -> np.ndarray:
    """Which points lie in the plane through the origin with unit normal ``n`` (within ``ELEMENT_TOL``).

    Parameters
    ----------
    p : ndarray, shape (n, 3)
    n : ndarray, shape (3,)

    Returns
    -------
    ndarray of bool, shape (n,)
    """
    return np.abs(p @ n) < ELEMENT_TOL if len(p) else np.zeros(0, bool)


def along_z(o: ExactOp) -> bool:
    """Whether an operation's axis (or mirror normal) lies along z, within ``ELEMENT_TOL``.

    Parameters
    ----------
    o : ExactOp
        In the frame's coordinates.

    Returns
    -------
    bool
    """
    return o.axis is not None and abs(abs(o.axis[2]) - 1) < ELEMENT_TOL


def _rank_counts(mask: np.ndarray, ranks: Sequence[int] | None) -> tuple[int, ...]:
    if ranks is None or not len(mask):
        return ()
    top = max(ranks) + 1
    return tuple(int(sum(1 for k, m in enumerate(mask) if m and ranks[k] == r)) for r in range(top))


def _unit(v) -> np.ndarray:
    v = np.asarray(v, dtype=float)
    return v / np.linalg.norm(v)


def _axis_score(u, pts, ranks, z, lab) -> tuple:
    """Sites on the axis, then sites in its vertical plane (with z), then by
    ligand rank, then nearness to the lab axis ``lab``."""
    on = on_line(pts, u)
    plane = in_plane(pts, _unit(np.cross(u, z))) if z is not None else np.zeros(len(pts), bool)
    return (
        int(on.sum()),
        int(plane.sum()),
        _rank_counts(on, ranks),
        _rank_counts(plane, ranks),
        round(abs(float(np.dot(u, lab))), KEY_DECIMALS),
        tuple(np.round(u, KEY_DECIMALS)),
    )


def _plane_score(n, pts, ranks, lab_dir, z) -> tuple:
    """Sites in the plane, then by ligand rank, then nearness of its in-plane direction to ``lab_dir``."""
    inp = in_plane(pts, n)
    d = _unit(np.cross(z, n))
    return (
        int(inp.sum()),
        _rank_counts(inp, ranks),
        round(abs(float(np.dot(d, lab_dir))), KEY_DECIMALS),
        tuple(np.round(n, KEY_DECIMALS)),
    )


def _perp_default(z: np.ndarray) -> np.ndarray:
    """The first lab axis with a usable part perpendicular to z, made perpendicular."""
    for lab in np.eye(3):
        v = lab - np.dot(lab, z) * z
        if np.linalg.norm(v) > PERPENDICULAR_PART_MIN:
            return _unit(v)
    raise AssertionError("no lab axis is perpendicular enough to z")


def _orient(x, z) -> np.ndarray:
    """Rows x, y, z: x made perpendicular to z, each of x and z signed so that
    its first non-zero component is positive, y = z cross x."""
    z = _unit(z)
    x = _unit(np.asarray(x) - np.dot(x, z) * z)
    for a in x:
        if abs(a) > VECTOR_TOL:
            if a < 0:
                x = -x
            break
    for a in z:
        if abs(a) > VECTOR_TOL:
            if a < 0:
                z = -z
            break
    y = np.cross(z, x)
    return np.array([x, y, z])


def _rotation_axes(infos: Sequence[ExactOp]) -> dict[tuple, int]:
    """Each proper rotation axis (by rounded direction) -> its highest-order rotation."""
    rot_axes: dict[tuple, int] = {}
    for k, o in enumerate(infos):
        if o.kind == "C":
            key = tuple(np.round(o.direction, AXIS_KEY_DECIMALS))
            if key not in rot_axes or o.order > infos[rot_axes[key]].order:
                rot_axes[key] = k
    return rot_axes


def _cubic_frame(infos: Sequence[ExactOp], rot_axes: Mapping[tuple, int], high: list[int], pts, ranks) -> Frame:
    """z and x along perpendicular C4 / S4 axes (O, Oh, Td), else C2 axes (T, Th, I, Ih)."""
    nmax = max(infos[k].order for k in high)
    if nmax == 5:
        cands = [infos[k].direction for k in rot_axes.values() if infos[k].order == 2]
    else:
        four = [o.direction for o in infos if o.order == 4 and o.kind in ("C", "S")]
        cands = four if four else [infos[k].direction for k in rot_axes.values() if infos[k].order == 2]
    cands = list({tuple(np.round(c, AXIS_KEY_DECIMALS)): c for c in cands}.values())
    z = max(cands, key=lambda u: _axis_score(u, pts, ranks, None, _EZ))
    perp = [c for c in cands if abs(np.dot(c, z)) < ELEMENT_TOL]
    x = max(perp, key=lambda u: _axis_score(u, pts, ranks, None, _EX))
    return Frame("cubic", _orient(x, z))


def _low_frame(infos: Sequence[ExactOp]) -> Frame:
    """No rotation axis: z the mirror normal (Cs), else the S axis, else the lab z."""
    mir = [o.direction for o in infos if o.kind == "s"]
    sax = [o.direction for o in infos if o.kind == "S"]
    z = mir[0] if mir else (sax[0] if sax else _EZ)
    return Frame("low", _orient(_perp_default(z), z))


def _d2_frame(axes: list[np.ndarray], pts, ranks) -> Frame:
    """D2 and D2h: z the C2 axis through the most sites, y the next, x the third."""
    order = sorted(axes, key=lambda u: _axis_score(u, pts, ranks, None, _EZ), reverse=True)
    z = order[0]
    rest = sorted(order[1:], key=lambda u: _axis_score(u, pts, ranks, None, _EY), reverse=True)
    y = rest[0]
    return Frame("D2", _orient(np.cross(y, z), z))


def _axial_frame(infos: Sequence[ExactOp], principal: int, pts, ranks) -> Frame:
    """x along the best perpendicular C2 axis, else in the best vertical mirror plane."""
    z = infos[principal].direction
    perp_c2 = [
        k for k, o in enumerate(infos) if o.kind == "C" and o.order == 2 and abs(np.dot(o.direction, z)) < ELEMENT_TOL
    ]
    vmir = [k for k, o in enumerate(infos) if o.kind == "s" and abs(np.dot(o.direction, z)) < ELEMENT_TOL]
    if perp_c2:
        kx = max(perp_c2, key=lambda k: _axis_score(infos[k].direction, pts, ranks, z, _EX))
        return Frame("axial", _orient(infos[kx].direction, z), principal, ("C2", kx))
    if vmir:
        kx = max(vmir, key=lambda k: _plane_score(infos[k].direction, pts, ranks, _EX, z))
        x = _unit(np.cross(z, infos[kx].direction))
        return Frame("axial", _orient(x, z), principal, ("sigma", kx))
    return Frame("axial", _orient(_perp_default(z), z), principal)


def choose_frame(infos: Sequence[ExactOp], pts: np.ndarray, ranks: Sequence[int] | None) -> Frame:
    """Apply :data:`AXIS_RULE` to a group.

    Parameters
    ----------
    infos : sequence of ExactOp
        Every operation of the group, with its exact axis.
    pts : ndarray, shape (n, 3)
        Site directions (may be empty: then only the later tie-breaks apply).
    ranks : sequence of int or None
        Per site, the formula position of its ligand (0 = first), for ties.

    Returns
    -------
    Frame
    """
    rot_axes = _rotation_axes(infos)
    high = [k for k in rot_axes.values() if infos[k].order >= 3]
    if len({tuple(np.round(infos[k].direction, AXIS_KEY_DECIMALS)) for k in high}) >= 2:  # cubic or icosahedral
        return _cubic_frame(infos, rot_axes, high, pts, ranks)
    if not rot_axes:
        return _low_frame(infos)
    nmax = max(infos[k].order for k in rot_axes.values())
    tops = [k for k in rot_axes.values() if infos[k].order == nmax]
    if len(tops) > 1:  # three C2 axes: D2, D2h or D2d
        s4 = [o.direction for o in infos if o.kind == "S" and o.order == 4]
        if not s4:
            return _d2_frame([infos[k].direction for k in tops], pts, ranks)
        tops = [next(k for k in tops if abs(abs(np.dot(infos[k].direction, s4[0])) - 1) < ELEMENT_TOL)]
    return _axial_frame(infos, tops[0], pts, ranks)


def _sites_txt(mask) -> str:
    idx = [str(k + 1) for k, m in enumerate(mask) if m]
    return "sites " + ", ".join(idx) if idx else "no sites"


def _vec_txt(v) -> str:
    return "(" + ", ".join(f"{round(float(a), 3) + 0.0:g}" for a in v) + ")"


def _through(pts: np.ndarray, u: np.ndarray) -> str:
    return f" through {_sites_txt(on_line(pts, u))}" if len(pts) else ""


def axes_note(
    name: str,
    frame: Frame,
    pts: np.ndarray,
    local: Sequence[ExactOp],
    x_class_label: str | None,
) -> str:
    """Where the axes went, in words: the 'axes' line of a table.

    Parameters
    ----------
    name : str
        Schoenflies symbol of the group.
    frame : Frame
        As chosen by :func:`choose_frame`.
    pts : ndarray, shape (n, 3)
        Site directions in the caller's coordinates (may be empty).
    local : sequence of ExactOp
        The operations described in the frame's coordinates.
    x_class_label : str or None
        The label of the class of the C2 along x, when a C2 fixed x.

    Returns
    -------
    str
    """
    x, y, z = frame.axes
    have = len(pts) > 0
    if frame.kind == "low":
        if name != "Cs":
            return f"{name}: every species is one-dimensional and no label depends on the axes"
        return f"z = mirror normal {_vec_txt(z)}" + (f"; sigma_h holds {_sites_txt(in_plane(pts, z))}" if have else "")
    parts = [f"z = {_vec_txt(z)}" + _through(pts, z), f"x = {_vec_txt(x)}" + _through(pts, x)]
    if frame.kind == "D2":
        parts.append(f"y = {_vec_txt(y)}" + _through(pts, y))
        return "; ".join(parts)
    if frame.kind == "cubic" or frame.x_element is None:
        return "; ".join(parts)
    if frame.x_element[0] == "C2":
        assert x_class_label is not None
        parts.append(f"{x_class_label.lstrip('0123456789')} axes include x")
    has_plane = any(o.kind == "s" and abs(abs(np.dot(o.direction, [0, 1, 0])) - 1) < ELEMENT_TOL for o in local)
    if has_plane and not name.endswith("d"):
        tag = "sigma_v(xz)" if name == "C2v" else "sigma_v"
        parts.append(f"{tag} is the xz plane" + (f", holding {_sites_txt(in_plane(pts, y))}" if have else ""))
    return "; ".join(parts)
