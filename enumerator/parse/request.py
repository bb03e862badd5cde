"""What one analysis is asked for: a formula and its options, checked against one declared table.

Every option a request can carry is declared once, in :data:`OPTIONS`: its
name, the type of value it takes, the values it allows and what it does.
The same table checks the options wherever they are written -- keyword
arguments of :func:`enumerator.analyse`, a job file's ``[[complex]]`` entry
(:mod:`enumerator.parse.job`), the command line -- so an unknown option gets
the same "did you mean" everywhere, and a :class:`Request` never holds a
value the table does not allow.

:func:`make_request` builds a request from keyword options (mappings such as
``reporters={"a": "CO"}`` are accepted where the table says "table");
:class:`Request` itself is plain, hashable data.

>>> make_request("Ma4b2", reporters={"a": "CO"}, pick="cis").reporters
(('a', 'CO'),)
>>> make_request("Ma4b2", pik="cis")
Traceback (most recent call last):
...
enumerator.errors.InputError: unknown option 'pik'; did you mean 'pick'?
>>> Request("M(AA)b4", spans=(("AA", "across"),))
Traceback (most recent call last):
...
enumerator.errors.InputError: span 'across' is not one of edge, cis, trans, any; e.g. --span AA=trans
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import fields
from os import PathLike, fspath
from types import MappingProxyType
from typing import Any

from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import ARRANGEMENTS
from enumerator.model.geometry import SPANS
from enumerator.rules.ruleset import closest_names

__all__ = ["Option", "OPTIONS", "Request", "make_request", "check_option", "unknown_option", "option_names"]

#: The kinds of value an option takes.
TEXT, COUNT, TABLE, FOLDERS = "text", "positive integer", "table of ligand = text", "list of folders"


@frozen_dataclass
class Option:
    """One request option.

    ``kind`` is one of ``"text"``, ``"positive integer"``, ``"table of
    ligand = text"`` (a mapping, or (ligand, value) pairs) and ``"list of
    folders"``.  ``allowed`` lists the values allowed (for a table, of each
    entry; an entry may list several, comma-separated, when ``several``);
    empty when any value of the kind is taken.  ``noun`` and ``flag`` word
    the message for a value that is not allowed, ``example`` the one for a
    value of the wrong kind.  ``where`` says where a job file gives it:
    ``"entry"`` (a key of ``[[complex]]`` and ``[defaults]``), ``"options"``
    (a key of the entry's ``options = { ... }`` table, read by an analysis
    stage) or ``"caller"`` (not in job files: the command line's ``--rules``).
    """

    name: str
    kind: str
    doc: str
    allowed: tuple[str, ...] = ()
    several: bool = False
    noun: str = ""
    flag: str = ""
    example: str = ""
    where: str = "entry"


#: Every request option: name, kind of value, allowed values, what it does.
OPTIONS: tuple[Option, ...] = (
    Option(
        "geometry",
        TEXT,
        "Polyhedral symbol of the coordination geometry (OC-6, TBPY-5, SP-4 ...); default: chosen from the formula.",
        example='geometry = "OC-6"',
    ),
    Option(
        "spans",
        TABLE,
        "Span of each chelate's links: edge (a polyhedron edge), cis, trans or any.",
        allowed=SPANS,
        noun="span",
        flag="--span AA=trans",
        example='spans = { AA = "trans" }',
    ),
    Option(
        "arrangements",
        TABLE,
        "Limit a tridentate chain to fac, mer or 'fac,mer'.",
        allowed=ARRANGEMENTS,
        several=True,
        noun="arrangement",
        flag="--arrangement AAA=fac",
        example='arrangements = { AAA = "fac" }',
    ),
    Option(
        "reporters",
        TABLE,
        "Treat a ligand as a stretch reporter of a class of the reporter rules (CO, CN, NO ...).",
        example='reporters = { a = "CO" }',
    ),
    Option("limit", COUNT, "Stop after this many stereoisomers.", example="limit = 100"),
    Option(
        "rules",
        FOLDERS,
        "Rule folders used besides the built-in rules (the command line's --rules DIR).",
        example='rules = ["my_rules"]',
        where="caller",
    ),
    Option(
        "pick",
        TEXT,
        "Keep only the isomers whose IUPAC descriptor matches: OC-6-32-C, OC-6-32, 32, cis, trans, fac or mer.",
        example='pick = "cis"',
        where="options",
    ),
)

_BY_NAME: Mapping[str, Option] = MappingProxyType({o.name: o for o in OPTIONS})


def option_names(where: str | None = None) -> tuple[str, ...]:
    """The names of the options, in table order, or of those a job file gives in one place.

    Parameters
    ----------
    where : str, optional
        ``"entry"``, ``"options"`` or ``"caller"`` (see :class:`Option`); all when omitted.

    Returns
    -------
    tuple of str
    """
    return tuple(o.name for o in OPTIONS if where is None or o.where == where)


def _fail(where: str, what: str, fix: str) -> InputError:
    return InputError(f"{where}: {what}" if where else what, fix)


def unknown_option(name: str, known: tuple[str, ...] | None = None, where: str = "") -> InputError:
    """The error for an option name that is not in the table, with the nearest names.

    Parameters
    ----------
    name : str
        What was written.
    known : tuple of str, optional
        The names allowed here (default: every option).
    where : str
        Where it was written (file and entry), put in front of the message.

    Returns
    -------
    InputError
    """
    pool = option_names() if known is None else known
    near = closest_names(name, pool)
    fix = f"did you mean '{near[0]}'?" if near else f"options: {', '.join(pool)}"
    return _fail(where, f"unknown option '{name}'", fix)


def _choices(allowed: tuple[str, ...]) -> str:
    return " or ".join(allowed) if len(allowed) == 2 else "one of " + ", ".join(allowed)


def _check_entry(opt: Option, value: str, where: str) -> None:
    parts = [p.strip() for p in value.split(",") if p.strip()] if opt.several else [value]
    for p in parts:
        if opt.allowed and p not in opt.allowed:
            raise _fail(where, f"{opt.noun} '{p}' is not {_choices(opt.allowed)}", f"e.g. {opt.flag}")


def _table(opt: Option, value: Any, where: str) -> tuple[tuple[str, str], ...]:
    if isinstance(value, Mapping):
        pairs = list(value.items())
    elif isinstance(value, (list, tuple)) and all(isinstance(p, (list, tuple)) and len(p) == 2 for p in value):
        pairs = [tuple(p) for p in value]
    else:
        raise _fail(where, f"'{opt.name}' must be a table of strings", f"write {opt.example}")
    if not all(isinstance(k, str) and isinstance(v, str) for k, v in pairs):
        raise _fail(where, f"'{opt.name}' must be a table of strings", f"write {opt.example}")
    for _, v in pairs:
        _check_entry(opt, v, where)
    return tuple((k, v) for k, v in pairs)


def check_option(name: str, value: Any, where: str = "") -> Any:
    """A checked option value in the form a :class:`Request` holds it.

    Parameters
    ----------
    name : str
        The option's name (a row of :data:`OPTIONS`).
    value : object
        Its value: text, a whole number, a mapping or (ligand, value) pairs, or a list of folders, as the
        option's kind says.  ``None`` means "not given".
    where : str
        Where it was written (file and entry), put in front of a message.

    Returns
    -------
    object
        ``None`` or the text for a text option, the number for a count, a tuple of (ligand, value) pairs for
        a table, a tuple of str for folders.

    Raises
    ------
    InputError
        An unknown name (with the nearest names), a value of the wrong kind or one the table does not allow.
    """
    opt = _BY_NAME.get(name)
    if opt is None:
        raise unknown_option(name, where=where)
    if opt.kind == TABLE:
        return () if value is None else _table(opt, value, where)
    if opt.kind == FOLDERS:
        if value is None:
            return ()
        if isinstance(value, (str, PathLike)) or not isinstance(value, (list, tuple)):
            raise _fail(where, f"'{name}' must be a list of folder names", f"write {opt.example}")
        if not all(isinstance(v, (str, PathLike)) for v in value):
            raise _fail(where, f"'{name}' must be a list of folder names", f"write {opt.example}")
        return tuple(fspath(v) for v in value)
    if value is None:
        return None
    if opt.kind == COUNT:
        if not isinstance(value, int) or isinstance(value, bool) or value < 1:
            raise _fail(where, f"'{name}' must be a positive integer", f"write {opt.example}")
        return value
    if not isinstance(value, str) or not value.strip():
        raise _fail(where, f"'{name}' must be a non-empty string", f"write {opt.example}")
    return value


@frozen_dataclass
class Request:
    """Everything one analysis needs, as plain hashable values; each option checked against :data:`OPTIONS`.

    ``spans``, ``arrangements`` and ``reporters`` are (ligand, value) pairs in the order given; ``rules``
    the extra rule folders; ``pick`` a descriptor (or part of one) the isomers are cut down to.

    Raises
    ------
    InputError
        An option value of the wrong kind or one the table does not allow.
    """

    formula: str
    geometry: str | None = None
    spans: tuple[tuple[str, str], ...] = ()
    arrangements: tuple[tuple[str, str], ...] = ()
    reporters: tuple[tuple[str, str], ...] = ()
    limit: int | None = None
    rules: tuple[str, ...] = ()
    pick: str | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.formula, str):
            raise InputError(f"the formula must be text, not {type(self.formula).__name__}", 'e.g. "Ma4b2"')
        for f in fields(self):
            if f.name != "formula":
                check_option(f.name, getattr(self, f.name))


def make_request(formula: str, **options: Any) -> Request:
    """A :class:`Request` from keyword options, each checked against :data:`OPTIONS`.

    Parameters
    ----------
    formula : str
        Abstract (``Ma2b2c2``, ``M(AA)2b2``) or condensed (``[RuCl2(CO)2(PPh3)2]``) formula.
    **options
        Any option of the table; ``None`` means "not given".  Tables may be mappings
        (``reporters={"a": "CO"}``) or (ligand, value) pairs.

    Returns
    -------
    Request

    Raises
    ------
    InputError
        An unknown option (with a "did you mean"), or a value the table does not allow.
    """
    checked = {name: check_option(name, value) for name, value in options.items()}
    return Request(formula, **{k: v for k, v in checked.items() if v is not None})
