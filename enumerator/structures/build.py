"""Starting structures (XYZ, SDF) of each isomer's idealised coordination sphere.

These are *starting geometries* for a quantum-chemical optimisation, not
optimised structures: the donors sit on the ideal polyhedron
(:mod:`.placement`).  Two kinds of structure come out:

* ``full`` -- every ligand has a SMILES in the catalogue (donor atoms
  carrying atom-map numbers 1..denticity in chain order).  The whole complex
  is built as one RDKit molecule and embedded with the metal and donors held
  (:mod:`.embed`); if that fails, each ligand alone, then put together.
  Close contacts between ligands are relieved (:mod:`.relax`); what is left
  goes into the note, the title and the SDF ``warning`` field.  The second
  enantiomer of a chiral pair ('1b' after '1a' in the same call of
  :func:`structures_for`) is not embedded: it is the exact mirror image of its
  partner's finished coordinates (:mod:`.mirror`), atom for atom, and its title
  says so ("mirror image of isomer 1a"); where the two do not correspond
  exactly (an η-ring, say) or the partner is not in the call, it is embedded
  on its own.  :func:`embedding_items` lists the isomers still to embed.
* ``core`` -- otherwise (abstract letters, a ligand without SMILES, an
  embedding failure): the metal and the donor atoms only.  The title/comment
  line then begins ``DONOR-ONLY CORE`` and says why.  Labels that are not
  element symbols (abstract 'a', 'b', 'M') become dummy atoms: ``X`` in XYZ,
  atomic number 0 in SDF.

>>> from enumerator.workflow.pipeline import analyse
>>> from enumerator.structures.formats import to_xyz
>>> r = analyse("Ma4b2", geometry="OC-6")
>>> s = build_structure(r.isomers[0], r.composition)
>>> s.kind, len(s.symbols)
('core', 7)
>>> to_xyz(s).splitlines()[1].startswith("DONOR-ONLY CORE")
True
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from enumerator.analyses.views import ResultView
from enumerator.isomers.enumeration import Isomer, Site
from enumerator.model.composition import Composition
from enumerator.model.elements import atomic_number
from enumerator.structures.embed import (
    Embedded,
    EmbedFailed,
    EmbedKey,
    assemble,
    embed,
    hydrogens_by_unit,
    ligand_units,
)
from enumerator.structures.formats import molblock
from enumerator.structures.mirror import Mirror, mirror_of
from enumerator.structures.placement import Vec, bond_length, element_or_none, round_coordinate
from enumerator.structures.pool import EmbedAhead
from enumerator.structures.relax import CLASH_FRACTION, closest_contact, relieve_clashes, uff_relax
from enumerator.structures.structure import Structure

__all__ = ["Structure", "build_structure", "embed_ahead", "embedding_items", "structures_for"]

_HOW = "RDKit ETKDG with donors fixed"


def _title(isomer: Isomer, comp: Composition, kind: str, note: str, extra: str = "") -> str:
    group = f"{isomer.point_group}{', ' + extra if extra else ''}"
    base = f"{comp.formula} isomer {isomer.id} ({group}) on {isomer.geometry.symbol}"
    if kind == "core":
        return f"DONOR-ONLY CORE (ligands not built: {note}): {base}; idealised starting geometry, charge {comp.charge}"
    return f"{base}; full ligands, {_HOW}; idealised starting geometry, charge {comp.charge}"


def build_structure(
    isomer: Isomer,
    composition: Composition,
    *,
    label: str = "",
    ahead: Mapping[EmbedKey, Embedded] | None = None,
) -> Structure:
    """The starting structure of one isomer: full ligands if possible, else the donor-only core.

    Parameters
    ----------
    isomer : Isomer
        One stereoisomer.
    composition : Composition
        Its composition (catalogue SMILES for full ligands).
    label : str, optional
        Added to the title line (e.g. the IUPAC descriptor).
    ahead : Mapping, optional
        Embeddings already worked out (:meth:`.pool.EmbedAhead.ready`); the same coordinates as without.

    Returns
    -------
    Structure
    """
    return _build(isomer, composition, label, ahead)[0]


def _build(
    isomer: Isomer, comp: Composition, label: str, ahead: Mapping[EmbedKey, Embedded] | None
) -> tuple[Structure, _Full | None]:
    """The structure as :func:`build_structure` makes it, and its full build (None for a core)."""
    reason = _why_not_full(comp)
    if not reason:
        try:
            full = _embedded_full(isomer, comp, ahead)
        except EmbedFailed as exc:
            reason = str(exc)
        else:
            return _finish(isomer, comp, label, full), full
    return _core(isomer, comp, reason, label), None


def structures_for(
    result: ResultView,
    labels: Mapping[str, str] | None = None,
    progress: Callable[[str, int, int], None] | None = None,
    ahead: EmbedAhead | None = None,
) -> tuple[Structure, ...]:
    """One structure per isomer of a result, in listing order; ``labels`` by isomer id go into the titles.

    The whole-complex embeddings are worked out ahead in worker processes when there are enough of them and
    more than one CPU (:mod:`.pool`); the structures are the same as in one process.  An enantiomer listed after
    its partner is that partner's finished structure reflected (:func:`.mirror.mirror_of`), where the two
    correspond atom for atom; otherwise it is embedded as any other isomer.

    Parameters
    ----------
    result : Result
        An analysed formula.
    labels : Mapping[str, str], optional
        Isomer id -> text added to the title (e.g. the IUPAC descriptor).
    progress : callable, optional
        Called as ``progress(isomer id, done, total)`` after each structure (a progress bar).
    ahead : EmbedAhead, optional
        An open :class:`.pool.EmbedAhead` given these isomers among others (a report opens one for all its
        complexes); default: one opened here for this result's isomers.

    Returns
    -------
    tuple of Structure
    """
    if ahead is None:
        with embed_ahead([result]) as own:
            return structures_for(result, labels, progress, own)
    labels = labels or {}
    comp = result.composition
    built: dict[str, _Full] = {}  # the chiral full builds so far, by isomer id: sources of their mirror images
    out = []
    for k, i in enumerate(result.isomers, 1):
        label = labels.get(i.id, "")
        source = built.get(i.enantiomer) if i.enantiomer else None
        s = _mirrored(i, comp, label, source) if source is not None else None
        if s is None:
            s, full = _build(i, comp, label, ahead.ready(i, comp))
            if full is not None and i.enantiomer:
                built[i.id] = full
        out.append(s)
        if progress is not None:
            progress(i.id, k, len(result.isomers))
    return tuple(out)


def embedding_items(results: Iterable[ResultView]) -> list[tuple[Isomer, Composition]]:
    """The isomers whose whole complexes :func:`structures_for` will embed, with their compositions.

    Those that can have full structures (an element as metal, a SMILES for every ligand), less each
    enantiomer listed after its partner when it is built as that partner's mirror image (:mod:`.mirror`).

    Parameters
    ----------
    results : iterable of Result
        The results whose structures will be built.

    Returns
    -------
    list of (Isomer, Composition)
        In listing order, result by result.
    """
    items: list[tuple[Isomer, Composition]] = []
    for r in results:
        comp = r.composition
        if _why_not_full(comp):
            continue
        seen: dict[str, Isomer] = {}
        for i in r.isomers:
            partner = seen.get(i.enantiomer) if i.enantiomer else None
            seen[i.id] = i
            if partner is None or _pair_mirror(partner, i, comp) is None:
                items.append((i, comp))
    return items


def embed_ahead(results: Iterable[ResultView], processes: int | None = None) -> EmbedAhead:
    """An :class:`.pool.EmbedAhead` (a context manager) for the isomers of the results whose whole complexes
    will be embedded (:func:`embedding_items`).

    Parameters
    ----------
    results : iterable of Result
        The results whose structures will be built.
    processes : int, optional
        The most processes (default: the CPUs available, capped by ``ISOSIEVE_EMBED_PROCESSES``).

    Returns
    -------
    EmbedAhead
    """
    return EmbedAhead(embedding_items(results), processes)


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
        x, y, z = s.position
        coords.append((round_coordinate(d * x), round_coordinate(d * y), round_coordinate(d * z)))
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
    block = molblock(mol, title, isomer, comp, "core")
    return Structure(isomer.id, "core", title, tuple(symbols), tuple(coords), comp.charge, reason, block)


def _embed_per_unit(mol, units: Sequence[Sequence[Site]], spans: Sequence[tuple[int, int]], comp: Composition):
    """Each ligand embedded on its own against the metal and its fixed donors, then put together."""
    pos = np.zeros((mol.GetNumAtoms(), 3))
    h_whole = hydrogens_by_unit(mol, spans)
    for k, sites in enumerate(units):
        mu, fu, _, su = assemble([sites], comp)
        pu = embed(mu, fu)
        off, n = spans[k]
        pos[off : off + n] = pu[1 : 1 + n]
        for hw, hu in zip(h_whole[k], hydrogens_by_unit(mu, su)[0]):
            pos[hw] = pu[hu]
    return pos


def _positions(mol, units, fixed, spans, comp: Composition, ahead=None) -> tuple[np.ndarray, str]:
    """Embedded and clash-relieved positions, and how they were made (for the title)."""
    how = _HOW
    try:
        pos = embed(mol, fixed, ahead)
    except EmbedFailed:
        pos = _embed_per_unit(mol, units, spans, comp)
        how = "RDKit ETKDG per ligand with donors fixed"
    pos, turned = relieve_clashes(mol, pos, fixed)
    if turned:
        how += f", {turned} monodentate ligand(s) turned about the M-donor axis to relieve contacts"
    contact = closest_contact(mol, pos)
    if contact is not None and contact[0] < contact[3]:
        relaxed = uff_relax(mol, pos, fixed)
        if relaxed is not None:
            pos = relaxed
            how += ", then UFF-relaxed with the metal and donor atoms held"
    return pos, how


def _clash_note(mol, coords: Sequence[Vec], symbols: Sequence[str]) -> str:
    """What remains of the worst contact, or ''."""
    contact = closest_contact(mol, coords)
    if contact is None:
        return ""
    d, i, j, limit = contact
    if d >= limit:
        return ""
    return (
        f"clash: {symbols[i]}{i + 1}...{symbols[j]}{j + 1} of two ligands {d:.2f} A apart "
        f"(below {CLASH_FRACTION:g} x the vdW sum, {limit:.2f} A); optimise before use"
    )


@dataclass(frozen=True)
class _Full:
    """A full structure's making: the isomer, the assembled molecule (before the η-ring bonds), its held
    atoms, η-ring atoms still to bond and unit spans (:func:`.embed.assemble`), the final positions and how
    they were made."""

    isomer: Isomer
    mol: Any
    fixed: Mapping[int, Vec]
    hapto: tuple[int, ...]
    spans: tuple[tuple[int, int], ...]
    positions: np.ndarray
    how: str


def _embedded_full(isomer: Isomer, comp: Composition, ahead=None) -> _Full:
    """The whole complex embedded at once; if RDKit fails on that, each ligand embedded on its own against the
    metal and its fixed donors, then put together; contacts relieved."""
    units = ligand_units(isomer)
    mol, fixed, hapto, spans = assemble(units, comp)
    pos, how = _positions(mol, units, fixed, spans, comp, ahead)
    pos.setflags(write=False)
    return _Full(isomer, mol, fixed, tuple(hapto), tuple(spans), pos, how)


def _pair_mirror(a: Isomer, b: Isomer, comp: Composition) -> Mirror | None:
    """How 'b' is 'a''s mirror image atom for atom, or None (either cannot be assembled, or they do not
    correspond exactly)."""
    try:
        mol_a, fixed_a, _, spans_a = assemble(ligand_units(a), comp)
        mol_b, fixed_b, _, spans_b = assemble(ligand_units(b), comp)
    except EmbedFailed:
        return None
    return mirror_of(a, b, (mol_a, fixed_a, spans_a), (mol_b, fixed_b, spans_b))


def _mirrored(isomer: Isomer, comp: Composition, label: str, source: _Full) -> Structure | None:
    """The structure of ``isomer`` as the exact mirror image of its enantiomer's finished one, or None when the
    two do not correspond exactly (:func:`.mirror.mirror_of`; the caller then embeds it)."""
    try:
        mol, fixed, hapto, spans = assemble(ligand_units(isomer), comp)
    except EmbedFailed:
        return None
    mirror = mirror_of(source.isomer, isomer, (source.mol, source.fixed, source.spans), (mol, fixed, spans))
    if mirror is None:
        return None
    pos = mirror.apply(source.positions)
    how = f"{source.how}, mirror image of isomer {source.isomer.id}"
    return _finish(isomer, comp, label, _Full(isomer, mol, fixed, tuple(hapto), tuple(spans), pos, how))


def _finish(isomer: Isomer, comp: Composition, label: str, full: _Full) -> Structure:
    """The structure from its final positions: held atoms at their exact ideal places, coordinates rounded as
    written, η-ring bonds added, the remaining worst contact in the note and title."""
    from rdkit import Chem
    from rdkit.Geometry import Point3D

    mol = Chem.Mol(full.mol)
    pos = np.array(full.positions, dtype=float)
    mol.RemoveAllConformers()
    mol.AddConformer(Chem.Conformer(mol.GetNumAtoms()), assignId=True)
    for i, p in full.fixed.items():  # exact ideal positions for the fixed atoms
        pos[i] = p
    conf = mol.GetConformer(0)
    coords: list[Vec] = []
    for k in range(mol.GetNumAtoms()):
        c = (round_coordinate(pos[k][0]), round_coordinate(pos[k][1]), round_coordinate(pos[k][2]))
        coords.append(c)
        conf.SetAtomPosition(k, Point3D(*c))
    if full.hapto:
        rw2 = Chem.RWMol(mol)
        for a in full.hapto:
            rw2.AddBond(a, 0, Chem.BondType.DATIVE)
        mol = rw2.GetMol()
    symbols = tuple(a.GetSymbol() for a in mol.GetAtoms())
    title = _title(isomer, comp, "full", "", label).replace(_HOW, full.how)
    note = _clash_note(mol, coords, symbols)
    if note:
        title += f"; WARNING {note}"
    block = molblock(mol, title, isomer, comp, "full", note)
    return Structure(isomer.id, "full", title, symbols, tuple(coords), comp.charge, note, block)
