"""One enantiomer's coordinates from the other's: the exact mirror image, atom for atom.

The two enantiomers of a chiral isomer ('3a', '3b') are images of each other under an improper operation of
the polyhedron (a reflection, an inversion or an improper rotation: :attr:`.Geometry.operations`).  A chemist
expects their starting structures to be that too, ligand conformations included; building 'b' as the image
of 'a''s finished coordinates gives exactly that, and saves its embedding.

:func:`mirror_of` finds, for the assembled molecules of the two (:func:`.embed.assemble`), the first improper
operation whose matrix takes every donor site of 'a' onto a site of 'b' of the same ligand, donor number and
unit (checked on the site vectors, not read from the enumeration), and the atom correspondence that goes with
it: metal onto metal, each ligand unit onto its image unit (heavy atoms by their offset in the unit, so in
SMILES order; hydrogens by :func:`.embed.hydrogens_by_unit`, in order).  It answers None, and the caller
embeds 'b' on its own, whenever anything does not correspond exactly: no such operation (a palindromic chelate
or a tripod whose image is spelled with its donors the other way round), different atom counts, elements,
mass numbers, charges or bonds, or a held atom whose image is not 'b''s held position within
:data:`MIRROR_TOL` (an η-ring, which :func:`.placement.ring_positions` turns to keep clear of the other
ligands and need not turn into the mirror image of the other ring).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from enumerator.isomers.enumeration import Isomer
from enumerator.structures.embed import hydrogens_by_unit, ligand_units
from enumerator.structures.placement import Vec

__all__ = ["MIRROR_TOL", "Mirror", "unit_images", "mirror_of"]

#: Largest distance (A) between the image of a held atom of 'a' and the held position of its partner in 'b'.
MIRROR_TOL = 1e-6
#: Largest distance between the image of a site vector (unit length) and the site it is taken for.
_SITE_TOL = 1e-6


@dataclass(frozen=True)
class Mirror:
    """How one enantiomer's atoms come from the other's.

    Atom ``j`` of the target sits at ``matrix @ p[source[j]]``, where ``p`` are the positions of the atoms of
    the isomer ``source_id`` (both molecules as :func:`.embed.assemble` builds them).
    """

    source_id: str
    matrix: tuple[tuple[float, float, float], tuple[float, float, float], tuple[float, float, float]]
    source: tuple[int, ...]

    def apply(self, positions: np.ndarray) -> np.ndarray:
        """The target's positions from the source's.

        Parameters
        ----------
        positions : numpy.ndarray
            n x 3 positions of the source's atoms (angstrom).

        Returns
        -------
        numpy.ndarray
            n x 3 positions of the target's atoms, a fresh array.
        """
        m = np.array(self.matrix, dtype=float)
        return np.asarray(positions, dtype=float)[list(self.source)] @ m.T


def unit_images(a: Isomer, b: Isomer) -> tuple[np.ndarray, tuple[int, ...]] | None:
    """The first improper operation of the polyhedron that takes 'a''s ligand units onto 'b''s, donor order kept.

    Parameters
    ----------
    a, b : Isomer
        The two enantiomers of one chiral isomer (``a.enantiomer == b.id``), on the same geometry.

    Returns
    -------
    (numpy.ndarray, tuple of int) or None
        The operation's 3 x 3 matrix and, for each unit of ``ligand_units(a)``, the index of its image in
        ``ligand_units(b)``; None when the two are not a pair or no improper operation maps every donor site
        of 'a' (ligand, unit, donor number) onto the matching site of 'b'.
    """
    if a.geometry != b.geometry or a.enantiomer != b.id or b.enantiomer != a.id or len(a.sites) != len(b.sites):
        return None
    units_a, units_b = ligand_units(a), ligand_units(b)
    if len(units_a) != len(units_b):
        return None
    where_b = {s.index: (k, s) for k, unit in enumerate(units_b) for s in unit}
    vectors = np.array(a.geometry.vectors, dtype=float)
    for op in a.geometry.operations:
        if op.proper:
            continue
        m = op.array
        images = _images(units_a, units_b, where_b, vectors, m)
        if images is not None:
            return m, images
    return None


def _images(units_a, units_b, where_b, vectors: np.ndarray, m: np.ndarray) -> tuple[int, ...] | None:
    """Each unit of 'a''s image unit of 'b' under the matrix ``m``, or None where one does not match."""
    out: list[int] = []
    for unit in units_a:
        target: int | None = None
        for s in unit:
            image = m @ np.array(s.position, dtype=float)
            hits = [k for k, v in enumerate(vectors) if float(np.linalg.norm(v - image)) <= _SITE_TOL]
            if len(hits) != 1 or hits[0] not in where_b:
                return None
            k, t = where_b[hits[0]]
            if t.ligand != s.ligand or t.donor_index != s.donor_index or target not in (None, k):
                return None
            target = k
        if target is None or len(units_b[target]) != len(unit):
            return None
        out.append(target)
    return tuple(out) if sorted(out) == list(range(len(units_b))) else None


def mirror_of(
    a: Isomer,
    b: Isomer,
    built_a: tuple[object, Mapping[int, Vec], Sequence[tuple[int, int]]],
    built_b: tuple[object, Mapping[int, Vec], Sequence[tuple[int, int]]],
) -> Mirror | None:
    """How 'b''s atoms come from 'a''s as the exact mirror image, or None when they do not correspond exactly.

    Parameters
    ----------
    a, b : Isomer
        The two enantiomers of one chiral isomer.
    built_a, built_b : (rdkit.Chem.Mol, Mapping, sequence of (int, int))
        Each one's assembled molecule, held positions and unit spans, as :func:`.embed.assemble` answers them
        (before any η-ring is bonded through its other atoms).

    Returns
    -------
    Mirror or None
        None means: embed 'b' on its own.
    """
    found = unit_images(a, b)
    if found is None:
        return None
    m, images = found
    mol_a, fixed_a, spans_a = built_a
    mol_b, fixed_b, spans_b = built_b
    source = _atom_map(mol_a, spans_a, mol_b, spans_b, images)
    if source is None or not _same_molecule(mol_a, mol_b, source):
        return None
    if {source[j] for j in fixed_b} != set(fixed_a):
        return None
    for j, p in fixed_b.items():
        image = m @ np.array(fixed_a[source[j]], dtype=float)
        if float(np.linalg.norm(image - np.array(p, dtype=float))) > MIRROR_TOL:
            return None
    matrix = tuple(tuple(float(x) for x in row) for row in m)
    return Mirror(a.id, matrix, source)  # type: ignore[arg-type]  # three rows of three, as built


def _atom_map(mol_a, spans_a, mol_b, spans_b, images: Sequence[int]) -> tuple[int, ...] | None:
    """For each atom of 'b', its atom of 'a': metal to metal, unit to image unit (heavy atoms by offset,
    hydrogens in order); None when the counts differ or some atom of 'b' is left without one."""
    n = mol_b.GetNumAtoms()
    if mol_a.GetNumAtoms() != n or len(spans_a) != len(images) or len(spans_b) != len(images):
        return None
    source = [-1] * n
    source[0] = 0
    h_a, h_b = hydrogens_by_unit(mol_a, spans_a), hydrogens_by_unit(mol_b, spans_b)
    for k, j in enumerate(images):
        (off_a, n_a), (off_b, n_b) = spans_a[k], spans_b[j]
        if n_a != n_b or len(h_a[k]) != len(h_b[j]):
            return None
        for t in range(n_a):
            source[off_b + t] = off_a + t
        for ha, hb in zip(h_a[k], h_b[j]):
            source[hb] = ha
    if sorted(source) != list(range(n)):
        return None
    return tuple(source)


def _same_molecule(mol_a, mol_b, source: Sequence[int]) -> bool:
    """Every atom of 'b' is its atom of 'a' (element, mass number, charge), and the bonds correspond."""
    for j, atom in enumerate(mol_b.GetAtoms()):
        other = mol_a.GetAtomWithIdx(source[j])
        if (atom.GetAtomicNum(), atom.GetIsotope(), atom.GetFormalCharge()) != (
            other.GetAtomicNum(),
            other.GetIsotope(),
            other.GetFormalCharge(),
        ):
            return False

    def bonds(mol, index) -> set[tuple[int, int, str]]:
        out = set()
        for bond in mol.GetBonds():
            i, k = index(bond.GetBeginAtomIdx()), index(bond.GetEndAtomIdx())
            out.add((min(i, k), max(i, k), str(bond.GetBondType())))
        return out

    return bonds(mol_b, lambda j: source[j]) == bonds(mol_a, lambda i: i)
