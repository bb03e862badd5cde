"""Which isomer pairs IR, Raman or NMR tell apart: by their counts, and for IR
also by their predicted band pattern.

Each isomer gets a count signature per technique: its IR band counts (one
per reporter class), the numbers of those bands with bond-dipole intensity
(the IR count less the bands predicted weak,
:attr:`~enumerator.analyses.stretch.modes.ModeSet.ir_weak`), its Raman band
counts, its NMR environment counts (ligands with an observable nucleus).
Signatures are numbered (:func:`signature_ids`), so a pair costs a few integer
comparisons and the tally over thousands of isomers (:func:`pair_tally`) is
counted over classes of equal signatures without listing a pair.

The verdict of a pair, cheapest technique first (:data:`VERDICT_ORDER`):

1. **IR (counts)**: the IR counts differ, and so do the numbers of bands with
   bond-dipole intensity, so the difference does not rest on a band the model
   predicts at zero intensity (those are counted, flagged, and never the
   only evidence);
2. **IR (pattern)**: the predicted band patterns differ beyond the model's
   uncertainty (:func:`enumerator.analyses.stretch.likelihood.patterns_distinct`),
   judged for the pairs that the IR counts do not separate;
3. **Raman** counts, then **NMR** counts.

Enantiomers share every count in achiral media and are never marked distinct.

>>> ids, en = ("1a", "1b", "2"), ("1b", "1a", None)
>>> sig = ([0, 0, 1], [0, 0, 1], [0, 0, 1], [0, 0, 0])
>>> [(p.a, p.b, p.cheapest, p.note) for p in list_pairs(ids, en, sig)]
[('1a', '1b', None, 'enantiomers'), ('1a', '2', 'IR', None), ('1b', '2', 'IR', None)]
>>> pair_tally(ids, en, sig)
{'IR': 2, 'en': 1}
"""

from __future__ import annotations

from collections.abc import Collection, Hashable, Sequence
from typing import Any

from enumerator.frozen import frozen_dataclass

__all__ = [
    "COST_ORDER",
    "VERDICT_ORDER",
    "VERDICT_CODES",
    "Pair",
    "Signatures",
    "signature_ids",
    "list_pairs",
    "pair_tally",
    "counts_tell_ir",
]

#: Techniques from cheapest to dearest (routine solution IR first; Raman needs
#: a separate instrument; 13C/15N NMR of reporters needs long runs or labelling).
COST_ORDER = ("IR", "Raman", "NMR")
#: The verdicts in the order tried: (technique, qualifier).  An IR pattern is read on the same routine
#: spectrum as IR counts, but it rests on the band model, so it comes after them and before Raman.
VERDICT_ORDER = (("IR", "counts"), ("IR", "pattern"), ("Raman", "counts"), ("NMR", "counts"))
#: Short codes of the verdicts (matrix cells and the tally).
VERDICT_CODES = {("IR", "counts"): "IR", ("IR", "pattern"): "IRp", ("Raman", "counts"): "Ra", ("NMR", "counts"): "NMR"}

_TALLY_KEYS = {"IR": "IR", "IRp": "IR (pattern)", "Ra": "Raman", "NMR": "NMR", "en": "en", "--": "--"}

#: One small integer per isomer for each of: IR counts, IR bands with bond-dipole intensity, Raman counts,
#: NMR counts (equal integers: equal counts).
Signatures = tuple[Sequence[int], Sequence[int], Sequence[int], Sequence[int]]


def counts_tell_ir(ir_a: int, ir_b: int, dipole_a: int, dipole_b: int) -> bool:
    """Whether IR counts tell two isomers apart: both the IR counts and the numbers of bands with
    bond-dipole intensity differ (signature numbers or counts).

    Parameters
    ----------
    ir_a, ir_b : int
        The IR signatures (or counts) of the two isomers.
    dipole_a, dipole_b : int
        Their bond-dipole signatures (or counts).

    Returns
    -------
    bool
    """
    return ir_a != ir_b and dipole_a != dipole_b


@frozen_dataclass
class Pair:
    """Whether IR, Raman and NMR tell two isomers apart; ``note`` says 'enantiomers' for those.

    ``ir`` / ``raman`` / ``nmr``: the counts differ; ``ir_dipole``: the numbers of IR bands with bond-dipole
    intensity differ; ``ir_pattern``: the predicted IR patterns differ beyond the model's uncertainty (None:
    not judged, because the IR counts already tell the pair apart or no pattern was predicted).
    """

    a: str
    b: str
    ir: bool
    raman: bool
    nmr: bool
    note: str | None = None
    ir_dipole: bool = False
    ir_pattern: bool | None = None

    @property
    def verdict(self) -> tuple[str, str] | None:
        """(technique, 'counts' | 'pattern') of the cheapest verdict (:data:`VERDICT_ORDER`), or None."""
        flags = (self.ir and self.ir_dipole, bool(self.ir_pattern), self.raman, self.nmr)
        for v, flag in zip(VERDICT_ORDER, flags):
            if flag:
                return v
        return None

    @property
    def cheapest(self) -> str | None:
        """The cheapest technique that tells the pair apart (:data:`COST_ORDER`), or None."""
        v = self.verdict
        return v[0] if v else None

    @property
    def tally_key(self) -> str:
        """The pair's key in a tally: 'IR', 'IR (pattern)', 'Raman', 'NMR', 'en' or '--'."""
        return _TALLY_KEYS[self.code]

    @property
    def code(self) -> str:
        """The verdict's short code: 'IR', 'IRp', 'Ra', 'NMR', 'en' (enantiomers) or '--' (none)."""
        if self.note == "enantiomers":
            return "en"
        v = self.verdict
        return VERDICT_CODES[v] if v else "--"

    def to_dict(self) -> dict[str, Any]:
        """The JSON object of the pair (an entry of the top-level ``pairs``)."""
        v = self.verdict
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
        d["ir_bond_dipole_distinct"] = self.ir_dipole
        d["ir_pattern_distinct"] = self.ir_pattern
        d["cheapest_qualifier"] = v[1] if v else None
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


def list_pairs(
    ids: Sequence[str],
    enantiomer: Sequence[str | None],
    signatures: Signatures,
    pattern_judged: Collection[tuple[int, int]] = (),
    pattern_distinct: Collection[tuple[int, int]] = (),
) -> list[Pair]:
    """Every unordered pair of listed isomers, in listing order.

    Parameters
    ----------
    ids : sequence of str
        Isomer ids in listing order.
    enantiomer : sequence of str or None
        Each isomer's enantiomer id.
    signatures : Signatures
        IR, bond-dipole IR, Raman and NMR signature numbers per isomer (:func:`signature_ids`).
    pattern_judged, pattern_distinct : collections of (i, j), i < j
        The index pairs whose IR patterns were judged, and those of them told apart.

    Returns
    -------
    list of Pair
    """
    ir, dip, ra, nm = signatures
    judged, distinct = set(pattern_judged), set(pattern_distinct)
    out = []
    n = len(ids)
    for i in range(n):
        for j in range(i + 1, n):
            if enantiomer[i] == ids[j]:
                out.append(Pair(ids[i], ids[j], False, False, False, "enantiomers"))
                continue
            pat = ((i, j) in distinct) if (i, j) in judged else None
            out.append(
                Pair(ids[i], ids[j], ir[i] != ir[j], ra[i] != ra[j], nm[i] != nm[j], None, dip[i] != dip[j], pat)
            )
    return out


def pair_tally(ids: Sequence[str], enantiomer: Sequence[str | None], signatures: Signatures) -> dict[str, int]:
    """How many pairs each technique tells apart first.

    Parameters
    ----------
    ids, enantiomer, signatures
        As for :func:`list_pairs` (counts only).

    Returns
    -------
    dict
        'IR', 'Raman', 'NMR', '--' (told apart by none) and 'en' (enantiomers) -> number of pairs;
        only non-zero entries.  The IR pattern tier needs the pairs themselves: count their codes instead.
    """
    classes: dict[tuple[int, int, int, int], int] = {}
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
            if counts_tell_ir(a[0], b[0], a[1], b[1]):
                name = "IR"
            else:
                name = "Raman" if a[2] != b[2] else "NMR" if a[3] != b[3] else "--"
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
