"""Enumerate the distinct arrangements of a composition on a geometry.

Geometric isomers are the orbits of decorated site sets under the full
symmetry group of the polyhedron; each chiral one splits into two
stereoisomers (its enantiomers), which are the orbits under the proper
rotations.  The orbits are built one ligand kind at a time: the placements
of the first kind are reduced to orbit representatives under the whole
group, the next kind is placed on the free sites and reduced under the
stabiliser of what is already placed, and so on.  Each orbit is reached
exactly once, its stabiliser comes for free, and no step ever runs over all
n! labellings (a stabiliser-chain form of orderly generation; cf. Read,
*Ann. Discrete Math.* 2 (1978) 107).

The generator is lazy, so huge cases stream and a ``limit`` stops early:

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> oc = load_rules().geometry("OC-6")
>>> [(i.id, i.point_group) for i in generate(parse_abstract("Ma4b2"), oc)]
[('1', 'C2v'), ('2', 'D4h')]
>>> s = enumerate_isomers(parse_abstract("M(AA)3"), oc)
>>> s.geometric_isomers, s.stereoisomers, [i.id for i in s.isomers]
(1, 2, ['1a', '1b'])
"""

from __future__ import annotations

import itertools
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import field

import numpy as np

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry
from enumerator.symmetry.dixon import compose_permutations
from enumerator.symmetry.operations import SymOp, schoenflies

__all__ = [
    "Site",
    "Isomer",
    "IsomerSet",
    "generate",
    "enumerate_isomers",
    "placements_for",
    "group_tables",
    "GroupTables",
    "canonical_placement",
    "capping_faces",
    "ring_sites",
]

Placement = tuple[int, ...]
Piece = tuple[Placement, ...]


@frozen_dataclass
class Site:
    """One occupied coordination site of an isomer."""

    index: int
    position: tuple[float, float, float]
    ligand: str
    donor: str
    unit: int
    donor_index: int
    ring: bool = False
    reporter: str | None = None


@frozen_dataclass
class Isomer:
    """One stereoisomer.

    ``number`` is its geometric-isomer number; the ``id`` adds 'a' or 'b'
    for the two enantiomers of a chiral one.  ``stabiliser`` holds indices
    into ``geometry.operations``: the operations (proper and improper) that
    map the decorated site set, chelate links included, onto itself.
    """

    id: str
    number: int
    geometry: Geometry
    point_group: str
    chiral: bool
    enantiomer: str | None
    sites: tuple[Site, ...]
    stabiliser: tuple[int, ...]
    placements: tuple[tuple[LigandKind, Piece], ...] = field(repr=False)

    @property
    def operations(self) -> tuple[SymOp, ...]:
        """The operations of the stabiliser, proper and improper."""
        ops = self.geometry.operations
        return tuple(ops[k] for k in self.stabiliser)

    @property
    def proper_stabiliser(self) -> tuple[int, ...]:
        """The rotations of the stabiliser, as indices into ``geometry.operations``."""
        ops = self.geometry.operations
        return tuple(k for k in self.stabiliser if ops[k].proper)

    def links(self) -> list[tuple[int, int, str]]:
        """Chelate and tripod links.

        Returns
        -------
        list of (int, int, str)
            (site, site, ligand name) per link, the lower site first, sorted;
            a tripod links every pair of its three sites, an η-ring (one site)
            has no links.
        """
        out: list[tuple[int, int, str]] = []
        for kind, piece in self.placements:
            for t in piece:
                pairs: Iterable[tuple[int, int]]
                if kind.tripod:
                    pairs = itertools.combinations(sorted(t), 2)
                else:
                    pairs = zip(t, t[1:])
                out.extend((min(a, b), max(a, b), kind.name) for a, b in pairs)
        return sorted(out)

    def sites_of(self, ligand: str) -> tuple[int, ...]:
        """The sites (0-based) a ligand holds.

        Parameters
        ----------
        ligand : str
            A ligand name of the composition.

        Returns
        -------
        tuple of int
            In site order; empty when the ligand is not there.
        """
        return tuple(s.index for s in self.sites if s.ligand == ligand)


@frozen_dataclass
class IsomerSet:
    """Every isomer of one composition on one geometry (or the first
    ``limit`` of them, with ``complete`` False)."""

    composition: Composition
    geometry: Geometry
    isomers: tuple[Isomer, ...]
    complete: bool = True

    @property
    def stereoisomers(self) -> int:
        """How many stereoisomers (enantiomers counted apart) the set holds."""
        return len(self.isomers)

    @property
    def geometric_isomers(self) -> int:
        """How many geometric isomers (enantiomer pairs counted once) the set holds."""
        return len({i.number for i in self.isomers})

    def get(self, isomer_id: str) -> Isomer:
        """The isomer with this id.

        Parameters
        ----------
        isomer_id : str
            E.g. '2' or '3a'.

        Returns
        -------
        Isomer

        Raises
        ------
        InputError
            No isomer has that id (the message lists the ids).
        """
        for i in self.isomers:
            if i.id == isomer_id:
                return i
        raise InputError(f"no isomer '{isomer_id}'", f"ids here: {', '.join(i.id for i in self.isomers)}")


@frozen_dataclass
class GroupTables:
    """A geometry's group as index tables (read-only arrays), for fast orbit work.

    ``perms`` is |G| x n (operation k sends site i to ``perms[k, i]``);
    ``mult[a, b]`` is the index of ``ops[a] @ ops[b]``; ``inverse[a]`` the index
    of the inverse of ``ops[a]``; ``proper`` marks the rotations.
    """

    perms: np.ndarray
    mult: np.ndarray
    inverse: np.ndarray
    proper: np.ndarray


def group_tables(geometry: Geometry) -> GroupTables:
    """Permutation, multiplication and inverse tables of a geometry's group.

    Parameters
    ----------
    geometry : Geometry

    Returns
    -------
    GroupTables
        Read-only arrays indexed like ``geometry.operations``; cached by the site vectors.
    """
    return _tables(geometry.vectors)


@cached(maxsize=None)
def _tables(vectors: tuple[tuple[float, float, float], ...]) -> GroupTables:
    from enumerator.model.geometry import derive_operations

    ops = derive_operations(vectors)
    g = len(ops)
    perms = np.array([op.perm for op in ops], dtype=np.int32)
    mult = _mult_by_perms(perms) if len({op.perm for op in ops}) == g else _mult_by_matrices(ops)
    ident = 0
    inverse = np.array([int(np.nonzero(mult[a] == ident)[0][0]) for a in range(g)], dtype=np.int32)
    proper = np.array([op.proper for op in ops], dtype=bool)
    for table in (perms, mult, inverse, proper):
        table.setflags(write=False)  # shared by every caller of the cache
    return GroupTables(perms, mult, inverse, proper)


def _mult_by_perms(perms: np.ndarray) -> np.ndarray:
    """The multiplication table from the site permutations, when no two operations permute the sites
    alike: the action on the sites is then faithful, and the permutation of ``a @ b`` (site ``i`` to
    ``perms[a][perms[b][i]]``) names the product (:func:`enumerator.symmetry.dixon.compose_permutations`,
    one array operation instead of g² matrix products)."""
    return compose_permutations(perms).astype(np.int32)


def _mult_by_matrices(ops) -> np.ndarray:
    """The multiplication table from the operation matrices (for a planar geometry, whose reflection in
    the plane permutes no site)."""
    keys = {tuple(np.round(op.array, 6).ravel()): k for k, op in enumerate(ops)}
    g = len(ops)
    mult = np.zeros((g, g), dtype=np.int32)
    for a, oa in enumerate(ops):
        for b, ob in enumerate(ops):
            mult[a, b] = keys[tuple(np.round(oa.array @ ob.array, 6).ravel())]
    return mult


def canonical_placement(kind: LigandKind, t: Placement) -> Placement:
    """One spelling per placement: a palindromic chain read from its lower end; a tripod's
    interchangeable donors (those with the same label) on their sites in ascending order.

    Parameters
    ----------
    kind : LigandKind
    t : tuple of int
        The sites the ligand holds, in donor order.

    Returns
    -------
    tuple of int
    """
    if kind.tripod:
        out = list(t)
        for positions in _label_groups(kind.donors):
            for k, site in zip(positions, sorted(t[k] for k in positions)):
                out[k] = site
        return tuple(out)
    if kind.palindromic:
        r = t[::-1]
        return r if r < t else t
    return t


@cached(maxsize=None)
def _label_groups(donors: tuple[str, ...]) -> tuple[tuple[int, ...], ...]:
    """Donor positions grouped by label, groups of two or more only: ('N', 'N', 'P') -> ((0, 1),)."""
    groups: dict[str, list[int]] = {}
    for k, d in enumerate(donors):
        groups.setdefault(d, []).append(k)
    return tuple(tuple(v) for v in groups.values() if len(v) > 1)


def capping_faces(geometry: Geometry) -> tuple[tuple[int, int, int], ...]:
    """The triangular faces of a polyhedron: where a tripod may sit.

    A face here is three sites whose tips span a plane of the convex hull
    that holds no other tip, with every other tip and the metal on one side
    and the metal off the plane.  So the equatorial triangle of TBPY-5 (its
    plane holds the metal) and three corners of a square face (the fourth
    lies on the plane) are not faces; the eight faces of OC-6, the four of
    T-4 and the two triangular ones of TPR-6 are.

    Parameters
    ----------
    geometry : Geometry

    Returns
    -------
    tuple of (int, int, int)
        Sorted site triples, in ascending order; cached by the site vectors.
    """
    return _capping_faces(geometry.vectors)


@cached(maxsize=None)
def _capping_faces(vectors: tuple[tuple[float, float, float], ...]) -> tuple[tuple[int, int, int], ...]:
    from enumerator.tolerances import DEGENERATE_FACE_TOL, FACE_TOL

    v = np.array(vectors, dtype=float)
    out = []
    for t in itertools.combinations(range(len(v)), 3):
        i, j, k = t
        nrm = np.cross(v[j] - v[i], v[k] - v[i])
        size = float(np.linalg.norm(nrm))
        if size < DEGENERATE_FACE_TOL:
            continue
        nrm = nrm / size
        offset = float(np.dot(nrm, v[i]))  # the metal (origin) lies at -offset from the plane
        if abs(offset) <= FACE_TOL:
            continue
        others = np.delete(v, t, axis=0) @ nrm - offset
        if np.all(others * np.sign(-offset) > FACE_TOL):
            out.append(t)
    return tuple(out)


def ring_sites(geometry: Geometry) -> tuple[int, ...]:
    """The sites an η-ring may take: those with the largest site stabiliser.

    The piano-stool idealisation puts an η-ring on one site whose local axis
    carries the ring's symmetry, so the ring goes where the frame is most
    symmetric about the site: every site of T-4, TPY-3, OC-6 or L-2, the apex
    of SPY-5, the two axial sites of TBPY-5.

    Parameters
    ----------
    geometry : Geometry

    Returns
    -------
    tuple of int
        Site indices, ascending; cached by the site vectors.
    """
    return _ring_sites(geometry.vectors)


@cached(maxsize=None)
def _ring_sites(vectors: tuple[tuple[float, float, float], ...]) -> tuple[int, ...]:
    perms = _tables(vectors).perms
    fixed = (perms == np.arange(perms.shape[1])[None, :]).sum(axis=0)
    return tuple(int(i) for i in np.nonzero(fixed == fixed.max())[0])


def placements_for(kind: LigandKind, geometry: Geometry) -> list[Placement]:
    """Every way one ligand of this kind can sit on the geometry, each once.

    A monodentate ligand takes any site; an η-ring one of the sites of the
    largest site stabiliser (:func:`ring_sites`); a tripod the three sites of
    a triangular face (:func:`capping_faces`) in every assignment of its
    donors that their labels tell apart.  A chelate chain's links obey its
    span settings (the geometry's default span where it sets none) and a
    tridentate chain its fac/mer limit.

    Parameters
    ----------
    kind : LigandKind
    geometry : Geometry

    Returns
    -------
    list of tuple of int
        Sorted canonical placements (:func:`canonical_placement`): a symmetric
        chelate's two directions count as one, and so do the assignments of a
        tripod's like donors.
    """
    n = geometry.coordination_number
    d = kind.denticity
    if kind.ring:
        return [(i,) for i in ring_sites(geometry)]
    if d == 1:
        return [(i,) for i in range(n)]
    out: set[Placement] = set()
    if kind.tripod:
        for face in capping_faces(geometry):
            out.update(canonical_placement(kind, t) for t in itertools.permutations(face))
        return sorted(out)
    for t in itertools.permutations(range(n), d):
        if not all(geometry.span_ok(kind.span(k, geometry.default_span), t[k], t[k + 1]) for k in range(d - 1)):
            continue
        if d == 3 and kind.arrangements:
            shape = "mer" if geometry.relation(t[0], t[2]) == "trans" else "fac"
            if shape not in kind.arrangements:
                continue
        out.add(canonical_placement(kind, t))
    return sorted(out)


def _pieces(cands: Sequence[Placement], masks: Sequence[int], count: int, used: int) -> Iterator[Piece]:
    """Sets of ``count`` disjoint placements avoiding the ``used`` sites, in
    lexicographic order."""
    free = [k for k in range(len(cands)) if not masks[k] & used]

    def rec(start: int, left: int, mask: int, acc: list[Placement]) -> Iterator[Piece]:
        if left == 0:
            yield tuple(acc)
            return
        for pos in range(start, len(free)):
            k = free[pos]
            if masks[k] & mask:
                continue
            acc.append(cands[k])
            yield from rec(pos + 1, left - 1, mask | masks[k], acc)
            acc.pop()

    yield from rec(0, count, used, [])


def _image(kind: LigandKind, piece: Piece, perm: np.ndarray) -> Piece:
    return tuple(sorted(canonical_placement(kind, tuple(int(perm[x]) for x in t)) for t in piece))


def _mask(t: Placement) -> int:
    m = 0
    for x in t:
        m |= 1 << x
    return m


@cached(maxsize=8192)
def _point_group(vectors, linear: bool, stab: tuple[int, ...]) -> str:
    from enumerator.model.geometry import derive_operations

    ops = derive_operations(vectors)
    if linear:
        has_inversion = any(np.allclose(ops[k].array, -np.eye(3)) for k in stab)
        return "Dinfh" if has_inversion else "Cinfv"
    return schoenflies([ops[k].array for k in stab])


def _check(composition: Composition, geometry: Geometry) -> list[tuple[LigandKind, int, list[Placement]]]:
    n = geometry.coordination_number
    if composition.donor_count != n:
        raise InputError(
            f"{composition.formula} has {composition.donor_count} donor atoms but {geometry.symbol} has {n} sites",
            "choose a geometry with that coordination number (--geometry) or check the formula",
        )
    levels = []
    for kind, count in composition.parts:
        cands = placements_for(kind, geometry)
        if not cands:
            hint = (
                "choose a geometry with a triangular face"
                if kind.tripod
                else f"allow a wider span with --span {kind.name}=cis or =trans"
            )
            raise InputError(f"ligand '{kind.name}' cannot be placed on {geometry.symbol} with its span settings", hint)
        levels.append((kind, count, cands))
    order = sorted(range(len(levels)), key=lambda k: (-levels[k][0].denticity, k))
    return [levels[k] for k in order]


def _leaves(levels, geometry: Geometry) -> Iterator[tuple[tuple[Piece, ...], tuple[int, ...]]]:
    """Depth-first walk: one (pieces, full stabiliser) per geometric isomer."""
    tab = group_tables(geometry)
    masks = [[_mask(t) for t in cands] for _, _, cands in levels]
    all_ops = tuple(range(len(tab.perms)))

    def rec(level: int, used: int, chosen: list[Piece], stab: tuple[int, ...]):
        if level == len(levels):
            yield tuple(chosen), stab
            return
        kind, count, cands = levels[level]
        for piece in _pieces(cands, masks[level], count, used):
            new_stab: tuple[int, ...]
            if len(stab) == 1:
                new_stab = stab
            else:
                new = []
                rep = True
                for h in stab:
                    img = _image(kind, piece, tab.perms[h])
                    if img < piece:
                        rep = False
                        break
                    if img == piece:
                        new.append(h)
                if not rep:
                    continue
                new_stab = tuple(new)
            m = used
            for t in piece:
                m |= _mask(t)
            chosen.append(piece)
            yield from rec(level + 1, m, chosen, new_stab)
            chosen.pop()

    yield from rec(0, 0, [], all_ops)


def _level_orders(levels, composition: Composition) -> tuple[int, ...]:
    """Each level's ligand kind's place in the formula (kinds compare by value: hashing one is not free)."""
    formula_order = {k: i for i, (k, _) in enumerate(composition.parts)}
    return tuple(formula_order[lv[0]] for lv in levels)


def _build(
    levels,
    pieces: tuple[Piece, ...],
    stab: tuple[int, ...],
    geometry: Geometry,
    composition: Composition,
    iid: str,
    number: int,
    chiral: bool,
    enantiomer: str | None,
    memo: dict[tuple[int, int, int, int], Site] | None = None,
    orders: tuple[int, ...] | None = None,
) -> Isomer:
    """One isomer; ``memo`` shares equal Site objects between the isomers of one enumeration (a Site is
    immutable, and most isomers repeat the sites of others: making each anew dominated the listing);
    ``orders`` is :func:`_level_orders`, worked out once per enumeration."""
    memo = {} if memo is None else memo
    orders = _level_orders(levels, composition) if orders is None else orders
    placed = sorted(
        ((orders[lv], t, levels[lv][0]) for lv, piece in enumerate(pieces) for t in piece),
        key=lambda x: (x[0], x[1]),
    )
    sites: list[Site | None] = [None] * geometry.coordination_number
    for unit, (order, t, kind) in enumerate(placed, start=1):
        for di, s in enumerate(t):
            key = (s, order, di, unit)
            site = memo.get(key)
            if site is None:
                site = memo[key] = Site(
                    index=s,
                    position=geometry.vectors[s],
                    ligand=kind.name,
                    donor=kind.donors[di],
                    unit=unit,
                    donor_index=di,
                    ring=kind.ring,
                    reporter=kind.reporter,
                )
            sites[s] = site
    point_group = _point_group(geometry.vectors, geometry.linear, tuple(sorted(stab)))
    return Isomer(
        id=iid,
        number=number,
        geometry=geometry,
        point_group=point_group,
        chiral=chiral,
        enantiomer=enantiomer,
        sites=tuple(s for s in sites if s is not None),
        stabiliser=tuple(sorted(stab)),
        placements=tuple((levels[lv][0], piece) for lv, piece in enumerate(pieces)),
    )


def generate(composition: Composition, geometry: Geometry, *, limit: int | None = None) -> Iterator[Isomer]:
    """Every stereoisomer, lazily, enantiomers side by side ('3a', '3b').

    Parameters
    ----------
    composition : Composition
    geometry : Geometry
    limit : int, optional
        Stop after this many stereoisomers.

    Returns
    -------
    Iterator[Isomer]
        In a fixed order: the same ids on every run.

    Raises
    ------
    InputError
        Before yielding anything, when the donor count does not match the
        geometry or a ligand cannot be placed on it.
    """
    levels = _check(composition, geometry)
    return _generate(levels, composition, geometry, limit)


def _generate(levels, composition: Composition, geometry: Geometry, limit: int | None) -> Iterator[Isomer]:
    tab = group_tables(geometry)
    mirror = next((k for k in range(len(tab.perms)) if not tab.proper[k]), None)
    emitted = 0
    memo: dict[tuple[int, int, int, int], Site] = {}
    orders = _level_orders(levels, composition)
    for number, (pieces, stab) in enumerate(_leaves(levels, geometry), start=1):
        chiral = mirror is not None and all(tab.proper[h] for h in stab)
        if not chiral:
            yield _build(levels, pieces, stab, geometry, composition, str(number), number, False, None, memo, orders)
            emitted += 1
        else:
            a, b = f"{number}a", f"{number}b"
            yield _build(levels, pieces, stab, geometry, composition, a, number, True, b, memo, orders)
            emitted += 1
            if limit is not None and emitted >= limit:
                return
            m = tab.perms[mirror]
            mpieces = tuple(_image(levels[lv][0], p, m) for lv, p in enumerate(pieces))
            inv = tab.inverse[mirror]
            mstab = tuple(int(tab.mult[tab.mult[mirror, h], inv]) for h in stab)
            yield _build(levels, mpieces, mstab, geometry, composition, b, number, True, a, memo, orders)
            emitted += 1
        if limit is not None and emitted >= limit:
            return


def enumerate_isomers(composition: Composition, geometry: Geometry, *, limit: int | None = None) -> IsomerSet:
    """All stereoisomers as a materialised set.

    Parameters
    ----------
    composition : Composition
    geometry : Geometry
    limit : int, optional
        Keep the first this many stereoisomers (``complete`` is then False if there are more).

    Returns
    -------
    IsomerSet

    Raises
    ------
    InputError
        The composition cannot be placed on the geometry, or its ligands cannot all be placed together.
    """
    levels = _check(composition, geometry)
    isomers = []
    complete = True
    for k, iso in enumerate(_generate(levels, composition, geometry, None)):
        if limit is not None and k >= limit:
            complete = False
            break
        isomers.append(iso)
    if not isomers:
        raise InputError(
            f"the ligands of {composition.formula} cannot all be placed together on {geometry.symbol}",
            "allow wider chelate spans (--span) or choose another geometry",
        )
    return IsomerSet(composition, geometry, tuple(isomers), complete)
