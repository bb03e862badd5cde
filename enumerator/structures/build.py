"""Starting structures (XYZ, SDF) of each isomer's idealised coordination sphere.

These are *starting geometries* for a quantum-chemical optimisation, not
optimised structures.  The metal sits at the origin and every donor atom on
its site vector of the ideal polyhedron, at the sum of the covalent radii of
metal and donor element (RDKit's periodic table, ``GetRcovalent``; these are
single-bond radii, so M-CO comes out some 0.2-0.3 A long, which an optimiser
fixes in a few steps).  An eta-ring (Cp, arene) is placed as a regular
polygon of ring bond 1.40 A centred on the axis of its three facial sites,
each ring carbon at the same M-C covalent distance.

Two kinds of structure come out:

* ``full`` -- every ligand has a SMILES in the catalogue (``meta['smiles']``,
  donor atoms carrying atom-map numbers 1..denticity in chain order).  The
  whole complex is built as one RDKit molecule (donor -> metal dative bonds,
  explicit hydrogens) and embedded by distance geometry (ETKDG) with the
  metal and donor positions held fixed (RDKit ``coordMap``) and a fixed
  random-number start value, so the file is the same on every run.
* ``core`` -- otherwise (abstract letters, a ligand without SMILES, an
  embedding failure): the metal and the donor atoms only.  The title/comment
  line then begins ``DONOR-ONLY CORE`` and says why.  Labels that are not
  element symbols (abstract 'a', 'b', 'M') become dummy atoms: ``X`` in XYZ,
  atomic number 0 in SDF.

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("Ma4b2", geometry="OC-6")
>>> s = build_structure(r.isomers[0], r.composition)
>>> s.kind, len(s.symbols)
('core', 7)
>>> to_xyz(s).splitlines()[1].startswith("DONOR-ONLY CORE")
True
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from functools import cache

from enumerator.isomers.enumeration import Isomer
from enumerator.model.composition import Composition, LigandKind
from enumerator.model.elements import atomic_number, covalent_radius, is_element, vdw_radius

__all__ = [
    "Structure",
    "build_structure",
    "structures_for",
    "to_xyz",
    "to_sdf",
    "bond_length",
    "element_or_none",
    "DUMMY_DISTANCE",
    "RING_BOND",
    "CLASH_FRACTION",
    "closest_contact",
]

#: M-donor distance (A) when either label is not an element (abstract formulas).
DUMMY_DISTANCE = 2.0  # common practice: a typical M-L distance for a placeholder
#: C-C bond of a planar eta-ring (A).
RING_BOND = 1.40  # from memory: aromatic C-C in benzene 1.39-1.40 A, Cp 1.40-1.43 A
#: Fixed start value of RDKit's random-number stream for the embedding.
_RNG_START = 61453
#: Largest deviation (A) of a fixed atom from its target before a full
#: structure is rejected in favour of the donor-only core.
_FIT_TOL = 0.05
#: Atoms of two different ligands closer than this fraction of the sum of
#: their van der Waals radii (RDKit's table) are reported as a clash
#: (common practice: non-bonded contacts below ~70-75% of the vdW sum are
#: unphysical and must be optimised away before use).
CLASH_FRACTION = 0.7

Vec = tuple[float, float, float]


@dataclass(frozen=True)
class Structure:
    """One isomer's starting structure.

    ``kind`` is 'full' or 'core'; ``title`` is the one-line description
    written as the XYZ comment and the SDF title; ``symbols``/``coords`` are
    the atoms (metal first) in angstrom; ``molblock`` the SDF record (without
    the ``$$$$`` terminator); ``note`` says why a core was written.
    """

    isomer_id: str
    kind: str
    title: str
    symbols: tuple[str, ...]
    coords: tuple[Vec, ...]
    charge: int
    note: str
    molblock: str


def element_or_none(label: str) -> str | None:
    """The element symbol if ``label`` is one (exact case), else None.

    >>> element_or_none("Ru"), element_or_none("a"), element_or_none("M")
    ('Ru', None, None)
    """
    if not label or not label[0].isupper():
        return None
    return label if is_element(label) else None


@cache
def bond_length(metal: str, donor: str) -> float:
    """Metal-donor starting distance: the sum of RDKit's covalent radii, or
    :data:`DUMMY_DISTANCE` when either is not an element.

    >>> bond_length("Ru", "C")  # 1.46 + 0.76, RDKit GetRcovalent
    2.22
    """
    if not element_or_none(metal) or not element_or_none(donor):
        return DUMMY_DISTANCE
    return round(covalent_radius(metal) + covalent_radius(donor), 4)


def _round(x: float) -> float:
    v = round(float(x), 5)
    return 0.0 if v == 0 else v


def _norm(v: Sequence[float]) -> Vec:
    n = math.sqrt(sum(c * c for c in v))
    return tuple(c / n for c in v)  # type: ignore[return-value]


def _ring_positions(site_vectors: Sequence[Vec], size: int, metal: str, element: str) -> list[Vec]:
    """A regular ring of ``size`` atoms centred on the axis of the sites it caps."""
    import numpy as np

    u = np.array(_norm(np.sum(np.array(site_vectors), axis=0)))
    radius = RING_BOND / (2 * math.sin(math.pi / size))
    mc = bond_length(metal, element)
    h = math.sqrt(max(mc * mc - radius * radius, 0.25))
    # in-plane frame: e1 toward the first capped site, projected
    first = np.array(site_vectors[0], dtype=float)
    e1 = first - (first @ u) * u
    if np.linalg.norm(e1) < 1e-6:  # pragma: no cover - sites on the axis
        e1 = np.cross(u, [1.0, 0.0, 0.0]) if abs(u[0]) < 0.9 else np.cross(u, [0.0, 1.0, 0.0])
    e1 = e1 / np.linalg.norm(e1)
    e2 = np.cross(u, e1)
    out = []
    for k in range(size):
        t = 2 * math.pi * k / size
        p = h * u + radius * (math.cos(t) * e1 + math.sin(t) * e2)
        out.append(tuple(float(c) for c in p))
    return out


def _title(isomer: Isomer, comp: Composition, kind: str, note: str, extra: str = "") -> str:
    base = f"{comp.formula} isomer {isomer.id} ({isomer.point_group}{', ' + extra if extra else ''}) on {isomer.geometry.symbol}"
    if kind == "core":
        return f"DONOR-ONLY CORE (ligands not built: {note}): {base}; idealised starting geometry, charge {comp.charge}"
    return f"{base}; full ligands, RDKit ETKDG with donors fixed; idealised starting geometry, charge {comp.charge}"


def build_structure(isomer: Isomer, composition: Composition, *, label: str = "") -> Structure:
    """The starting structure of one isomer: full ligands if possible, else
    the donor-only core.  ``label`` (e.g. the IUPAC descriptor) is added to
    the title line."""
    reason = _why_not_full(composition)
    if not reason:
        try:
            return _full(isomer, composition, label)
        except _EmbedFailed as exc:
            reason = str(exc)
    return _core(isomer, composition, reason, label)


def structures_for(result, labels: dict[str, str] | None = None) -> tuple[Structure, ...]:
    """One structure per isomer of a :class:`~enumerator.workflow.result.Result`."""
    labels = labels or {}
    return tuple(build_structure(i, result.composition, label=labels.get(i.id, "")) for i in result.isomers)


class _EmbedFailed(Exception):
    pass


def _why_not_full(comp: Composition) -> str:
    if not element_or_none(comp.metal):
        return f"metal '{comp.metal}' is not an element"
    for k in comp.kinds:
        if not k.info("smiles"):
            return f"no SMILES for ligand '{k.name}'"
    return ""


def _core(isomer: Isomer, comp: Composition, reason: str, label: str) -> Structure:
    from rdkit import Chem
    from rdkit.Geometry import Point3D

    metal = comp.metal
    symbols = [element_or_none(metal) or "X"]
    coords: list[Vec] = [(0.0, 0.0, 0.0)]
    for s in isomer.sites:
        d = bond_length(metal, s.donor)
        symbols.append(element_or_none(s.donor) or "X")
        coords.append(tuple(_round(d * c) for c in s.position))  # type: ignore[arg-type]
    title = _title(isomer, comp, "core", reason, label)
    rw = Chem.RWMol()
    for sym in symbols:
        rw.AddAtom(Chem.Atom(0 if sym == "X" else atomic_number(sym)))
    for k in range(1, len(symbols)):
        rw.AddBond(0, k, Chem.BondType.SINGLE)
    conf = Chem.Conformer(len(symbols))
    for k, c in enumerate(coords):
        conf.SetAtomPosition(k, Point3D(*c))
    mol = rw.GetMol()
    mol.AddConformer(conf, assignId=True)
    block = _molblock(mol, title, isomer, comp, "core")
    return Structure(isomer.id, "core", title, tuple(symbols), tuple(coords), comp.charge, reason, block)


def _ligand_mol(kind: LigandKind):
    from rdkit import Chem, rdBase

    smi = str(kind.info("smiles"))
    with rdBase.BlockLogs():  # '[H-:1]' (hydride) draws a warning about a lone H
        m = Chem.MolFromSmiles(smi)
    if m is None:
        raise _EmbedFailed(f"RDKit cannot read the SMILES of '{kind.name}' ({smi})")
    maps = sorted(a.GetAtomMapNum() for a in m.GetAtoms() if a.GetAtomMapNum())
    if not kind.ring and maps != list(range(1, kind.denticity + 1)):
        raise _EmbedFailed(
            f"the SMILES of '{kind.name}' does not number its {kind.denticity} donor atom(s) :1..:{kind.denticity}"
        )
    return m


def _ring_atoms(m, kind: LigandKind) -> list[int]:
    """The atoms of an eta-ring bound to the metal, in ring order."""
    size = int(kind.info("hapticity", 0) or 0)
    mapped = {a.GetIdx() for a in m.GetAtoms() if a.GetAtomMapNum()}
    for ring in m.GetRingInfo().AtomRings():
        if (not size or len(ring) == size) and (not mapped or mapped <= set(ring) or mapped & set(ring)):
            return list(ring)
    raise _EmbedFailed(f"no {size or ''}-membered ring found in the SMILES of '{kind.name}'")


def _assemble(units: list, comp: Composition):
    """One RDKit molecule of the metal and the given ligand units (each a
    list of sites), with the fixed positions, the eta-ring atoms still to be
    bonded and each unit's (offset, heavy-atom count)."""
    from rdkit import Chem, rdBase

    metal = comp.metal
    rw = Chem.RWMol()
    m_idx = rw.AddAtom(Chem.Atom(metal))
    fixed: dict[int, Vec] = {m_idx: (0.0, 0.0, 0.0)}
    lig_charge = 0
    hapto: list[int] = []
    spans: list[tuple[int, int]] = []
    for sites in units:
        kind = comp.kind(sites[0].ligand)
        m = _ligand_mol(kind)
        off = rw.GetNumAtoms()
        spans.append((off, m.GetNumAtoms()))
        for a in m.GetAtoms():
            rw.AddAtom(a)
            lig_charge += a.GetFormalCharge()
        for b in m.GetBonds():
            rw.AddBond(b.GetBeginAtomIdx() + off, b.GetEndAtomIdx() + off, b.GetBondType())
        if kind.ring:
            ring = _ring_atoms(m, kind)
            el = m.GetAtomWithIdx(ring[0]).GetSymbol()
            pos = _ring_positions([s.position for s in sites], len(ring), metal, el)
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
                fixed[a + off] = tuple(d * c for c in s.position)  # type: ignore[assignment]
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
            raise _EmbedFailed(f"RDKit rejects the assembled complex ({str(exc).splitlines()[0]})") from None
    return mol, fixed, hapto, spans


def _embed(mol, fixed: dict[int, Vec]):
    """Embedded coordinates (numpy, aligned onto the fixed atoms)."""
    import numpy as np
    from rdkit import rdBase
    from rdkit.Chem import AllChem
    from rdkit.Geometry import Point3D

    with rdBase.BlockLogs():
        cmap = {i: Point3D(*p) for i, p in fixed.items()}
        try:
            cid = AllChem.EmbedMolecule(mol, coordMap=cmap, randomSeed=_RNG_START, useRandomCoords=True, maxAttempts=20)
        except (RuntimeError, IndexError) as exc:
            raise _EmbedFailed(f"RDKit could not embed the ligands ({str(exc).strip().splitlines()[0]})") from None
    if cid < 0:
        raise _EmbedFailed("RDKit could not embed the ligands with the donor positions fixed")
    pos = _align(np.array(mol.GetConformer(cid).GetPositions()), fixed)
    dev = max(float(np.linalg.norm(pos[i] - np.array(p))) for i, p in fixed.items())
    if dev > _FIT_TOL:
        raise _EmbedFailed(f"the embedded donors sit {dev:.2f} A off their sites")
    return pos


def _hydrogens_by_unit(mol, spans) -> list[list[int]]:
    out: list[list[int]] = [[] for _ in spans]
    for a in mol.GetAtoms():
        if a.GetAtomicNum() == 1 and a.GetIdx() >= spans[-1][0] + spans[-1][1]:
            nb = a.GetNeighbors()[0].GetIdx()
            for k, (off, n) in enumerate(spans):
                if off <= nb < off + n:
                    out[k].append(a.GetIdx())
    return out


def _full(isomer: Isomer, comp: Composition, label: str) -> Structure:
    """The whole complex embedded at once; if RDKit fails on that, each
    ligand embedded on its own against the metal and its fixed donors, then
    put together (ligands may then need a clash check by the optimiser)."""
    import numpy as np
    from rdkit import Chem
    from rdkit.Geometry import Point3D

    by_unit: dict[int, list] = {}
    for s in isomer.sites:
        by_unit.setdefault(s.unit, []).append(s)
    units = [sorted(by_unit[u], key=lambda s: s.donor_index) for u in sorted(by_unit)]
    mol, fixed, hapto, spans = _assemble(units, comp)
    m_idx = 0
    how = "RDKit ETKDG with donors fixed"
    try:
        pos = _embed(mol, fixed)
    except _EmbedFailed:
        pos = np.zeros((mol.GetNumAtoms(), 3))
        h_whole = _hydrogens_by_unit(mol, spans)
        for k, sites in enumerate(units):
            mu, fu, _, su = _assemble([sites], comp)
            pu = _embed(mu, fu)
            off, n = spans[k]
            pos[off : off + n] = pu[1 : 1 + n]
            for hw, hu in zip(h_whole[k], _hydrogens_by_unit(mu, su)[0]):
                pos[hw] = pu[hu]
        how = "RDKit ETKDG per ligand with donors fixed"
    pos, turned = _relieve_clashes(mol, pos, fixed)
    if turned:
        how += f", {turned} monodentate ligand(s) turned about the M-donor axis to relieve contacts"
    contact = closest_contact(mol, pos)
    if contact is not None and contact[0] < contact[3]:
        relaxed = _uff_relax(mol, pos, fixed)
        if relaxed is not None:
            pos = relaxed
            how += ", then UFF-relaxed with the metal and donor atoms held"
    mol.RemoveAllConformers()
    conf0 = Chem.Conformer(mol.GetNumAtoms())
    mol.AddConformer(conf0, assignId=True)
    cid = 0
    for i, p in fixed.items():  # exact ideal positions for the fixed atoms
        pos[i] = p
    conf = mol.GetConformer(cid)
    coords = []
    for k in range(mol.GetNumAtoms()):
        c = tuple(_round(x) for x in pos[k])
        coords.append(c)
        conf.SetAtomPosition(k, Point3D(*c))
    if hapto:
        rw2 = Chem.RWMol(mol)
        for a in hapto:
            rw2.AddBond(a, m_idx, Chem.BondType.DATIVE)
        mol = rw2.GetMol()
    symbols = tuple(a.GetSymbol() for a in mol.GetAtoms())
    title = _title(isomer, comp, "full", "", label).replace("RDKit ETKDG with donors fixed", how)
    note = ""
    contact = closest_contact(mol, coords)
    if contact is not None:
        d, i, j, limit = contact
        if d < limit:
            note = (
                f"clash: {symbols[i]}{i + 1}...{symbols[j]}{j + 1} of two ligands {d:.2f} A apart "
                f"(below {CLASH_FRACTION:g} x the vdW sum, {limit:.2f} A); optimise before use"
            )
            title += f"; WARNING {note}"
    block = _molblock(mol, title, isomer, comp, "full", note)
    return Structure(isomer.id, "full", title, symbols, tuple(coords), comp.charge, note, block)  # type: ignore[arg-type]


#: UFF steps for relieving clashes (the metal and donor atoms are held fixed).
_UFF_STEPS = 2000


def _uff_relax(mol, pos, fixed):
    """Ligand atoms relaxed with RDKit's UFF, the metal and every fixed
    (donor or ring) atom held in place, so the polyhedron and the isomer
    are unchanged; None where UFF lacks parameters."""
    import numpy as np
    from rdkit import Chem, rdBase
    from rdkit.Chem import AllChem
    from rdkit.Geometry import Point3D

    m = Chem.Mol(mol)
    m.RemoveAllConformers()
    conf = Chem.Conformer(m.GetNumAtoms())
    for k, p in enumerate(pos):
        conf.SetAtomPosition(k, Point3D(*map(float, p)))
    m.AddConformer(conf, assignId=True)
    with rdBase.BlockLogs():
        if not AllChem.UFFHasAllMoleculeParams(m):
            return None
        ff = AllChem.UFFGetMoleculeForceField(m, ignoreInterfragInteractions=False)
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


def _vdw(mol):
    import numpy as np

    return np.array([vdw_radius(a.GetAtomicNum()) if a.GetAtomicNum() else 1.5 for a in mol.GetAtoms()])


#: Rotor search: angles tried per ligand and passes over the ligands.
_ROTOR_STEPS = 36
_ROTOR_PASSES = 3


def _relieve_clashes(mol, pos, fixed):
    """Turn each monodentate ligand about its M-donor axis (its donor and
    the metal stay put) to the angle that makes its worst contact with the
    other ligands least bad (distance / vdW sum), a few greedy passes; only
    while some contact is below the clash limit.  Returns (positions,
    number of ligands turned)."""
    import numpy as np

    frag = _fragments(mol)
    rv = _vdw(mol)
    n = len(frag)
    members: dict[int, list[int]] = {}
    for i in range(1, n):
        members.setdefault(frag[i], []).append(i)
    metal_nb = {nb.GetIdx() for nb in mol.GetAtomWithIdx(0).GetNeighbors()}
    rotors = []
    for f, atoms in sorted(members.items()):
        donors = [a for a in atoms if a in metal_nb or a in fixed]
        if len(donors) == 1 and len(atoms) > 1:
            rotors.append((atoms, donors[0]))
    pos = np.array(pos, dtype=float)

    def worst(atoms, pts):
        """Worst distance / clash limit between the ligand at ``pts`` and the rest."""
        mask = np.ones(n, dtype=bool)
        mask[atoms] = False
        mask[0] = False
        if not mask.any():
            return np.inf
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
            best = (worst(atoms, base), 0)
            for k in range(1, _ROTOR_STEPS):
                t = 2 * np.pi * k / _ROTOR_STEPS
                c, s_ = np.cos(t), np.sin(t)
                rot = base * c + np.cross(axis, base) * s_ + np.outer(base @ axis, axis) * (1 - c)
                w = worst(atoms, rot)
                if w > best[0] + 1e-9:
                    best = (w, k, rot)
            if best[1]:
                pos[atoms] = best[2]
                turned.add(donor)
                changed = True
        if not changed:
            break
    return pos, len(turned)


def closest_contact(mol, coords) -> tuple[float, int, int, float] | None:
    """The closest pair of atoms of two different ligands (no path between
    them that avoids the metal, atom 0), as (distance, i, j, clash limit
    for that pair), the pair chosen by distance / limit; None with one ligand."""
    import numpy as np

    n = mol.GetNumAtoms()
    if n < 3:
        return None
    frag = _fragments(mol)
    xyz = np.array(coords, dtype=float)
    rv = _vdw(mol)
    best = None
    for i in range(1, n):
        for j in range(i + 1, n):
            if frag[i] == frag[j]:
                continue
            d = float(np.linalg.norm(xyz[i] - xyz[j]))
            limit = CLASH_FRACTION * float(rv[i] + rv[j])
            key = d / limit
            if best is None or key < best[0]:
                best = (key, d, i, j, limit)
    if best is None:
        return None
    return best[1], best[2], best[3], best[4]


def _align(pos, fixed: dict[int, Vec]):
    """Rotate (proper rotation only, so chirality is kept) and translate the
    embedded coordinates onto the fixed targets (Kabsch)."""
    import numpy as np

    idx = sorted(fixed)
    p = pos[idx]
    q = np.array([fixed[i] for i in idx], dtype=float)
    pc, qc = p.mean(axis=0), q.mean(axis=0)
    h = (p - pc).T @ (q - qc)
    u, _, vt = np.linalg.svd(h)
    d = np.sign(np.linalg.det(vt.T @ u.T)) or 1.0
    r = vt.T @ np.diag([1.0, 1.0, d]) @ u.T
    return (pos - pc) @ r.T + qc


def _molblock(mol, title: str, isomer: Isomer, comp: Composition, kind: str, warning: str = "") -> str:
    from rdkit import Chem

    mol.SetProp("_Name", title[:200])
    block = Chem.MolToMolBlock(mol)
    props = [
        ("formula", comp.formula),
        ("isomer", isomer.id),
        ("point_group", isomer.point_group),
        ("geometry", isomer.geometry.symbol),
        ("structure", "full ligands" if kind == "full" else "DONOR-ONLY CORE"),
        ("charge", str(comp.charge)),
    ]
    if warning:
        props.append(("warning", warning))
    tail = "".join(f">  <{k}>\n{v}\n\n" for k, v in props)
    return block + tail


def to_xyz(structure: Structure) -> str:
    """One XYZ block: atom count, the title line, then 'El x y z' in angstrom."""
    lines = [str(len(structure.symbols)), structure.title.replace("\n", " ")]
    for sym, (x, y, z) in zip(structure.symbols, structure.coords):
        lines.append(f"{sym:<2} {x:12.6f} {y:12.6f} {z:12.6f}".replace("-0.000000", " 0.000000"))
    return "\n".join(lines) + "\n"


def to_sdf(structures: Iterable[Structure]) -> str:
    """An SD file of the given structures, one record each."""
    return "".join(s.molblock + "$$$$\n" for s in structures)
