"""What is bound to the metal: ligand kinds and their counts.

A :class:`LigandKind` says how one ligand molecule occupies sites: its donor
sequence along the chain, whether it is a ring that caps a face, which spans
its chelate links may take and, for tridentate chains, whether it binds fac,
mer or either.  A :class:`Composition` is the multiset of kinds on one metal.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, replace
from types import MappingProxyType
from typing import Any

from enumerator.errors import InputError
from enumerator.model.geometry import SPANS

__all__ = ["LigandKind", "Composition", "ARRANGEMENTS"]

#: Placements a tridentate chain may be limited to.
ARRANGEMENTS = ("fac", "mer")


@dataclass(frozen=True)
class LigandKind:
    """One kind of ligand, as it occupies coordination sites.

    ``donors`` lists the donor labels in chain order (``("a",)`` for a
    monodentate letter, ``("A", "B")`` for an unsymmetrical chelate).
    ``spans`` gives one span setting per chain link ('edge', 'cis', 'trans'
    or 'any'); empty means the geometry's default for every link.
    ``arrangements`` limits a tridentate chain to 'fac' and/or 'mer' (empty:
    either).  A ``ring`` ligand caps a face: its donors are mutually adjacent
    and interchangeable (the piano-stool idealisation of an η-ring).
    ``reporter`` names the stretch-reporter class (CO, CN, NO, ...) if any.
    ``meta`` carries catalogue data (SMILES, charge, electron counts, ...) as
    sorted key/value pairs of hashable values.  It is part of equality and of
    the hash: two kinds of one name with different catalogue data (a user's
    ``ligands.toml`` redefining a built-in ligand) are different values, so a
    cache keyed by a kind, a composition or an isomer never answers for the
    other one.
    """

    name: str
    donors: tuple[str, ...]
    ring: bool = False
    spans: tuple[str, ...] = ()
    arrangements: frozenset[str] = frozenset()
    reporter: str | None = None
    meta: tuple[tuple[str, object], ...] = ()

    @property
    def denticity(self) -> int:
        return len(self.donors)

    def info(self, key: str, default: Any = None) -> Any:
        """One item of the catalogue data (``'smiles'``, ``'charge'``, ``'hapticity'``, ...), or ``default``.

        Parameters
        ----------
        key : str
            The catalogue key.
        default : object, optional
            Returned when the kind carries no such key (abstract letters carry none).

        Returns
        -------
        object
            The catalogue value as the ligand catalogue validated it (TOML types).
        """
        for k, v in self.meta:
            if k == key:
                return v
        return default

    def info_dict(self) -> Mapping[str, Any]:
        """All catalogue data of the kind as a read-only mapping (empty for an abstract letter).

        Returns
        -------
        Mapping[str, Any]
            Key -> value, not to be modified (a ``MappingProxyType``).
        """
        return MappingProxyType(dict(self.meta))

    @property
    def palindromic(self) -> bool:
        """The donor chain reads the same both ways (AA, ABA): it has no direction."""
        return self.donors == self.donors[::-1]

    def span(self, link: int, default: str) -> str:
        if not self.spans:
            return default
        return self.spans[min(link, len(self.spans) - 1)]

    def with_span(self, span: str) -> LigandKind:
        if span not in SPANS:
            raise InputError(f"span '{span}' is not one of {', '.join(SPANS)}", "e.g. --span AA=trans")
        if self.denticity < 2 or self.ring:
            raise InputError(
                f"ligand '{self.name}' is not a chelate chain, so it has no span",
                "give --span only for chelates such as (AA)",
            )
        return replace(self, spans=(span,) * (self.denticity - 1))

    def with_arrangements(self, names: Iterable[str]) -> LigandKind:
        chosen = frozenset(n.strip() for n in names if n.strip())
        bad = sorted(chosen - set(ARRANGEMENTS))
        if bad:
            raise InputError(f"arrangement '{bad[0]}' is not fac or mer", "e.g. --arrangement AAA=fac")
        if self.denticity != 3 or self.ring:
            raise InputError(
                f"ligand '{self.name}' is not a tridentate chain, so fac/mer does not apply",
                "give --arrangement only for (AAA), (ABA), (ABC)",
            )
        return replace(self, arrangements=chosen)


@dataclass(frozen=True)
class Composition:
    """The ligands on one metal centre, in formula order."""

    formula: str
    parts: tuple[tuple[LigandKind, int], ...]
    metal: str = "M"
    charge: int = 0

    @property
    def donor_count(self) -> int:
        return sum(k.denticity * n for k, n in self.parts)

    @property
    def kinds(self) -> tuple[LigandKind, ...]:
        return tuple(k for k, _ in self.parts)

    def kind(self, name: str) -> LigandKind:
        for k in self.kinds:
            if k.name == name:
                return k
        raise InputError(
            f"no ligand '{name}' in {self.formula}", f"ligands here: {', '.join(k.name for k in self.kinds)}"
        )

    def replace_kind(self, name: str, new: LigandKind) -> Composition:
        self.kind(name)
        return replace(self, parts=tuple((new if k.name == name else k, n) for k, n in self.parts))

    @property
    def pattern(self) -> tuple:
        """The value that decides the isomers: kinds and counts, without names
        of the formula.  Used as a cache key."""
        return tuple((k.donors, k.ring, k.spans, tuple(sorted(k.arrangements)), n) for k, n in self.parts)
