"""A small reader of ligand SMILES: atoms and bonds as RDKit reads them unsanitised, or nothing.

The band model needs, for a catalogue ligand, only its atoms (element,
isotope, atom-map number) and its bonds with their orders; importing RDKit
for that cost a small command a sixth of its start-up.  :func:`read_graph`
reads the OpenSMILES grammar a ligand catalogue uses (bracket atoms, the
organic subset, aromatic lower case, bonds ``- = # $ : / \\``, branches, ring
closures ``1``-``9`` and ``%nn``, and ``.``) and gives the graph RDKit's
``MolFromSmiles(smiles, sanitize=False)`` gives: atoms in order of
appearance, a bond written without a symbol aromatic (order 1.5) between two
aromatic atoms and single otherwise.  Anything else it refuses (None), and
the caller asks RDKit; ``tests/test_startup_shortcuts.py`` holds the graph
equal to RDKit's for every SMILES of the built-in catalogue.

>>> g = read_graph("[C-:1]#[O+]")
>>> [(a.symbol, a.isotope, a.map_number) for a in g.atoms], g.bonds
([('C', 0, 1), ('O', 0, 0)], ((0, 1, 3.0),))
>>> read_graph("C1CC") is None  # an unclosed ring
True
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from enumerator.model.elements import atomic_number

__all__ = ["SmilesAtom", "SmilesGraph", "read_graph", "heavy_atoms"]

_ORGANIC = re.compile(r"Cl|Br|[BCNOPSFI]|[bcnops]|\*")
_BRACKET = re.compile(
    r"\[(?P<iso>\d*)(?P<sym>[A-Z][a-z]?|se|as|te|[bcnops]|\*)"
    r"(?P<chiral>@{1,2}(?:TH[12]|AL[12]|SP[123]|TB\d{1,2}|OH\d{1,2})?)?"
    r"(?P<h>H\d?)?(?P<charge>[+-]{1,2}|[+-]\d{1,2})?(?::(?P<map>\d+))?\]"
)
_BONDS = {"-": 1.0, "/": 1.0, "\\": 1.0, "=": 2.0, "#": 3.0, "$": 4.0, ":": 1.5}


@dataclass(frozen=True)
class SmilesAtom:
    """One atom: element symbol (capitalised), mass number (0: none written), map number (0: none), aromatic."""

    symbol: str
    isotope: int
    map_number: int
    aromatic: bool


@dataclass(frozen=True)
class SmilesGraph:
    """Atoms in order of appearance; bonds as (atom index, atom index, order), order 1.5 aromatic."""

    atoms: tuple[SmilesAtom, ...]
    bonds: tuple[tuple[int, int, float], ...]

    def neighbours(self, index: int) -> list[tuple[int, float]]:
        """(neighbour index, bond order) of one atom, in bond order of appearance.

        Parameters
        ----------
        index : int

        Returns
        -------
        list of (int, float)
        """
        out = []
        for a, b, order in self.bonds:
            if a == index:
                out.append((b, order))
            elif b == index:
                out.append((a, order))
        return out


def _atom(smiles: str, i: int) -> tuple[SmilesAtom, int] | None:
    """The atom starting at ``smiles[i]`` and the index after it, or None."""
    if smiles[i] == "[":
        m = _BRACKET.match(smiles, i)
        if m is None:
            return None
        sym = m["sym"]
        symbol = sym if sym == "*" else sym[0].upper() + sym[1:]
        if sym != "*" and atomic_number(symbol) <= 0:
            return None
        iso = int(m["iso"]) if m["iso"] else 0
        return SmilesAtom(symbol, iso, int(m["map"] or 0), sym.islower()), m.end()
    m = _ORGANIC.match(smiles, i)
    if m is None:
        return None
    sym = m.group()
    return SmilesAtom(sym.upper() if sym.islower() else sym, 0, 0, sym.islower()), m.end()


def _implicit(a: SmilesAtom, b: SmilesAtom) -> float:
    return 1.5 if a.aromatic and b.aromatic else 1.0


class _Reader:
    """The state of one left-to-right pass (atoms, bonds, open branches and rings, the pending bond)."""

    def __init__(self, smiles: str) -> None:
        self.smiles = smiles
        self.atoms: list[SmilesAtom] = []
        self.bonds: list[tuple[int, int, float]] = []
        self.stack: list[int] = []
        self.rings: dict[int, tuple[int, float | None]] = {}
        self.prev: int | None = None
        self.bond: float | None = None
        self.dot = False

    def step(self, i: int) -> int | None:
        """Read the token at ``i``; the index after it, or None on anything not covered."""
        c = self.smiles[i]
        if c in _BONDS or c in ".()":
            if self.prev is None or self.bond is not None:
                return None
            if c in _BONDS:
                self.bond = _BONDS[c]
            elif c == ".":
                self.prev, self.dot = None, True
            elif c == "(":
                self.stack.append(self.prev)
            elif not self.stack:
                return None
            else:
                self.prev = self.stack.pop()
            return i + 1
        if c.isdigit() or c == "%":
            return self.ring(i)
        return self.atom(i)

    def ring(self, i: int) -> int | None:
        c = self.smiles[i]
        if c == "%":
            digits = self.smiles[i + 1 : i + 3]
            if len(digits) != 2 or not digits.isdigit():
                return None
            label, end = int(digits), i + 3
        else:
            label, end = int(c), i + 1
        prev = self.prev
        if prev is None:
            return None
        if label not in self.rings:
            self.rings[label] = (prev, self.bond)
            self.bond = None
            return end
        other, first = self.rings.pop(label)
        if other == prev or (first is not None and self.bond is not None and first != self.bond):
            return None
        if any({a, b} == {other, prev} for a, b, _ in self.bonds):
            return None
        order = self.bond if self.bond is not None else first
        self.bonds.append((other, prev, order if order is not None else _implicit(self.atoms[other], self.atoms[prev])))
        self.bond = None
        return end

    def atom(self, i: int) -> int | None:
        got = _atom(self.smiles, i)
        if got is None:
            return None
        atom, end = got
        self.atoms.append(atom)
        k = len(self.atoms) - 1
        if self.prev is not None:
            order = self.bond if self.bond is not None else _implicit(self.atoms[self.prev], atom)
            self.bonds.append((self.prev, k, order))
        elif self.bond is not None:
            return None
        self.prev, self.bond, self.dot = k, None, False
        return end

    def graph(self) -> SmilesGraph | None:
        if self.rings or self.stack or self.bond is not None or self.dot or not self.atoms:
            return None
        return SmilesGraph(tuple(self.atoms), tuple(self.bonds))


def read_graph(smiles: str) -> SmilesGraph | None:
    """The atoms and bonds of a SMILES, as RDKit reads it unsanitised; None for what this reader does not cover.

    Parameters
    ----------
    smiles : str
        A ligand SMILES (e.g. ``'[C-:1]#[O+]'``).

    Returns
    -------
    SmilesGraph or None
        None for a syntax error or for anything outside the grammar above (the caller then asks RDKit).
    """
    reader = _Reader(smiles)
    i: int | None = 0
    while i is not None and i < len(smiles):
        i = reader.step(i)
    return None if i is None else reader.graph()


def heavy_atoms(graph: SmilesGraph) -> tuple[tuple[str, int], ...]:
    """The element counts of a graph without hydrogen, sorted: the same for every isotopologue of one molecule.

    Parameters
    ----------
    graph : SmilesGraph

    Returns
    -------
    tuple of (str, int)
    """
    counts: dict[str, int] = {}
    for a in graph.atoms:
        if a.symbol != "H":
            counts[a.symbol] = counts.get(a.symbol, 0) + 1
    return tuple(sorted(counts.items()))
