"""One enantiomer's coordinates from the other's: the exact mirror image, atom for atom.

The two enantiomers of a chiral isomer ('3a', '3b') are images of each other under an improper operation of
the polyhedron (a reflection, an inversion or an improper rotation: :attr:`.Geometry.operations`).  A chemist
expects their starting structures to be that too, ligand conformations included; building 'b' as the image
of 'a''s finished coordinates gives exactly that, and saves its embedding.

:func:`mirror_of` finds, for the assembled molecules of the two (:func:`.embed.assemble`), the first improper
operation whose matrix takes every donor site of 'a' onto a site of 'b' of the same ligand, all donors of a
unit onto one unit (checked on the site vectors, not read from the enumeration), and the atom correspondence
that goes with it: metal onto metal, each ligand unit onto its image unit -- heavy atoms by their offset in the
unit (SMILES order) where the donors keep their numbers, else by a symmetry of the ligand's graph that takes
each donor onto the one it becomes (a palindromic chelate such as en or bpy, whose image the enumeration
spells from its other end: RDKit's substructure search of the ligand on itself), hydrogens in order on
corresponding atoms.  It answers None, and the caller embeds 'b' on its own, whenever anything does not
correspond exactly: no such operation or ligand symmetry (acac written as one resonance form has none that
swaps its two oxygens), different atom counts, elements, mass numbers, charges or bonds, a stereocentre or
chiral axis set in a ligand's SMILES (its mirror image would be the other configuration of the ligand), or a
held atom whose image is not 'b''s held position within :data:`MIRROR_TOL` (an η-ring, which
:func:`.placement.ring_positions` turns to keep clear of the other ligands and need not turn into the mirror
image of the other ring).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import LigandKind
from enumerator.structures.embed import ligand_mol, ligand_units
from enumerator.structures.placement import Vec

__all__ = ["MIRROR_TOL", "Mirror", "UnitImage", "unit_images", "mirror_of"]

#: Largest distance (A) between the image of a held atom of 'a' and the held position of its partner in 'b'.
MIRROR_TOL = 1e-6
#: Largest distance between the image of a site vector (unit length) and the site it is taken for.
_SITE_TOL = 1e-6
#: The most automorphisms of one ligand searched for a relabelling (PPh3 has 48, dppe 128).
_AUTOMORPHISMS = 10000


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


#: One unit's image: the index of the image unit in ``ligand_units(b)``, and for each donor of the unit (in
#: donor order) the donor number it takes in the image unit.
UnitImage = tuple[int, tuple[int, ...]]


def unit_images(a: Isomer, b: Isomer) -> tuple[tuple[np.ndarray, tuple[UnitImage, ...]], ...]:
    """The improper operations of the polyhedron that take 'a''s ligand units onto 'b''s.

    Parameters
    ----------
    a, b : Isomer
        The two enantiomers of one chiral isomer (``a.enantiomer == b.id``), on the same geometry.

    Returns
    -------
    tuple of (numpy.ndarray, tuple of UnitImage)
        In the order of ``geometry.operations``: each operation's 3 x 3 matrix and, for each unit of
        ``ligand_units(a)``, its image unit in ``ligand_units(b)`` and where its donors go there; empty when
        the two are not a pair or no improper operation takes every donor site of 'a' onto a site of 'b' of
        the same ligand (all donors of one unit onto one unit).
    """
    if a.geometry != b.geometry or a.enantiomer != b.id or b.enantiomer != a.id or len(a.sites) != len(b.sites):
        return ()
    units_a, units_b = ligand_units(a), ligand_units(b)
    if len(units_a) != len(units_b):
        return ()
    where_b = {s.index: (k, s) for k, unit in enumerate(units_b) for s in unit}
    vectors = np.array(a.geometry.vectors, dtype=float)
    found = []
    for op in a.geometry.operations:
        if op.proper:
            continue
        images = _images(units_a, units_b, where_b, vectors, op.array)
        if images is not None:
            found.append((op.array, images))
    return tuple(found)


def _images(units_a, units_b, where_b, vectors: np.ndarray, m: np.ndarray) -> tuple[UnitImage, ...] | None:
    """Each unit of 'a''s image unit of 'b' under the matrix ``m`` and its donors' numbers there, or None."""
    images = vectors @ m.T
    out: list[UnitImage] = []
    for unit in units_a:
        target: int | None = None
        donors: list[int] = []
        for s in unit:
            dist = np.linalg.norm(vectors - images[s.index], axis=1)
            hits = np.flatnonzero(dist <= _SITE_TOL)
            if len(hits) != 1 or int(hits[0]) not in where_b:
                return None
            k, t = where_b[int(hits[0])]
            if t.ligand != s.ligand or target not in (None, k):
                return None
            target = k
            donors.append(t.donor_index)
        if target is None or sorted(donors) != [t.donor_index for t in units_b[target]]:
            return None
        out.append((target, tuple(donors)))
    return tuple(out) if sorted(k for k, _ in out) == list(range(len(units_b))) else None


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
        The first improper operation (in the order of ``geometry.operations``) under which every atom
        corresponds; None means: embed 'b' on its own.
    """
    mol_a, fixed_a, spans_a = built_a
    mol_b, fixed_b, spans_b = built_b
    if _has_configuration(mol_a) or _has_configuration(mol_b):
        return None
    kinds = {k.name: k for k, _ in a.placements}
    units_a = ligand_units(a)
    for m, images in unit_images(a, b):
        source = _atom_map(mol_a, spans_a, mol_b, spans_b, images, [kinds[u[0].ligand] for u in units_a])
        if source is None or not _same_molecule(mol_a, mol_b, source) or not _held(m, source, fixed_a, fixed_b):
            continue
        matrix = tuple(tuple(float(x) for x in row) for row in m)
        return Mirror(a.id, matrix, source)  # type: ignore[arg-type]  # three rows of three, as built
    return None


def _has_configuration(mol) -> bool:
    """A stereocentre or chiral axis set in a SMILES: its mirror image would be the other configuration."""
    from rdkit import Chem

    unset = Chem.ChiralType.CHI_UNSPECIFIED
    if any(atom.GetChiralTag() != unset for atom in mol.GetAtoms()):
        return True
    return any("ATROP" in str(bond.GetStereo()) for bond in mol.GetBonds())


def _held(m: np.ndarray, source: Sequence[int], fixed_a: Mapping[int, Vec], fixed_b: Mapping[int, Vec]) -> bool:
    """Every held atom of 'b' is the image of a held atom of 'a' within :data:`MIRROR_TOL`, and no other."""
    if {source[j] for j in fixed_b} != set(fixed_a):
        return False
    for j, p in fixed_b.items():
        image = m @ np.array(fixed_a[source[j]], dtype=float)
        if float(np.linalg.norm(image - np.array(p, dtype=float))) > MIRROR_TOL:
            return False
    return True


def _relabelling(kind: LigandKind, donors: tuple[int, ...], n: int) -> tuple[int, ...] | None:
    """A symmetry of the ligand's heavy-atom graph (elements, charges, bond orders) that takes donor ``d`` onto
    donor ``donors[d]`` (atom maps ``d + 1``): the identity when the donor order is kept, else the first such
    automorphism RDKit's substructure search finds (a palindromic chelate read the other way), or None."""
    if donors == tuple(range(len(donors))):
        return tuple(range(n))
    m = ligand_mol(kind)
    by_map = {a.GetAtomMapNum(): a.GetIdx() for a in m.GetAtoms() if a.GetAtomMapNum()}
    want = {by_map[d + 1]: by_map[e + 1] for d, e in enumerate(donors) if d + 1 in by_map and e + 1 in by_map}
    if len(want) != len(donors):
        return None
    for match in m.GetSubstructMatches(m, uniquify=False, useChirality=True, maxMatches=_AUTOMORPHISMS):
        if all(match[i] == j for i, j in want.items()):
            return tuple(int(j) for j in match)
    return None


def _atom_map(
    mol_a, spans_a, mol_b, spans_b, images: Sequence[UnitImage], kinds: Sequence[LigandKind]
) -> tuple[int, ...] | None:
    """For each atom of 'b', its atom of 'a': metal to metal, unit to image unit (heavy atoms by offset, or by
    the ligand's relabelling where the donors are read the other way; hydrogens in order on corresponding
    atoms); None when the counts differ or some atom of 'b' is left without one."""
    n = mol_b.GetNumAtoms()
    if mol_a.GetNumAtoms() != n or not len(spans_a) == len(spans_b) == len(images) == len(kinds):
        return None
    source = [-1] * n
    source[0] = 0
    h_a, h_b = _hydrogens(mol_a), _hydrogens(mol_b)
    for k, (j, donors) in enumerate(images):
        (off_a, n_a), (off_b, n_b) = spans_a[k], spans_b[j]
        sigma = _relabelling(kinds[k], donors, n_a)
        if n_a != n_b or sigma is None or len(sigma) != n_a:
            return None
        for t in range(n_a):
            ha, hb = h_a.get(off_a + t, []), h_b.get(off_b + sigma[t], [])
            if len(ha) != len(hb):
                return None
            source[off_b + sigma[t]] = off_a + t
            for x, y in zip(ha, hb):
                source[y] = x
    if sorted(source) != list(range(n)):
        return None
    return tuple(source)


def _hydrogens(mol) -> dict[int, list[int]]:
    """The added hydrogens (``Chem.AddHs`` appends them) by the heavy atom they sit on, in index order."""
    out: dict[int, list[int]] = {}
    for atom in mol.GetAtoms():
        if atom.GetAtomicNum() == 1 and atom.GetDegree() == 1:
            out.setdefault(atom.GetNeighbors()[0].GetIdx(), []).append(atom.GetIdx())
    return out


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
