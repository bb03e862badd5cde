"""Parsed copies of the built-in rule files, so that a small command skips the TOML parser.

Python's TOML parser (:mod:`tomllib`, pure Python) spent a fifth of the
start-up of a small command on the built-in files it reads (the ligand
catalogue alone about 25 ms on an idle host).  :data:`TWIN_NAME`
(``parsed.twin`` beside the built-in rule files) holds, for each built-in
file, its whole text and its parsed document as JSON.  :func:`lookup` gives
the document only when the text just read is one of those, character for
character: the key is the full value the parse depends on.  An edited file,
a user's file, or a file the twin lacks is parsed as TOML as before, so a
stale twin costs time, never a wrong answer; the document then goes through
the same checks as a freshly parsed one.

The twin is plain text, so that reading it costs no parsing: a first line
``isosieve-parsed-rules FORMAT``, then per file a header line ``PATH <tab>
N <tab> M`` followed by the file's N characters and the document's M
characters of JSON.  Only the document that matches is decoded.

After editing a built-in rule file, rewrite the twin with::

    python -m enumerator.rules.parsed

(``tests/test_parsed_rules.py`` fails until then, and checks every document
of the twin against :mod:`tomllib`'s parse, types included).
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached

__all__ = ["TWIN_NAME", "FORMAT", "lookup", "build", "write", "documents"]

#: The twin's file name, in the built-in rules folder.
TWIN_NAME = "parsed.twin"
#: The twin's layout version; a twin of another version is not read.
FORMAT = 1
_MAGIC = "isosieve-parsed-rules"


def _twin_path() -> Path:
    from enumerator.rules.ruleset import BUILTIN_RULES

    return BUILTIN_RULES / TWIN_NAME


def _entries(text: str) -> list[tuple[str, str, str]] | None:
    """(path, file text, JSON text) of each document of a twin's text; None when malformed."""
    head, _, rest = text.partition("\n")
    if head != f"{_MAGIC} {FORMAT}":
        return None
    out = []
    i = 0
    while i < len(rest):
        end = rest.find("\n", i)
        fields = rest[i:end].split("\t") if end >= 0 else []
        if len(fields) != 3 or not fields[1].isdigit() or not fields[2].isdigit():
            return None
        n, m = int(fields[1]), int(fields[2])
        start = end + 1
        if start + n + m + 1 > len(rest) or rest[start + n + m] != "\n":
            return None
        out.append((fields[0], rest[start : start + n], rest[start + n : start + n + m]))
        i = start + n + m + 1
    return out


@cached(maxsize=1)
def _documents(path: str, stamp: tuple[int, int]) -> Mapping[str, str]:
    """A rule file's whole text -> its document's JSON text, from the twin at ``path`` (keyed by the
    twin's modification time and size too)."""
    try:
        with open(path, encoding="utf-8", newline="") as fh:
            entries = _entries(fh.read())
    except (OSError, ValueError):
        return MappingProxyType({})
    return MappingProxyType({source: doc for _, source, doc in entries or ()})


def lookup(raw: bytes) -> dict[str, Any] | None:
    """The parsed document of a rule file's bytes, from the twin; None when the twin lacks them.

    Parameters
    ----------
    raw : bytes
        The whole file as read.

    Returns
    -------
    dict or None
        A fresh document (the caller may change it), equal to what :func:`tomllib.loads` gives for
        ``raw``; None when no twin entry has exactly this text.
    """
    path = _twin_path()
    try:
        st = os.stat(path)
        source = raw.decode("utf-8")
    except (OSError, UnicodeDecodeError):
        return None
    text = _documents(str(path), (st.st_mtime_ns, st.st_size)).get(source)
    if text is None:
        return None
    doc = json.loads(text)
    return doc if isinstance(doc, dict) else None


def documents(text: str) -> list[tuple[str, str, str]]:
    """The entries of a twin's text: (path relative to the rules folder, file text, JSON text).

    Parameters
    ----------
    text : str
        The twin, as written by :func:`write`.

    Returns
    -------
    list of (str, str, str)
        Empty for a twin of another format or a malformed one.
    """
    return _entries(text) or []


def _same(a: Any, b: Any) -> bool:
    """Equal values of equal types all the way down (1 is not 1.0, True is not 1)."""
    if type(a) is not type(b):
        return False
    if isinstance(a, dict):
        return list(a) == list(b) and all(_same(a[k], b[k]) for k in a)
    if isinstance(a, list):
        return len(a) == len(b) and all(_same(x, y) for x, y in zip(a, b))
    if isinstance(a, float) and a != a:  # NaN
        return b != b
    return bool(a == b)


def build(folder: Path) -> str:
    """The twin of every ``*.toml`` under ``folder``: each file read as a rule file is, kept when it round-trips.

    Parameters
    ----------
    folder : Path
        The built-in rules folder.

    Returns
    -------
    str
        The twin's text.  A file whose document JSON cannot hold exactly (dates and times), or that is
        not UTF-8, is left out and is parsed as TOML.
    """
    import tomllib  # parsed afresh, never from an older twin

    parts = [f"{_MAGIC} {FORMAT}\n"]
    for path in sorted(folder.rglob("*.toml")):
        try:
            source = path.read_bytes().decode("utf-8")
            doc = tomllib.loads(source.removeprefix("\ufeff"))
        except (UnicodeDecodeError, tomllib.TOMLDecodeError):
            continue
        try:
            text = json.dumps(doc, ensure_ascii=False, separators=(",", ":"))
        except (TypeError, ValueError):
            continue
        if _same(json.loads(text), doc):
            rel = path.relative_to(folder).as_posix()
            parts.append(f"{rel}\t{len(source)}\t{len(text)}\n{source}{text}\n")
    return "".join(parts)


def write(folder: Path | None = None) -> Path:
    """Rewrite the twin of the built-in rules folder (or of ``folder``).

    Parameters
    ----------
    folder : Path, optional
        The rules folder (default: the built-in one).

    Returns
    -------
    Path
        The file written.
    """
    from enumerator.rules.ruleset import BUILTIN_RULES

    folder = BUILTIN_RULES if folder is None else folder
    out = folder / TWIN_NAME
    with open(out, "w", encoding="utf-8", newline="") as fh:
        fh.write(build(folder))
    return out


if __name__ == "__main__":  # pragma: no cover
    print(write())
