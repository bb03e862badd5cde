"""Which sites each ligand holds, in one short line (``CO:1,2 Cl:3,6 (en):(4-5)``).

Sites are numbered from 1 as in every table; a chelate chain is written as
its linked site tuple in donor order, ``(1-2)``, a tripod in braces as the
abstract notation writes it, ``{1-2-3}``; an η-ring holds one site.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> s = enumerate_isomers(parse_abstract("M(AA)b4"), load_rules().geometry("OC-6"))
>>> occupancy(s.isomers[0])
'AA:(1-2) b:3,4,5,6'
>>> occupancy(enumerate_isomers(parse_abstract("M{AAA}b3"), load_rules().geometry("OC-6")).isomers[0])
'{AAA}:{1-2-3} b:4,5,6'
"""

from __future__ import annotations

from collections import defaultdict

from enumerator.isomers.enumeration import Isomer, Site

__all__ = ["occupancy"]


def occupancy(iso: Isomer) -> str:
    """Which sites (1-based) each ligand holds, chelates as linked site tuples, tripods in braces.

    Parameters
    ----------
    iso : Isomer

    Returns
    -------
    str
        One group per ligand in unit order, e.g. ``'CO:1,2 Cl:3,6 en:(4-5)'``.
    """
    by_unit: dict[int, list[Site]] = defaultdict(list)
    for s in iso.sites:
        by_unit[s.unit].append(s)
    tripods = {k.name for k, _ in iso.placements if k.tripod}
    groups: dict[str, list[str]] = defaultdict(list)
    order: list[str] = []
    for unit in sorted(by_unit):
        sites = sorted(by_unit[unit], key=lambda s: s.donor_index)
        name = sites[0].ligand
        if name not in groups:
            order.append(name)
        if len(sites) == 1:
            groups[name].append(str(sites[0].index + 1))
        else:
            inner = "-".join(str(s.index + 1) for s in sites)
            groups[name].append("{" + inner + "}" if name in tripods else "(" + inner + ")")
    return " ".join(f"{n}:{','.join(groups[n])}" for n in order)
