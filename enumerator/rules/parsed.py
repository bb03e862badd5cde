"""Parsed copies of the built-in rule files, so that a small command skips the TOML parser.

Python's TOML parser (:mod:`tomllib`, pure Python) spent a fifth of the
start-up of a small command on the built-in files it reads (the ligand
catalogue alone about 25 ms on an idle host).  :data:`TWIN_NAME`
(``parsed.json`` beside the built-in rule files) holds the parsed document of
each built-in file as JSON text, keyed by the SHA-256 of the file's bytes;
:func:`lookup` gives the document only when the bytes just read hash to a
key.  An edited file, a user's file, or a file the twin lacks is parsed as
TOML as before, so a stale twin costs time, never a wrong answer; the
document then goes through the same checks as a freshly parsed one.

After editing a built-in rule file, rewrite the twin with::

    python -m enumerator.rules.parsed

(``tests/test_parsed_rules.py`` fails until then, and checks every document
of the twin against :mod:`tomllib`'s parse, types included).
"""

from __future__ import annotations

import hashlib
import json
import os
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached

__all__ = ["TWIN_NAME", "FORMAT", "lookup", "build", "write"]

#: The twin's file name, in the built-in rules folder.
TWIN_NAME = "parsed.json"
#: The twin's layout version; a twin of another version is not read.
FORMAT = 1


def _twin_path() -> Path:
    from enumerator.rules.ruleset import BUILTIN_RULES

    return BUILTIN_RULES / TWIN_NAME


@cached(maxsize=1)
def _documents(path: str, stamp: tuple[int, int]) -> Mapping[str, str]:
    """SHA-256 -> JSON text of the twin at ``path`` (keyed by its modification time and size too)."""
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
    except (OSError, ValueError):
        return MappingProxyType({})
    if not isinstance(data, dict) or data.get("format") != FORMAT or not isinstance(data.get("documents"), dict):
        return MappingProxyType({})
    return MappingProxyType({k: v["json"] for k, v in data["documents"].items() if isinstance(v, dict)})


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
        ``raw``; None when no twin entry has these bytes' SHA-256.
    """
    path = _twin_path()
    try:
        st = os.stat(path)
    except OSError:
        return None
    text = _documents(str(path), (st.st_mtime_ns, st.st_size)).get(hashlib.sha256(raw).hexdigest())
    if text is None:
        return None
    doc = json.loads(text)
    return doc if isinstance(doc, dict) else None


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


def build(folder: Path) -> dict[str, Any]:
    """The twin of every ``*.toml`` under ``folder``: each file read as a rule file is, kept when it round-trips.

    Parameters
    ----------
    folder : Path
        The built-in rules folder.

    Returns
    -------
    dict
        ``{"format": FORMAT, "documents": {sha256: {"file": relative path, "json": text}}}``; a file whose
        document JSON cannot hold exactly (dates and times) is left out, and is parsed as TOML.
    """
    from enumerator.rules.checks import read_toml

    docs: dict[str, dict[str, str]] = {}
    for path in sorted(folder.rglob("*.toml")):
        raw = path.read_bytes()
        doc = read_toml(path)
        try:
            text = json.dumps(doc, ensure_ascii=False, separators=(",", ":"))
        except (TypeError, ValueError):
            continue
        if _same(json.loads(text), doc):
            docs[hashlib.sha256(raw).hexdigest()] = {"file": path.relative_to(folder).as_posix(), "json": text}
    return {"format": FORMAT, "documents": dict(sorted(docs.items(), key=lambda kv: kv[1]["file"]))}


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
    out.write_text(json.dumps(build(folder), ensure_ascii=False, indent=1) + "\n", encoding="utf-8")
    return out


if __name__ == "__main__":  # pragma: no cover
    print(write())
