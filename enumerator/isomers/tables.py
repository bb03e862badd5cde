"""The character table of an isomer's own stabiliser.

The axis rule breaks ties between equivalent axes by the ligands in formula
order; this module supplies that order (one rank per site) and asks
:mod:`enumerator.symmetry.chartable` for the table.  :func:`tables_for_isomers`
collects the tables of a whole isomer set (or of one isomer) as an
:class:`IsomerTables` result, which ``isosieve chartable FORMULA`` prints.

>>> from enumerator.rules import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers import enumerate_isomers
>>> s = enumerate_isomers(parse_abstract("Ma3b3"), load_rules().geometry("OC-6"))
>>> [table_for_isomer(i).group for i in s.isomers]
['C3v', 'C2v']
>>> r = tables_for_isomers(s, "2")
>>> r.to_dict()["isomer"], r.to_dict()["group"]
('2', 'C2v')
"""

from __future__ import annotations

from typing import Any

from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.symmetry.chartable import CharacterTable, character_table

__all__ = ["table_for_isomer", "isomer_ranks", "tables_for_isomers", "IsomerTables"]


def table_for_isomer(isomer: Isomer) -> CharacterTable:
    """The table of an isomer's full stabiliser.

    Parameters
    ----------
    isomer : Isomer

    Returns
    -------
    CharacterTable
        Ties in the axis rule broken by the ligands in formula order.

    Raises
    ------
    InputError
        For a linear centre (infinite group).
    """
    return character_table(isomer.geometry, tuple(isomer.stabiliser), isomer_ranks(isomer))


def isomer_ranks(isomer: Isomer) -> tuple[int, ...]:
    """Per site, the formula rank of the ligand on it.

    Parameters
    ----------
    isomer : Isomer

    Returns
    -------
    tuple of int
        0 for the first ligand in formula order, 1 for the next, ... (ligand
        units are numbered in formula order).
    """
    first: dict[str, int] = {}
    for s in isomer.sites:
        first[s.ligand] = min(first.get(s.ligand, 10**9), s.unit)
    order = {name: k for k, name in enumerate(sorted(first, key=lambda n: first[n]))}
    ranks = [0] * isomer.geometry.coordination_number
    for s in isomer.sites:
        ranks[s.index] = order[s.ligand]
    return tuple(ranks)


@frozen_dataclass
class IsomerTables:
    """The character tables of a formula's isomers on one geometry.

    ``tables`` pairs each isomer id with its table, in isomer order.
    ``single`` is True when one isomer was asked for: the JSON document is
    then that isomer's table, not a list."""

    formula: str
    geometry: str
    tables: tuple[tuple[str, CharacterTable], ...]
    single: bool = False

    def to_dict(self) -> dict[str, Any] | list[dict[str, Any]]:
        """Plain data for JSON, the shape of ``isosieve chartable FORMULA --json``.

        Returns
        -------
        dict or list of dict
            Per isomer ``{"isomer": id, **table.to_dict()}``; a list of them,
            or the one document when ``single``.
        """
        docs = [{"isomer": iso_id, **t.to_dict()} for iso_id, t in self.tables]
        return docs[0] if self.single else docs


def tables_for_isomers(isomers: IsomerSet, isomer_id: str | None = None) -> IsomerTables:
    """The tables of every isomer of a set, or of one.

    Parameters
    ----------
    isomers : IsomerSet
    isomer_id : str, optional
        Only this isomer ('2', '1a' ...).

    Returns
    -------
    IsomerTables

    Raises
    ------
    InputError
        For an unknown isomer id (the ids present are listed), or a linear centre.
    """
    chosen = [isomers.get(isomer_id)] if isomer_id else list(isomers.isomers)
    return IsomerTables(
        formula=isomers.composition.formula,
        geometry=isomers.geometry.symbol,
        tables=tuple((iso.id, table_for_isomer(iso)) for iso in chosen),
        single=bool(isomer_id),
    )
