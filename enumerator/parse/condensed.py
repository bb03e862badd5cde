"""Condensed formulas of real complexes -> :class:`~enumerator.model.composition.Composition`.

The notation is the one chemists write in papers:

* one metal, anywhere in the formula: ``[RuCl2(CO)2(PPh3)2]``, ``[CpMn(CO)3]``;
* square brackets and an overall charge after them: ``[Fe(CN)5(NO)]2-``,
  ``[Co(NH3)4Cl2]+`` (``+``, ``-``, ``2+``, ``3-``; a Unicode minus is accepted);
* ligands by catalogue name or alias (``isosieve ligands`` lists them), with
  a multiplier after a ligand or a parenthesised group: ``Cl2``, ``(CO)3``;
* hapticity prefixes ``η5-``, ``eta5-``, ``h5-`` (also ``η⁵-``): ``[(η5-C5H5)Fe(CO)2Cl]``.

The parser never makes up a ligand; three rules make sure of it.

1. **A parenthesised group is exactly one ligand**: a catalogue spelling,
   with an optional hapticity prefix, and an optional multiplier after the
   closing parenthesis: ``(PPh3)2``, ``(η5-C5H5)``, ``(P(OMe)3)3``.  Any
   other group is refused, naming the group, its position, the nearest
   catalogue names and how to add a ligand; it is never split into several
   ligands (``(NPr3)`` is not nitrido + three Pr, ``(ClEt)`` not chlorido +
   ethyl).
2. **Outside parentheses** the trade's condensed notation is read greedily,
   the longest catalogue spelling at each position (``[Mn(CO)5Br]``,
   ``CpFe(CO)2Cl``, ``HMn(CO)5``, ``Cp2ZrCl2``, ``Ni(CO)3PPh3``), with one
   exception where a bare run reads as several ligands as readily as one
   molecule.  A *head* is a catalogue spelling that begins with the symbol
   of a group 15 or 16 element (N, P, As, Sb, Bi, O, S, Se, Te; two letters
   when they form an element symbol) and continues, if at all, only with
   hydrido/organyl spellings and their counts: ``N``, ``O``, ``NH2``,
   ``NEt2``, ``OMe``, ``OH2``, ``PPh3``.  A hydrido/organyl ligand is a
   catalogue entry bound through one H, C, Si, Ge or Sn atom, charge -1,
   without a stretch reporter (H, Me, Ph, SiMe3; not CN).  Then

   a. a head of more than one atom written with a multiplier right after
      it (``OMe2``) is refused: it reads as two methoxido or as dimethyl
      ether; write ``(OMe)2`` or ``(OMe2)``;
   b. a head written without a multiplier and followed directly (no space,
      bracket or metal between) by a run of hydrido, organyl or halido
      ligands, bare or each in its own parentheses, that holds at least one
      hydrido or organyl ligand is refused: ``NPr3``, ``NEt2Me``, ``NH2Et``,
      ``N(CH3)3``, ``PCl2Ph`` (with a P ligand), ``[OsNMe4]-`` read as one
      molecule as readily as a head plus substituents.  The message says how
      to write each reading: ``(NEt2Me)`` for the molecule, ``(NEt2)Me`` for
      the separate ligands.

   A head followed by halido ligands only stays legal (``[ReOCl4]-``,
   ``[MoOCl4]``), as does a head with a multiplier before the organyl
   (``ReO3Me``, three oxido and a methyl).  Halides are not heads, so
   ``[PtClMe(cod)]`` is chlorido + methyl; a halocarbon ligand is written
   in parentheses, ``(ClMe)``, and must be catalogued.
3. **Hapticity chooses the entry**: ``(η2-H2)`` is dihydrogen (``H2`` alone
   stays two hydrides), ``(η3-C3H5)`` allyl and ``(η1-C3H5)`` the σ-allyl;
   a spelling that the catalogue holds at two hapticities means, without a
   prefix, the entry marked ``hapto_default`` (``C3H5`` η3, ``C8H8`` η8).
   A hapticity the catalogue lacks is refused with the ones it has.

Write ``(NO)2`` for two nitrosyls: ``NO2`` is the nitro ligand.  Case
matters: ``CO`` is carbonyl, ``Co`` cobalt.  Every error names the
offending text and its position (1-based).  :func:`read_condensed` keeps,
for each ligand, the text it was read from (:class:`LigandSpan`), so a
test can check that every ligand was written as one.

>>> from enumerator.rules.ruleset import load_rules
>>> c = parse_condensed("[Fe(CN)5(NO)]2-", load_rules())
>>> c.metal, c.charge, [(k.name, n) for k, n in c.parts]
('Fe', -2, [('CN', 5), ('NO', 1)])
>>> c = parse_condensed("[(η5-C5H5)Mn(CO)3]", load_rules())
>>> [(k.name, k.ring, n) for k, n in c.parts], c.donor_count
([('Cp', True, 1), ('CO', False, 3)], 4)
>>> r = read_condensed("[RuH2(η2-H2)(PPh3)3]", load_rules())
>>> [(s.name, r.text[s.start : s.end], s.count) for s in r.ligands]
[('H', 'H', 2), ('dihydrogen', 'H2', 1), ('PPh3', 'PPh3', 3)]
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from types import MappingProxyType

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.limits import MAX_CHARGE, MAX_SITES
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.elements import element_symbols, is_metal
from enumerator.parse.text import check_formula_text, check_sites, echo, non_ascii, read_number
from enumerator.rules.ligands import LigandEntry, all_spellings, load_ligands, spelling_index, split_hapto
from enumerator.rules.ruleset import RuleSet, closest_names

__all__ = ["parse_condensed", "read_condensed", "CondensedReading", "LigandSpan", "METAL_FIX", "HEAD_ELEMENTS"]

#: The fix offered when a formula has no metal (or not one the parser accepts).
METAL_FIX = "write one metal symbol, e.g. [RuCl2(CO)2(PPh3)2]"

#: Elements whose symbol starts a head: a ligand spelling that may go on as one molecule (rule 2).
HEAD_ELEMENTS = frozenset({"N", "P", "As", "Sb", "Bi", "O", "S", "Se", "Te"})

#: Donor elements of hydrido/organyl (and silyl, germyl, stannyl) ligands.
_SUBSTITUENT_DONORS = frozenset({"H", "C", "Si", "Ge", "Sn"})
_HALOGENS = frozenset({"F", "Cl", "Br", "I"})

#: How to add a ligand, for the end of a message.
_ADD = "in a ligands.toml under --rules DIR (isosieve ligands lists the catalogue; README: Ligand catalogue)"

_CHARGE = re.compile(r"([0-9]*)([+-])")
_ELEMENT = re.compile(r"[A-Z][a-z]?")
_WORD = re.compile(r"[A-Za-z0-9*'+-]+")
_DIGITS = re.compile(r"[0-9]+")
_ALNUM = re.compile(r"[A-Za-z0-9]*")
#: characters that end a bare run of ligands
_BREAKS = frozenset("()[] \t")


@frozen_dataclass
class LigandSpan:
    """One ligand as written: where its spelling sits in the text and its multiplier.

    ``start``/``end`` bound the catalogue spelling (0-based, end exclusive),
    its hapticity prefix excluded; ``prefix_start`` is where that prefix
    begins (None: none written).  ``group`` is the span of the parentheses
    around it, ``(`` to ``)`` inclusive, or None for a bare ligand.
    ``count`` is the multiplier written after the spelling or the group.
    """

    name: str
    start: int
    end: int
    count: int = 1
    hapticity: int | None = None
    prefix_start: int | None = None
    group: tuple[int, int] | None = None


@frozen_dataclass
class CondensedReading:
    """A condensed formula as read: the metal, the charge and every ligand with its text span.

    ``text`` is the formula with a Unicode minus replaced by '-' (same
    positions as the input).
    """

    text: str
    metal: str
    metal_span: tuple[int, int]
    charge: int
    ligands: tuple[LigandSpan, ...]

    def counts(self) -> tuple[tuple[str, int], ...]:
        """Each ligand once (canonical name), in order of first appearance, with its summed count.

        Returns
        -------
        tuple of (str, int)
        """
        counts: dict[str, int] = {}
        for s in self.ligands:
            counts[s.name] = counts.get(s.name, 0) + s.count
        return tuple(counts.items())


@frozen_dataclass
class _Classes:
    """How rule 2 sees the catalogue: hydrido/organyl and halido names, and the head spellings."""

    substituents: frozenset[str]
    halides: frozenset[str]
    heads: Mapping[str, str]  # head spelling -> its leading element symbol


def _leading_element(spelling: str) -> str:
    """The element symbol a spelling starts with, two letters when they form one ('' if none)."""
    symbols = element_symbols()
    if spelling[:2] in symbols:
        return spelling[:2]
    return spelling[:1] if spelling[:1] in symbols else ""


def _is_substituent(e: LigandEntry) -> bool:
    return (
        e.bound_atoms == 1
        and e.charge == -1
        and not e.ring
        and e.reporter is None
        and e.donors[0] in _SUBSTITUENT_DONORS
    )


def _only_substituents(rest: str, spellings: frozenset[str]) -> bool:
    """Whether ``rest`` is a run of substituent spellings, each with an optional count."""
    if not rest:
        return True
    for k in range(len(rest), 0, -1):
        if rest[:k] in spellings:
            m = _DIGITS.match(rest, k)
            if _only_substituents(rest[m.end() if m else k :], spellings):
                return True
    return False


@cached(maxsize=16)
def _classes(rules: RuleSet) -> _Classes:
    entries = load_ligands(rules)
    bare = spelling_index(rules).bare
    subs = frozenset(n for n, e in entries.items() if _is_substituent(e))
    halides = frozenset(n for n, e in entries.items() if e.bound_atoms == 1 and e.donors[0] in _HALOGENS)
    sub_spellings = frozenset(s for s, n in bare.items() if n in subs)
    heads = {}
    for s in bare:
        el = _leading_element(s)
        if el in HEAD_ELEMENTS and _only_substituents(s[len(el) :], sub_spellings):
            heads[s] = el
    return _Classes(subs, halides, MappingProxyType(dict(sorted(heads.items()))))


def _err(text: str, pos: int, what: str, fix: str, after: str = "") -> InputError:
    return InputError(f"formula '{echo(text)}': {what} at position {pos + 1}{after}", fix)


@frozen_dataclass
class _Metal:
    symbol: str
    start: int
    end: int


class _Reader:
    """One pass over one formula; every method reads ``text[i:end]`` and returns where it stopped."""

    def __init__(self, text: str, rules: RuleSet, suggest: bool = True) -> None:
        self.text = text
        self.rules = rules
        self.suggest = suggest
        self.entries = load_ligands(rules)
        self.index = spelling_index(rules)
        self.classes = _classes(rules)
        self.metal_seen = False
        self.previous: LigandSpan | None = None  # the bare ligand just read, for the message of an unknown one

    # -- pieces ------------------------------------------------------------
    def count(self, i: int, end: int) -> tuple[int, int]:
        m = _DIGITS.match(self.text, i, end)
        if not m:
            return 1, i
        n = read_number(m.group(0), self.text, i, "count", MAX_SITES)
        if n == 0:
            raise _err(self.text, i, "a count of 0", "leave the ligand out instead")
        return n, m.end()

    def metal_at(self, i: int, end: int) -> str | None:
        m = _ELEMENT.match(self.text, i, end)
        return m.group(0) if m and is_metal(m.group(0)) else None

    def nearest(self, word: str) -> str:
        near = closest_names(word, all_spellings(self.rules)) if self.suggest else []
        return f"did you mean {', '.join(near)}?" if near else "see the catalogue with: isosieve ligands"

    def label(self, name: str) -> str:
        return self.entries[name].label

    # -- parenthesised groups: exactly one ligand -------------------------
    def closing(self, i: int, end: int) -> int:
        depth = 0
        for k in range(i, end):
            if self.text[k] == "(":
                depth += 1
            elif self.text[k] == ")":
                depth -= 1
                if depth == 0:
                    return k
        raise _err(self.text, i, "'(' is never closed", "close the group, e.g. (CO)3")

    def group(self, open_: int, close: int, end: int) -> tuple[LigandSpan, int]:
        """The one ligand of the group ``text[open_:close + 1]`` and where its multiplier ends."""
        inner = self.text[open_ + 1 : close]
        if not inner.strip():
            raise _err(self.text, open_, "empty parentheses", "write a ligand inside, e.g. (CO)")
        first = open_ + 1 + len(inner) - len(inner.lstrip())
        last = open_ + 1 + len(inner.rstrip())
        eta, j = split_hapto(self.text, first, last)
        while j < last and self.text[j].isspace():
            j += 1
        spelling = self.text[j:last]
        n, after = self.count(close + 1, end)
        if not spelling:
            raise _err(self.text, j, "no ligand after the hapticity prefix", "write the ligand after it, e.g. (η5-Cp)")
        name = self.index.resolve(spelling, eta)
        if name is None:
            raise self.unknown_group(first, j, spelling, eta, n)
        span = LigandSpan(name, j, last, n, eta, first if eta is not None else None, (open_, close + 1))
        return span, after

    def unknown_group(self, first: int, j: int, spelling: str, eta: int | None, n: int) -> InputError:
        refused = self.index.refusal(spelling, eta)
        if refused is not None:
            what, fix = refused
            split = self.separate(spelling, n) if eta is None else ""
            if split:
                fix += f", or {split}"
            return _err(self.text, first, what, fix)
        hint = self.nearest(spelling)
        split = self.separate(spelling, n)
        tail = (f"; or write {split}" if split else "") + non_ascii(spelling)
        return _err(
            self.text,
            j,
            f"unknown ligand '{spelling}'",
            f"{hint} To use {spelling}, add it {_ADD}{tail}",
            " (a parenthesised group is one ligand)",
        )

    def separate(self, spelling: str, n: int) -> str:
        """'(NEt2)Me for NEt2 and Me as separate ligands' when a group's text reads as several ('' if not)."""
        toks: list[tuple[str, str, int]] = []
        i = 0
        while i < len(spelling):
            k = self.index.longest(spelling, i, len(spelling))
            if k == i:
                return ""
            m = _DIGITS.match(spelling, k)
            toks.append((spelling[i:k], self.index.bare[spelling[i:k]], int(m.group(0)) * n if m else n))
            i = m.end() if m else k
        if len(toks) == 1 and toks[0][2] == 1:
            return ""
        written = "".join(
            (s if _ELEMENT.fullmatch(s) and s not in self.classes.heads else f"({s})") + (str(c) if c > 1 else "")
            for s, _name, c in toks
        )
        return f"{written} for {' and '.join(f'{c} {s}' if c > 1 else s for s, _n, c in toks)} as separate ligands"

    # -- bare ligands and the metal ---------------------------------------
    def bare(self, i: int, end: int) -> tuple[LigandSpan | _Metal, int]:
        """The ligand or the metal at ``i`` (outside parentheses) and where its multiplier ends."""
        eta, j = split_hapto(self.text, i, end)
        k = self.index.longest(self.text, j, end, prefixed=eta is not None)
        metal = self.metal_at(i, end) if eta is None else None
        if metal is not None and (k == j or len(metal) > k - j):
            n, after = self.count(i + len(metal), end)
            if n != 1:
                raise _err(
                    self.text,
                    after - len(str(n)),
                    f"{n} metal atoms",
                    "only mononuclear complexes are handled; write one metal",
                )
            return _Metal(metal, i, i + len(metal)), after
        if k == j:
            raise self.unknown_bare(j, end)
        spelling = self.text[j:k]
        name = self.index.resolve(spelling, eta)
        if name is None:
            what, fix = self.index.refusal(spelling, eta) or ("unknown ligand", "")
            raise _err(self.text, i, what, fix)
        n, after = self.count(k, end)
        span = LigandSpan(name, j, k, n, eta, i if eta is not None else None)
        if eta is None and spelling in self.classes.heads:
            self.check_head(span, after, end)
        return span, after

    def unknown_bare(self, j: int, end: int) -> InputError:
        if j >= end:
            return _err(
                self.text,
                j,
                "the formula ends where a ligand should follow",
                "write the ligand after the prefix, e.g. η5-Cp",
            )
        m = _WORD.match(self.text, j, end)
        word = m.group(0) if m else self.text[j]
        el = _ELEMENT.match(self.text, j, end)
        if el and el.group(0) in element_symbols() and not is_metal(el.group(0)):
            near = closest_names(word, all_spellings(self.rules))
            if not near:
                return _err(self.text, j, f"'{el.group(0)}' is not a metal and no ligand starts here", METAL_FIX)
        greedy = ""
        if self.previous is not None and self.previous.end == j:
            read = self.text[self.previous.start : j]
            greedy = (
                f"; outside parentheses the longest spelling wins, and '{read}' was read just before it: "
                "put each ligand of the run in parentheses, e.g. (N)Cl4 rather than NCl4"
            )
        return _err(
            self.text,
            j,
            f"unknown ligand '{word}'",
            self.nearest(word) + " (add your own in a ligands.toml under --rules DIR)" + greedy + non_ascii(word),
        )

    # -- rule 2: a head that reads as one molecule -------------------------
    def check_head(self, head: LigandSpan, after: int, end: int) -> None:
        """Refuse a head that, with what follows it, reads as one molecule (module docstring, rule 2)."""
        spelling = self.text[head.start : head.end]
        element = self.classes.heads[spelling]
        if after > head.end:  # a multiplier follows
            if spelling != element:
                raise self.multiplied_head(head, spelling, after)
            return
        molecule, stop = self.run_after(after, end)
        if molecule:
            raise self.refuse_head(head, spelling, stop)

    def run_after(self, i: int, end: int) -> tuple[bool, int]:
        """Whether the run right after a head makes one molecule of it, and where that run stops.

        The run is the hydrido, organyl and halido ligands that follow the
        head directly, bare or each in its own parentheses, with their counts:
        ``NEt2Me``, ``N(CH3)3``, ``PCl2Ph``.  True when it holds a hydrido or
        organyl one, or when the letters that follow cannot be read at all (an
        unknown word, a metal symbol with a count or after the metal): ``NPr3``
        then reads as one molecule only.  A space, a bracket, a hapticity
        prefix, the metal or any other ligand ends the run.
        """
        organyl = False
        while i < end:
            step, j = self.run_step(i, end)
            if step == "stop":
                break
            if step == "molecule":
                return True, j
            organyl = organyl or step == "organyl"
            i = j
        return organyl, i

    def run_step(self, i: int, end: int) -> tuple[str, int]:
        """One ligand of the run after a head: 'organyl', 'halide', 'stop' or 'molecule', and where it ends."""
        ch = self.text[i]
        if ch == "(":
            return self.run_group(i, end)
        if ch in _BREAKS or split_hapto(self.text, i, end)[0] is not None:
            return "stop", i
        k = self.index.longest(self.text, i, end)
        metal = self.metal_at(i, end)
        if metal is not None and (k == i or len(metal) > k - i):
            m = _DIGITS.match(self.text, i + len(metal), end)
            if m or self.metal_seen:
                return "molecule", m.end() if m else i + len(metal)
            return "stop", i
        if k == i:
            if ch.isascii() and ch.isalpha():
                return "molecule", _ALNUM.match(self.text, i, end).end()  # type: ignore[union-attr]
            return "stop", i
        return self.run_kind(self.index.bare[self.text[i:k]]), self.count_end(k, end)

    def run_group(self, i: int, end: int) -> tuple[str, int]:
        """A parenthesised ligand in the run after a head (an unreadable group stops the run: it is refused later)."""
        depth = 0
        for close in range(i, end):
            depth += {"(": 1, ")": -1}.get(self.text[close], 0)
            if depth == 0:
                inner = self.text[i + 1 : close].strip()
                eta, at = split_hapto(inner)
                name = self.index.resolve(inner[at:].strip(), eta)
                if name is None:
                    return "stop", i
                return self.run_kind(name), self.count_end(close + 1, end)
        return "stop", i

    def run_kind(self, name: str) -> str:
        if name in self.classes.substituents:
            return "organyl"
        return "halide" if name in self.classes.halides else "stop"

    def count_end(self, i: int, end: int) -> int:
        m = _DIGITS.match(self.text, i, end)
        return m.end() if m else i

    def refuse_head(self, head: LigandSpan, spelling: str, stop: int) -> InputError:
        word = self.text[head.start : stop]
        rest = word[len(spelling) :]
        return _err(
            self.text,
            head.start,
            f"'{word}'",
            f"write ({word}) for one ligand{self.catalogued(word)} "
            f"or ({spelling}){rest} for {spelling} and {rest} as separate ligands; add a ligand {_ADD}",
            f" reads as one ligand {word} or as {spelling} ({self.label(head.name)}) followed by {rest}",
        )

    def multiplied_head(self, head: LigandSpan, spelling: str, after: int) -> InputError:
        word = self.text[head.start : after]
        n = head.count
        return _err(
            self.text,
            head.start,
            f"'{word}'",
            f"write ({spelling}){n} for {n} {spelling} or ({word}) for one ligand{self.catalogued(word)}; "
            f"add a ligand {_ADD}",
            f" reads as {n} {spelling} ({self.label(head.name)}) or as one ligand {word}",
        )

    def catalogued(self, word: str) -> str:
        """' (NAME)' or ' (not in the catalogue)', to follow 'one ligand'."""
        name = self.index.bare.get(word)
        return f" ({name})" if name is not None else " (not in the catalogue)"

    # -- the formula -------------------------------------------------------
    def sequence(self, i: int, end: int) -> tuple[list[LigandSpan], list[_Metal]]:
        ligands: list[LigandSpan] = []
        metals: list[_Metal] = []
        while i < end:
            ch = self.text[i]
            if ch.isspace():
                i += 1
                continue
            if ch == "(":
                close = self.closing(i, end)
                span, i = self.group(i, close, end)
                ligands.append(span)
                continue
            if ch in ")]":
                raise _err(self.text, i, f"unmatched '{ch}'", "check the brackets")
            if ch == "[":
                raise _err(self.text, i, "a second '['", "write one bracketed complex, e.g. [Co(NH3)4Cl2]+")
            tok, i = self.bare(i, end)
            self.previous = None
            if isinstance(tok, _Metal):
                metals.append(tok)
                self.metal_seen = True
            else:
                ligands.append(tok)
                self.previous = tok if tok.end == i else None
        return ligands, metals


def _split_charge(text: str) -> tuple[int, int, int]:
    """(body start, body end, charge) for the whole formula."""
    t = text.replace("−", "-")
    start = len(t) - len(t.lstrip())
    stop = len(t.rstrip())
    if "[" not in t and "]" not in t:
        return start, stop, 0
    if t[start] != "[":
        raise _err(
            text, start, "text before '['", "write the complex ion alone, e.g. [Fe(CN)6]4- rather than K4[Fe(CN)6]"
        )
    close = t.rfind("]", start, stop)
    if close < 0:
        raise _err(text, start, "'[' is never closed", "close the bracket: [Co(NH3)6]3+")
    tail = t[close + 1 : stop].strip()
    charge = 0
    if tail:
        m = _CHARGE.fullmatch(tail)
        if not m:
            raise _err(
                text, close + 1, f"cannot read the charge '{echo(tail)}'", "write it like 2-, + or 3+ right after ']'"
            )
        n = read_number(m.group(1) or "1", text, close + 1, "charge", MAX_CHARGE)
        charge = n if m.group(2) == "+" else -n
    return start + 1, close, charge


def read_condensed(text: str, rules: RuleSet, suggest: bool = True) -> CondensedReading:
    """Read a condensed formula, keeping the text span of every ligand (see the module docstring).

    Parameters
    ----------
    text : str
        E.g. '[Fe(CN)5(NO)]2-'.
    rules : RuleSet
        The rule folders in force (the ligand catalogue).
    suggest : bool, optional
        False leaves the "did you mean" names out of an unknown-ligand error.

    Returns
    -------
    CondensedReading

    Raises
    ------
    InputError
        The formula cannot be read, or reads in more than one way; the message
        names the text and its position (1-based).
    """
    if not text or not text.strip():
        raise InputError("empty formula", "give a formula such as [RuCl2(CO)2(PPh3)2]")
    check_formula_text(text)
    start, stop, charge = _split_charge(text)
    plain = text.replace("−", "-")
    ligands, metals = _Reader(plain, rules, suggest).sequence(start, stop)
    if not metals:
        raise _err(text, start, "no metal symbol", METAL_FIX)
    if len(metals) > 1:
        raise _err(
            text, metals[1].start, f"a second metal '{metals[1].symbol}'", "only mononuclear complexes are handled"
        )
    if not ligands:
        raise _err(text, stop, "no ligands", "write the ligands after the metal, e.g. [Ni(CO)4]")
    m = metals[0]
    return CondensedReading(plain, m.symbol, (m.start, m.end), charge, tuple(ligands))


def parse_condensed(text: str, rules: RuleSet, suggest: bool = True) -> Composition:
    """Parse a condensed formula of a mononuclear complex (see the module docstring).

    Parameters
    ----------
    text : str
        E.g. '[Fe(CN)5(NO)]2-'.
    rules : RuleSet
        The rule folders in force (the ligand catalogue).
    suggest : bool, optional
        False leaves the "did you mean" names out of an unknown-ligand error:
        for a caller that only tries the condensed reading and discards the
        error (the fuzzy match costs far more than the parse).

    Returns
    -------
    Composition
        The metal, the overall charge, and each catalogue ligand once (its
        canonical name) with its count, in order of first appearance.

    Raises
    ------
    InputError
        The formula cannot be read, or reads in more than one way; the message
        names the text and its position (1-based).
    """
    reading = read_condensed(text, rules, suggest)
    entries = load_ligands(rules)
    parts: tuple[tuple[LigandKind, int], ...] = tuple((entries[n].kind(), c) for n, c in reading.counts())
    comp = Composition(formula=text.strip(), parts=parts, metal=reading.metal, charge=reading.charge)
    check_sites(comp)
    return comp
