"""The built-in geometries' symmetry, derived once and kept beside the rule files.

A small command spent about 50 ms deriving what never changes between runs:
the operations of its geometry (:func:`enumerator.symmetry.derive.derive_operations`,
23 ms for OC-6) and the character table of its whole group (26 ms for Oh).
:data:`STORE_NAME` (``derived.jsonl`` beside the built-in rule files) holds,
for every built-in geometry that is not linear, its site vectors as stored
floats, its operations (matrix and site permutation, in order) and the
whole group's character table (with no axis tie-break and with all sites
ranked alike, as :func:`enumerator.symmetry.chartable.character_table` asks
for them).  It is JSON read by :mod:`json` (no pickled objects), one line per
geometry: the vectors, a tab, the entry; a first line names the store and its
format.  Only the entry whose vectors match is decoded (the whole store
decoded at once cost about 5 ms, a quarter of what it saves).

The key is the full value the answers depend on: the exact site vectors,
and :data:`FORMAT`, which is bumped whenever the derivation code changes
what it returns (a store of another format is not read).  A geometry whose
vectors differ by one bit (a user's ``--rules`` file, an edited built-in
file) is not in the store and is derived as before; a missing or damaged
store or entry costs time, never a wrong answer.  The answers are handed to
the symmetry code through :mod:`enumerator.symmetry.known` (which reads no
files); :func:`install` is called when geometries are loaded, and the store
is read on the first question, not before.

After changing a built-in geometry or the derivation code, rewrite the store
(with the parsed twin) with::

    python -m enumerator.rules.parsed

``tests/test_derived_store.py`` fails until then: it rewrites the store and
compares, and checks every stored value against a fresh derivation (same
dataclass values, same order, same types).
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping
from pathlib import Path
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.symmetry import known
from enumerator.symmetry.chartable import CharacterTable, ConjugacyClass, Irrep, geometry_table_afresh
from enumerator.symmetry.derive import Vec, derive_operations_afresh, is_collinear
from enumerator.symmetry.operations import SymOp

__all__ = ["STORE_NAME", "FORMAT", "StoredSymmetry", "SOURCE", "install", "build", "write", "entry_tables"]

#: The store's file name, in the built-in rules folder.
STORE_NAME = "derived.jsonl"
#: The store's layout and derivation version: bump it when the derivation code changes what it returns.
FORMAT = 1
_MAGIC = "isosieve-derived-symmetry"

Vectors = tuple[Vec, ...]


def _store_path() -> Path:
    from enumerator.rules.ruleset import BUILTIN_RULES

    return BUILTIN_RULES / STORE_NAME


def _key(vectors: Any) -> Vectors:
    """The vectors of a stored entry as the tuple a Geometry holds (floats as stored)."""
    out = []
    for v in vectors:
        if len(v) != 3 or not all(type(x) is float for x in v):
            raise ValueError("a stored vector is not three floats")
        out.append((v[0], v[1], v[2]))
    return tuple(out)


@cached(maxsize=1)
def _entries(path: str, stamp: tuple[int, int]) -> Mapping[Vectors, str]:
    """Site vectors -> the stored entry's JSON text (decoded only when asked), from the store at ``path``
    (keyed by its modification time and size too)."""
    try:
        with open(path, encoding="utf-8") as fh:
            head, *lines = fh.read().splitlines()
        if json.loads(head) != {"store": _MAGIC, "format": FORMAT}:
            return MappingProxyType({})
        out = {}
        for line in lines:
            key, _, entry = line.partition("\t")
            out[_key(json.loads(key))] = entry
        return MappingProxyType(out)
    except (OSError, ValueError, TypeError, KeyError, AttributeError):
        return MappingProxyType({})


def _entry(vectors: Vectors) -> tuple[tuple[int, int], dict[str, Any]] | None:
    path = _store_path()
    try:
        st = os.stat(path)
    except OSError:
        return None
    stamp = (st.st_mtime_ns, st.st_size)
    try:
        found = _entries(str(path), stamp).get(vectors)
    except TypeError:  # unhashable vectors: not a geometry's
        return None
    if found is None:
        return None
    try:
        entry = json.loads(found)
    except ValueError:
        return None
    return (stamp, entry) if isinstance(entry, dict) else None


def _ints(xs: Any) -> tuple[int, ...]:
    if not all(type(x) is int for x in xs):
        raise ValueError("not integers")
    return tuple(xs)


def _floats(xs: Any) -> tuple[float, ...]:
    if not all(type(x) is float for x in xs):
        raise ValueError("not floats")
    return tuple(xs)


def _op(data: Any, n: int) -> SymOp:
    m, perm = data
    rows = [_floats(r) for r in m]
    if len(rows) != 3 or any(len(r) != 3 for r in rows) or sorted(perm) != list(range(n)):
        raise ValueError("not an operation of these sites")
    return SymOp(
        (
            (rows[0][0], rows[0][1], rows[0][2]),
            (rows[1][0], rows[1][1], rows[1][2]),
            (rows[2][0], rows[2][1], rows[2][2]),
        ),
        _ints(perm),
    )


def _table(d: Any) -> CharacterTable:
    frame = [_floats(r) for r in d["frame"]]
    return CharacterTable(
        group=str(d["group"]),
        order=int(d["order"]),
        classes=tuple(ConjugacyClass(str(c[0]), int(c[1]), _ints(c[2])) for c in d["classes"]),
        irreps=tuple(
            Irrep(
                str(i[0]),
                int(i[1]),
                _floats(i[2]),
                tuple(str(f) for f in i[3]),
                tuple(tuple(str(f) for f in s) for s in i[4]),
                int(i[5]),
            )
            for i in d["irreps"]
        ),
        axes_note=str(d["axes_note"]),
        op_indices=_ints(d["op_indices"]),
        class_of=_ints(d["class_of"]),
        frame=tuple((r[0], r[1], r[2]) for r in frame),
    )


@cached(maxsize=64)
def _stored_operations(vectors: Vectors, stamp: tuple[int, int]) -> tuple[SymOp, ...] | None:
    found = _entry(vectors)
    if found is None or found[0] != stamp:
        return None
    try:
        return tuple(_op(o, len(vectors)) for o in found[1]["operations"])
    except (KeyError, TypeError, ValueError):
        return None


@cached(maxsize=64)
def _stored_table(
    vectors: Vectors, op_indices: tuple[int, ...], ranks: tuple[int, ...] | None, stamp: tuple[int, int]
) -> CharacterTable | None:
    found = _entry(vectors)
    if found is None or found[0] != stamp:
        return None
    try:
        for t in found[1]["tables"]:
            got_ranks = None if t["ranks"] is None else _ints(t["ranks"])
            if got_ranks == ranks and _ints(t["table"]["op_indices"]) == op_indices:
                return _table(t["table"])
    except (KeyError, TypeError, ValueError, IndexError):
        return None
    return None


def _stamp() -> tuple[int, int] | None:
    try:
        st = os.stat(_store_path())
    except OSError:
        return None
    return (st.st_mtime_ns, st.st_size)


class StoredSymmetry:
    """The store as a :class:`enumerator.symmetry.known.KnownSource` (stateless: the answers live in caches
    keyed by the exact vectors and the store file's modification time and size)."""

    def operations(self, vectors: Vectors) -> tuple[SymOp, ...] | None:
        """The stored operations of exactly these vectors, or None.

        Parameters
        ----------
        vectors : tuple of (x, y, z)

        Returns
        -------
        tuple of SymOp or None
        """
        stamp = _stamp()
        return None if stamp is None else _stored_operations(vectors, stamp)

    def table(
        self, vectors: Vectors, op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
    ) -> CharacterTable | None:
        """The stored character table of these vectors' operations ``op_indices`` with ``ranks``, or None.

        Parameters
        ----------
        vectors : tuple of (x, y, z)
        op_indices : tuple of int
        ranks : tuple of int or None

        Returns
        -------
        CharacterTable or None
        """
        stamp = _stamp()
        return None if stamp is None else _stored_table(vectors, op_indices, ranks, stamp)


#: The one source this module installs.
SOURCE = StoredSymmetry()


def install() -> None:
    """Let the symmetry code answer the built-in geometries from the store (reads nothing yet)."""
    known.install(SOURCE)


def entry_tables(n_ops: int, n_sites: int) -> tuple[tuple[tuple[int, ...], tuple[int, ...] | None], ...]:
    """The (op_indices, ranks) of the tables stored per geometry: the whole group, with no axis tie-break
    and with every site ranked alike (one ligand throughout, as in [Cr(CO)6]).

    Parameters
    ----------
    n_ops : int
        The geometry's number of operations.
    n_sites : int

    Returns
    -------
    tuple of (tuple of int, tuple of int or None)
    """
    every = tuple(range(n_ops))
    return ((every, None), (every, (0,) * n_sites))


def _table_data(t: CharacterTable) -> dict[str, Any]:
    return {
        "group": t.group,
        "order": t.order,
        "classes": [[c.label, c.size, list(c.members)] for c in t.classes],
        "irreps": [
            [i.label, i.dimension, list(i.characters), list(i.functions), [list(s) for s in i.function_sets], i.parts]
            for i in t.irreps
        ],
        "axes_note": t.axes_note,
        "op_indices": list(t.op_indices),
        "class_of": list(t.class_of),
        "frame": [list(r) for r in t.frame],
    }


def build(folder: Path) -> str:
    """The store of every geometry under ``folder``/geometries, derived afresh (never from an older store).

    Parameters
    ----------
    folder : Path
        The built-in rules folder.

    Returns
    -------
    str
        The store's text (JSON lines, see the module guide).  Linear geometries (infinite groups, no
        table) are left out.
    """
    from enumerator.rules.checks import read_toml
    from enumerator.rules.geometries import parse_geometry

    lines = [_dump({"store": _MAGIC, "format": FORMAT}) + "\n"]
    for path in sorted((folder / "geometries").glob("*.toml")):
        geo = parse_geometry(path, read_toml(path), snap=False, derive=False)
        if len(geo.vectors) < 2 or is_collinear(geo.vectors):
            continue
        ops = derive_operations_afresh(geo.vectors)
        tables = [
            {
                "ranks": None if ranks is None else list(ranks),
                "table": _table_data(geometry_table_afresh(geo.vectors, idx, ranks)),
            }
            for idx, ranks in entry_tables(len(ops), len(geo.vectors))
        ]
        entry = {
            "symbol": geo.symbol,
            "operations": [[[list(r) for r in op.matrix], list(op.perm)] for op in ops],
            "tables": tables,
        }
        lines.append(_dump([list(v) for v in geo.vectors]) + "\t" + _dump(entry) + "\n")
    return "".join(lines)


def _dump(value: Any) -> str:
    return json.dumps(value, ensure_ascii=False, separators=(",", ":"))


def write(folder: Path | None = None) -> Path:
    """Rewrite the store of the built-in rules folder (or of ``folder``).

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
    out = folder / STORE_NAME
    text = build(folder)
    with open(out, "w", encoding="utf-8", newline="") as fh:
        fh.write(text)
    return out


if __name__ == "__main__":  # pragma: no cover
    print(write())
