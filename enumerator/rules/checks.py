"""Reading and checking rule files: the helpers every loader under
:mod:`enumerator.rules` shares.

Every problem in a rule file is reported the same way: one
:class:`~enumerator.errors.RuleError` whose line names the file (and the entry
or table in it), says what is wrong with which key, and how to fix it.
:func:`rule_error` builds that error; :func:`check_keys` reports a missing or
unknown key with a 'did you mean'; :func:`read_toml` turns a syntax error into
one such line.

>>> err = rule_error("rules/ligands.toml [[ligand]] #3 (PPh3)", "'charge' must be an integer", "write charge = 0")
>>> err.line()
"rules/ligands.toml [[ligand]] #3 (PPh3): 'charge' must be an integer; write charge = 0"
>>> check_keys({"nmae": "x"}, "user.toml", required=(), optional=("name",))
Traceback (most recent call last):
...
enumerator.errors.RuleError: user.toml: unknown key 'nmae'; did you mean 'name'?
>>> closest_names("ppH3", ["PPh3", "PMe3", "CO"])
['PPh3', 'PMe3']
"""

from __future__ import annotations

import contextlib
import sys
from collections.abc import Callable, Iterable, Iterator, Mapping
from pathlib import Path
from typing import Any

from enumerator.errors import IsosieveError, RuleError
from enumerator.limits import MAX_TOML_DEPTH

__all__ = ["rule_error", "read_toml", "check_keys", "closest_names", "quiet_rdkit"]

#: Builds the error for one problem in a file: (where, what, fix) -> an error to raise.
ErrorFactory = Callable[[Any, str, str], IsosieveError]


def rule_error(where: str | Path, what: str, fix: str) -> RuleError:
    """The error for one problem in a rule file, as one line: ``<where>: <what>; <fix>``.

    Parameters
    ----------
    where : str or Path
        The file, followed by the entry or table when there is one
        (``'.../ligands.toml [[ligand]] #3 (PPh3)'``, ``'.../forcefields.toml: [class.CO]'``).
    what : str
        What is wrong, naming the key (``"'charge' must be an integer, not 'x'"``).
    fix : str
        What to write instead (``'write charge = 0'``).

    Returns
    -------
    RuleError
        To be raised by the caller.
    """
    return RuleError(f"{where}: {what}", fix)


def read_toml(path: Path | str, error: ErrorFactory = rule_error) -> dict[str, Any]:
    """Parse one TOML file (a rule file, or a job file with another ``error``).

    The file must be UTF-8 (a byte-order mark is allowed) and may nest tables
    and arrays at most :data:`~enumerator.limits.MAX_TOML_DEPTH` deep.

    Parameters
    ----------
    path : Path or str
        The file.
    error : callable, optional
        Builds the error raised, from (where, what, fix); :func:`rule_error` by default.

    Returns
    -------
    dict
        The parsed document.

    Raises
    ------
    RuleError
        (or what ``error`` builds) The file cannot be read, is not UTF-8, is not valid TOML (with the line
        and column), or nests too deeply.
    """
    try:
        with open(path, "rb") as fh:
            raw = fh.read()
    except OSError as exc:
        raise error(path, f"cannot read ({exc.strerror})", "check the path and permissions") from None
    from enumerator.rules.parsed import lookup

    twin = lookup(raw)  # a built-in file's bytes, already parsed and checked (enumerator.rules.parsed)
    if twin is not None:
        return twin
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise error(
            path,
            f"the file is not UTF-8 text (byte 0x{raw[exc.start]:02x} on line {line})",
            "save the file as UTF-8",
        ) from None
    import tomllib  # here, not at the top: the built-in files come parsed from the twin

    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise error(path, f"TOML syntax error ({exc})", "fix the file at that line and column") from None
    except RecursionError:
        data = None
    if data is None or _depth(data) > MAX_TOML_DEPTH:
        raise error(
            path,
            f"tables and arrays nested more than {MAX_TOML_DEPTH} deep",
            "check the brackets (these files nest a few levels at most)",
        )
    return data


def _depth(value: Any) -> int:
    """How deep tables and arrays nest in parsed TOML (without recursion)."""
    deepest = 0
    stack: list[tuple[Any, int]] = [(value, 0)]
    while stack:
        v, d = stack.pop()
        if isinstance(v, dict):
            children: Iterable[Any] = v.values()
        elif isinstance(v, list):
            children = v
        else:
            continue
        deepest = max(deepest, d + 1)
        if deepest > MAX_TOML_DEPTH:
            return deepest
        stack.extend((c, d + 1) for c in children)
    return deepest


@contextlib.contextmanager
def quiet_rdkit() -> Iterator[None]:
    """Silence RDKit's C++ log while a rule file is checked: its findings become one RuleError line instead.

    Yields
    ------
    None
    """
    if "rdkit" not in sys.modules:
        # nothing has loaded RDKit, so nothing before this block can log through it, and checking the built-in
        # rules must not import it (an abstract formula never needs it); the readers that load it inside the
        # block hold its messages back themselves (the SMILES reader, enumerator.model.elements)
        yield
        return
    from rdkit import rdBase

    with rdBase.BlockLogs():
        yield


def check_keys(table: Mapping[str, Any], where: str, required: Iterable[str], optional: Iterable[str] = ()) -> None:
    """Check that a table has every required key and no key it does not know.

    Parameters
    ----------
    table : Mapping[str, Any]
        One table of a rule file.
    where : str
        The file and the table, for the message.
    required, optional : iterable of str
        The keys the table must have and those it may have.

    Raises
    ------
    RuleError
        For the first missing key, or an unknown key (with the nearest known keys).
    """
    req = list(required)
    allowed = set(req) | set(optional)
    for key in req:
        if key not in table:
            raise rule_error(where, f"missing key '{key}'", f"add '{key} = ...'")
    for key in table:
        if key not in allowed:
            near = closest_names(key, sorted(allowed))
            hint = f"did you mean '{near[0]}'?" if near else f"allowed keys: {', '.join(sorted(allowed))}"
            raise rule_error(where, f"unknown key '{key}'", hint)


def closest_names(name: str, names: Iterable[str], n: int = 3) -> list[str]:
    """The nearest known names, compared case-insensitively, for 'did you mean' hints.

    Parameters
    ----------
    name : str
        The name given.
    names : iterable of str
        The names known.
    n : int, optional
        At most this many.

    Returns
    -------
    list of str
        The nearest names as spelled in ``names``, nearest first (difflib's ratio of at least 0.5).
    """
    pool = list(names)
    lower = {p.lower(): p for p in pool}
    import difflib  # only for a misspelt name

    hits = difflib.get_close_matches(name.lower(), list(lower), n=n, cutoff=0.5)
    return [lower[h] for h in hits]
