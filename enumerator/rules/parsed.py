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

The same command writes :data:`GRAPHS_NAME`: the atoms and bonds RDKit reads
from every ``smiles`` string of the built-in files (the ligand catalogue),
keyed by the SMILES text, so that the band model's oscillator atoms and
masses need no RDKit for a built-in ligand (:func:`smiles_graph`; any other
SMILES is read by RDKit then and there), and :data:`enumerator.rules.derived.STORE_NAME`: the
built-in geometries' symmetry operations and whole-group character tables (:mod:`enumerator.rules.derived`).
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from enumerator.caches import cached

if TYPE_CHECKING:
    from enumerator.model.smiles import SmilesGraph

__all__ = [
    "TWIN_NAME",
    "GRAPHS_NAME",
    "FORMAT",
    "lookup",
    "build",
    "write",
    "documents",
    "build_graphs",
    "smiles_graph",
]

#: The twin's file name, in the built-in rules folder.
TWIN_NAME = "parsed.twin"
#: The SMILES graphs' file name, in the built-in rules folder.
GRAPHS_NAME = "smiles_graphs.json"
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


def _smiles_strings(doc: Any) -> list[str]:
    """Every string value under a ``smiles`` key anywhere in a parsed document."""
    out: list[str] = []
    if isinstance(doc, dict):
        for k, v in doc.items():
            if k == "smiles" and isinstance(v, str):
                out.append(v)
            else:
                out += _smiles_strings(v)
    elif isinstance(doc, list):
        for v in doc:
            out += _smiles_strings(v)
    return out


def build_graphs(folder: Path) -> str:
    """The SMILES graphs of every ``smiles`` string of the ``*.toml`` files under ``folder``, read by RDKit.

    Parameters
    ----------
    folder : Path
        The built-in rules folder.

    Returns
    -------
    str
        JSON text: an object from each SMILES (sorted) to its graph
        (:func:`enumerator.model.smiles.graph_to_data`); a SMILES RDKit cannot read is left out.
    """
    import tomllib

    from enumerator.model.smiles import graph_to_data, rdkit_graph

    found: set[str] = set()
    for path in sorted(folder.rglob("*.toml")):
        try:
            found.update(_smiles_strings(tomllib.loads(path.read_text(encoding="utf-8"))))
        except (UnicodeDecodeError, tomllib.TOMLDecodeError):
            continue
    graphs = {s: rdkit_graph(s) for s in sorted(found)}
    data = {s: graph_to_data(g) for s, g in graphs.items() if g is not None}
    return json.dumps(data, ensure_ascii=False, separators=(",", ":"), sort_keys=True) + "\n"


@cached(maxsize=1)
def _graphs(path: str, stamp: tuple[int, int]) -> Mapping[str, Any]:
    """SMILES -> graph data, from the file at ``path`` (keyed by its modification time and size too)."""
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
    except (OSError, ValueError):
        return MappingProxyType({})
    return MappingProxyType(data if isinstance(data, dict) else {})


@cached(maxsize=512)
def smiles_graph(smiles: str) -> SmilesGraph | None:
    """The atoms and bonds RDKit reads from ``smiles`` without sanitising it; None when it cannot read it.

    A built-in catalogue SMILES is answered from :data:`GRAPHS_NAME` (written by RDKit with the twin, keyed
    by the SMILES text); any other is read by RDKit now.

    Parameters
    ----------
    smiles : str

    Returns
    -------
    SmilesGraph or None
    """
    from enumerator.model.smiles import graph_from_data, rdkit_graph
    from enumerator.rules.ruleset import BUILTIN_RULES

    path = BUILTIN_RULES / GRAPHS_NAME
    try:
        st = os.stat(path)
        data = _graphs(str(path), (st.st_mtime_ns, st.st_size)).get(smiles)
    except OSError:
        data = None
    if data is not None:
        try:
            return graph_from_data(data)
        except (TypeError, ValueError):
            pass
    return rdkit_graph(smiles)


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
    with open(folder / GRAPHS_NAME, "w", encoding="utf-8", newline="") as fh:
        fh.write(build_graphs(folder))
    from enumerator.rules import derived  # the built-in geometries' symmetry, derived from the files just read

    derived.write(folder)
    return out


if __name__ == "__main__":  # pragma: no cover
    print(write())
