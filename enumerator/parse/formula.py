"""One entry point for formulas: the abstract letter notation or a condensed
real formula, whichever the text is.

>>> from enumerator.rules import load_rules
>>> parse_formula("Ma4b2", load_rules()).donor_count
6
>>> parse_formula("[Mo(CO)6]", load_rules()).metal
'Mo'
"""

from __future__ import annotations

import re

from enumerator.errors import InputError
from enumerator.model.composition import Composition
from enumerator.parse.abstract import looks_abstract, parse_abstract
from enumerator.parse.condensed import parse_condensed
from enumerator.parse.text import check_formula_text
from enumerator.rules.ligands import spelling_index, split_hapto
from enumerator.rules.ruleset import RuleSet

__all__ = ["parse_formula"]


#: Element symbols that begin like the abstract notation's 'M' + a letter.
_M_ELEMENTS = frozenset({"Mn", "Mo", "Mg", "Mt", "Md", "Mc"})
#: Of those, the ones a real formula is likely to start with.
_COMMON_M_ELEMENTS = frozenset({"Mn", "Mo", "Mg"})
_GROUP = re.compile(r"\(([^()]*)\)")


def _has_catalogue_group(text: str, rules: RuleSet) -> bool:
    """Whether a parenthesised group of the text is a catalogue ligand, as (CO) or (η5-Cp) are."""
    index = spelling_index(rules)
    for m in _GROUP.finditer(text):
        inner = m.group(1).strip()
        eta, at = split_hapto(inner)
        if index.resolve(inner[at:].strip(), eta) is not None:
            return True
    return False


def parse_formula(text: str, rules: RuleSet) -> Composition:
    """Parse the abstract letter notation or a condensed formula, whichever the text is.

    A text that starts like the letter notation ('M' + a lowercase letter or
    a parenthesis) is read as one, except that a text starting with Mn, Mo,
    Mg, Mt, Md or Mc is first tried as a real formula; and one of those that
    holds a parenthesised catalogue ligand ('Mo(CO)3(PPP)') is a real formula
    whatever else it holds, so the condensed parser's refusal stands rather
    than a letter-notation reading (M, a ligand 'o', a chelate 'CO').

    Parameters
    ----------
    text : str
        E.g. 'Ma4b2' or '[RuCl2(CO)2(PPh3)2]'.
    rules : RuleSet
        The rule folders in force (the ligand catalogue).

    Returns
    -------
    Composition

    Raises
    ------
    InputError
        Neither reading works (the error of the more likely reading is raised); or, before either is tried,
        the text is too long, holds an unprintable character or nests brackets too deep
        (:func:`enumerator.parse.text.check_formula_text`).
    """
    if not text or not text.strip():
        raise InputError("empty formula", "give a formula such as Ma4b2 or [RuCl2(CO)2(PPh3)2]")
    check_formula_text(text)
    if looks_abstract(text):
        # 'Mn', 'Mo', 'Mg', ... also start like the abstract notation
        # ("Mo(CO)6" reads as M + o + a chelate (CO)): a text that the ligand
        # catalogue reads as a real formula is taken as one; otherwise it is
        # the letter notation.
        head = text.strip().lstrip("[")[:2]
        if head in _M_ELEMENTS:
            if _has_catalogue_group(text, rules):
                return parse_condensed(text, rules)
            try:
                return parse_condensed(text, rules, suggest=False)
            except InputError:
                pass
        try:
            return parse_abstract(text)
        except InputError as abstract_error:
            if head in _COMMON_M_ELEMENTS:
                # neither reading works: for Mn/Mo/Mg the real formula is the
                # likely intent, so its error (with suggestions) is the useful one
                return parse_condensed(text, rules)
            try:
                return parse_condensed(text, rules, suggest=False)
            except InputError:
                raise abstract_error from None
    return parse_condensed(text, rules)
