"""Everyday stereo prefixes: cis/trans, fac/mer.

On SP-4 and OC-6 (:data:`PREFIX_GEOMETRIES`) a set of two identical
ligating atoms is cis or trans, a set of three on OC-6 fac or mer, a
tridentate chelate fac or mer (common practice, not an IUPAC descriptor;
IR-9.3.1 lists the words).  :func:`prefix_text` writes one word when all sets
agree ("all-cis" for three or more sets), else the words per ligand, e.g.
``trans(a),cis(b)``.

>>> prefix_text([("a", "cis"), ("b", "cis"), ("c", "cis")]), prefix_text([("a", "trans"), ("b", "cis")])
('all-cis', 'trans(a),cis(b)')
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence

from enumerator.isomers.enumeration import Isomer
from enumerator.model.geometry import Geometry

__all__ = ["PREFIX_GEOMETRIES", "everyday_prefixes", "prefix_text"]

#: Polyhedra on which cis/trans (and on OC-6 fac/mer) are given.
PREFIX_GEOMETRIES = ("SP-4", "OC-6")


def everyday_prefixes(isomer: Isomer) -> tuple[tuple[str, str], ...]:
    """(label, word) for each set of identical ligating atoms (label: the ligand, or ligand/donor within a
    chelate), then (ligand, 'fac' | 'mer') for tridentate chelates on OC-6; empty off SP-4 and OC-6.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.

    Returns
    -------
    tuple of (str, str)
    """
    g = isomer.geometry
    if g.symbol not in PREFIX_GEOMETRIES:
        return ()
    groups: dict[tuple[str, str], list[int]] = {}
    order: list[tuple[str, str]] = []
    chains: dict[str, dict[int, list[int]]] = {}
    for s in sorted(isomer.sites, key=lambda s: (s.unit, s.donor_index)):
        if s.ring:
            continue
        key = (s.ligand, s.donor)
        if key not in groups:
            groups[key] = []
            order.append(key)
        groups[key].append(s.index)
        chains.setdefault(s.ligand, {}).setdefault(s.unit, []).append(s.index)
    multi = {name for name, units in chains.items() if any(len(v) > 1 for v in units.values())}
    out: list[tuple[str, str]] = []
    for name, donor in order:
        sites = groups[(name, donor)]
        label = name if name not in multi else f"{name}/{donor}"
        word = _shape(g, sites)
        if word:
            out.append((label, word))
    for name, units in chains.items():
        shapes = {_shape(g, v) for v in units.values() if len(v) == 3}
        if len(shapes) == 1 and g.symbol == "OC-6" and all(len(v) == 3 for v in units.values()):
            shape = shapes.pop()
            if shape:
                out.append((name, shape))
    return tuple(out)


def _shape(g: Geometry, sites: Sequence[int]) -> str | None:
    """cis/trans of two sites; fac/mer of three on OC-6; else None."""
    if len(sites) == 2:
        return g.relation(sites[0], sites[1])
    if len(sites) == 3 and g.symbol == "OC-6":
        trans = any(g.relation(a, b) == "trans" for a, b in itertools.combinations(sites, 2))
        return "mer" if trans else "fac"
    return None


def prefix_text(words: Sequence[tuple[str, str]]) -> str | None:
    """The prefix as written: one word when all sets agree, else ``word(label)`` per set; None without sets.

    Parameters
    ----------
    words : sequence of (str, str)
        (label, word) pairs from :func:`everyday_prefixes`.

    Returns
    -------
    str or None
    """
    if not words:
        return None
    distinct = {w for _, w in words}
    if len(distinct) == 1:
        w = distinct.pop()
        return f"all-{w}" if len(words) >= 3 and w in ("cis", "trans") else w
    return ",".join(f"{w}({label})" for label, w in words)
