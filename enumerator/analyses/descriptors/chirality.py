"""Chirality symbols of a coordination centre (Nomenclature of Inorganic
Chemistry, IUPAC Recommendations 2005, IR-9.3.4), other than C/A (which the
rules of :mod:`enumerator.analyses.descriptors.rules` read):

* **R/S** on T-4 (IR-9.3.4.2), from the CIP priorities: viewed with the
  lowest-priority atom pointing away, 1 -> 2 -> 3 clockwise is R (checked
  against RDKit's CIP labeller);
* **Δ/Λ** (IR-9.3.4.11 to IR-9.3.4.13, the skew-lines convention): two
  chelate rings are represented by the lines joining their ligating atoms.
  When these lines are skew and not orthogonal, one defines the axis of a
  helix and the other a tangent to it at their common normal; a
  right-handed helix is Δ, a left-handed one Λ.  It is given on OC-6 only
  (IR-9.3.4.1: the convention is applied to octahedral complexes), for bis-
  and tris-chelates when every pair of rings agrees.

A descriptor carries one symbol: R/S on T-4, else Δ/Λ where the skew-lines
convention applies, else C/A; all are kept in its detail.

>>> rs_symbol([1, 1, 1], [1, -1, -1], [-1, 1, -1], [-1, -1, 1])
'S'
>>> SYMBOL_TEXT["Delta"]
'Δ'
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping
from typing import TYPE_CHECKING

import numpy as np

from enumerator.analyses.descriptors.ranks import Rank, site_vector
from enumerator.isomers.enumeration import Isomer
from enumerator.model.geometry import Geometry

if TYPE_CHECKING:
    from numpy.typing import ArrayLike  # annotations only: numpy.typing is not imported at run time

__all__ = ["SYMBOL_TEXT", "rs_symbol", "skew_lines_sense", "tetrahedral_rs", "skew_lines_symbol"]

#: How the skew-lines symbols are written in a descriptor.
SYMBOL_TEXT = {"Delta": "Δ", "Lambda": "Λ"}


def tetrahedral_rs(g: Geometry, r: Mapping[int, Rank]) -> str | None:
    """R or S of a T-4 centre (IR-9.3.4.2) whose four priorities all differ, else None.

    Parameters
    ----------
    g : Geometry
        The tetrahedron.
    r : Mapping[int, Rank]
        Site index -> rank.

    Returns
    -------
    str or None
        'R', 'S', or None where two priorities tie.
    """
    if len(set(r.values())) != 4:
        return None
    s1, s2, s3, s4 = sorted(r, key=lambda s: r[s])
    return rs_symbol(*(site_vector(g, s) for s in (s1, s2, s3, s4)))


def rs_symbol(v1: ArrayLike, v2: ArrayLike, v3: ArrayLike, v4: ArrayLike) -> str:
    """R or S for bond vectors (from the centre) of the priority-1..4 atoms:
    seen with atom 4 pointing away, 1 -> 2 -> 3 clockwise is R.

    >>> rs_symbol([1, 1, 1], [1, -1, -1], [-1, 1, -1], [-1, -1, 1])
    'S'

    Parameters
    ----------
    v1, v2, v3, v4 : array_like
        Bond vectors of the priority-1, 2, 3 and 4 atoms.

    Returns
    -------
    str
        'R' or 'S'.
    """
    a1, a2, a3, a4 = (np.asarray(v, dtype=float) for v in (v1, v2, v3, v4))
    normal = np.cross(a2 - a1, a3 - a1)
    # the viewer sits opposite atom 4; 1->2->3 looks clockwise to it iff normal . v4 > 0
    return "R" if float(np.dot(normal, a4)) > 0 else "S"


def skew_lines_sense(p1: ArrayLike, p2: ArrayLike, q1: ArrayLike, q2: ArrayLike, tol: float = 1e-6) -> str | None:
    """'Delta' or 'Lambda' for two skew, non-orthogonal lines p1-p2 and q1-q2
    by the skew-lines convention (right-handed helix = Δ), else None.

    One line is the helix axis, the other its tangent at the common normal;
    the sense is the sign of (u1 . u2) * (d . (u1 x u2)), negative for a
    right-handed helix (d = q1 - p1).  The result is the same whichever
    line is taken as the axis.

    >>> skew_lines_sense([0, 0, -1], [0, 0, 1], [1, 0, 0], [1, 1, 1])  # tangent of a right-handed helix
    'Delta'

    Parameters
    ----------
    p1, p2 : array_like
        The ends of the first line.
    q1, q2 : array_like
        The ends of the second line.
    tol : float, optional
        Relative tolerance below which the lines count as parallel, orthogonal or meeting.

    Returns
    -------
    str or None
    """
    a1, a2, b1, b2 = (np.asarray(v, dtype=float) for v in (p1, p2, q1, q2))
    u1, u2 = a2 - a1, b2 - b1
    n = np.cross(u1, u2)
    dot = float(np.dot(u1, u2))
    off = float(np.dot(b1 - a1, n))
    scale = np.linalg.norm(u1) * np.linalg.norm(u2)
    if abs(dot) < tol * scale or abs(off) < tol * scale or np.linalg.norm(n) < tol * scale:
        return None
    return "Delta" if dot * off < 0 else "Lambda"


def skew_lines_symbol(isomer: Isomer) -> str | None:
    """Δ/Λ of an isomer's chelate rings by the skew-lines convention ('Delta' or 'Lambda'), or None.

    Every pair of chelate links that share no donor is tested with
    :func:`skew_lines_sense` (rings of one ligand count too: the two outer
    rings of cis-α-trien); the symbol is given only when every skew pair
    agrees.  η-rings take no part.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer (its chelate links and site vectors).

    Returns
    -------
    str or None
    """
    ring = {s.index for s in isomer.sites if s.ring}
    links = [(a, b) for a, b, _ in isomer.links() if a not in ring]
    senses: set[str] = set()
    g = isomer.geometry
    for (a, b), (c, d) in itertools.combinations(links, 2):
        if {a, b} & {c, d}:
            continue  # rings sharing a donor meet: their lines are not skew
        # rings of one ligand count too (cis-alpha-trien: the two outer rings)
        s = skew_lines_sense(g.vectors[a], g.vectors[b], g.vectors[c], g.vectors[d])
        if s:
            senses.add(s)
    return senses.pop() if len(senses) == 1 else None
