"""Priority ranks of an isomer's sites and the priming convention.

:func:`base_ranks` gives each site the priority number of its ligating atom
(:func:`enumerator.analyses.cip.donor_priorities`: CIP rules for catalogue
ligands, letter order a > b > c ... for abstract ones), unprimed.

Priming convention (IUPAC 2005, IR-9.3.5.1: primes mark which donor atoms
belong to one polydentate ligand; an unprimed number outranks the primed
one, 2 > 2', IR-9.3.4.8): when identical polydentate ligands would leave two
diastereomers with the same descriptor, or a chiral isomer without a
symbol, the ligating atoms of one such ligand keep their numbers, those of
the next are primed, and so on.  :func:`primed_maps` gives every assignment
of primes (at most :data:`MAX_PRIMINGS`); the index is then chosen over all
of them as without priming (the detailed IR-9.3.5 priming rules were not
available to check this against).

>>> from enumerator.parse.abstract import parse_abstract
>>> has_repeated_chelate(parse_abstract("M(AA)2b2")), has_repeated_chelate(parse_abstract("M(AA)b4"))
(True, False)
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping

from enumerator.analyses.cip import donor_priorities
from enumerator.analyses.descriptors.ranks import Rank
from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition

__all__ = ["PRIMING_SCAN", "MAX_PRIMINGS", "base_ranks", "has_repeated_chelate", "prime_groups", "primed_maps"]

#: At most this many isomers are enumerated to decide whether priming is needed.
PRIMING_SCAN = 3000
#: At most this many prime assignments are tried.
MAX_PRIMINGS = 720


def base_ranks(isomer: Isomer, composition: Composition) -> dict[int, Rank]:
    """Site index -> (priority number of its ligating atom, no primes).

    Raises
    ------
    InputError
        A catalogue ligand has no SMILES, so its CIP priority cannot be computed.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.
    composition : Composition
        Its composition.

    Returns
    -------
    dict[int, Rank]
    """
    table = donor_priorities(composition)
    return {s.index: (table[(s.ligand, s.donor_index)], 0) for s in isomer.sites}


def has_repeated_chelate(composition: Composition) -> bool:
    """Two or more polydentate ligands whose donors share a priority number.

    Parameters
    ----------
    composition : Composition

    Returns
    -------
    bool
    """
    table = donor_priorities(composition)
    seen: set[int] = set()
    for kind, n in composition.parts:
        if kind.denticity < 2 or kind.ring:
            continue
        mine = {table[(kind.name, i)] for i in range(kind.denticity)}
        if n >= 2 or mine & seen:
            return True
        seen |= mine
    return False


def prime_groups(isomer: Isomer, composition: Composition, base: Mapping[int, Rank]) -> list[int]:
    """Polydentate units (unit numbers) that share a priority number with
    another polydentate unit: the ones the priming convention tells apart.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.
    composition : Composition
        Its composition.
    base : Mapping[int, Rank]
        The unprimed ranks (:func:`base_ranks`).

    Returns
    -------
    list of int
        Unit numbers, sorted.
    """
    poly = {k.name for k in composition.kinds if k.denticity >= 2 and not k.ring}
    numbers: dict[int, set[int]] = {}
    for s in isomer.sites:
        if s.ligand in poly:
            numbers.setdefault(s.unit, set()).add(base[s.index][0])
    return sorted(u for u, ns in numbers.items() if any(ns & other for v, other in numbers.items() if v != u))


def primed_maps(isomer: Isomer, composition: Composition, base: Mapping[int, Rank]) -> list[dict[int, Rank]]:
    """Every assignment of primes to the units of :func:`prime_groups` (one unit unprimed, the next
    primed once, ...), at most :data:`MAX_PRIMINGS`; just ``base`` when fewer than two units need them.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.
    composition : Composition
        Its composition.
    base : Mapping[int, Rank]
        The unprimed ranks (:func:`base_ranks`).

    Returns
    -------
    list of dict[int, Rank]
    """
    units = prime_groups(isomer, composition, base)
    if len(units) < 2:
        return [dict(base)]
    unit = {s.index: s.unit for s in isomer.sites}
    maps = []
    for perm in itertools.permutations(range(len(units))):
        level = dict(zip(units, perm))
        maps.append({i: (r[0], level.get(unit[i], 0)) for i, r in base.items()})
        if len(maps) >= MAX_PRIMINGS:
            break
    return maps
