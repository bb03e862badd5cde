"""Building the full complex and embedding it with the donors held on their sites.

:func:`assemble` makes one RDKit molecule of the metal and the given ligand
units from each ligand's catalogue SMILES (atom maps 1..denticity = chain
order = ``Site.donor_index + 1``), donor -> metal dative bonds, map numbers
cleared, the metal's formal charge = total charge - ligand charges, then
explicit hydrogens.  An η-ring is bonded to the metal through one ring atom
during the embedding (a fully hapto-bonded ring defeats RDKit's bounds
builder: "bad lower bound"); the other M-C bonds are added afterwards.

:func:`embed` runs distance geometry (ETKDG; S. Riniker, G. A. Landrum,
*J. Chem. Inf. Model.* 55 (2015) 2562) with the metal and donor positions
held by RDKit's ``coordMap`` and a fixed random-number start value, so the
file is the same on every run; then aligns the result onto the fixed atoms
by a proper-rotation Kabsch fit (W. Kabsch, *Acta Cryst.* A32 (1976) 922;
a proper rotation keeps the chirality of enantiomers) and rejects a fit
worse than :data:`FIT_TOL`.  Any failure is an :class:`EmbedFailed` whose
message says why; the caller then writes the donor-only core.  The embedding
is memoised by value (the molecule without mass numbers and the held
positions), so an isotopologue in the same run (a report of a complex and its
``13CO`` label) is not embedded twice.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING

import numpy as np

from enumerator.caches import cached
from enumerator.isomers.enumeration import Isomer, Site
from enumerator.model.composition import Composition, LigandKind
from enumerator.structures.placement import Vec, bond_length, ring_positions

if TYPE_CHECKING:  # RDKit is imported where it is used, so that importing this module stays cheap
    from rdkit import Chem

__all__ = [
    "EmbedFailed",
    "EmbedKey",
    "Embedded",
    "RNG_START",
    "FIT_TOL",
    "ligand_mol",
    "ring_atoms",
    "assemble",
    "embed",
    "embed_key",
    "embed_or_message",
    "hydrogens_by_unit",
    "ligand_units",
]

#: Fixed start value of RDKit's random-number stream for the embedding.
RNG_START = 61453
#: Largest deviation (A) of a fixed atom from its target before a full
#: structure is rejected in favour of the donor-only core.
FIT_TOL = 0.05


class EmbedFailed(Exception):
    """RDKit could not build or embed the full complex; the message says why."""


def ligand_mol(kind: LigandKind):
    """The RDKit molecule of a catalogue ligand's SMILES, its donor atoms mapped :1..:denticity.

    Raises
    ------
    EmbedFailed
        RDKit cannot read the SMILES, or the donors are not numbered in chain order.

    Parameters
    ----------
    kind : LigandKind
        A catalogue ligand (``smiles`` in its catalogue data).

    Returns
    -------
    rdkit.Chem.Mol
    """
    from rdkit import Chem, rdBase

    smi = str(kind.info("smiles"))
    with rdBase.BlockLogs():  # '[H-:1]' (hydride) draws a warning about a lone H
        m = Chem.MolFromSmiles(smi)
    if m is None:
        raise EmbedFailed(f"RDKit cannot read the SMILES of '{kind.name}' ({smi})")
    maps = sorted(a.GetAtomMapNum() for a in m.GetAtoms() if a.GetAtomMapNum())
    if not kind.ring and maps != list(range(1, kind.denticity + 1)):
        raise EmbedFailed(
            f"the SMILES of '{kind.name}' does not number its {kind.denticity} donor atom(s) :1..:{kind.denticity}"
        )
    return m


def ring_atoms(m, kind: LigandKind) -> list[int]:
    """The atoms of an η-ring bound to the metal, in ring order.

    Raises
    ------
    EmbedFailed
        No ring of the ligand's hapticity in its SMILES.

    Parameters
    ----------
    m : rdkit.Chem.Mol
        The ligand molecule.
    kind : LigandKind
        The ligand (its hapticity).

    Returns
    -------
    list of int
    """
    size = int(kind.info("hapticity", 0) or 0)
    mapped = {a.GetIdx() for a in m.GetAtoms() if a.GetAtomMapNum()}
    for ring in m.GetRingInfo().AtomRings():
        if (not size or len(ring) == size) and (not mapped or mapped <= set(ring) or mapped & set(ring)):
            return list(ring)
    raise EmbedFailed(f"no {size or ''}-membered ring found in the SMILES of '{kind.name}'")


def ligand_units(isomer: Isomer) -> list[list[Site]]:
    """The isomer's sites grouped by ligand unit (units in order, donors in chain order), as :func:`assemble`
    takes them.

    Parameters
    ----------
    isomer : Isomer

    Returns
    -------
    list of list of Site
    """
    by_unit: dict[int, list[Site]] = {}
    for s in isomer.sites:
        by_unit.setdefault(s.unit, []).append(s)
    return [sorted(by_unit[u], key=lambda s: s.donor_index) for u in sorted(by_unit)]


def assemble(
    units: Sequence[Sequence[Site]], comp: Composition
) -> tuple[Chem.Mol, dict[int, Vec], list[int], list[tuple[int, int]]]:
    """One RDKit molecule of the metal and the given ligand units.

    Parameters
    ----------
    units : sequence of sequence of Site
        Each ligand unit's sites, in donor order.
    comp : Composition
        The composition (ligand SMILES, total charge).

    Returns
    -------
    (rdkit.Chem.Mol, dict, list of int, list of (int, int))
        The molecule with explicit hydrogens (metal atom 0), the fixed positions by atom index, the η-ring atoms
        still to be bonded to the metal, and each unit's (offset, heavy-atom count).

    Raises
    ------
    EmbedFailed
        A SMILES cannot be read or RDKit rejects the assembled complex.
    """
    from rdkit import Chem, rdBase

    metal = comp.metal
    rw = Chem.RWMol()
    m_idx = rw.AddAtom(Chem.Atom(metal))
    fixed: dict[int, Vec] = {m_idx: (0.0, 0.0, 0.0)}
    lig_charge = 0
    hapto: list[int] = []
    spans: list[tuple[int, int]] = []
    # where every non-ring donor will sit, and each ring's centroid direction: the rings keep clear of them
    targets = [(s.unit, bond_length(metal, s.donor) * np.array(s.position)) for unit in units for s in unit]
    for sites in units:
        kind = comp.kind(sites[0].ligand)
        m = ligand_mol(kind)
        off = rw.GetNumAtoms()
        spans.append((off, m.GetNumAtoms()))
        for a in m.GetAtoms():
            rw.AddAtom(a)
            lig_charge += a.GetFormalCharge()
        for b in m.GetBonds():
            rw.AddBond(b.GetBeginAtomIdx() + off, b.GetEndAtomIdx() + off, b.GetBondType())
        if kind.ring:
            ring = ring_atoms(m, kind)
            el = m.GetAtomWithIdx(ring[0]).GetSymbol()
            placed = [p for i, p in fixed.items() if i != m_idx]
            avoid = placed + [tuple(p) for u, p in targets if u != sites[0].unit]
            pos = ring_positions([s.position for s in sites], len(ring), metal, el, avoid)
            # one ring atom is bonded to the metal for the embedding (a
            # fully hapto-bonded ring defeats RDKit's bounds builder); the
            # other M-C bonds are added afterwards
            rw.AddBond(ring[0] + off, m_idx, Chem.BondType.DATIVE)
            for a, p in zip(ring, pos):
                if a != ring[0]:
                    hapto.append(a + off)
                fixed[a + off] = p
        else:
            donors = {a.GetAtomMapNum(): a.GetIdx() for a in m.GetAtoms() if a.GetAtomMapNum()}
            for s in sites:
                a = donors[s.donor_index + 1]
                el = m.GetAtomWithIdx(a).GetSymbol()
                d = bond_length(metal, el)
                rw.AddBond(a + off, m_idx, Chem.BondType.DATIVE)
                x, y, z = s.position
                fixed[a + off] = (d * x, d * y, d * z)
    for a in rw.GetAtoms():
        a.SetAtomMapNum(0)
    rw.GetAtomWithIdx(m_idx).SetFormalCharge(comp.charge - lig_charge)
    rw.GetAtomWithIdx(m_idx).SetNoImplicit(True)
    mol = rw.GetMol()
    with rdBase.BlockLogs():
        try:
            Chem.SanitizeMol(mol)
            mol = Chem.AddHs(mol)
        except Exception as exc:  # valence problems in a catalogue SMILES
            raise EmbedFailed(f"RDKit rejects the assembled complex ({str(exc).splitlines()[0]})") from None
    return mol, fixed, hapto, spans


#: What :func:`embed` looks an embedding up by: the molecule's binary form (mass numbers cleared, no
#: conformers) and the held positions, sorted by atom index.
EmbedKey = tuple[bytes, tuple[tuple[int, Vec], ...]]
#: An embedding worked out ahead (:mod:`.pool`): the read-only positions, or the :class:`EmbedFailed` message.
Embedded = np.ndarray | str


def embed_key(mol, fixed: Mapping[int, Vec]) -> EmbedKey:
    """The value an embedding depends on: the molecule without mass numbers or conformers, and the held atoms.

    Distance geometry reads no mass number, so an isotopologue (a ``13CO`` complex beside its ``CO`` parent)
    has the key of its parent.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The assembled complex (not changed).
    fixed : Mapping[int, Vec]
        Atom index -> position held.

    Returns
    -------
    (bytes, tuple)
        RDKit's binary form of the plain molecule, and the held (index, position) pairs by index.
    """
    from rdkit import Chem

    plain = Chem.Mol(mol)
    plain.RemoveAllConformers()
    for a in plain.GetAtoms():
        a.SetIsotope(0)
    held = tuple(sorted((int(i), (float(p[0]), float(p[1]), float(p[2]))) for i, p in fixed.items()))
    return plain.ToBinary(), held


def embed(mol, fixed: Mapping[int, Vec], ahead: Mapping[EmbedKey, Embedded] | None = None) -> np.ndarray:
    """Embedded coordinates, aligned onto the fixed atoms.

    The answer is memoised by value (:func:`embed_key`): the molecule exactly as RDKit stores it (its binary
    form: atoms and bonds in index order, charges, hydrogens, aromaticity, stereo flags) with mass numbers
    cleared, and the fixed positions.  Distance geometry reads no mass number, so an isotopologue (a
    ``13CO`` complex beside its ``CO`` parent) gets the same coordinates without a second embedding
    (tests/test_structures.py holds both).  An answer worked out ahead in worker processes (``ahead``, by
    :mod:`.pool`) is taken as it is: the same function on the same key, so the same coordinates.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The assembled complex (not changed).
    fixed : Mapping[int, Vec]
        Atom index -> position held (metal, donors, ring atoms).
    ahead : Mapping, optional
        Embeddings already worked out, by :func:`embed_key`: positions, or the message of the failure.

    Returns
    -------
    numpy.ndarray
        n x 3 positions in angstrom (a fresh array the caller may change).

    Raises
    ------
    EmbedFailed
        RDKit finds no embedding, or the fit to the fixed atoms is worse than :data:`FIT_TOL`.
    """
    key = embed_key(mol, fixed)
    done = ahead.get(key) if ahead else None
    if isinstance(done, str):
        raise EmbedFailed(done)
    if done is not None:
        return np.array(done)
    return np.array(_embedded(*key))


def embed_or_message(binary: bytes, held: tuple[tuple[int, Vec], ...]) -> Embedded:
    """The embedding of one key, or the message of its :class:`EmbedFailed` (what a worker process sends back).

    Parameters
    ----------
    binary : bytes
        RDKit's binary form of the plain molecule (:func:`embed_key`).
    held : tuple
        The held (index, position) pairs.

    Returns
    -------
    numpy.ndarray or str
        The read-only positions, or why RDKit could not embed the complex.
    """
    try:
        return _embedded(binary, held)
    except EmbedFailed as exc:
        return str(exc)


@cached(maxsize=256)
def _embedded(binary: bytes, held: tuple[tuple[int, Vec], ...]) -> np.ndarray:
    """ETKDG with the held atoms in place, then the Kabsch fit (read-only array)."""
    from rdkit import Chem, rdBase
    from rdkit.Chem import rdDistGeom
    from rdkit.Geometry import Point3D

    mol = Chem.Mol(binary)  # type: ignore[call-overload]  # RDKit's stubs say str; the pickle is bytes
    fixed = dict(held)
    with rdBase.BlockLogs():
        cmap = {i: Point3D(*p) for i, p in fixed.items()}
        try:
            cid = rdDistGeom.EmbedMolecule(
                mol, coordMap=cmap, randomSeed=RNG_START, useRandomCoords=True, maxAttempts=20
            )
        except (RuntimeError, IndexError) as exc:
            raise EmbedFailed(f"RDKit could not embed the ligands ({str(exc).strip().splitlines()[0]})") from None
    if cid < 0:
        raise EmbedFailed("RDKit could not embed the ligands with the donor positions fixed")
    pos = _align(np.array(mol.GetConformer(cid).GetPositions()), fixed)
    dev = max(float(np.linalg.norm(pos[i] - np.array(p))) for i, p in fixed.items())
    if dev > FIT_TOL:
        raise EmbedFailed(f"the embedded donors sit {dev:.2f} A off their sites")
    pos.setflags(write=False)
    return pos


def hydrogens_by_unit(mol, spans: Sequence[tuple[int, int]]) -> list[list[int]]:
    """The added hydrogens of each unit (atom indices in order), found by the heavy atom they sit on.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The assembled complex, hydrogens added after every heavy atom.
    spans : sequence of (int, int)
        Each unit's (offset, heavy-atom count).

    Returns
    -------
    list of list of int
    """
    out: list[list[int]] = [[] for _ in spans]
    for a in mol.GetAtoms():
        if a.GetAtomicNum() == 1 and a.GetIdx() >= spans[-1][0] + spans[-1][1]:
            nb = a.GetNeighbors()[0].GetIdx()
            for k, (off, n) in enumerate(spans):
                if off <= nb < off + n:
                    out[k].append(a.GetIdx())
    return out


def _align(pos: np.ndarray, fixed: Mapping[int, Vec]) -> np.ndarray:
    """Rotate (proper rotation only, so chirality is kept) and translate the
    embedded coordinates onto the fixed targets (Kabsch)."""
    idx = sorted(fixed)
    p = pos[idx]
    q = np.array([fixed[i] for i in idx], dtype=float)
    pc, qc = p.mean(axis=0), q.mean(axis=0)
    h = (p - pc).T @ (q - qc)
    u, _, vt = np.linalg.svd(h)
    d = np.sign(np.linalg.det(vt.T @ u.T)) or 1.0
    r = vt.T @ np.diag([1.0, 1.0, d]) @ u.T
    return (pos - pc) @ r.T + qc
