"""Condensed formulas of real complexes -> :class:`~enumerator.model.composition.Composition`.

The notation is the one chemists write in papers:

* one metal, anywhere in the formula: ``[RuCl2(CO)2(PPh3)2]``, ``[CpMn(CO)3]``;
* square brackets and an overall charge after them: ``[Fe(CN)5(NO)]2-``,
  ``[Co(NH3)4Cl2]+`` (``+``, ``-``, ``2+``, ``3-``; a Unicode minus is accepted);
* ligands by catalogue name or alias (``isosieve ligands`` lists them), with
  a multiplier after a ligand or a parenthesised group: ``Cl2``, ``(CO)3``;
* a parenthesised group holds one ligand, ``(PPh3)``, or several,
  ``(CO)2`` or ``(NH3Cl)``-style lists;
* hapticity prefixes ``η5-``, ``eta5-``, ``h5-`` (also ``η⁵-``): ``[(η5-C5H5)Fe(CO)2Cl]``.

Outside parentheses a ligand name is read greedily (the longest catalogue
spelling that matches), so write ``(NO)2`` for two nitrosyls: ``NO2`` is
the nitro ligand.  Case matters: ``CO`` is carbonyl, ``Co`` cobalt.  Every
error names the offending text and its position (1-based).

>>> from enumerator.rules.ruleset import load_rules
>>> c = parse_condensed("[Fe(CN)5(NO)]2-", load_rules())
>>> c.metal, c.charge, [(k.name, n) for k, n in c.parts]
('Fe', -2, [('CN', 5), ('NO', 1)])
>>> c = parse_condensed("[(η5-C5H5)Mn(CO)3]", load_rules())
>>> [(k.name, k.ring, n) for k, n in c.parts], c.donor_count
([('Cp', True, 1), ('CO', False, 3)], 4)
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.elements import element_symbols, is_metal
from enumerator.rules.ligands import LigandEntry, all_spellings, load_ligands
from enumerator.rules.ruleset import RuleSet, closest_names

__all__ = ["parse_condensed", "METAL_FIX"]

#: The fix offered when a formula has no metal (or not one the parser accepts).
METAL_FIX = "write one metal symbol, e.g. [RuCl2(CO)2(PPh3)2]"

_SUPERSCRIPT = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_HAPTO = re.compile(r"(?:η\^?|eta\^?|h)([0-9⁰¹²³⁴⁵⁶⁷⁸⁹]+)-")
_CHARGE = re.compile(r"(\d*)([+-])")
_ELEMENT = re.compile(r"[A-Z][a-z]?")
_WORD = re.compile(r"[A-Za-z0-9*'+-]+")


@dataclass
class _Tok:
    entry: LigandEntry | None  # None: the metal
    metal: str | None
    count: int
    pos: int


def _err(text: str, pos: int, what: str, fix: str) -> InputError:
    return InputError(f"formula '{text}': {what} at position {pos + 1}", fix)


@cached(maxsize=16)
def _spellings_by_length(rules: RuleSet) -> tuple[tuple[str, str], ...]:
    return tuple(sorted(all_spellings(rules).items(), key=lambda kv: (-len(kv[0]), kv[0])))


class _Parser:
    def __init__(self, text: str, rules: RuleSet, suggest: bool = True) -> None:
        self.text = text
        self.rules = rules
        self.suggest = suggest
        self.entries = load_ligands(rules)
        self.spellings = _spellings_by_length(rules)
        self.exact = all_spellings(rules)

    # -- pieces ------------------------------------------------------------
    def count(self, i: int, end: int) -> tuple[int, int]:
        m = re.compile(r"\d+").match(self.text, i, end)
        if not m:
            return 1, i
        n = int(m.group(0))
        if n == 0:
            raise _err(self.text, i, "a count of 0", "leave the ligand out instead")
        return n, m.end()

    def hapto(self, i: int, end: int) -> tuple[int | None, int]:
        m = _HAPTO.match(self.text, i, end)
        if not m:
            return None, i
        return int(m.group(1).translate(_SUPERSCRIPT)), m.end()

    def check_hapto(self, entry: LigandEntry, eta: int | None, pos: int) -> None:
        if eta is None:
            return
        if eta != entry.bound_atoms:
            raise _err(
                self.text,
                pos,
                f"η{eta}-{entry.name} is not in the catalogue "
                f"({entry.name} is bound through {entry.bound_atoms} atom(s))",
                f"write η{entry.bound_atoms}-{entry.name}, or add an η{eta} entry in a ligands.toml under --rules DIR",
            )

    def match_name(self, i: int, end: int) -> tuple[str, int] | None:
        for spelling, name in self.spellings:
            j = i + len(spelling)
            if j <= end and self.text.startswith(spelling, i):
                return name, j
        return None

    def unknown(self, i: int, end: int) -> InputError:
        if i >= len(self.text):
            return _err(
                self.text,
                i,
                "the formula ends where a ligand should follow",
                "write the ligand after the prefix, e.g. η5-Cp",
            )
        m = _WORD.match(self.text, i, end)
        word = m.group(0) if m else self.text[i]
        near = closest_names(word, self.exact) if self.suggest else []
        hint = f"did you mean {', '.join(near)}?" if near else "see the catalogue with: isosieve ligands"
        return _err(
            self.text, i, f"unknown ligand '{word}'", hint + " (add your own in a ligands.toml under --rules DIR)"
        )

    # -- sequences ---------------------------------------------------------
    def sequence(self, i: int, end: int, top: bool) -> list[_Tok]:
        toks: list[_Tok] = []
        while i < end:
            ch = self.text[i]
            if ch.isspace():
                i += 1
                continue
            if ch == "(":
                close = self.closing(i, end)
                inner = self.group(i + 1, close)
                n, i = self.count(close + 1, end)
                for t in inner:
                    t.count *= n
                toks.extend(inner)
                continue
            if ch in ")]":
                raise _err(self.text, i, f"unmatched '{ch}'", "check the brackets")
            if ch == "[":
                raise _err(self.text, i, "a second '['", "write one bracketed complex, e.g. [Co(NH3)4Cl2]+")
            eta, j = self.hapto(i, end)
            lig = self.match_name(j, end)
            metal = None
            if top and eta is None:
                m = _ELEMENT.match(self.text, i, end)
                if m and is_metal(m.group(0)):
                    metal = m.group(0)
            if metal is not None and (lig is None or len(metal) > lig[1] - j):
                n, i = self.count(i + len(metal), end)
                if n != 1:
                    raise _err(
                        self.text,
                        i - len(str(n)),
                        f"{n} metal atoms",
                        "only mononuclear complexes are handled; write one metal",
                    )
                toks.append(_Tok(None, metal, 1, j))
                continue
            if lig is None:
                m = _ELEMENT.match(self.text, j, end)
                if (
                    top
                    and m
                    and m.group(0) in element_symbols()
                    and not is_metal(m.group(0))
                    and not self.match_name(j, end)
                ):
                    near = closest_names(_WORD.match(self.text, j, end).group(0), self.exact)  # type: ignore[union-attr]
                    if not near:
                        raise _err(self.text, j, f"'{m.group(0)}' is not a metal and no ligand starts here", METAL_FIX)
                raise self.unknown(j, end)
            name, k = lig
            entry = self.entries[name]
            self.check_hapto(entry, eta, i)
            n, i = self.count(k, end)
            toks.append(_Tok(entry, None, n, j))
        return toks

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

    def group(self, i: int, end: int) -> list[_Tok]:
        if i == end:
            raise _err(self.text, i - 1, "empty parentheses", "write a ligand inside, e.g. (CO)")
        eta, j = self.hapto(i, end)
        inner = self.text[j:end].strip()
        if inner in self.exact:
            entry = self.entries[self.exact[inner]]
            self.check_hapto(entry, eta, i)
            return [_Tok(entry, None, 1, j)]
        if eta is not None:
            raise self.unknown(j, end)
        try:
            toks = self.sequence(i, end, top=False)
        except InputError:
            raise self.unknown(i, end) from None
        return toks


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
            raise _err(text, close + 1, f"cannot read the charge '{tail}'", "write it like 2-, + or 3+ right after ']'")
        n = int(m.group(1) or 1)
        charge = n if m.group(2) == "+" else -n
    return start + 1, close, charge


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
        The formula cannot be read; the message names the text and its position (1-based).
    """
    if not text or not text.strip():
        raise InputError("empty formula", "give a formula such as [RuCl2(CO)2(PPh3)2]")
    start, stop, charge = _split_charge(text)
    p = _Parser(text.replace("−", "-"), rules, suggest)
    toks = p.sequence(start, stop, top=True)
    metals = [t for t in toks if t.metal]
    if not metals:
        raise _err(text, start, "no metal symbol", METAL_FIX)
    if len(metals) > 1:
        raise _err(text, metals[1].pos, f"a second metal '{metals[1].metal}'", "only mononuclear complexes are handled")
    order: list[str] = []
    counts: dict[str, int] = {}
    for t in toks:
        if t.entry is None:
            continue
        if t.entry.name not in counts:
            order.append(t.entry.name)
            counts[t.entry.name] = 0
        counts[t.entry.name] += t.count
    if not order:
        raise _err(text, stop, "no ligands", "write the ligands after the metal, e.g. [Ni(CO)4]")
    entries = load_ligands(rules)
    parts: tuple[tuple[LigandKind, int], ...] = tuple((entries[n].kind(), counts[n]) for n in order)
    return Composition(formula=text.strip(), parts=parts, metal=metals[0].metal or "M", charge=charge)
