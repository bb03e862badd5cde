"""Formulas -> :class:`~enumerator.model.composition.Composition`.

The abstract notation of the trade, with ``M`` for the metal:

* a lowercase letter is a monodentate ligand: ``Ma2b2c2``, ``Mabcdef``;
* uppercase letters in parentheses are one chelate chain, the letters its
  donors in chain order: ``M(AA)2b2``, ``M(AB)3``, ``M(ABA)b3``;
* three uppercase letters in braces are one tripod, capping a face with
  every pair of donors linked (Tp, tacn, triphos): ``M{AAA}b3``,
  ``M{ABB}c3``; ``(AAA)`` stays a chain;
* ``(ring)`` is an η-ring on one site of its own (piano stool): ``M(ring)a3``;
* a count follows a letter or a closing bracket; square brackets and a
  trailing charge are allowed: ``[Ma4b2]+``.

>>> c = parse_abstract("M(AA)2b2")
>>> [(k.name, k.donors, n) for k, n in c.parts]
[('AA', ('A', 'A'), 2), ('b', ('b',), 2)]
>>> [(k.name, k.topology, k.denticity) for k in parse_abstract("M{AAA}(ring)b").kinds]
[('{AAA}', 'tripod', 3), ('ring', 'ring', 1), ('b', 'chain', 1)]
"""

from __future__ import annotations

import re

from enumerator.errors import InputError
from enumerator.limits import MAX_CHARGE, MAX_SITES
from enumerator.model.composition import Composition, LigandKind
from enumerator.parse.text import check_formula_text, check_sites, describe_char, echo, read_number

__all__ = ["parse_abstract", "looks_abstract", "parse_charge"]

_CHARGE = re.compile(r"([0-9]*)([+-])$")
_COUNT = re.compile(r"[0-9]+")


def looks_abstract(text: str) -> bool:
    """Whether a formula is written in the letter notation: 'M' then a ligand token or nothing.

    Parameters
    ----------
    text : str

    Returns
    -------
    bool
        Also True for some real formulas ('Mo(CO)6'); :func:`enumerator.parse.formula.parse_formula` settles those.
    """
    t = text.strip().lstrip("[")
    if len(t) > 1 and t[0] == "M" and not t[1].isascii() and (t[1].isalpha() or t[1].isdigit()):
        return True  # 'M' and a look-alike letter ('Mаb5' with a Cyrillic а): refused as the letter notation
    return bool(re.match(r"^M(?:[a-z({]|$)", t))


def parse_charge(text: str) -> tuple[str, int]:
    """Split a trailing charge such as '2-' or '+' off a bracketed formula.

    Parameters
    ----------
    text : str

    Returns
    -------
    (str, int)
        The formula up to its closing bracket (or all of it without one) and the charge (0 if none).

    Raises
    ------
    InputError
        Something other than a charge follows the closing bracket.

    Examples
    --------
    >>> parse_charge("[Ma4b2]2-")
    ('[Ma4b2]', -2)
    """
    t = text.strip()
    if "]" in t:
        head, _, tail = t.rpartition("]")
        tail = tail.strip()
        if not tail:
            return head + "]", 0
        m = _CHARGE.fullmatch(tail)
        if not m:
            raise InputError(
                f"cannot read the charge '{echo(tail)}' after ']' in '{echo(text)}'",
                "write it like 2- or + after the bracket",
            )
        n = read_number(m.group(1) or "1", text, text.rfind(tail), "charge", MAX_CHARGE)
        return head + "]", n if m.group(2) == "+" else -n
    return t, 0


def _error(text: str, pos: int, what: str, fix: str) -> InputError:
    return InputError(f"formula '{echo(text)}': {what} at position {pos + 1}", fix)


def _chelate(original: str, body: str, offset: int, i: int) -> tuple[LigandKind, int]:
    """The chelate chain or ring opened by '(' at ``body[i]``, and the position after its ')'."""
    close = body.find(")", i)
    if close < 0:
        raise _error(original, offset + i, "'(' is never closed", "close the chelate: (AA)")
    inner = body[i + 1 : close]
    if inner == "ring":
        return LigandKind(name="ring", donors=("R",), ring=True), close + 1
    if re.fullmatch(r"[A-Z]{2,6}", inner):
        return LigandKind(name=inner, donors=tuple(inner)), close + 1
    raise _error(
        original,
        offset + i + 1,
        f"'({inner})' is not a chelate",
        "write chelate donors as 2-6 capital letters, e.g. (AA), (AB), (ABA), "
        "{AAA} for a tripod, or (ring) for an η-ring",
    )


def _tripod(original: str, body: str, offset: int, i: int) -> tuple[LigandKind, int]:
    """The tripod opened by '{' at ``body[i]``, and the position after its '}'."""
    close = body.find("}", i)
    if close < 0:
        raise _error(original, offset + i, "'{' is never closed", "close the tripod: {AAA}")
    inner = body[i + 1 : close]
    if not re.fullmatch(r"[A-Z]{3}", inner):
        raise _error(
            original,
            offset + i + 1,
            f"'{{{inner}}}' is not a tripod",
            "write a tripod as three capital letters in braces, e.g. {AAA} or {ABB}",
        )
    return LigandKind(name="{" + inner + "}", donors=tuple(inner), topology="tripod"), close + 1


def parse_abstract(text: str) -> Composition:
    """Parse the abstract letter notation (see the module docstring).

    Parameters
    ----------
    text : str
        E.g. 'Ma4b2', 'M(AB)2b2', 'M{AAA}b3', '[M(ring)a3]+'.

    Returns
    -------
    Composition
        Metal 'M'; each ligand kind once, in order of first appearance, counts added up.

    Raises
    ------
    InputError
        The text does not follow the notation; the message gives the position (1-based).
    """
    original = text
    check_formula_text(text)
    body, charge = parse_charge(text)
    body = body.strip()
    offset = len(original) - len(original.lstrip())
    if body.startswith("["):
        if not body.endswith("]"):
            raise _error(original, len(original) - 1, "'[' is never closed", "close the bracket: [Ma4b2]")
        body = body[1:-1]
        offset += 1
    if not body.startswith("M"):
        raise _error(original, offset, "the abstract notation starts with 'M'", "write e.g. Ma4b2 or M(AA)2b2")
    i = 1
    order: list[LigandKind] = []
    counts: dict[LigandKind, int] = {}
    while i < len(body):
        ch = body[i]
        if not ch.isascii():
            raise _error(
                original,
                offset + i,
                f"{describe_char(ch)} is not an ASCII character",
                "the letter notation takes the ASCII letters a-z and A-Z, digits 0-9 and ( ) { } [ ] only; retype it",
            )
        if ch.islower():
            kind = LigandKind(name=ch, donors=(ch,))
            i += 1
        elif ch == "(":
            kind, i = _chelate(original, body, offset, i)
        elif ch == "{":
            kind, i = _tripod(original, body, offset, i)
        else:
            raise _error(
                original,
                offset + i,
                f"unexpected '{ch}'",
                "use lowercase letters for monodentate ligands, (AA)/(AB)/(ABA) for chelates, {AAA} for a tripod "
                "and a number for a count",
            )
        m = _COUNT.match(body, i)
        n = 1
        if m:
            n = read_number(m.group(0), original, offset + i, "count", MAX_SITES)
            if n == 0:
                raise _error(original, offset + i, "a count of 0", "leave the ligand out instead")
            i += len(m.group(0))
        if kind not in counts:
            order.append(kind)
            counts[kind] = 0
        counts[kind] += n
    if not order:
        raise _error(original, offset + len(body), "no ligands after 'M'", "write e.g. Ma4b2")
    comp = Composition(formula=original.strip(), parts=tuple((k, counts[k]) for k in order), charge=charge)
    check_sites(comp)
    return comp
