"""The two enantiomers' starting structures are exact mirror images of each other.

Reference points: a chiral isomer and its enantiomer are related by an improper operation (reflection,
inversion or improper rotation) and by no proper rotation (the definition of chirality, IUPAC Gold Book,
"chirality"); pymatgen's KabschMatcher / BruteForceOrderMatcher (proper-rotation Kabsch fits, W. Kabsch,
Acta Cryst. A32 (1976) 922) are the outside reference for "not superimposable".
"""

from __future__ import annotations

import numpy as np
import pytest

from enumerator.caches import clear
from enumerator.structures import embed as embed_module
from enumerator.structures.build import build_structure, embed_ahead, embedding_items, structures_for
from enumerator.structures.embed import assemble, ligand_units
from enumerator.structures.mirror import mirror_of, unit_images
from enumerator.workflow.pipeline import analyse

# [RuCl2(CO)2(PPh3)2] and its dppe chelate: one chiral (all-cis) isomer each (M(a2)(b2)(c2), M(AA)b2c2; common
# practice).  [Pt(py)(NH3)(NO2)ClBrI]: the classic Mabcdef complex, 15 geometric isomers, all chiral, 15 pairs
# (from memory: the Pt(IV) complex of Essen and Gel'man, 1956, prepared to test that count).  [Co(en)3]3+ and
# [Ru(bpy)3]2+: the textbook Delta/Lambda pairs (common practice), whose chelates the enumeration spells from
# the other end in the image, so the mirror relabels each ligand by its symmetry.
PAIRS = {
    "[RuCl2(CO)2(PPh3)2]": 1,
    "[RuCl2(CO)2(dppe)]": 1,
    "[Pt(py)(NH3)(NO2)ClBrI]": 15,
    "[Co(en)3]3+": 1,
    "[Ru(bpy)3]2+": 1,
}


def _block_positions(structure) -> tuple[list[str], np.ndarray]:
    """Elements and coordinates as written in the SDF record (4 decimals)."""
    from rdkit import Chem

    mol = Chem.MolFromMolBlock(structure.molblock, removeHs=False, sanitize=False)
    return [a.GetSymbol() for a in mol.GetAtoms()], np.array(mol.GetConformer().GetPositions())


def _pairs(result):
    byid = {i.id: i for i in result.isomers}
    return [(i, byid[i.enantiomer]) for i in result.isomers if i.chiral and i.id.endswith("a")]


def _pmg(symbols, coords):
    from pymatgen.core import Molecule

    return Molecule(list(symbols), [list(map(float, c)) for c in coords])


@pytest.mark.parametrize("formula", list(PAIRS))
def test_the_second_enantiomer_is_the_exact_mirror_image_of_the_first(formula):
    import warnings

    from pymatgen.analysis.molecule_matcher import BruteForceOrderMatcher, KabschMatcher

    res = analyse(formula, geometry="OC-6")
    pairs = _pairs(res)
    assert len(pairs) == PAIRS[formula]
    built = {s.isomer_id: s for s in structures_for(res)}
    comp = res.composition
    for a, b in pairs:
        sa, sb = built[a.id], built[b.id]
        assert sa.kind == sb.kind == "full"
        assert sb.title.count(f"mirror image of isomer {a.id}") == 1 and "mirror image" not in sa.title
        assert sb.note == sa.note
        el_a, pa = _block_positions(sa)
        el_b, pb = _block_positions(sb)
        # independent of the correspondence: some improper operation of the octahedron takes the written atoms
        # of 'a' onto those of 'b', element onto element, to the 4 decimals written (one unit of the last place)
        reflected = [
            op.array
            for op in a.geometry.operations
            if not op.proper and _same_atoms(el_a, pa @ op.array.T, el_b, pb, 1e-4)
        ]
        assert reflected
        # and the atom correspondence of the mirror: atom j of 'b' is the image of atom source[j] of 'a'
        ma, fa, _, spa = assemble(ligand_units(a), comp)
        mb, fb, _, spb = assemble(ligand_units(b), comp)
        mirror = mirror_of(a, b, (ma, fa, spa), (mb, fb, spb))
        assert mirror is not None and mirror.source_id == a.id
        assert [el_a[k] for k in mirror.source] == el_b
        assert np.abs(mirror.apply(pa) - pb).max() <= 1e-4
        # not superimposable by a proper rotation: whole molecules in corresponding order (heavy atoms) ...
        heavy = [j for j, e in enumerate(el_b) if e != "H"]
        src = [mirror.source[j] for j in heavy]
        _, rmsd = KabschMatcher(_pmg([el_a[k] for k in src], pa[src])).fit(_pmg([el_b[j] for j in heavy], pb[heavy]))
        assert rmsd > 0.1
        # ... and the donor cores (metal and donors, each ligand unit's donors standing for that unit, so that a
        # chelate's links count) under every relabelling of like units and like donors, while the core of 'b'
        # does fit the core of 'a' turned inside out (x -> -x): they are enantiomers, not one isomer written twice
        core_a = _pmg(*_core(sa, fa, a, _units_in_order(a)))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            fits = [
                (
                    BruteForceOrderMatcher(core_a).fit(_pmg(*_core(sb, fb, b, order)))[1],
                    BruteForceOrderMatcher(core_a).fit(_pmg(*_core(sb, fb, b, order, -1.0)))[1],
                )
                for order in _like_orders(b)
            ]
        assert min(f for f, _ in fits) > 0.1 and min(g for _, g in fits) < 1e-3


def _same_atoms(el_a, pa, el_b, pb, tol) -> bool:
    """Each atom of 'b' has exactly one atom of 'a' of its element within ``tol`` (per coordinate)."""
    used = set()
    for e, p in zip(el_b, pb):
        hits = [k for k, (f, q) in enumerate(zip(el_a, pa)) if f == e and np.abs(q - p).max() <= tol]
        if len(hits) != 1 or hits[0] in used:
            return False
        used.add(hits[0])
    return len(used) == len(el_a)


#: Stand-in elements for the ligand units of a donor core (a unit's donors share one)
_STAND_INS = ("He", "Ne", "Ar", "Kr", "Xe", "Rn")


def _units_in_order(isomer) -> list[int]:
    return sorted({s.unit for s in isomer.sites})


def _like_orders(isomer):
    """Every order of the isomer's units that only exchanges units of the same ligand."""
    import itertools

    units = _units_in_order(isomer)
    ligand = {s.unit: s.ligand for s in isomer.sites}
    for order in itertools.permutations(units):
        if all(ligand[u] == ligand[v] for u, v in zip(units, order)):
            yield list(order)


def _core(structure, fixed, isomer, order, sign=1.0):
    """The metal and the held donor atoms of a written structure, each donor as the stand-in of its unit's place
    in ``order``; ``sign`` -1 turns the core inside out."""
    symbols, coords = [structure.symbols[0]], [structure.coords[0]]
    for k in sorted(fixed)[1:]:
        p = np.array(structure.coords[k])
        site = max(isomer.sites, key=lambda s: float(np.dot(s.position, p)))  # the site in its direction
        symbols.append(_STAND_INS[order.index(site.unit)])
        coords.append(tuple(sign * x for x in structure.coords[k]))
    return symbols, coords


def test_mirrored_files_are_the_same_run_to_run_and_with_workers():
    # the mirror image is taken of the finished coordinates of 'a', which a worker process embeds to the same
    # bytes (RDKit ETKDG with a fixed random-number start, Riniker & Landrum, J. Chem. Inf. Model. 55 (2015)
    # 2562): the files are the same bytes with one process, with two, and on a second cold run
    res = analyse("[RuCl2(CO)2(PMe2Ph)2]", geometry="OC-6")

    def files(processes):
        clear()
        with embed_ahead([res], processes=processes) as ahead:
            return [(s.isomer_id, s.title, s.coords, s.molblock) for s in structures_for(res, ahead=ahead)]

    one = files(1)
    assert any("mirror image of isomer 1a" in title for _, title, _, _ in one)
    assert files(2) == one and files(1) == one


def test_the_first_enantiomer_and_every_other_isomer_are_as_before():
    # only the second enantiomer of a pair changes: the others are the structures build_structure makes alone
    res = analyse("[RuCl2(CO)2(PPh3)2]", geometry="OC-6")
    comp = res.composition
    for i, s in zip(res.isomers, structures_for(res)):
        if i.id != "1b":
            assert s == build_structure(i, comp)


def test_without_its_partner_an_enantiomer_is_embedded_as_before():
    # a --limit that keeps '1a' only, and '1b' asked for alone: embedded on its own, no mirror in the title
    whole = analyse("[RuCl2(CO)2(PPh3)2]", geometry="OC-6")
    cut = analyse("[RuCl2(CO)2(PPh3)2]", geometry="OC-6", limit=1)
    assert [i.id for i in cut.isomers] == ["1a"]
    assert [i.id for i, _ in embedding_items([cut])] == ["1a"]
    b = whole.isomers[1]
    alone = build_structure(b, whole.composition)
    mirrored = structures_for(whole)[1]
    assert alone.isomer_id == mirrored.isomer_id == "1b"
    assert "mirror image" not in alone.title and "mirror image of isomer 1a" in mirrored.title
    assert alone.symbols == mirrored.symbols and alone.coords != mirrored.coords  # the contract change


def test_an_eta_ring_is_not_mirrored_and_its_enantiomer_is_embedded():
    # [CpFe(CO)(PPh3)I] is chiral at iron (a classic chiral-at-metal piano stool; from memory).  The Cp ring's
    # turn about its axis is chosen to keep clear of the other ligands (placement.ring_positions), not as the
    # mirror image of the other enantiomer's: the held ring atoms do not correspond, so '1b' is embedded
    res = analyse("[CpFe(CO)(PPh3)I]")
    a, b = _pairs(res)[0]
    assert unit_images(a, b)  # the donor sites themselves do map
    comp = res.composition
    ma, fa, _, spa = assemble(ligand_units(a), comp)
    mb, fb, _, spb = assemble(ligand_units(b), comp)
    assert mirror_of(a, b, (ma, fa, spa), (mb, fb, spb)) is None
    assert [i.id for i, _ in embedding_items([res])] == ["1a", "1b"]
    sb = structures_for(res)[1]
    assert sb.kind == "full" and "mirror image" not in sb.title


def test_a_pair_is_only_mirrored_onto_its_own_partner():
    res = analyse("[Pt(py)(NH3)(NO2)ClBrI]", geometry="OC-6")
    one, other = _pairs(res)[:2]
    assert unit_images(one[0], other[1]) == ()  # 1a and 2b are not enantiomers
    assert unit_images(one[1], one[0])  # the relation is symmetric


def _count_embeddings(monkeypatch, results) -> int:
    """ETKDG embeddings actually run (misses of the memoised embed._embedded) while the structures are built."""
    runs = []
    inner = embed_module._embedded

    def counting(*key):
        before = inner.cache_info().misses
        out = inner(*key)
        runs.append(inner.cache_info().misses - before)
        return out

    clear()
    monkeypatch.setattr(embed_module, "_embedded", counting)
    with embed_ahead(results, processes=1) as ahead:
        for r in results:
            structures_for(r, ahead=ahead)
    monkeypatch.undo()
    return sum(runs)


def test_the_ruthenium_example_needs_fewer_embeddings(monkeypatch):
    # the four complexes of examples/ruthenium/ru_dicarbonyl.toml; before the mirror every distinct whole-complex
    # molecule was embedded (18: a 13CO isotopologue shares its parent's); now each chiral pair's 'b' is not,
    # which leaves 14 (measured: one fewer for each of the three parents and for the label's '1b'; the label's
    # '3b' shared its parent's '1b' embedding before and is mirrored now, and its '3a' still needs its own)
    from enumerator.structures.embed import embed_key

    formulas = ["[RuCl2(CO)2(PPh3)2]", "[RuCl2(CO)2(PMe2Ph)2]", "[RuCl2(CO)2(dppe)]", "[RuCl2(CO)(13CO)(PPh3)2]"]
    results = [analyse(f, geometry="OC-6") for f in formulas]

    def distinct(items):
        return len({embed_key(*assemble(ligand_units(i), c)[:2]) for i, c in items})

    every = [(i, r.composition) for r in results for i in r.isomers]
    assert distinct(every) == 18
    assert distinct(embedding_items(results)) == 14
    assert _count_embeddings(monkeypatch, results) == 14


def test_a_chelate_without_the_symmetry_or_with_a_configuration_is_embedded():
    # acac as the catalogue writes it (one resonance form, CC(=O)C=C([O-])C) has no symmetry that swaps its
    # oxygens, which the mirror of Delta-[Cr(acac)3] would need; a diamine with set stereocentres
    # ((R,R)-cyclohexane-1,2-diamine, SMILES written from its structure) would come out as its own enantiomer
    from enumerator.isomers.enumeration import enumerate_isomers
    from enumerator.model.composition import Composition, LigandKind
    from enumerator.rules.ruleset import load_rules

    res = analyse("[Cr(acac)3]", geometry="OC-6")
    a, b = _pairs(res)[0]
    assert unit_images(a, b) and [i.id for i, _ in embedding_items([res])] == ["1a", "1b"]
    oc = load_rules().geometry("OC-6")
    for smiles, mirrored in (("[NH2:1]C1CCCCC1[NH2:2]", True), ("[NH2:1][C@@H]1CCCC[C@H]1[NH2:2]", False)):
        chxn = LigandKind("chxn", ("N", "N"), meta=(("smiles", smiles),))
        comp = Composition("[Co(chxn)3]3+", ((chxn, 3),), metal="Co", charge=3)
        a, b = enumerate_isomers(comp, oc).isomers
        ma, fa, _, spa = assemble(ligand_units(a), comp)
        mb, fb, _, spb = assemble(ligand_units(b), comp)
        assert (mirror_of(a, b, (ma, fa, spa), (mb, fb, spb)) is not None) is mirrored
