"""IUPAC additive names of mononuclear complexes (Nomenclature of Inorganic
Chemistry, IUPAC Recommendations 2005, IR-9.2), with the stereodescriptor
of IR-9.3 in front: ``(OC-6-22)-triamminetrinitrito-κN-cobalt(III)``.

The parts come from the rule data, never from the formula text:

* each ligand's name is the ``iupac`` key of its catalogue entry, with
  ``enclose`` saying whether it goes in parentheses (organic ligands and
  names with locants, spaces or multiplying prefixes of their own);
* the central atom's name is in ``rules/element_names.toml``, read by
  :func:`enumerator.rules.element_names.element_names` (its -ate form for
  an anionic complex).

Assembly (IR-9.2.2):

* ligands in alphanumerical order of their names, ignoring multiplying
  prefixes of the complex and the designators η, κ, locants and italic
  prefixes (N-, tert-) at the front of a ligand name;
* multiplying prefixes di, tri, tetra ... for plain names, bis, tris,
  tetrakis ... for enclosed ones; no elision (tetraammine, hexaaqua);
  enclosing marks nest ( ), [ ( ) ], { [ ( ) ] };
* a hyphen after a κ term when a plain name follows (nitrito-κN-cobalt);
* the oxidation number in roman numerals after the central atom,
  ``cobalt(III)``, ``nickel(0)``; where a nitrosyl makes the oxidation
  state a matter of convention, the charge number instead
  (Ewens–Bassett), ``ferrate(2−)``, and none for a neutral complex.

The descriptor is put in front, in parentheses, when the composition has
more than one stereoisomer, and only an IR-9.3 one: on a shape IUPAC lists
no polyhedral symbol for (the tool's own ``hexplane-6``) the name has none.
A complex with an unnamed ligand (generic or isotope-labelled entries) or
metal gets no name, with the reason.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> rs = load_rules()
>>> additive_name(parse_condensed("[CoCl3(NH3)3]", rs), rs, "OC-6-22").name
'(OC-6-22)-triamminetrichloridocobalt(III)'
>>> additive_name(parse_condensed("[Fe(CN)6]4-", rs), rs, None).name
'hexacyanidoferrate(II)'
"""

from __future__ import annotations

import re

from enumerator.analyses.centre.electrons import count_electrons, roman
from enumerator.errors import IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition
from enumerator.rules.element_names import element_names
from enumerator.rules.ruleset import RuleSet

__all__ = ["ComplexName", "additive_name", "ligand_sort_key"]

#: Multiplying prefixes for plain ligand names, by count from 1 (IR-9.2.2; no elision).
_SIMPLE = (
    "",
    "di",
    "tri",
    "tetra",
    "penta",
    "hexa",
    "hepta",
    "octa",
    "nona",
    "deca",
    "undeca",
    "dodeca",
)
#: Multiplying prefixes for enclosed ligand names, by count from 1.
_ENCLOSED = (
    "",
    "bis",
    "tris",
    "tetrakis",
    "pentakis",
    "hexakis",
    "heptakis",
    "octakis",
    "nonakis",
    "decakis",
    "undecakis",
    "dodecakis",
)
#: designators and italic prefixes at the front of a ligand name, ignored in ordering
_FRONT = re.compile(
    r"^(?:η\d*-|κ\d*[A-Za-z,′″']*-|\d[\d,:′″']*-|[A-Z](?:,[A-Z])*[′″']*(?:,[A-Z][′″']*)*-|tert-|sec-|cis-|trans-)+"
)
_KAPPA_END = re.compile(r"κ\d*[A-Z][a-z]?\d*[′″']*(?:,κ?\d*[A-Z][a-z]?\d*[′″']*)*$")


@frozen_dataclass
class ComplexName:
    """An additive name, or why there is none."""

    name: str | None
    reason: str | None = None


def ligand_sort_key(name: str) -> str:
    """The ordering key of a ligand name (IR-9.2.2): front designators and
    locants dropped, then letters only, lower case.

    >>> ligand_sort_key("N,N′-bis(2-aminoethyl)ethane-1,2-diamine")
    'bisaminoethylethanediamine'
    >>> ligand_sort_key("η5-cyclopentadienyl")
    'cyclopentadienyl'

    Parameters
    ----------
    name : str
        A ligand name as it appears in an additive name.

    Returns
    -------
    str
    """
    body = _FRONT.sub("", name)
    return "".join(ch for ch in body.lower() if ch.isalpha() and ch not in "κη")


def _number(comp: Composition) -> str | None:
    """'(III)', '(0)', '(2−)' or '' (neutral nitrosyl complex); None when the
    oxidation state cannot be computed."""
    nitrosyl = any(k.info("nitrosyl") is not None for k in comp.kinds)
    if nitrosyl:
        q = comp.charge
        if q == 0:
            return ""
        return f"({abs(q)}{'+' if q > 0 else '−'})"
    try:
        ox = count_electrons(comp).oxidation_state
    except IsosieveError:  # an uncountable centre simply gets no name
        return None
    if ox is None:
        return None
    return f"({roman(ox).replace('-', '−')})"


#: A square-bracket group with no enclosing mark inside it.  In the nesting order ( ), [( )], {[( )]}
#: an enclosing square bracket always holds parentheses, so such a group belongs to the name itself:
#: von Baeyer and spiro descriptors (bicyclo[2.2.1], spiro[4.5]), fusion descriptors (benzo[h],
#: pyrido[1,2-a]) and ring assemblies ([1,1′-binaphthalene]).
_NAME_BRACKETS = re.compile(r"\[[^\[\](){}]*\]")


def _enclosed(name: str) -> str:
    """The name in the enclosing marks one level above the deepest inside
    it, in the nesting order ( [ { ( [ { ... (IR-9.2.2.3; P-16.5 of the
    organic recommendations).  Square brackets that are part of the name
    itself (von Baeyer, spiro, fusion and ring-assembly brackets; see
    :data:`_NAME_BRACKETS`) are not enclosing marks and do not count: nbd
    is ``(η4-bicyclo[2.2.1]hepta-2,5-diene)``.

    >>> _enclosed("η4-bicyclo[2.2.1]hepta-2,5-diene")
    '(η4-bicyclo[2.2.1]hepta-2,5-diene)'
    >>> _enclosed("2-(diphenylphosphanyl)ethyl")
    '[2-(diphenylphosphanyl)ethyl]'
    >>> _enclosed("ethane-1,2-diylbis[di(propan-2-yl)phosphane]")
    '{ethane-1,2-diylbis[di(propan-2-yl)phosphane]}'
    """
    depth = level = 0
    for ch in _NAME_BRACKETS.sub("", name):
        if ch in "([{":
            level += 1
            depth = max(depth, level)
        elif ch in ")]}":
            level -= 1
    marks = ("()", "[]", "{}")[depth % 3]
    return marks[0] + name + marks[1]


def additive_name(comp: Composition, ruleset: RuleSet, descriptor: str | None) -> ComplexName:
    """The additive name of a composition (IR-9.2) with its descriptor in front.

    Parameters
    ----------
    comp : Composition
        A real composition (catalogue ligands with ``iupac`` names).
    ruleset : RuleSet
        The rule folders in force (for the central atom's name).
    descriptor : str or None
        The stereodescriptor to put in front, in parentheses (None: no descriptor; one that begins
        with the tool's own lower-case name of a shape, e.g. 'hexplane-6', is left out).

    Returns
    -------
    ComplexName
        The name, or None with the reason (abstract letters, an unnamed ligand or metal, an uncountable
        oxidation state, more than 12 identical ligands).
    """
    if comp.metal == "M":
        return ComplexName(None, "abstract letters have no names")
    parts = []
    for kind, count in comp.parts:
        name = kind.info("iupac")
        if not isinstance(name, str):
            return ComplexName(
                None,
                f"ligand '{kind.name}' has no IUPAC name in the catalogue (iupac = \"...\" in its ligands.toml entry)",
            )
        parts.append((ligand_sort_key(name), name, bool(kind.info("enclose")), count))
    metals = element_names(ruleset)
    if comp.metal not in metals:
        return ComplexName(
            None, f"no name for the element {comp.metal} (add it to an element_names.toml under --rules DIR)"
        )
    number = _number(comp)
    if number is None:
        return ComplexName(None, f"the oxidation state of {comp.metal} cannot be computed here")
    pieces = []
    for _, name, enclose, count in sorted(parts):
        if count > 12:
            return ComplexName(None, f"{count} identical ligands: no multiplying prefix is tabulated here")
        pieces.append((_ENCLOSED[count - 1] + _enclosed(name)) if enclose else (_SIMPLE[count - 1] + name))
    pieces.append(metals[comp.metal][1 if comp.charge < 0 else 0] + number)
    text = ""
    for piece in pieces:
        if text and _KAPPA_END.search(text) and piece[:1] not in "([{":
            text += "-"
        text += piece
    if descriptor and descriptor[:1].islower():
        # the tool's own name of a shape IUPAC lists no symbol for (hexplane-6): no IR-9.3 descriptor exists
        descriptor = None
    full = f"({descriptor.replace(chr(39), '′')})-{text}" if descriptor else text
    return ComplexName(full)
