"""Checks every formula passes before it is read: its length, its characters, its nesting, its numbers.

A formula is refused here, with one line naming what and where, when it

* is longer than :data:`~enumerator.limits.MAX_FORMULA_CHARS` characters;
* holds a character that is not printable -- a control character (a tab, a
  line break, NUL, ESC ...), a format character (a zero-width space, a
  right-to-left mark) or a space other than the ordinary one (a no-break
  space): such a character would be echoed raw into a table, a CSV file or a
  LaTeX caption, and some change what the text appears to say;
* nests brackets more than :data:`~enumerator.limits.MAX_NESTING` deep.

Labels and titles (a job's, a batch file's) are checked alike by
:func:`check_label_text`: no control, format or unusual space character (a
line break in a label would end a LaTeX comment and start a command), and at
most :data:`~enumerator.limits.MAX_LABEL_CHARS` characters.

Numbers are read by :func:`read_number`, which takes ASCII digits only and
refuses a number of more than :data:`~enumerator.limits.MAX_COUNT_DIGITS`
digits before converting it.  :func:`describe_char` names a character by its
code point and Unicode name, for messages about look-alikes (a Cyrillic 'а',
a full-width '３').

>>> check_formula_text("[RuCl2(CO)2(PPh3)2]")
>>> check_formula_text("Ma4\\tb2")  # doctest: +ELLIPSIS
Traceback (most recent call last):
...
enumerator.errors.InputError: formula 'Ma4\\tb2': control character U+0009 (CHARACTER TABULATION) at position 4; ...
>>> describe_char("а")
"'а' (U+0430 CYRILLIC SMALL LETTER A)"
"""

from __future__ import annotations

import unicodedata

from enumerator.errors import InputError, shorten
from enumerator.limits import (
    ECHO_CHARS,
    MAX_COUNT_DIGITS,
    MAX_FORMULA_CHARS,
    MAX_LABEL_CHARS,
    MAX_NESTING,
    MAX_SITES,
)
from enumerator.model.composition import Composition

__all__ = [
    "check_formula_text",
    "check_label_text",
    "check_sites",
    "describe_char",
    "read_number",
    "echo",
    "non_ascii",
    "OPENERS",
    "CLOSERS",
]

OPENERS = "([{"
CLOSERS = ")]}"

#: Names of control characters, which have no Unicode name of their own.
_CONTROL_NAMES = {
    "\t": "CHARACTER TABULATION",
    "\n": "LINE FEED",
    "\r": "CARRIAGE RETURN",
    "\x0b": "LINE TABULATION",
    "\x0c": "FORM FEED",
    "\x00": "NULL",
    "\x1b": "ESCAPE",
    "\x7f": "DELETE",
    "\x85": "NEXT LINE",
}


def echo(text: str) -> str:
    """A user's text as a message quotes it: shortened to :data:`~enumerator.limits.ECHO_CHARS`.

    Parameters
    ----------
    text : str

    Returns
    -------
    str
    """
    return shorten(text, ECHO_CHARS)


def describe_char(ch: str) -> str:
    """A character with its code point and Unicode name: ``'а' (U+0430 CYRILLIC SMALL LETTER A)``.

    Parameters
    ----------
    ch : str
        One character.

    Returns
    -------
    str
        Control characters are shown escaped (``'\\t'``), as the message line shows them.
    """
    name = _CONTROL_NAMES.get(ch) or unicodedata.name(ch, "")
    shown = ch if ch.isprintable() else repr(ch)[1:-1]
    return f"'{shown}' (U+{ord(ch):04X}{' ' + name if name else ''})"


def _bad_character(ch: str) -> str | None:
    """What kind of character ``ch`` is when a formula may not hold it (None when it may)."""
    if ch == " " or ch.isprintable():
        return None
    cat = unicodedata.category(ch)
    if cat == "Cc":
        return "control character"
    if cat == "Cf":
        return "invisible format character"
    if cat in ("Zs", "Zl", "Zp"):
        return "unusual space or line break"
    return "unprintable character"


def check_formula_text(text: str, what: str = "formula") -> None:
    """Refuse a formula that is too long, holds an unprintable character or nests too deep.

    Parameters
    ----------
    text : str
        The formula as given.
    what : str
        What to call it in the message.

    Raises
    ------
    InputError
        Naming the first offending character (escaped, with its code point) and its position (1-based),
        or the length or depth with the range allowed.
    """
    if len(text) > MAX_FORMULA_CHARS:
        raise InputError(
            f"{what} '{echo(text)}' has {len(text):,} characters, more than the {MAX_FORMULA_CHARS} read",
            "check that one formula was given (a batch file takes one formula a line)",
        )
    depth = 0
    for k, ch in enumerate(text):
        kind = _bad_character(ch)
        if kind is not None:
            code = f"U+{ord(ch):04X}"
            name = _CONTROL_NAMES.get(ch) or unicodedata.name(ch, "")
            raise InputError(
                f"{what} '{echo(text)}': {kind} {code}{f' ({name})' if name else ''} at position {k + 1}",
                "write an ordinary space"
                if kind == "unusual space or line break" and ch not in "\n\r"
                else "remove it (retype the formula if it was pasted)",
            )
        if ch in OPENERS:
            depth += 1
            if depth > MAX_NESTING:
                raise InputError(
                    f"{what} '{echo(text)}': brackets nested more than {MAX_NESTING} deep at position {k + 1}",
                    f"a formula nests at most {MAX_NESTING} brackets deep; check the brackets",
                )
        elif ch in CLOSERS:
            depth = max(0, depth - 1)


def check_label_text(text: str, what: str) -> None:
    """Refuse a label or title that is too long or holds a character a table or caption must not hold.

    Parameters
    ----------
    text : str
        The label or title as given.
    what : str
        Where it comes from, for the message (e.g. ``"job.toml [[complex]] #2: label"``).

    Raises
    ------
    InputError
        Naming the first offending character (escaped, with its code point) and its position, or the length.

    Examples
    --------
    >>> check_label_text("Ru, cis", "label")
    >>> check_label_text("x\\ninput", "label")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    enumerator.errors.InputError: label 'x\\ninput': control character U+000A (LINE FEED) at position 2; ...
    """
    if len(text) > MAX_LABEL_CHARS:
        raise InputError(
            f"{what} '{echo(text)}' has {len(text):,} characters, more than the {MAX_LABEL_CHARS} allowed",
            "shorten it",
        )
    for k, ch in enumerate(text):
        kind = _bad_character(ch)
        if kind is not None:
            name = _CONTROL_NAMES.get(ch) or unicodedata.name(ch, "")
            raise InputError(
                f"{what} '{echo(text)}': {kind} U+{ord(ch):04X}{f' ({name})' if name else ''} at position {k + 1}",
                "remove it (a label or title is one line of printable text)",
            )


def read_number(digits: str, text: str, pos: int, noun: str, largest: int) -> int:
    """A count or charge written as ASCII digits, checked against its range before and after conversion.

    Parameters
    ----------
    digits : str
        The digits as matched (``[0-9]+``).
    text : str
        The whole formula, for the message.
    pos : int
        Where the digits start (0-based).
    noun : str
        What the number is ('count', 'charge').
    largest : int
        The largest value allowed.

    Returns
    -------
    int

    Raises
    ------
    InputError
        More than :data:`~enumerator.limits.MAX_COUNT_DIGITS` digits, or a value above ``largest``.
    """
    if len(digits) > MAX_COUNT_DIGITS or int(digits) > largest:
        shown = echo(digits) if len(digits) <= ECHO_CHARS else f"of {len(digits):,} digits"
        number = f"'{shown}'" if len(digits) <= ECHO_CHARS else shown
        return _raise_range(text, pos, noun, number, largest)
    return int(digits)


def _raise_range(text: str, pos: int, noun: str, number: str, largest: int) -> int:
    raise InputError(
        f"formula '{echo(text)}': a {noun} {number} at position {pos + 1} is out of range",
        f"a {noun} is at most {largest}" + (" (either sign)" if noun == "charge" else ""),
    )


def check_sites(comp: Composition) -> None:
    """Refuse a composition with more donor sites than any geometry may have.

    Parameters
    ----------
    comp : Composition

    Raises
    ------
    InputError
        More than :data:`~enumerator.limits.MAX_SITES` coordination sites.
    """
    if comp.donor_count > MAX_SITES:
        raise InputError(
            f"formula '{echo(comp.formula)}' takes {comp.donor_count} coordination sites, more than the "
            f"{MAX_SITES} any geometry here may have",
            "check the counts",
        )


def non_ascii(word: str) -> str:
    """'; ... is not an ASCII character' for the first look-alike in ``word`` ('' when it is all ASCII).

    Parameters
    ----------
    word : str

    Returns
    -------
    str
        Meant to follow a message's fix.
    """
    for ch in word:
        if not ch.isascii():
            return f"; {describe_char(ch)} is not an ASCII character: retype it"
    return ""
