"""Relieving close contacts between ligands of an embedded structure.

Atoms of two different ligands closer than :data:`CLASH_FRACTION` of the
sum of their van der Waals radii (RDKit's table) are a clash (common
practice: non-bonded contacts below ~70-75% of the vdW sum are unphysical
and must be optimised away before use).  Two remedies, metal and donor atoms
held in place so the polyhedron and the isomer are unchanged:

* :func:`relieve_clashes`: a rotor search turning each monodentate ligand
  about its M-donor axis to the angle that makes its worst contact least
  bad, a few greedy passes;
* :func:`uff_relax`: RDKit's Universal Force Field (A. K. Rappé et al.,
  *J. Am. Chem. Soc.* 114 (1992) 10024) on the ligand atoms.

:func:`closest_contact` reports what is left.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from enumerator.model.elements import vdw_radius
from enumerator.structures.placement import Vec

__all__ = ["CLASH_FRACTION", "relieve_clashes", "uff_relax", "closest_contact"]

#: Atoms of two different ligands closer than this fraction of the sum of
#: their van der Waals radii are reported as a clash.
CLASH_FRACTION = 0.7
#: UFF steps for relieving clashes (the metal and donor atoms are held fixed).
_UFF_STEPS = 2000


def uff_relax(mol, pos: np.ndarray, fixed: Mapping[int, Vec]) -> np.ndarray | None:
    """Ligand atoms relaxed with RDKit's UFF, the metal and every fixed (donor or ring) atom held in place, so the
    polyhedron and the isomer are unchanged.

    Returns
    -------
    numpy.ndarray or None
        The positions; None where UFF lacks parameters for some atom.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The complex, metal as atom 0.
    pos : numpy.ndarray
        Atom positions (n x 3, angstrom).
    fixed : Mapping[int, Vec]
        Atoms held at their places.
    """
    from rdkit import Chem, rdBase
    from rdkit.Chem import rdForceFieldHelpers
    from rdkit.Geometry import Point3D

    m = Chem.Mol(mol)
    m.RemoveAllConformers()
    conf = Chem.Conformer(m.GetNumAtoms())
    for k, p in enumerate(pos):
        conf.SetAtomPosition(k, Point3D(*map(float, p)))
    m.AddConformer(conf, assignId=True)
    with rdBase.BlockLogs():
        if not rdForceFieldHelpers.UFFHasAllMoleculeParams(m):
            return None
        ff = rdForceFieldHelpers.UFFGetMoleculeForceField(m, ignoreInterfragInteractions=False)
        if ff is None:
            return None
        for i in fixed:
            ff.AddFixedPoint(int(i))
        ff.Initialize()
        ff.Minimize(maxIts=_UFF_STEPS)
    out = np.array(m.GetConformer().GetPositions())
    for i, p in fixed.items():
        out[i] = p
    return out


def _fragments(mol) -> list[int]:
    """Ligand number of every atom (0 for the metal, atom 0): the pieces
    left when the metal's bonds are cut."""
    from rdkit import Chem

    rw = Chem.RWMol(mol)
    for b in list(rw.GetAtomWithIdx(0).GetBonds()):
        rw.RemoveBond(b.GetBeginAtomIdx(), b.GetEndAtomIdx())
    frag = [0] * mol.GetNumAtoms()
    for k, atoms in enumerate(Chem.GetMolFrags(rw.GetMol(), sanitizeFrags=False)):
        for a in atoms:
            frag[a] = k
    return frag


def _vdw(mol) -> np.ndarray:
    return np.array([vdw_radius(a.GetAtomicNum()) if a.GetAtomicNum() else 1.5 for a in mol.GetAtoms()])


#: Rotor search: angles tried per ligand and passes over the ligands.
_ROTOR_STEPS = 36
_ROTOR_PASSES = 3


def _rotors(mol, frag: Sequence[int], fixed: Mapping[int, Vec]) -> list[tuple[list[int], int]]:
    """(atoms, donor) of every monodentate ligand of more than one atom."""
    members: dict[int, list[int]] = {}
    for i in range(1, len(frag)):
        members.setdefault(frag[i], []).append(i)
    metal_nb = {nb.GetIdx() for nb in mol.GetAtomWithIdx(0).GetNeighbors()}
    rotors = []
    for _, atoms in sorted(members.items()):
        donors = [a for a in atoms if a in metal_nb or a in fixed]
        if len(donors) == 1 and len(atoms) > 1:
            rotors.append((atoms, donors[0]))
    return rotors


def relieve_clashes(mol, pos: np.ndarray, fixed: Mapping[int, Vec]) -> tuple[np.ndarray, int]:
    """Turn each monodentate ligand about its M-donor axis (its donor and the metal stay put) to the angle that
    makes its worst contact with the other ligands least bad (distance / vdW sum), a few greedy passes; only while
    some contact is below the clash limit.

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The complex, metal as atom 0.
    pos : numpy.ndarray
        Atom positions (n x 3, angstrom).
    fixed : Mapping[int, Vec]
        Atoms held at their places (donors, ring atoms).

    Returns
    -------
    (numpy.ndarray, int)
        The positions and the number of ligands turned.
    """
    frag = _fragments(mol)
    rv = _vdw(mol)
    n = len(frag)
    rotors = _rotors(mol, frag, fixed)
    pos = np.array(pos, dtype=float)

    def worst(atoms: list[int], pts: np.ndarray) -> float:
        """Worst distance / clash limit between the ligand at ``pts`` and the rest."""
        mask = np.ones(n, dtype=bool)
        mask[atoms] = False
        mask[0] = False
        if not mask.any():
            return float(np.inf)
        d = np.linalg.norm(pts[:, None, :] - pos[mask][None, :, :], axis=2)
        lim = CLASH_FRACTION * (rv[atoms][:, None] + rv[mask][None, :])
        return float(np.min(d / lim))

    if not rotors or min(worst(a, pos[a]) for a, _ in rotors) >= 1.0:
        return pos, 0
    turned = set()
    for _ in range(_ROTOR_PASSES):
        changed = False
        for atoms, donor in rotors:
            axis = pos[donor] / np.linalg.norm(pos[donor])
            base = pos[atoms]
            best_w, best_k, best_rot = worst(atoms, base), 0, base
            for k in range(1, _ROTOR_STEPS):
                t = 2 * np.pi * k / _ROTOR_STEPS
                c, s_ = np.cos(t), np.sin(t)
                rot = base * c + np.cross(axis, base) * s_ + np.outer(base @ axis, axis) * (1 - c)
                w = worst(atoms, rot)
                if w > best_w + 1e-9:
                    best_w, best_k, best_rot = w, k, rot
            if best_k:
                pos[atoms] = best_rot
                turned.add(donor)
                changed = True
        if not changed:
            break
    return pos, len(turned)


def closest_contact(mol, coords: Sequence[Vec] | np.ndarray) -> tuple[float, int, int, float] | None:
    """The closest pair of atoms of two different ligands (no path between them that avoids the metal, atom 0).

    Parameters
    ----------
    mol : rdkit.Chem.Mol
        The complex, metal as atom 0.
    coords : sequence of Vec
        Atom positions in angstrom.

    Returns
    -------
    (float, int, int, float) or None
        Distance, the two atom indices and the clash limit for that pair, the pair chosen by distance / limit;
        None with one ligand.
    """
    n = mol.GetNumAtoms()
    if n < 3:
        return None
    frag = np.array(_fragments(mol))
    xyz = np.array(coords, dtype=float)
    rv = _vdw(mol)
    # every pair i < j of ligand atoms at once; the first smallest distance / limit in (i, j) order
    i, j = np.triu_indices(n, 1)
    keep = (i > 0) & (frag[i] != frag[j])
    i, j = i[keep], j[keep]
    if not len(i):
        return None
    diff = xyz[i] - xyz[j]
    d = np.sqrt((diff * diff).sum(axis=1))
    limit = CLASH_FRACTION * (rv[i] + rv[j])
    k = int(np.argmin(d / limit))
    return float(d[k]), int(i[k]), int(j[k]), float(limit[k])
