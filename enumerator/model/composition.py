"""What is bound to the metal: ligand kinds and their counts.

A :class:`LigandKind` says how one ligand molecule occupies sites: its donor
sequence, its topology, which spans its chelate links may take and, for
tridentate chains, whether it binds fac, mer or either.  The topology is one
of :data:`TOPOLOGIES`:

* ``chain``: the donors in chain order, each consecutive pair linked (a
  monodentate ligand is a chain of one);
* ``tripod``: three donors on the three sites of one polyhedron face, every
  pair linked (Tp, tacn, triphos); donors with the same label are
  interchangeable, so the symmetry of the face (C3, its mirrors) may permute
  them;
* ``ring``: an η-ring (Cp, arenes) on ONE site of its own whose local axis
  carries the ring's symmetry (the piano-stool idealisation).

A :class:`Composition` is the multiset of kinds on one metal, in formula
order.  Both are values: frozen, hashable, compared field by field (catalogue
data included), so they can key a cache.

>>> en = LigandKind("en", ("N", "N"))
>>> en.denticity, en.palindromic, en.with_span("cis").spans
(2, True, ('cis',))
>>> tacn = LigandKind("tacn", ("N", "N", "N"), topology="tripod")
>>> tacn.denticity, tacn.tripod, tacn.ring
(3, True, False)
>>> cp = LigandKind("Cp", ("C",), ring=True)
>>> cp.denticity, cp.topology
(1, 'ring')
>>> comp = Composition("[Co(en)2Cl2]+", ((en, 2), (LigandKind("Cl", ("Cl",)), 2)), metal="Co", charge=1)
>>> comp.donor_count, [k.name for k in comp.kinds]
(6, ['en', 'Cl'])
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import replace
from types import MappingProxyType
from typing import Any

from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.geometry import SPANS

__all__ = ["LigandKind", "Composition", "ARRANGEMENTS", "TOPOLOGIES"]

#: Placements a tridentate chain may be limited to.
ARRANGEMENTS = ("fac", "mer")
#: How a ligand's donors are joined: a chain, a facial tripod, or an η-ring on one site.
TOPOLOGIES = ("chain", "tripod", "ring")


@frozen_dataclass
class LigandKind:
    """One kind of ligand, as it occupies coordination sites.

    ``donors`` lists the donor labels in chain order (``("a",)`` for a
    monodentate letter, ``("A", "B")`` for an unsymmetrical chelate).
    ``spans`` gives one span setting per chain link ('edge', 'cis', 'trans'
    or 'any'); empty means the geometry's default for every link.
    ``arrangements`` limits a tridentate chain to 'fac' and/or 'mer' (empty:
    either).  ``topology`` is 'chain', 'tripod' (three donors capping one
    face, every pair linked) or 'ring' (an η-ring on one site of its own, the
    piano-stool idealisation); ``ring=True`` is the same as
    ``topology='ring'``, and the two fields always agree.
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
    topology: str = "chain"

    def __post_init__(self) -> None:
        topology = "ring" if self.ring and self.topology == "chain" else self.topology
        if topology not in TOPOLOGIES:
            raise InputError(
                f"ligand '{self.name}': topology '{topology}' is not one of {', '.join(TOPOLOGIES)}",
                "use chain, tripod or ring",
            )
        if self.ring and topology != "ring":
            raise InputError(f"ligand '{self.name}' is marked both ring and {topology}", "give one topology")
        object.__setattr__(self, "topology", topology)
        object.__setattr__(self, "ring", topology == "ring")
        if topology == "ring" and len(self.donors) != 1:
            raise InputError(
                f"ring ligand '{self.name}' has {len(self.donors)} donors; an η-ring occupies one site",
                "give the ring one donor label, e.g. donors=('C',)",
            )
        if topology == "tripod" and len(self.donors) != 3:
            raise InputError(
                f"tripod ligand '{self.name}' has {len(self.donors)} donors; a tripod caps a face with three",
                "give three donor labels, e.g. ('N', 'N', 'N')",
            )

    @property
    def tripod(self) -> bool:
        """Three donors on one polyhedron face, every pair linked (Tp, tacn, triphos)."""
        return self.topology == "tripod"

    @property
    def chain(self) -> bool:
        """A chain of donors (monodentate ligands included): consecutive donors linked."""
        return self.topology == "chain"

    @property
    def denticity(self) -> int:
        """The number of sites the ligand occupies (1 for an η-ring, 3 for a tripod)."""
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
        """The span setting of one chain link.

        Parameters
        ----------
        link : int
            The link's index along the chain (0 joins donors 0 and 1).
        default : str
            The geometry's default span, used when the kind sets none.

        Returns
        -------
        str
            'edge', 'cis', 'trans' or 'any'; a single setting applies to every link.
        """
        if not self.spans:
            return default
        return self.spans[min(link, len(self.spans) - 1)]

    def with_span(self, span: str) -> LigandKind:
        """The same chelate with every link limited to one span setting (``--span AA=trans``).

        Parameters
        ----------
        span : str
            One of :data:`~enumerator.model.geometry.SPANS`.

        Returns
        -------
        LigandKind

        Raises
        ------
        InputError
            The span is unknown, or the kind is not a chelate chain.
        """
        if span not in SPANS:
            raise InputError(f"span '{span}' is not one of {', '.join(SPANS)}", "e.g. --span AA=trans")
        if self.denticity < 2 or not self.chain:
            raise InputError(
                f"ligand '{self.name}' is not a chelate chain, so it has no span",
                "give --span only for chelates such as (AA)",
            )
        return replace(self, spans=(span,) * (self.denticity - 1))

    def with_arrangements(self, names: Iterable[str]) -> LigandKind:
        """The same tridentate chain limited to fac and/or mer (``--arrangement AAA=fac``).

        Parameters
        ----------
        names : iterable of str
            'fac', 'mer' or both (blank names are ignored).

        Returns
        -------
        LigandKind

        Raises
        ------
        InputError
            A name is neither fac nor mer, or the kind is not a tridentate chain.
        """
        chosen = frozenset(n.strip() for n in names if n.strip())
        bad = sorted(chosen - set(ARRANGEMENTS))
        if bad:
            raise InputError(f"arrangement '{bad[0]}' is not fac or mer", "e.g. --arrangement AAA=fac")
        if self.tripod:
            raise InputError(
                f"ligand '{self.name}' is a tripod, which always caps a face (fac)",
                "leave --arrangement out for tripods; write a chain as (AAA) to choose fac or mer",
            )
        if self.denticity != 3 or not self.chain:
            raise InputError(
                f"ligand '{self.name}' is not a tridentate chain, so fac/mer does not apply",
                "give --arrangement only for (AAA), (ABA), (ABC)",
            )
        return replace(self, arrangements=chosen)


@frozen_dataclass
class Composition:
    """The ligands on one metal centre, in formula order.

    ``formula`` is the text as given; ``parts`` each kind with its count;
    ``metal`` the element symbol ('M' for the abstract notation); ``charge``
    the overall charge of the complex.
    """

    formula: str
    parts: tuple[tuple[LigandKind, int], ...]
    metal: str = "M"
    charge: int = 0

    @property
    def donor_count(self) -> int:
        """The number of sites the ligands occupy together."""
        return sum(k.denticity * n for k, n in self.parts)

    @property
    def kinds(self) -> tuple[LigandKind, ...]:
        """The ligand kinds, in formula order."""
        return tuple(k for k, _ in self.parts)

    def kind(self, name: str) -> LigandKind:
        """The kind called ``name``.

        Parameters
        ----------
        name : str
            A ligand name of this composition ('en', 'CO', 'a').

        Returns
        -------
        LigandKind

        Raises
        ------
        InputError
            No ligand of that name (the message lists those there are).
        """
        for k in self.kinds:
            if k.name == name:
                return k
        raise InputError(
            f"no ligand '{name}' in {self.formula}", f"ligands here: {', '.join(k.name for k in self.kinds)}"
        )

    def replace_kind(self, name: str, new: LigandKind) -> Composition:
        """The same composition with the kind called ``name`` replaced by ``new`` (same count).

        Parameters
        ----------
        name : str
            The ligand to replace.
        new : LigandKind
            Its replacement, e.g. with a span or reporter set.

        Returns
        -------
        Composition

        Raises
        ------
        InputError
            No ligand of that name.
        """
        self.kind(name)
        return replace(self, parts=tuple((new if k.name == name else k, n) for k, n in self.parts))

    @property
    def rings(self) -> int:
        """How many η-rings the centre carries (each on one site)."""
        return sum(n for k, n in self.parts if k.ring)

    @property
    def legs(self) -> int:
        """The sites held by everything but the η-rings (the legs of a piano stool)."""
        return sum(k.denticity * n for k, n in self.parts if not k.ring)

    @property
    def pattern(self) -> tuple:
        """The value that decides the isomers: each kind's donors, topology, spans and
        arrangements with its count, without names or catalogue data (so
        ``[Mo(CO)4(PPh3)2]`` and ``[W(CO)4(PMe3)2]`` share it)."""
        return tuple((k.donors, k.topology, k.spans, tuple(sorted(k.arrangements)), n) for k, n in self.parts)
