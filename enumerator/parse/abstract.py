"""Formulas -> :class:`~enumerator.model.composition.Composition`.

The abstract notation of the trade, with ``M`` for the metal:

* a lowercase letter is a monodentate ligand: ``Ma2b2c2``, ``Mabcdef``;
* uppercase letters in parentheses are one chelate, the letters its donors
  in chain order: ``M(AA)2b2``, ``M(AB)3``, ``M(ABA)b3``;
* ``(ring)`` is a ring ligand capping a face (piano stool): ``M(ring)a3``;
* a count follows a letter or a closing parenthesis; square brackets and a
  trailing charge are allowed: ``[Ma4b2]+``.

>>> c = parse_abstract("M(AA)2b2")
>>> [(k.name, k.donors, n) for k, n in c.parts]
[('AA', ('A', 'A'), 2), ('b', ('b',), 2)]
"""

from __future__ import annotations

import re

from enumerator.errors import InputError
from enumerator.model.composition import Composition, LigandKind

__all__ = ["parse_abstract", "looks_abstract", "parse_charge"]

_CHARGE = re.compile(r"(\d*)([+-])$")


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
    return bool(re.match(r"^M(?:[a-z(]|$)", t))


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
                f"cannot read the charge '{tail}' after ']' in '{text}'", "write it like 2- or + after the bracket"
            )
        n = int(m.group(1) or 1)
        return head + "]", n if m.group(2) == "+" else -n
    return t, 0


def _error(text: str, pos: int, what: str, fix: str) -> InputError:
    return InputError(f"formula '{text}': {what} at position {pos + 1}", fix)


def parse_abstract(text: str) -> Composition:
    """Parse the abstract letter notation (see the module docstring).

    Parameters
    ----------
    text : str
        E.g. 'Ma4b2', 'M(AB)2b2', '[M(ring)a3]+'.

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
        if ch.islower():
            kind = LigandKind(name=ch, donors=(ch,))
            i += 1
        elif ch == "(":
            close = body.find(")", i)
            if close < 0:
                raise _error(original, offset + i, "'(' is never closed", "close the chelate: (AA)")
            inner = body[i + 1 : close]
            if inner == "ring":
                kind = LigandKind(name="ring", donors=("R", "R", "R"), ring=True)
            elif re.fullmatch(r"[A-Z]{2,6}", inner):
                kind = LigandKind(name=inner, donors=tuple(inner))
            else:
                raise _error(
                    original,
                    offset + i + 1,
                    f"'({inner})' is not a chelate",
                    "write chelate donors as 2-6 capital letters, e.g. (AA), (AB), (ABA), "
                    "or (ring) for a face-capping ring",
                )
            i = close + 1
        else:
            raise _error(
                original,
                offset + i,
                f"unexpected '{ch}'",
                "use lowercase letters for monodentate ligands, (AA)/(AB)/(ABA) for chelates and a number for a count",
            )
        m = re.match(r"\d+", body[i:])
        n = 1
        if m:
            n = int(m.group(0))
            if n == 0:
                raise _error(original, offset + i, "a count of 0", "leave the ligand out instead")
            i += len(m.group(0))
        if kind not in counts:
            order.append(kind)
            counts[kind] = 0
        counts[kind] += n
    if not order:
        raise _error(original, offset + len(body), "no ligands after 'M'", "write e.g. Ma4b2")
    return Composition(formula=original.strip(), parts=tuple((k, counts[k]) for k in order), charge=charge)
