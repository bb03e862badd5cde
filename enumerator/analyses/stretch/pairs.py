"""Which isomer pairs IR, Raman or NMR tell apart, from their counts.

Each isomer gets a count signature per technique: its IR band counts (one
per reporter class), its Raman band counts, its NMR environment counts
(ligands with an observable nucleus).  Two isomers are told apart by a
technique when their signatures differ.  Signatures are numbered
(:func:`signature_ids`), so a pair costs three integer comparisons and the
tally over thousands of isomers (:func:`pair_tally`) is counted over classes
of equal signatures without listing a pair.  Enantiomers share every count
in achiral media and are never marked distinct.

>>> ids, en = ("1a", "1b", "2"), ("1b", "1a", None)
>>> sig = ([0, 0, 1], [0, 0, 1], [0, 0, 0])
>>> [(p.a, p.b, p.cheapest, p.note) for p in list_pairs(ids, en, sig)]
[('1a', '1b', None, 'enantiomers'), ('1a', '2', 'IR', None), ('1b', '2', 'IR', None)]
>>> pair_tally(ids, en, sig)
{'IR': 2, 'en': 1}
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from dataclasses import dataclass
from typing import Any

__all__ = ["COST_ORDER", "Pair", "Signatures", "signature_ids", "list_pairs", "pair_tally"]

#: Techniques from cheapest to dearest (routine solution IR first; Raman needs
#: a separate instrument; 13C/15N NMR of reporters needs long runs or labelling).
COST_ORDER = ("IR", "Raman", "NMR")

#: One small integer per isomer for each of IR, Raman and NMR (equal integers: equal counts).
Signatures = tuple[Sequence[int], Sequence[int], Sequence[int]]


@dataclass(frozen=True)
class Pair:
    """Whether IR, Raman and NMR counts tell two isomers apart; ``note`` says 'enantiomers' for those."""

    a: str
    b: str
    ir: bool
    raman: bool
    nmr: bool
    note: str | None = None

    @property
    def cheapest(self) -> str | None:
        """The cheapest technique whose counts differ (:data:`COST_ORDER`), or None."""
        for name, flag in zip(COST_ORDER, (self.ir, self.raman, self.nmr)):
            if flag:
                return name
        return None

    def to_dict(self) -> dict[str, Any]:
        """The JSON object of the pair (an entry of the top-level ``pairs``)."""
        d: dict[str, Any] = {
            "a": self.a,
            "b": self.b,
            "ir_distinct": self.ir,
            "raman_distinct": self.raman,
            "nmr_distinct": self.nmr,
            "cheapest": self.cheapest,
        }
        if self.note:
            d["note"] = self.note
        return d


def signature_ids(signatures: Sequence[Hashable]) -> list[int]:
    """Number the distinct signatures in order of first appearance (equal signatures, equal numbers).

    Parameters
    ----------
    signatures : sequence of hashable
        One count signature per isomer.

    Returns
    -------
    list of int
    """
    table: dict[Hashable, int] = {}
    return [table.setdefault(s, len(table)) for s in signatures]


def list_pairs(ids: Sequence[str], enantiomer: Sequence[str | None], signatures: Signatures) -> list[Pair]:
    """Every unordered pair of listed isomers, in listing order.

    Parameters
    ----------
    ids : sequence of str
        Isomer ids in listing order.
    enantiomer : sequence of str or None
        Each isomer's enantiomer id.
    signatures : Signatures
        IR, Raman and NMR signature numbers per isomer (:func:`signature_ids`).

    Returns
    -------
    list of Pair
    """
    ir, ra, nm = signatures
    out = []
    n = len(ids)
    for i in range(n):
        for j in range(i + 1, n):
            if enantiomer[i] == ids[j]:
                out.append(Pair(ids[i], ids[j], False, False, False, "enantiomers"))
            else:
                out.append(Pair(ids[i], ids[j], ir[i] != ir[j], ra[i] != ra[j], nm[i] != nm[j]))
    return out


def pair_tally(ids: Sequence[str], enantiomer: Sequence[str | None], signatures: Signatures) -> dict[str, int]:
    """How many pairs each technique tells apart first.

    Parameters
    ----------
    ids, enantiomer, signatures
        As for :func:`list_pairs`.

    Returns
    -------
    dict
        'IR', 'Raman', 'NMR', '--' (told apart by none) and 'en' (enantiomers) -> number of pairs;
        only non-zero entries.
    """
    classes: dict[tuple[int, int, int], int] = {}
    for t in zip(*signatures):
        classes[t] = classes.get(t, 0) + 1
    keys = sorted(classes)
    tally: dict[str, int] = {}

    def add(name: str, k: int) -> None:
        if k:
            tally[name] = tally.get(name, 0) + k

    for x, a in enumerate(keys):
        na = classes[a]
        add("--", na * (na - 1) // 2)
        for b in keys[x + 1 :]:
            name = "IR" if a[0] != b[0] else "Raman" if a[1] != b[1] else "NMR"
            add(name, na * classes[b])
    # enantiomer pairs share every signature: move them from '--' to 'en'
    pos = {i: k for k, i in enumerate(ids)}
    en = sum(1 for k, e in enumerate(enantiomer) if e is not None and pos.get(e, -1) > k)
    if en:
        tally["--"] -= en
        if not tally["--"]:
            del tally["--"]
        tally["en"] = en
    return tally
