"""Answers derived once and kept: where the symmetry code may find them before deriving.

:func:`enumerator.symmetry.derive.derive_operations` and the whole-group
character table of a geometry are pure functions of the site vectors.  For the
built-in geometries the rules layer keeps them in a store written beside the
rule files (:mod:`enumerator.rules.derived`); this module is the seam through
which it hands them down, since this package reads no files.  A source is
asked with the exact vectors (the full value the answer depends on) and says
None for any vectors it does not hold, which are then derived as before; so a
missing, stale or damaged store costs time, never a wrong answer.

Only :func:`install` adds to the sources (once per source) and nothing removes
from them, as :mod:`enumerator.caches` keeps its registry; the answers live in
the source, which returns immutable values.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Protocol

if TYPE_CHECKING:
    from enumerator.symmetry.chartable import CharacterTable
    from enumerator.symmetry.derive import Vec
    from enumerator.symmetry.operations import SymOp

__all__ = ["KnownSource", "install", "installed", "operations", "table"]


class KnownSource(Protocol):
    """Stored answers for some exact site-vector sets."""

    def operations(self, vectors: tuple[Vec, ...]) -> tuple[SymOp, ...] | None: ...

    def table(
        self, vectors: tuple[Vec, ...], op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
    ) -> CharacterTable | None: ...


#: The sources installed so far, in installation order (only :func:`install` adds).
_SOURCES: list[KnownSource] = []


def install(source: KnownSource) -> None:
    """Let the symmetry code ask ``source`` before deriving (a source installed twice is kept once).

    Parameters
    ----------
    source : KnownSource
    """
    if not any(s is source for s in _SOURCES):
        _SOURCES.append(source)


def installed() -> tuple[KnownSource, ...]:
    """The sources installed so far.

    Returns
    -------
    tuple of KnownSource
    """
    return tuple(_SOURCES)


def operations(vectors: tuple[Vec, ...]) -> tuple[SymOp, ...] | None:
    """The stored operations of exactly these vectors, or None.

    Parameters
    ----------
    vectors : tuple of (x, y, z)

    Returns
    -------
    tuple of SymOp or None
        What :func:`enumerator.symmetry.derive.derive_operations` derives for them, when a source holds it.
    """
    for s in _SOURCES:
        found = s.operations(vectors)
        if found is not None:
            return found
    return None


def table(
    vectors: tuple[Vec, ...], op_indices: tuple[int, ...], ranks: tuple[int, ...] | None
) -> CharacterTable | None:
    """The stored character table of these vectors' operations ``op_indices`` (axis ties by ``ranks``), or None.

    Parameters
    ----------
    vectors : tuple of (x, y, z)
    op_indices : tuple of int
    ranks : tuple of int or None

    Returns
    -------
    CharacterTable or None
    """
    for s in _SOURCES:
        found = s.table(vectors, op_indices, ranks)
        if found is not None:
            return found
    return None
