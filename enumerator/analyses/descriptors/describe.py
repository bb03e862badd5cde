"""One isomer's IUPAC stereodescriptor (IUPAC 2005, IR-9.3): polyhedral
symbol, configuration index and chirality symbol, with the everyday prefix.

:func:`describe_isomer` ranks the sites (:mod:`.priming`), applies the rule
of the polyhedron (:mod:`.rules`) over every rank map (one, or one per
priming assignment), takes the largest index key and, among the choices that
reach it, the lowest C/A sequence; then R/S or Δ/Λ (:mod:`.chirality`).
Priming is used where, without it, two diastereomers of the composition
would share a descriptor or a chiral isomer would get no symbol (decided on
the first :data:`~.priming.PRIMING_SCAN` isomers).

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = parse_abstract("M(AA)3")
>>> s = enumerate_isomers(comp, load_rules().geometry("OC-6"))
>>> sorted(describe_isomer(i, comp).text for i in s.isomers)
['OC-6-11-Δ', 'OC-6-11-Λ']
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from enumerator.analyses.descriptors.chirality import SYMBOL_TEXT, skew_lines_symbol, tetrahedral_rs
from enumerator.analyses.descriptors.prefixes import everyday_prefixes, prefix_text
from enumerator.analyses.descriptors.priming import PRIMING_SCAN, base_ranks, has_repeated_chelate, primed_maps
from enumerator.analyses.descriptors.ranks import Rank, format_rank
from enumerator.analyses.descriptors.rules import RULE_TEXT, RULES, SUPPORTED
from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, IsomerSet, generate
from enumerator.model.composition import Composition
from enumerator.model.geometry import Geometry

__all__ = ["Descriptor", "describe_isomer", "describe_set"]


@frozen_dataclass
class Descriptor:
    """The IUPAC stereodescriptor of one isomer.

    ``text`` is the full descriptor ('OC-6-32-C', 'T-4-R', 'OC-6-11-Δ');
    ``priorities`` maps site index (0-based) to its priority number as
    written ('1', '2', "1'").  ``ca``, ``skew`` and ``rs`` hold every
    chirality symbol that applies; ``chirality`` the one in ``text``."""

    polyhedral_symbol: str
    configuration_index: str | None
    chirality: str | None
    prefix: str | None
    text: str
    priority_pairs: tuple[tuple[int, str], ...]
    ca: str | None = None
    skew: str | None = None
    rs: str | None = None
    primed: bool = False
    prefixes: tuple[tuple[str, str], ...] = ()
    rule: str = ""

    @property
    def priorities(self) -> dict[int, str]:
        """Site index (0-based) -> priority number as written."""
        return dict(self.priority_pairs)

    @property
    def stereo_free(self) -> str:
        """The descriptor without its chirality symbol."""
        if self.configuration_index:
            return f"{self.polyhedral_symbol}-{self.configuration_index}"
        return self.polyhedral_symbol


#: (index key, hyphen position) of the winning choice, or None where no index applies.
_Key = tuple[tuple[Rank, ...], int] | None


def _evaluate(isomer: Isomer, maps: Sequence[Mapping[int, Rank]]) -> tuple[_Key, str | None, str | None]:
    """(index key, C/A symbol, R/S symbol) over all rank maps."""
    g = isomer.geometry
    sym = g.symbol
    if sym == "T-4":
        found = {tetrahedral_rs(g, r) for r in maps}
        return None, None, (found.pop() if len(found) == 1 and None not in found else None)
    rule = RULES.get(sym)
    if rule is None:
        return None, None, None
    choices = [c for r in maps for c in rule(g, r)]
    if not choices:
        return None, None, None
    best = max(c.key for c in choices)
    split = next(c.split for c in choices if c.key == best)
    seqs = [s for c in choices if c.key == best for s in c.seqs]
    ca = None
    if seqs:
        low = min(s for s, _ in seqs)
        dirs = {d for s, d in seqs if s == low}
        if len(dirs) == 1:
            ca = dirs.pop()
    return (best, split), ca, None


def _index_text(digits: tuple[Rank, ...], split: int) -> str:
    """The configuration index as written, a hyphen after ``split`` digits (0: none)."""
    index = "".join(format_rank(k) for k in digits[:split] or digits)
    if split:
        index += "-" + "".join(format_rank(k) for k in digits[split:])
    return index


def _shown_map(g: Geometry, maps: Sequence[Mapping[int, Rank]], digits: tuple[Rank, ...]) -> Mapping[int, Rank]:
    """A priming that realises the chosen index (the first map when none of the others does)."""
    rule = RULES.get(g.symbol)
    for r in maps:
        if rule and any(c.key == digits for c in rule(g, r)):
            return r
    return maps[0]


def _describe(isomer: Isomer, composition: Composition, primed: bool) -> Descriptor:
    g = isomer.geometry
    base = base_ranks(isomer, composition)
    maps: Sequence[Mapping[int, Rank]] = primed_maps(isomer, composition, base) if primed else [base]
    key, ca, rs = _evaluate(isomer, maps)
    # IR-9.3.4.1: the skew-lines convention is applied to octahedral centres;
    # elsewhere C/A (or R/S) with priming where needed
    skew = skew_lines_symbol(isomer) if g.symbol == "OC-6" else None
    if not isomer.chiral:
        ca = rs = skew = None
    chirality = rs or skew or ca
    index = _index_text(*key) if key else None
    text = (
        g.symbol + (f"-{index}" if index else "") + (f"-{SYMBOL_TEXT.get(chirality, chirality)}" if chirality else "")
    )
    shown = _shown_map(g, maps, key[0]) if primed and len(maps) > 1 and key else maps[0]
    words = everyday_prefixes(isomer)
    return Descriptor(
        polyhedral_symbol=g.symbol,
        configuration_index=index,
        chirality=chirality,
        prefix=prefix_text(words),
        text=text,
        priority_pairs=tuple(sorted((i, format_rank(r)) for i, r in shown.items())),
        ca=ca,
        skew=skew,
        rs=rs,
        primed=primed and any(r[1] for r in shown.values()),
        prefixes=words,
        rule=RULE_TEXT.get(g.symbol, f"no configuration-index rule for {g.symbol}: polyhedral symbol only"),
    )


def _needs_priming(composition: Composition, geometry: Geometry) -> bool:
    """Priming is needed where, without it, two diastereomers share a
    descriptor or a chiral isomer gets no chirality symbol."""
    return _needs_priming_cached(composition, geometry)


@cached(maxsize=256)
def _needs_priming_cached(composition: Composition, geometry: Geometry) -> bool:
    # keyed by the composition, whose ligand kinds compare their SMILES and other catalogue data too
    if not has_repeated_chelate(composition) or geometry.symbol not in SUPPORTED:
        return False
    seen: dict[str, int] = {}
    for k, iso in enumerate(generate(composition, geometry)):
        if k >= PRIMING_SCAN:
            break
        d = _describe(iso, composition, False)
        if iso.chiral and d.chirality is None:
            return True
        if seen.setdefault(d.stereo_free, iso.number) != iso.number:
            return True
    return False


def describe_isomer(isomer: Isomer, composition: Composition) -> Descriptor:
    """The IUPAC descriptor of one isomer.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer of ``composition``.
    composition : Composition
        Its ligands (priorities from their SMILES, or the letter order).

    Returns
    -------
    Descriptor

    Raises
    ------
    InputError
        A catalogue ligand has no SMILES.
    """
    return _describe(isomer, composition, _needs_priming(composition, isomer.geometry))


def describe_set(isomer_set: IsomerSet) -> dict[str, Descriptor]:
    """Descriptors of every isomer of a set, by isomer id.

    Raises
    ------
    InputError
        A catalogue ligand has no SMILES.

    Parameters
    ----------
    isomer_set : IsomerSet

    Returns
    -------
    dict[str, Descriptor]
    """
    comp = isomer_set.composition
    return {i.id: describe_isomer(i, comp) for i in isomer_set.isomers}
