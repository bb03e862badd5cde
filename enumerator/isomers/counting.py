"""Up-front isomer counts by Burnside's lemma, without enumerating.

For ligands that each take one site, the number of orbits of colourings
with prescribed colour counts is the average, over the group, of the number
of colourings each operation fixes (Burnside's lemma; the coefficient
extraction of Pólya's theorem).  An operation fixes a colouring exactly
when every one of its site cycles is one colour, so the fixed count is the
number of ways to give each cycle a colour with the counts adding up.

Chelates, tripods and η-rings (which may take only the most symmetric sites)
are counted the same way, with placements in place of sites: an operation
permutes the placements of each ligand kind, and a decoration it fixes is a
union of whole cycles of placements (each cycle's members pairwise disjoint)
that covers every site exactly once with the right number of molecules of
each kind.  Those are counted by a small dynamic programme over covered-site
bit masks (always extending the lowest uncovered site, so each decoration is
counted once).  Burnside's lemma (W. Burnside, *Theory of Groups of Finite
Order*, 1897; as used by G. Pólya, *Acta Math.* 68 (1937) 145) then averages
these fixed counts over the group.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> oc = load_rules().geometry("OC-6")
>>> burnside_counts(parse_abstract("Mabcdef"), oc)
(15, 30)
>>> burnside_counts(parse_abstract("M(AA)2b2"), oc)
(2, 3)

:func:`count_isomers` checks a composition on one or more geometries and gives
the counts as a :class:`CountResult` (what ``isosieve count`` prints):

>>> count_isomers(parse_abstract("Ma4b2"), [oc]).to_dict()["counts"][0]["geometric_isomers"]
2
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.errors import CapacityError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import canonical_placement, generate, placements_for
from enumerator.limits import SIZE_CAP
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry

__all__ = [
    "burnside_counts",
    "cycle_type",
    "fixed_decorations",
    "count_isomers",
    "check_size",
    "size_bounds",
    "CountResult",
    "GeometryCount",
    "SIZE_CAP",
]

#: Called as ``progress(done, total)`` after each symmetry operation's term of a Burnside sum.
Progress = Callable[[int, int], None]

#: How the counts are found, as the JSON document names it.
METHOD = "Burnside's lemma"


@frozen_dataclass
class GeometryCount:
    """The counts of one composition on one geometry."""

    geometry: str
    name: str
    geometric_isomers: int
    stereoisomers: int

    def to_dict(self) -> dict[str, Any]:
        """Plain data for JSON.

        Returns
        -------
        dict
            ``geometry``, ``name``, ``geometric_isomers``, ``stereoisomers``.
        """
        return {
            "geometry": self.geometry,
            "name": self.name,
            "geometric_isomers": self.geometric_isomers,
            "stereoisomers": self.stereoisomers,
        }


@frozen_dataclass
class CountResult:
    """Up-front counts of a formula: one row per geometry tried.

    ``geometry_reason`` says why the geometry was chosen when one geometry was
    counted; it is None when every geometry of the coordination number was."""

    formula: str
    counts: tuple[GeometryCount, ...]
    geometry_reason: str | None = None
    method: str = METHOD

    def to_dict(self) -> dict[str, Any]:
        """Plain data for JSON.

        Returns
        -------
        dict
            The shape of ``isosieve count --json``.
        """
        doc: dict[str, Any] = {
            "formula": self.formula,
            "method": self.method,
            "counts": [c.to_dict() for c in self.counts],
        }
        if self.geometry_reason is not None:
            doc["geometry_reason"] = self.geometry_reason
        return doc


def count_isomers(
    composition: Composition,
    geometries: Iterable[Geometry],
    geometry_reason: str | None = None,
    progress: Progress | None = None,
) -> CountResult:
    """Count the isomers of a composition on each geometry, without enumerating.

    Parameters
    ----------
    composition : Composition
        Span and arrangement settings already applied.
    geometries : iterable of Geometry
        The geometries to count on, in the order to report them.
    geometry_reason : str, optional
        Why the geometry was chosen, when there is one (reported as given).
    progress : callable, optional
        Called as ``progress(done, total)`` after each operation's term of each geometry's sum.

    Returns
    -------
    CountResult
        A geometry where the ligands cannot all be placed together counts (0, 0).

    Raises
    ------
    InputError
        Where the enumerator itself would refuse the composition on a geometry
        (donor count, ligands that cannot be placed): the same checks, run
        without listing anything.
    """
    rows = []
    for g in geometries:
        generate(composition, g)  # the enumerator's own checks; nothing is listed
        n_geo, n_stereo = burnside_counts(composition, g, progress) or (0, 0)
        rows.append(GeometryCount(g.symbol, g.name, n_geo, n_stereo))
    return CountResult(composition.formula, tuple(rows), geometry_reason)


def cycle_type(perm: tuple[int, ...]) -> tuple[int, ...]:
    """Sorted cycle lengths of a permutation.

    Parameters
    ----------
    perm : tuple of int
        Site ``i`` goes to ``perm[i]``.

    Returns
    -------
    tuple of int
        The lengths of its cycles, ascending.
    """
    seen = [False] * len(perm)
    out = []
    for i in range(len(perm)):
        if seen[i]:
            continue
        n = 0
        j = i
        while not seen[j]:
            seen[j] = True
            j = perm[j]
            n += 1
        out.append(n)
    return tuple(sorted(out))


@cached(maxsize=None)
def _fixed(cycles: tuple[int, ...], counts: tuple[int, ...]) -> int:
    if not cycles:
        return 1 if all(c == 0 for c in counts) else 0
    first, rest = cycles[0], cycles[1:]
    total = 0
    for k, c in enumerate(counts):
        if c >= first:
            nxt = counts[:k] + (c - first,) + counts[k + 1 :]
            total += _fixed(rest, tuple(sorted(nxt)))
    return total


def burnside_counts(
    composition: Composition, geometry: Geometry, progress: Progress | None = None
) -> tuple[int, int] | None:
    """(geometric isomers, stereoisomers) by Burnside's lemma, without
    enumerating: orbits under the full group and under the proper rotations.

    Works for monodentate ligands (cycle colouring), chelates of any span
    setting, fac/mer-limited tridentates, face-capping tripods and η-rings
    on one site (placement cycles, see the module docstring).  None when the
    donor count does not match the geometry; (0, 0) when the ligands cannot
    be placed together.

    Parameters
    ----------
    composition : Composition
    geometry : Geometry
    progress : callable, optional
        Called as ``progress(done, total)`` after each operation's term (for a progress bar on a long count).

    Returns
    -------
    (int, int) or None
        Orbits under the full group (geometric isomers) and under the proper
        rotations (stereoisomers, enantiomers counted apart).
    """
    if composition.donor_count != geometry.coordination_number:
        return None
    if progress is None:
        return _counts(composition.parts, geometry)
    ops = geometry.operations
    terms = []
    for k, op in enumerate(ops):
        terms.append(_term(composition.parts, geometry, op.perm))
        progress(k + 1, len(ops))
    return _average(terms, [op.proper for op in ops], composition.parts, geometry)


@cached(maxsize=256)
def _counts(parts: tuple[tuple[LigandKind, int], ...], geometry: Geometry) -> tuple[int, int]:
    ops = geometry.operations
    terms = [_term(parts, geometry, op.perm) for op in ops]
    return _average(terms, [op.proper for op in ops], parts, geometry)


def _average(
    terms: list[int], proper: list[bool], parts: tuple[tuple[LigandKind, int], ...], geometry: Geometry
) -> tuple[int, int]:
    """Burnside's averages over the full group and over its rotations."""
    rotations = [t for t, p in zip(terms, proper) if p]
    geo, rem_g = divmod(sum(terms), len(terms))
    stereo, rem_s = divmod(sum(rotations), len(rotations))
    if rem_g or rem_s:  # pragma: no cover - Burnside's average is always whole
        raise ArithmeticError(f"Burnside average is not whole for {parts} on {geometry.symbol}")
    return geo, stereo


def _monodentate(parts: tuple[tuple[LigandKind, int], ...]) -> bool:
    return all(k.denticity == 1 and not k.ring for k, _ in parts)


@cached(maxsize=4096)
def _term(parts: tuple[tuple[LigandKind, int], ...], geometry: Geometry, perm: tuple[int, ...]) -> int:
    """The decorations one site permutation fixes (one term of Burnside's sum), cached."""
    if _monodentate(parts):
        return _fixed(cycle_type(perm), tuple(sorted(n for _, n in parts)))
    return fixed_decorations(parts, geometry, perm)


def size_bounds(composition: Composition, geometry: Geometry) -> tuple[int, int]:
    """Cheap bounds (low, high) on the number of stereoisomers, from the identity's term alone.

    Every stereoisomer is an orbit of the decorations under the rotations, so
    there are at most as many as there are decorations (the identity's term of
    Burnside's sum) and at least that number over the number of rotations.
    The identity's term is one of the group's terms, so these bounds never
    cost more than the exact count; they decide the size guard
    (:func:`check_size`) without the other terms whenever the count is far
    from the cap.

    Parameters
    ----------
    composition : Composition
    geometry : Geometry

    Returns
    -------
    (int, int)
        (0, 0) when the donor count does not match the geometry.

    Examples
    --------
    >>> from enumerator.rules.ruleset import load_rules
    >>> from enumerator.parse.abstract import parse_abstract
    >>> size_bounds(parse_abstract("Mabcdef"), load_rules().geometry("OC-6"))
    (30, 720)
    """
    if composition.donor_count != geometry.coordination_number:
        return 0, 0
    identity = geometry.operations[0].perm
    decorations = _term(composition.parts, geometry, identity)
    rotations = len(geometry.proper_operations)
    return -(-decorations // rotations), decorations


def check_size(
    composition: Composition,
    geometry: Geometry,
    limit: int | None = None,
    cap: int = SIZE_CAP,
    progress: Progress | None = None,
) -> int | None:
    """Refuse an enumeration of more than ``cap`` stereoisomers when no limit is given.

    The cheap bounds of :func:`size_bounds` decide first; the exact Burnside
    count is computed only when the cap lies between them.

    Parameters
    ----------
    composition : Composition
    geometry : Geometry
    limit : int, optional
        The stereoisomer limit asked for (``--limit``): with one, nothing is checked.
    cap : int
        The most stereoisomers listed at once (default :data:`~enumerator.limits.SIZE_CAP`).
    progress : callable, optional
        Passed to :func:`burnside_counts` when the exact count is needed.

    Returns
    -------
    int or None
        The exact number of stereoisomers when it had to be computed, else None.

    Raises
    ------
    CapacityError
        Over the cap without a limit; the message gives the count (or the least it can be) and how to go on.
    """
    if limit is not None or composition.donor_count != geometry.coordination_number:
        return None
    low, high = size_bounds(composition, geometry)
    if high <= cap:
        return None
    total = None
    if low <= cap or _monodentate(composition.parts):  # the exact count of monodentates costs no more
        counts = burnside_counts(composition, geometry, progress)
        total = counts[1] if counts else 0
        if total <= cap:
            return total
    many = f"{total:,}" if total is not None else f"at least {low:,}"
    raise CapacityError(
        f"{composition.formula} on {geometry.symbol} has {many} stereoisomers (Burnside count), "
        f"more than the {cap:,} listed at once",
        "list the first N with 'isosieve isomers ... --limit N' (limit = N in a job file, --limit in batch and "
        "structures), or run 'isosieve count' for the numbers alone",
    )


def fixed_decorations(parts: tuple[tuple[LigandKind, int], ...], geometry: Geometry, perm: tuple[int, ...]) -> int:
    """How many decorations of the sites with ``parts`` the site permutation
    ``perm`` maps onto themselves.

    Parameters
    ----------
    parts : tuple of (LigandKind, int)
        Each ligand kind and how many molecules of it.
    geometry : Geometry
    perm : tuple of int
        A symmetry operation's site permutation.

    Returns
    -------
    int
        The number of fixed decorations (unions of whole placement cycles,
        each cycle's members pairwise disjoint, covering every site once).
    """
    items = _cycle_items(parts, geometry, perm)
    full_mask = (1 << geometry.coordination_number) - 1
    memo: dict[tuple[int, tuple[int, ...]], int] = {}

    def count(covered: int, left: tuple[int, ...]) -> int:
        if covered == full_mask:
            return 1 if not any(left) else 0
        key = (covered, left)
        hit = memo.get(key)
        if hit is not None:
            return hit
        free = ~covered & full_mask
        low = (free & -free).bit_length() - 1
        total = 0
        for kk, mask, size in items[low]:
            if mask & covered or size > left[kk]:
                continue
            nxt = left[:kk] + (left[kk] - size,) + left[kk + 1 :]
            total += count(covered | mask, nxt)
        memo[key] = total
        return total

    return count(0, tuple(c for _, c in parts))


def _cycle_items(
    parts: tuple[tuple[LigandKind, int], ...], geometry: Geometry, perm: tuple[int, ...]
) -> list[list[tuple[int, int, int]]]:
    """Per site, (kind index, site mask, molecules) of each usable placement
    cycle of ``perm`` whose lowest site it is (members pairwise disjoint)."""
    items: list[list[tuple[int, int, int]]] = [[] for _ in range(geometry.coordination_number)]
    for kk, (kind, _) in enumerate(parts):
        cands, index = _placements(kind, geometry)
        image = [index[canonical_placement(kind, tuple(perm[x] for x in t))] for t in cands]
        seen = [False] * len(cands)
        for start in range(len(cands)):
            if seen[start]:
                continue
            mask = 0
            size = 0
            ok = True
            j = start
            while not seen[j]:
                seen[j] = True
                m = _mask(cands[j])
                if mask & m:
                    ok = False
                mask |= m
                size += 1
                j = image[j]
            if ok:
                low = (mask & -mask).bit_length() - 1
                items[low].append((kk, mask, size))
    return items


@cached(maxsize=64)
def _placements(
    kind: LigandKind, geometry: Geometry
) -> tuple[tuple[tuple[int, ...], ...], Mapping[tuple[int, ...], int]]:
    """Every placement of one ligand kind (as :func:`placements_for` lists them) and each one's index.

    Computed once per kind and geometry rather than once per symmetry operation: listing the placements
    of a long chain (every ordered site tuple tried against the span rules) costs far more than
    permuting them.
    """
    cands = tuple(placements_for(kind, geometry))
    return cands, MappingProxyType({t: k for k, t in enumerate(cands)})


def _mask(t: tuple[int, ...]) -> int:
    m = 0
    for x in t:
        m |= 1 << x
    return m
