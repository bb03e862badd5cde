"""Where the metal and the donor atoms go: the ideal polyhedron scaled to bond lengths.

The metal sits at the origin and every donor atom on its site vector of the
ideal polyhedron, at the sum of the covalent radii of metal and donor
element (RDKit's periodic table, ``GetRcovalent``; these are single-bond
radii, so M-CO comes out some 0.2-0.3 A long, which an optimiser fixes in a
few steps).  An η-ring (Cp, arene) holds one site: it is placed as a regular
polygon of ring bond :data:`RING_BOND` whose centroid lies on the site's
direction and whose plane is perpendicular to it, each ring atom at the same
M-C covalent distance, turned about its axis to keep clear of the other
ligands.  Labels that are not element
symbols (abstract 'a', 'b', 'M') get :data:`DUMMY_DISTANCE`.

>>> bond_length("Ru", "C")  # 1.46 + 0.76, RDKit GetRcovalent
2.22
>>> element_or_none("Ru"), element_or_none("a"), element_or_none("M")
('Ru', None, None)
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from enumerator.caches import cached
from enumerator.model.elements import covalent_radius, is_element

__all__ = [
    "Vec",
    "DUMMY_DISTANCE",
    "RING_BOND",
    "element_or_none",
    "bond_length",
    "ring_positions",
    "RING_TURNS",
    "round_coordinate",
]

#: A point or direction in angstrom.
Vec = tuple[float, float, float]
#: M-donor distance (A) when either label is not an element (abstract formulas).
DUMMY_DISTANCE = 2.0  # common practice: a typical M-L distance for a placeholder
#: C-C bond of a planar eta-ring (A).
RING_BOND = 1.40  # from memory: aromatic C-C in benzene 1.39-1.40 A, Cp 1.40-1.43 A


def element_or_none(label: str) -> str | None:
    """The element symbol if ``label`` is one (exact case), else None.

    Parameters
    ----------
    label : str
        A donor or metal label ('Ru', 'C', 'a', 'M').

    Returns
    -------
    str or None
    """
    if not label or not label[0].isupper():
        return None
    return label if is_element(label) else None


@cached(maxsize=None)
def bond_length(metal: str, donor: str) -> float:
    """Metal-donor starting distance in angstrom: the sum of RDKit's covalent radii, or
    :data:`DUMMY_DISTANCE` when either is not an element.

    Parameters
    ----------
    metal, donor : str
        Element symbols or abstract labels.

    Returns
    -------
    float
    """
    if not element_or_none(metal) or not element_or_none(donor):
        return DUMMY_DISTANCE
    return round(covalent_radius(metal) + covalent_radius(donor), 4)


def round_coordinate(x: float) -> float:
    """A coordinate as written: 5 decimals, never -0.0.

    Parameters
    ----------
    x : float

    Returns
    -------
    float
    """
    v = round(float(x), 5)
    return 0.0 if v == 0 else v


def _unit(v: Sequence[float]) -> np.ndarray:
    n = math.sqrt(sum(c * c for c in v))
    return np.array([c / n for c in v])


#: Turns of an η-ring about its axis tried when it is placed (over one ring bond's angle).
RING_TURNS = 24


def ring_positions(
    site_vectors: Sequence[Vec], size: int, metal: str, element: str, avoid: Sequence[Vec] = ()
) -> list[Vec]:
    """A regular ring of ``size`` atoms, its centroid on the ring's site direction and its plane perpendicular.

    Parameters
    ----------
    site_vectors : sequence of Vec
        The unit vector of the ring's site (several vectors: their sum is the axis).
    size : int
        Ring atoms.
    metal, element : str
        The metal and the ring atoms' element (for the M-C distance).
    avoid : sequence of Vec, optional
        Points (A) of the other ligands the ring should keep clear of: of
        :data:`RING_TURNS` turns about its axis the one whose nearest atom is
        farthest from them is taken (the first of equals, so the placement is
        reproducible).

    Returns
    -------
    list of Vec
        The ring atoms in ring order; at turn 0 the first lies in the plane of the
        axis and the laboratory z axis (x where the axis is along z).
    """
    u = _unit(np.sum(np.array(site_vectors), axis=0))
    radius = RING_BOND / (2 * math.sin(math.pi / size))
    mc = bond_length(metal, element)
    h = math.sqrt(max(mc * mc - radius * radius, 0.25))
    ref = np.array([0.0, 0.0, 1.0]) if abs(u[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
    e1 = ref - (ref @ u) * u
    e1 = e1 / np.linalg.norm(e1)
    e2 = np.cross(u, e1)
    others = np.array(avoid, dtype=float).reshape(-1, 3)
    best: np.ndarray | None = None
    best_gap = -1.0
    for turn in range(RING_TURNS if len(others) else 1):
        t = 2 * math.pi * (np.arange(size) / size + turn / (RING_TURNS * size))
        ring = h * u + radius * (np.cos(t)[:, None] * e1 + np.sin(t)[:, None] * e2)
        gap = float(np.min(np.linalg.norm(ring[:, None, :] - others[None, :, :], axis=2))) if len(others) else 0.0
        if best is None or gap > best_gap + 1e-9:
            best, best_gap = ring, gap
    assert best is not None
    return [(float(p[0]), float(p[1]), float(p[2])) for p in best]
