"""The atoms and bonds of a ligand SMILES, as RDKit reads it unsanitised.

The band model needs, for a catalogue ligand, only its atoms (element,
isotope, atom-map number) and its bonds with their orders; importing RDKit
for that cost a small command a sixth of its start-up.  So the graphs of the
built-in catalogue's SMILES are read by RDKit once, when the built-in rules'
parsed twin is written (``python -m enumerator.rules.parsed``; see
:func:`enumerator.rules.parsed.smiles_graph`), and kept as data keyed by the
SMILES text; any other SMILES is read by RDKit here (:func:`rdkit_graph`).
``tests/test_startup_shortcuts.py`` holds the kept graphs equal to RDKit's.

>>> g = rdkit_graph("[C-:1]#[O+]")
>>> [(a.symbol, a.isotope, a.map_number) for a in g.atoms], g.bonds
([('C', 0, 1), ('O', 0, 0)], ((0, 1, 3.0),))
>>> rdkit_graph("C1CC") is None  # an unclosed ring
True
"""

from __future__ import annotations

from typing import Any

from enumerator.frozen import frozen_dataclass

__all__ = ["SmilesAtom", "SmilesGraph", "rdkit_graph", "graph_to_data", "graph_from_data", "heavy_atoms"]


@frozen_dataclass
class SmilesAtom:
    """One atom: element symbol (capitalised), mass number (0: none written), map number (0: none), aromatic."""

    symbol: str
    isotope: int
    map_number: int
    aromatic: bool


@frozen_dataclass
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


def rdkit_graph(smiles: str) -> SmilesGraph | None:
    """The atoms and bonds RDKit reads from a SMILES without sanitising it; None when RDKit cannot read it.

    Parameters
    ----------
    smiles : str
        A ligand SMILES (e.g. ``'[C-:1]#[O+]'``).

    Returns
    -------
    SmilesGraph or None
        Atoms in RDKit's order (the order of appearance), bonds as (begin, end, order) in RDKit's order,
        order 1.5 for an aromatic bond.
    """
    from rdkit import Chem, rdBase  # here, not at the top: the built-in SMILES come from the parsed twin

    with rdBase.BlockLogs():  # an unreadable SMILES is an answer here (None), not a line of RDKit's log
        mol = Chem.MolFromSmiles(smiles, sanitize=False) if smiles else None
    if mol is None or mol.GetNumAtoms() == 0:
        return None
    atoms = tuple(
        SmilesAtom(a.GetSymbol(), a.GetIsotope(), a.GetAtomMapNum(), a.GetIsAromatic()) for a in mol.GetAtoms()
    )
    bonds = tuple((b.GetBeginAtomIdx(), b.GetEndAtomIdx(), b.GetBondTypeAsDouble()) for b in mol.GetBonds())
    return SmilesGraph(atoms, bonds)


def graph_to_data(graph: SmilesGraph) -> list[Any]:
    """A graph as plain JSON data: ``[[[symbol, isotope, map, aromatic], ...], [[i, j, order], ...]]``.

    Parameters
    ----------
    graph : SmilesGraph

    Returns
    -------
    list
    """
    return [[[a.symbol, a.isotope, a.map_number, a.aromatic] for a in graph.atoms], [list(b) for b in graph.bonds]]


def graph_from_data(data: Any) -> SmilesGraph:
    """The graph :func:`graph_to_data` wrote.

    Parameters
    ----------
    data : list

    Returns
    -------
    SmilesGraph
    """
    atoms, bonds = data
    return SmilesGraph(
        tuple(SmilesAtom(str(s), int(i), int(m), bool(r)) for s, i, m, r in atoms),
        tuple((int(a), int(b), float(o)) for a, b, o in bonds),
    )


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
