"""Priority ranks and how the rules read them off the polyhedron.

A rank is ``(priority number, primes)``: smaller means higher priority, so
1 > 1' > 1'' > 2 (IUPAC 2005, IR-9.3.4.8: an unprimed number outranks the
primed one).  A rule of :mod:`enumerator.analyses.descriptors.rules` returns
one :class:`Choice` per admissible choice of reference atoms; the sequences
for C/A are read round a ring of sites by :func:`ring_sequences`.  Sites are
found from the geometry (:func:`trans_partners`, ``geometry.edges``), never
by fixed indices: user rule files may order sites differently.

>>> format_rank((2, 1))
"2'"
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from enumerator.frozen import frozen_dataclass
from enumerator.model.geometry import Geometry

__all__ = ["Rank", "Sequences", "Choice", "format_rank", "trans_partners", "site_vector", "ring_sequences"]

#: (priority number, primes): smaller = higher priority.
Rank = tuple[int, int]
#: C/A candidates: (sequence of ranks, 'C' or 'A') pairs.
Sequences = tuple[tuple[tuple[Rank, ...], str], ...]


@frozen_dataclass
class Choice:
    """One admissible choice of reference atoms under a rule.

    ``key`` is the configuration index as ranks (the largest key wins: the
    "highest numerical value" rule); ``seqs`` the C/A candidates read for
    it; ``split`` puts a hyphen after that many digits (0: none)."""

    key: tuple[Rank, ...]
    seqs: Sequences = ()
    split: int = 0


def format_rank(r: Rank) -> str:
    """A rank as written in an index: the number, then its primes.

    Parameters
    ----------
    r : Rank

    Returns
    -------
    str
    """
    return f"{r[0]}" + "'" * r[1]


def trans_partners(g: Geometry) -> dict[int, int]:
    """Site index -> the index of the site trans to it (sites with no trans partner are left out).

    Parameters
    ----------
    g : Geometry

    Returns
    -------
    dict[int, int]
    """
    n = g.coordination_number
    return {i: j for i in range(n) for j in range(n) if i != j and g.relation(i, j) == "trans"}


def site_vector(g: Geometry, i: int) -> np.ndarray:
    """The direction of site ``i`` as a numpy vector.

    Parameters
    ----------
    g : Geometry
    i : int
        0-based site index.

    Returns
    -------
    numpy.ndarray
    """
    return np.array(g.vectors[i], dtype=float)


def _ring_orders(g: Geometry, view: np.ndarray, ring: Sequence[int], start: int) -> tuple[list[int], list[int]]:
    """The ring sites from ``start``, anticlockwise and clockwise as seen
    by a viewer on ``view`` looking towards the metal."""
    w = view / np.linalg.norm(view)
    b = site_vector(g, start)
    e1 = b - np.dot(b, w) * w
    e1 = e1 / np.linalg.norm(e1)
    e2 = np.cross(w, e1)

    def ang(s: int) -> float:
        v = site_vector(g, s)
        a = float(np.arctan2(np.dot(v, e2), np.dot(v, e1)))
        a = a % (2 * np.pi)
        return 0.0 if a > 2 * np.pi - 1e-9 or s == start else a

    acw = sorted(ring, key=lambda s: (s != start, ang(s)))
    cw = [start] + acw[1:][::-1]
    return acw, cw


def ring_sequences(
    g: Geometry,
    r: Mapping[int, Rank],
    view: np.ndarray,
    ring: Sequence[int],
    start: int,
    tail: Mapping[int, int] | None = None,
) -> Sequences:
    """The C/A candidates of one ring of sites read from ``start``.

    Parameters
    ----------
    g : Geometry
        The polyhedron.
    r : Mapping[int, Rank]
        Site index -> rank.
    view : numpy.ndarray
        Where the viewer sits, looking towards the metal.
    ring : sequence of int
        The sites read round.
    start : int
        The site the reading starts from.
    tail : Mapping[int, int], optional
        Each ring site's partner, whose ranks follow the ring's (TPR-6: the
        preferred-face atoms eclipsed).

    Returns
    -------
    Sequences
        The clockwise reading labelled 'C' and the anticlockwise one 'A'.
    """
    acw, cw = _ring_orders(g, view, ring, start)
    out = []
    for order, sym in ((cw, "C"), (acw, "A")):
        seq = tuple(r[s] for s in order)
        if tail is not None:
            seq += tuple(r[tail[s]] for s in order)
        out.append((seq, sym))
    return tuple(out)
