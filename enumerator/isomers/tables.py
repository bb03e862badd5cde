"""The character table of an isomer's own stabiliser.

The axis rule breaks ties between equivalent axes by the ligands in formula
order; this module supplies that order (one rank per site) and asks
:mod:`enumerator.symmetry.chartable` for the table.

>>> from enumerator.rules import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers import enumerate_isomers
>>> s = enumerate_isomers(parse_abstract("Ma3b3"), load_rules().geometry("OC-6"))
>>> [table_for_isomer(i).group for i in s.isomers]
['C3v', 'C2v']
"""

from __future__ import annotations

from enumerator.isomers.enumeration import Isomer
from enumerator.symmetry.chartable import CharacterTable, character_table

__all__ = ["table_for_isomer", "isomer_ranks"]


def table_for_isomer(isomer: Isomer) -> CharacterTable:
    """The table of an isomer's full stabiliser (ties in the axis rule broken
    by the ligands in formula order)."""
    return character_table(isomer.geometry, tuple(isomer.stabiliser), isomer_ranks(isomer))


def isomer_ranks(isomer: Isomer) -> tuple[int, ...]:
    """Per site, the formula rank of the ligand on it (ligand units are
    numbered in formula order)."""
    first: dict[str, int] = {}
    for s in isomer.sites:
        first[s.ligand] = min(first.get(s.ligand, 10**9), s.unit)
    order = {name: k for k, name in enumerate(sorted(first, key=lambda n: first[n]))}
    ranks = [0] * isomer.geometry.coordination_number
    for s in isomer.sites:
        ranks[s.index] = order[s.ligand]
    return tuple(ranks)
