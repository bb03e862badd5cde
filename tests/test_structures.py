"""Starting structures: geometry of the coordination sphere, full ligands, files."""

from __future__ import annotations

import math

import numpy as np
import pytest
from click.testing import CliRunner

from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.model.composition import Composition, LigandKind
from enumerator.rules.ruleset import load_rules
from enumerator.structures import bond_length, build_structure, to_sdf, to_xyz

# Hand-built catalogue-style kinds (as in the catalogue: donor atoms carry atom maps 1..denticity).
# SMILES written from the ligands' structures (common practice); CO as the
# charge-separated [C-]#[O+] that RDKit sanitises.
CO = LigandKind("CO", ("C",), reporter="CO", meta=(("smiles", "[C-:1]#[O+]"),))
NH3 = LigandKind("NH3", ("N",), meta=(("smiles", "[NH3:1]"),))
CL = LigandKind("Cl", ("Cl",), meta=(("charge", -1), ("smiles", "[Cl-:1]")))
PPH3 = LigandKind("PPh3", ("P",), meta=(("smiles", "[P:1](c1ccccc1)(c1ccccc1)c1ccccc1"),))
EN = LigandKind("en", ("N", "N"), meta=(("smiles", "[NH2:1]CC[NH2:2]"),))
CP = LigandKind("Cp", ("C",), ring=True, meta=(("hapticity", 5), ("smiles", "[cH-]1cccc1")))


def _oc():
    return load_rules().geometry("OC-6")


def _isomers(comp):
    return enumerate_isomers(comp, _oc()).isomers


def _pmg_group(symbols, coords):
    from pymatgen.core import Molecule
    from pymatgen.symmetry.analyzer import PointGroupAnalyzer

    return PointGroupAnalyzer(Molecule(list(symbols), list(coords))).sch_symbol


def test_bond_length_is_sum_of_rdkit_covalent_radii():
    from rdkit import Chem

    pt = Chem.GetPeriodicTable()  # reference library: RDKit's periodic table
    assert bond_length("Ru", "P") == pytest.approx(pt.GetRcovalent("Ru") + pt.GetRcovalent("P"))
    assert bond_length("M", "a") == 2.0  # placeholder distance, common practice


def test_core_point_groups_agree_with_pymatgen():
    # Donor-only cores of [RuCl2(CO)2(NH3)2]-type isomers (no SMILES given -> core).
    # pymatgen's PointGroupAnalyzer is the outside reference for each isomer's group.
    bare = [LigandKind(k.name, k.donors) for k in (CL, CO, NH3)]
    comp = Composition("[RuCl2(CO)2(NH3)2]", tuple((k, 2) for k in bare), metal="Ru")
    seen = set()
    for iso in _isomers(comp):
        s = build_structure(iso, comp)
        assert s.kind == "core" and s.title.startswith("DONOR-ONLY CORE")
        pg = _pmg_group(s.symbols, s.coords)
        # pymatgen writes C*v / D*h for linear; none here
        assert pg == iso.point_group, (iso.id, pg, iso.point_group)
        seen.add(pg)
    assert seen == {"C1", "C2v", "D2h"}  # Ma2b2c2: 5 geometric isomers, groups C1, C2v x3, D2h (common practice)


def test_core_angles_are_ideal_octahedral():
    comp = Composition("Mo(CO)6-core", ((LigandKind("CO", ("C",)), 6),), metal="Mo")
    s = build_structure(_isomers(comp)[0], comp)
    v = np.array(s.coords[1:])
    cosang = (v @ v.T) / np.outer(np.linalg.norm(v, axis=1), np.linalg.norm(v, axis=1))
    angles = sorted({round(math.degrees(math.acos(np.clip(c, -1, 1)))) for c in cosang[np.triu_indices(6, 1)]})
    assert angles == [90, 180]  # ideal octahedron: cis 90 deg, trans 180 deg (fact of the trade)


def test_full_ligands_formula_and_fixed_donors():
    from rdkit import Chem
    from rdkit.Chem.rdMolDescriptors import CalcMolFormula

    comp = Composition("[RuCl2(CO)2(PPh3)2]", ((CL, 2), (CO, 2), (PPH3, 2)), metal="Ru")
    iso = _isomers(comp)[-1]  # the all-trans isomer (D2h)
    s = build_structure(iso, comp, label="OC-6-11")
    assert s.kind == "full" and "DONOR-ONLY" not in s.title and "OC-6-11" in s.title
    mol = Chem.MolFromMolBlock(s.molblock, removeHs=False)
    assert mol is not None
    # RuCl2(CO)2(PPh3)2 is C38H30Cl2O2P2Ru (formula of the known complex, fact of the trade)
    assert CalcMolFormula(mol) == "C38H30Cl2O2P2Ru"
    pos = mol.GetConformer().GetPositions()
    assert np.allclose(pos[0], 0.0, atol=1e-4)  # metal at the origin
    for site in iso.sites:  # each donor sits on its site vector at the covalent distance
        d = bond_length("Ru", site.donor)
        hits = [k for k, a in enumerate(mol.GetAtoms()) if np.allclose(pos[k], d * np.array(site.position), atol=1e-3)]
        assert len(hits) == 1 and mol.GetAtomWithIdx(hits[0]).GetSymbol() == site.donor
    # no two atoms closer than 0.9 A (C-H 1.09 A is the shortest bond here; common practice)
    dist = np.linalg.norm(pos[:, None] - pos[None], axis=-1) + np.eye(len(pos)) * 9
    assert dist.min() > 0.9


def test_carbonyls_are_near_linear_and_output_deterministic():
    comp = Composition("[Mo(CO)4(NH3)2]", ((CO, 4), (NH3, 2)), metal="Mo")
    iso = _isomers(comp)[0]
    a, b = build_structure(iso, comp), build_structure(iso, comp)
    assert to_xyz(a) == to_xyz(b) and a.molblock == b.molblock  # same input, same bytes
    pos = np.array(a.coords)
    for k, sym in enumerate(a.symbols):
        if sym == "O":  # its carbon is the nearest C
            c = min((j for j, s in enumerate(a.symbols) if s == "C"), key=lambda j: np.linalg.norm(pos[j] - pos[k]))
            u, w = pos[0] - pos[c], pos[k] - pos[c]
            ang = math.degrees(math.acos(u @ w / np.linalg.norm(u) / np.linalg.norm(w)))
            assert ang > 165  # terminal M-C-O is close to linear (fact of the trade)
            assert 1.05 < np.linalg.norm(w) < 1.25  # C-O of a carbonyl ~1.13-1.15 A (from memory)


def test_chelate_and_ring_ligands():
    from rdkit import Chem

    comp = Composition("[Co(en)3]3+", ((EN, 3),), metal="Co", charge=3)
    s = build_structure(_isomers(comp)[0], comp)
    assert s.kind == "full" and len(s.symbols) == 1 + 3 * 12  # Co + 3 x C2H8N2
    mol = Chem.MolFromMolBlock(s.molblock, removeHs=False)
    assert Chem.GetFormalCharge(mol) == 3
    comp = Composition("CpMn(CO)3", ((CP, 1), (CO, 3)), metal="Mn")
    iso = enumerate_isomers(comp, load_rules().geometry("T-4")).isomers[0]  # the piano stool's frame
    s = build_structure(iso, comp)
    assert s.kind == "full"
    pos = np.array(s.coords)
    ring = pos[[k for k, sym in enumerate(s.symbols) if sym == "C"][:5]]
    centroid = ring.mean(axis=0)
    assert 1.6 < np.linalg.norm(centroid) < 1.95  # M-Cp(centroid) ~1.7-1.8 A in CpMn(CO)3 (from memory)
    site = np.array(next(st.position for st in iso.sites if st.ring))
    # the centroid lies on the ring's site direction and the ring plane is perpendicular to it (the model)
    assert np.allclose(centroid / np.linalg.norm(centroid), site, atol=1e-4)
    assert np.allclose((ring - centroid) @ site, 0.0, atol=1e-4)


def test_unusable_smiles_falls_back_to_marked_core():
    bad = LigandKind("L", ("P",), meta=(("smiles", "P(C)(C)C"),))  # no atom map on the donor
    comp = Composition("[CrL6]", ((bad, 6),), metal="Cr")
    s = build_structure(_isomers(comp)[0], comp)
    assert s.kind == "core" and "atom" in s.note and s.title.startswith("DONOR-ONLY CORE")
    assert s.symbols == ("Cr",) + ("P",) * 6


def test_cli_writes_files(tmp_path):
    from enumerator.cli import cli

    r = CliRunner().invoke(cli, ["structures", "Ma4b2", "--out", str(tmp_path / "o")])
    assert r.exit_code == 0, r.output
    files = sorted(p.name for p in (tmp_path / "o").iterdir())
    assert files == ["Ma4b2_1.xyz", "Ma4b2_2.xyz"]  # Ma4b2: trans and cis (fact of the trade)
    text = (tmp_path / "o" / "Ma4b2_1.xyz").read_text()
    assert text.splitlines()[0] == "7" and "DONOR-ONLY CORE" in text.splitlines()[1]
    r = CliRunner().invoke(cli, ["structures", "Ma4b2", "--out", str(tmp_path / "s"), "--format", "sdf"])
    assert r.exit_code == 0 and (tmp_path / "s" / "Ma4b2.sdf").read_text().count("$$$$") == 2
    assert to_sdf([]) == ""


def test_per_ligand_fallback_on_trigonal_bipyramid():
    # Fe(CO)5 (TBPY-5): the one-piece embedding fails in RDKit, each CO is then
    # embedded on its own against the fixed metal and donor.  Formula Fe(CO)5 =
    # C5FeO5 (fact of the trade); M-C-O near linear.
    from enumerator.workflow.pipeline import analyse

    r = analyse("[Fe(CO)5]")
    s = build_structure(r.isomers[0], r.composition)
    assert s.kind == "full" and sorted(s.symbols) == sorted(["Fe"] + ["C"] * 5 + ["O"] * 5)
    pos = np.array(s.coords)
    for k, sym in enumerate(s.symbols):
        if sym == "O":
            c = min((j for j, t in enumerate(s.symbols) if t == "C"), key=lambda j: np.linalg.norm(pos[j] - pos[k]))
            u, w = pos[0] - pos[c], pos[k] - pos[c]
            assert math.degrees(math.acos(u @ w / np.linalg.norm(u) / np.linalg.norm(w))) > 165


def test_closest_contact_flags_overlapping_ligands():
    # two chlorido ligands 0.5 A apart are a clash (non-bonded contact far
    # below 70% of the vdW sum, common practice); on opposite sites they are not
    from rdkit import Chem

    from enumerator.structures import CLASH_FRACTION, closest_contact

    mol = Chem.MolFromSmiles("[Mo](Cl)Cl", sanitize=False)
    d, i, j, limit = closest_contact(mol, [(0, 0, 0), (2.4, 0, 0), (2.4, 0.5, 0)])
    assert (i, j) == (1, 2) and abs(d - 0.5) < 1e-9 and d < limit
    pt = Chem.GetPeriodicTable()
    assert abs(limit - CLASH_FRACTION * 2 * pt.GetRvdw(17)) < 1e-9
    d, *_rest, limit = closest_contact(mol, [(0, 0, 0), (2.4, 0, 0), (-2.4, 0, 0)])
    assert d > limit


@pytest.mark.parametrize("formula", ["[RuCl2(CO)2(PPh3)2]", "[Mo(CO)3(PPh3)3]", "[Cr(CO)3(PCy3)3]"])
def test_written_structures_are_clash_free_or_say_so(formula):
    # invariant: a full structure either has no inter-ligand contact below
    # the clash limit, or its title, note and SDF record carry the warning
    from rdkit import Chem

    from enumerator.structures import closest_contact, structures_for
    from enumerator.workflow.pipeline import analyse

    res = analyse(formula, geometry="OC-6")
    for s in structures_for(res):
        if s.kind != "full":
            continue
        mol = Chem.MolFromMolBlock(s.molblock, removeHs=False, sanitize=False)
        d, _, _, limit = closest_contact(mol, s.coords)
        if d < limit:
            assert s.note.startswith("clash") and "WARNING" in s.title and "<warning>" in s.molblock
        else:
            assert s.note == "" and "WARNING" not in s.title
    if formula == "[RuCl2(CO)2(PPh3)2]":  # a known compound's isomers embed cleanly
        assert all(s.note == "" for s in structures_for(res))


def test_structure_set_names_files_and_lists_them(tmp_path):
    from pathlib import Path

    from enumerator.render.structures import structure_files, structure_listing
    from enumerator.structures import structure_set
    from enumerator.workflow.pipeline import analyse

    ss = structure_set(analyse("Ma4b2", geometry="OC-6"))
    assert [s.isomer_id for s in ss.structures] == ["1", "2"]
    assert "OC-6-22" in ss.structures[0].title  # the descriptor goes into the title
    assert [name for name, _ in structure_files(ss, "sdf")] == ["Ma4b2.sdf"]
    lines = structure_listing(ss, "xyz", Path("out")).splitlines()
    assert lines[0].startswith(str(Path("out") / "Ma4b2_1.xyz") + "  isomer 1: DONOR-ONLY CORE (")
    assert ss.to_dict()["structures"][1]["kind"] == "core"


def test_closest_contact_is_the_pairwise_minimum():
    # the all-pairs search must pick the pair a plain double loop picks (first smallest distance / limit in
    # (i, j) order, same atoms of one ligand skipped), on an embedded complex and on a tie (common practice)
    from rdkit import Chem

    from enumerator.structures import CLASH_FRACTION, closest_contact, structures_for
    from enumerator.workflow.pipeline import analyse

    def loop(mol, coords):
        frag = [0] * mol.GetNumAtoms()
        rw = Chem.RWMol(mol)
        for b in list(rw.GetAtomWithIdx(0).GetBonds()):
            rw.RemoveBond(b.GetBeginAtomIdx(), b.GetEndAtomIdx())
        for k, atoms in enumerate(Chem.GetMolFrags(rw.GetMol(), sanitizeFrags=False)):
            for a in atoms:
                frag[a] = k
        pt = Chem.GetPeriodicTable()
        rv = [pt.GetRvdw(a.GetAtomicNum()) for a in mol.GetAtoms()]
        best = None
        for i in range(1, len(frag)):
            for j in range(i + 1, len(frag)):
                if frag[i] != frag[j]:
                    d = math.dist(coords[i], coords[j])
                    limit = CLASH_FRACTION * (rv[i] + rv[j])
                    if best is None or d / limit < best[0]:
                        best = (d / limit, d, i, j, limit)
        return best[1:]

    s = structures_for(analyse("[RuCl2(CO)2(PMe2Ph)2]", geometry="OC-6"))[2]
    mol = Chem.MolFromMolBlock(s.molblock, removeHs=False, sanitize=False)
    got, want = closest_contact(mol, s.coords), loop(mol, s.coords)
    assert got[1:3] == want[1:3] and got[0] == pytest.approx(want[0], abs=1e-12)
    tie = Chem.MolFromSmiles("[Mo](Cl)(Cl)Cl", sanitize=False)
    coords = [(0, 0, 0), (2.4, 0, 0), (0, 2.4, 0), (-2.4, 0, 0)]  # 1-2 and 2-3 equally close: 1-2 comes first
    assert closest_contact(tie, coords)[1:3] == loop(tie, coords)[1:3] == (1, 2)


def test_an_isotopologue_embeds_as_its_parent():
    # distance geometry reads no mass number (ETKDG: Riniker & Landrum, J. Chem. Inf. Model. 55 (2015) 2562), so
    # the embedding is memoised without it: checked here with each embedding done cold, then warm
    from enumerator.caches import clear
    from enumerator.structures.embed import assemble, embed
    from enumerator.structures.embed import ligand_units as _units
    from enumerator.workflow.pipeline import analyse

    parent = analyse("[RuCl2(CO)2(PPh3)2]", geometry="OC-6")
    label = analyse("[RuCl2(CO)(13CO)(PPh3)2]", geometry="OC-6")
    mol, fixed, _, _ = assemble(_units(parent.isomers[0]), parent.composition)
    mol13, fixed13, _, _ = assemble(_units(label.isomers[0]), label.composition)
    assert [a.GetIsotope() for a in mol13.GetAtoms() if a.GetIsotope()] == [13] and fixed13 == fixed
    clear()
    cold = embed(mol, fixed)
    clear()
    cold13 = embed(mol13, fixed13)
    warm13 = embed(mol13, fixed13)
    assert np.array_equal(cold, cold13) and np.array_equal(cold13, warm13)
    warm13[0, 0] = 99.0  # the caller's copy: the memoised answer is not changed
    assert np.array_equal(embed(mol13, fixed13), cold13)


def _die(binary, held):
    """A worker that dies at once (as one killed for its memory would)."""
    import os

    os._exit(1)


def _files(structures):
    from enumerator.structures.formats import to_xyz

    return [(s.isomer_id, to_xyz(s), s.molblock) for s in structures]


def test_embeddings_in_worker_processes_give_the_same_bytes():
    # ETKDG with a fixed random-number start is deterministic per molecule (RDKit's EmbedMolecule, randomSeed;
    # Riniker & Landrum, J. Chem. Inf. Model. 55 (2015) 2562): the files of two worker processes equal those of
    # one process byte for byte, in the same order (common practice for a seeded pool: compare the bytes)
    from enumerator.caches import clear
    from enumerator.structures.build import embed_ahead, embedding_items, structures_for
    from enumerator.structures.pool import POOL_MIN_EMBEDDINGS
    from enumerator.workflow.pipeline import analyse

    res = analyse("[RuCl2(CO)2(PMe3)2]", geometry="OC-6")
    assert len(res.isomers) >= POOL_MIN_EMBEDDINGS
    clear()
    with embed_ahead([res], processes=1) as one:
        assert not one._futures  # one process: nothing worked out ahead
        serial = _files(structures_for(res, ahead=one))
    clear()
    with embed_ahead([res], processes=2) as two:
        # one per isomer, less '1b', the mirror image of '1a' (tests/test_structures_mirror.py)
        assert len(two._futures) == len(embedding_items([res])) == len(res.isomers) - 1
        pooled = _files(structures_for(res, ahead=two))
    assert pooled == serial and all(kind == "full" for kind in (s.kind for s in structures_for(res)))


def test_a_dead_worker_costs_time_not_the_structure(monkeypatch):
    # a worker that dies (a broken pool) leaves its isomers to be embedded in this process: same files
    from enumerator.structures import pool
    from enumerator.structures.build import embed_ahead, structures_for
    from enumerator.workflow.pipeline import analyse

    res = analyse("[RuCl2(CO)2(PMe3)2]", geometry="OC-6")
    serial = _files(structures_for(res, ahead=pool.EmbedAhead([], processes=1)))
    monkeypatch.setattr(pool, "embed_or_message", _die)
    with embed_ahead([res], processes=2) as broken:
        assert broken._futures
        assert _files(structures_for(res, ahead=broken)) == serial


def test_an_embedding_failure_sent_back_reads_as_before():
    # a worker sends a failure back as its message; the builder raises it, so the donor-only core says why
    from enumerator.structures.embed import EmbedFailed, assemble, embed, embed_key, ligand_units
    from enumerator.workflow.pipeline import analyse

    res = analyse("[RuCl2(CO)2(PMe3)2]", geometry="OC-6")
    mol, fixed, _, _ = assemble(ligand_units(res.isomers[0]), res.composition)
    with pytest.raises(EmbedFailed, match="^RDKit could not embed the ligands with the donor positions fixed$"):
        embed(mol, fixed, {embed_key(mol, fixed): "RDKit could not embed the ligands with the donor positions fixed"})


def test_the_process_count_from_the_environment(monkeypatch):
    from enumerator.errors import InputError
    from enumerator.structures.pool import ENV_PROCESSES, EmbedAhead, available_processes

    monkeypatch.setenv(ENV_PROCESSES, "1")
    assert available_processes() == 1
    assert EmbedAhead([])._processes == 1
    monkeypatch.setenv(ENV_PROCESSES, "0")
    with pytest.raises(InputError, match="ISOSIEVE_EMBED_PROCESSES='0' is not a whole number of processes"):
        available_processes()
    monkeypatch.delenv(ENV_PROCESSES)
    assert available_processes() >= 1


def test_isomers_handed_over_one_result_at_a_time_give_the_same_bytes():
    # a report hands each complex to the workers as soon as it is analysed (EmbedAhead.add): the files equal
    # those of one process byte for byte (seeded ETKDG: Riniker & Landrum 2015, as above); a key met again
    # (a 13CO-labelled isomer placed as its parent is) is not submitted again
    from enumerator.caches import clear
    from enumerator.structures.build import embedding_items, structures_for
    from enumerator.structures.pool import EmbedAhead
    from enumerator.workflow.pipeline import analyse

    first = analyse("[RuCl2(CO)2(PMe3)2]", geometry="OC-6")
    label = analyse("[RuCl2(CO)(13CO)(PMe3)2]", geometry="OC-6")
    clear()
    serial = [_files(structures_for(r, ahead=EmbedAhead([], processes=1))) for r in (first, label)]
    clear()
    with EmbedAhead(processes=2) as ahead:
        assert ahead._pool is None  # nothing handed over yet
        ahead.add(embedding_items([first]))
        submitted = len(ahead._futures)
        assert submitted == len(embedding_items([first])) < len(first.isomers)  # 1b is 1a's mirror image
        ahead.add(embedding_items([label]))
        assert len(ahead._futures) - submitted < len(embedding_items([label]))  # some reuse a parent's
        pooled = [_files(structures_for(r, ahead=ahead)) for r in (first, label)]
    assert pooled == serial


def test_a_single_embedding_is_not_sent_to_a_worker():
    # fewer than POOL_MIN_EMBEDDINGS distinct embeddings in all: no pool is started, the builder embeds here
    from enumerator.structures.build import embedding_items
    from enumerator.structures.pool import POOL_MIN_EMBEDDINGS, EmbedAhead
    from enumerator.workflow.pipeline import analyse

    res = analyse("[Cr(CO)5(PMe3)]")
    assert len(res.isomers) == 1 < POOL_MIN_EMBEDDINGS  # M(CO)5L has one isomer (common practice)
    with EmbedAhead(processes=2) as ahead:
        ahead.add(embedding_items([res]))
        assert ahead._pool is None and ahead.ready(res.isomers[0], res.composition) == {}
