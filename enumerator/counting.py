"""Up-front isomer counts by Burnside's lemma, without enumerating.

For ligands that each take one site, the number of orbits of colourings
with prescribed colour counts is the average, over the group, of the number
of colourings each operation fixes (Burnside's lemma; the coefficient
extraction of Pólya's theorem).  An operation fixes a colouring exactly
when every one of its site cycles is one colour, so the fixed count is the
number of ways to give each cycle a colour with the counts adding up.

>>> from enumerator.rules import load_rules
>>> from enumerator.formula import parse_abstract
>>> burnside_counts(parse_abstract("Mabcdef"), load_rules().geometry("OC-6"))
(15, 30)
"""

from __future__ import annotations

from functools import lru_cache

from .composition import Composition
from .geometry import Geometry

__all__ = ["burnside_counts", "cycle_type"]


def cycle_type(perm: tuple[int, ...]) -> tuple[int, ...]:
    """Sorted cycle lengths of a permutation."""
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


@lru_cache(maxsize=None)
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


def burnside_counts(composition: Composition, geometry: Geometry) -> tuple[int, int] | None:
    """(geometric isomers, stereoisomers) for a composition of monodentate
    ligands; None when chelates or rings are present (no closed form here)."""
    if any(k.denticity != 1 for k in composition.kinds):
        return None
    if composition.donor_count != geometry.coordination_number:
        return None
    counts = tuple(sorted(n for _, n in composition.parts))
    full = [_fixed(cycle_type(op.perm), counts) for op in geometry.operations]
    proper = [f for f, op in zip(full, geometry.operations) if op.proper]
    return sum(full) // len(full), sum(proper) // len(proper)
