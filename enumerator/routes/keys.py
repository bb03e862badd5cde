"""Decorations and their canonical keys up to symmetry.

A *decoration* says which ligand sits where: ``((ligand name, (placement,
...)), ...)`` sorted by name, each placement a tuple of site indices in chain
order, written in the normal form of
:func:`~enumerator.isomers.enumeration.canonical_placement` (a ring's sites
sorted, a palindromic chain read from its lower end).  Its *canonical key*
is its smallest image under the rotations of the polyhedron, so two
decorations are the same stereoisomer exactly when their keys agree
(under the full group: the same geometric isomer).

A substitution product is found by writing the new decoration
(:func:`replace_site`) and looking its key up in :func:`isomer_index`: one
dictionary look-up, and the isomer ids are those ``isosieve isomers`` prints.

>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.rules.ruleset import load_rules
>>> oc = load_rules().geometry("OC-6")
>>> comp = parse_abstract("Ma4b2")
>>> cis, trans = enumerate_isomers_cached(comp, oc).isomers
>>> decoration(trans)
(('a', ((0,), (1,), (3,), (5,))), ('b', ((2,), (4,))))
>>> index = isomer_index(comp, oc)
>>> index[canonical_key(trans, oc)]
'2'
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.isomers.counting import check_size
from enumerator.isomers.enumeration import Isomer, IsomerSet, canonical_placement, enumerate_isomers, group_tables
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.geometry import Geometry

__all__ = [
    "Placement",
    "Decoration",
    "decoration",
    "canonical_key",
    "replace_site",
    "enumerate_isomers_cached",
    "isomer_index",
]

#: Site indices of one ligand in chain order.
Placement = tuple[int, ...]
#: Which ligand sits where: ((ligand name, (placement, ...)), ...), sorted by name.
Decoration = tuple[tuple[str, tuple[Placement, ...]], ...]


def decoration(isomer: Isomer) -> Decoration:
    """The decoration of an isomer (placements in normal form, sorted).

    Parameters
    ----------
    isomer : Isomer
        Any enumerated isomer.

    Returns
    -------
    Decoration
    """
    by: dict[str, list[Placement]] = {}
    for kind, piece in isomer.placements:
        by.setdefault(kind.name, []).extend(canonical_placement(kind, t) for t in piece)
    return tuple((n, tuple(sorted(by[n]))) for n in sorted(by))


def _image(deco: Decoration, kinds: Mapping[str, LigandKind], perm: Sequence[int]) -> Decoration:
    return tuple(
        (n, tuple(sorted(canonical_placement(kinds[n], tuple(int(perm[x]) for x in t)) for t in piece)))
        for n, piece in deco
    )


def canonical_key(
    deco: Decoration | Isomer, geometry: Geometry, kinds: Mapping[str, LigandKind] | None = None, *, proper: bool = True
) -> Decoration:
    """The smallest image of a decoration under the symmetry operations of the geometry.

    Parameters
    ----------
    deco : Decoration or Isomer
        The decoration, or an isomer (its own decoration and ligand kinds are used).
    geometry : Geometry
        The polyhedron; its operations come from
        :func:`~enumerator.isomers.enumeration.group_tables`.
    kinds : Mapping[str, LigandKind], optional
        Ligand kinds by name; required when ``deco`` is a decoration.
    proper : bool
        True (default): rotations only, so enantiomers get different keys;
        False: the full group, one key per geometric isomer.

    Returns
    -------
    Decoration
        The lexicographically smallest image.

    Raises
    ------
    TypeError
        ``deco`` is a decoration and ``kinds`` is not given.
    """
    if isinstance(deco, Isomer):
        kinds = {k.name: k for k, _ in deco.placements}
        deco = decoration(deco)
    if kinds is None:
        raise TypeError("canonical_key needs the ligand kinds of a decoration")
    tab = group_tables(geometry)
    best: Decoration | None = None
    for k, perm in enumerate(tab.perms):
        if proper and not tab.proper[k]:
            continue
        img = _image(deco, kinds, perm)
        if best is None or img < best:
            best = img
    assert best is not None  # the identity is always a rotation
    return best


def replace_site(deco: Decoration, site: int, leaving: str, entering: str) -> Decoration:
    """The decoration after the monodentate ``leaving`` ligand at ``site`` is replaced by ``entering``.

    Parameters
    ----------
    deco : Decoration
        The starting decoration.
    site : int
        Site index (from 0) held by one ``leaving`` ligand.
    leaving, entering : str
        Ligand names; the entering ligand takes the vacated site.

    Returns
    -------
    Decoration
    """
    d = {n: list(p) for n, p in deco}
    d[leaving].remove((site,))
    if not d[leaving]:
        del d[leaving]
    d.setdefault(entering, []).append((site,))
    return tuple((n, tuple(sorted(d[n]))) for n in sorted(d))


@cached(maxsize=256)
def enumerate_isomers_cached(comp: Composition, geometry: Geometry) -> IsomerSet:
    """:func:`~enumerator.isomers.enumeration.enumerate_isomers`, cached by the (composition, geometry) value.

    Parameters
    ----------
    comp : Composition
    geometry : Geometry

    Returns
    -------
    IsomerSet

    Raises
    ------
    CapacityError
        More stereoisomers than :data:`enumerator.limits.SIZE_CAP` (checked by their Burnside count first).
    """
    check_size(comp, geometry)
    return enumerate_isomers(comp, geometry)


@cached(maxsize=256)
def isomer_index(comp: Composition, geometry: Geometry) -> Mapping[Decoration, str]:
    """Every isomer of a composition by its rotation key (:func:`canonical_key`).

    Parameters
    ----------
    comp : Composition
    geometry : Geometry

    Returns
    -------
    Mapping[Decoration, str]
        Read-only mapping from canonical key to isomer id.
    """
    iset = enumerate_isomers_cached(comp, geometry)
    return MappingProxyType({canonical_key(iso, geometry): iso.id for iso in iset.isomers})
