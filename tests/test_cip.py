"""CIP priority numbers of ligating atoms (enumerator.analyses.cip).

Sources: the sequence rules of Cahn, Ingold & Prelog, Angew. Chem. Int. Ed.
Engl. 5 (1966) 385 and Prelog & Helmchen, Angew. Chem. Int. Ed. Engl. 21
(1982) 567 (Rule 1a atomic number, duplicate atoms for multiple bonds,
hierarchical exploration; Rule 2 mass number); the ranks below are worked
by hand from those rules unless RDKit's own CIP labeller (rdCIPLabeler, a
reference implementation independent of this project) is the check.
"""

from __future__ import annotations

import numpy as np
import pytest

from enumerator.analyses.cip import dense_ranks, donor_priorities, rank_smiles
from enumerator.analyses.descriptors import rs_symbol
from enumerator.errors import InputError
from enumerator.model.composition import Composition, LigandKind
from enumerator.parse.abstract import parse_abstract

PPH3 = "[P:1](c1ccccc1)(c1ccccc1)c1ccccc1"


def test_sphere_one_atomic_number():
    # Rule 1a, sphere 1: Cl (17) > P (15) > O (8) > N (7) > C (6) (CIP 1966)
    assert rank_smiles(["[Cl-:1]", PPH3, "[OH2:1]", "[NH3:1]", "[C-:1]#[O+]"]) == (1, 2, 3, 4, 5)


def test_nitrogen_donors_by_second_sphere():
    # Rule 1a, sphere 2 (worked by hand): N of nitrite {O, O, O(duplicate)} >
    # N of pyridine {C, C, C(duplicate)} > N of NH3 {H, H, H}
    assert rank_smiles(["[NH3:1]", "c1cc[n:1]cc1", "O=[N:1][O-]"]) == (3, 2, 1)


def test_duplicate_atoms_of_a_triple_bond():
    # C of CO {O, O, O} > C of CN- {N, N, N}: duplicated atoms (CIP 1966); hand-worked
    assert rank_smiles(["[C-:1]#N", "[C-:1]#[O+]"]) == (2, 1)


def test_third_sphere_decides_en_over_methylamine():
    # en N {C,H,H} ties MeNH2 at sphere 2; sphere 3: C{N,H,H} > C{H,H,H} (hand-worked)
    assert rank_smiles(["[NH2:1]CC[NH2:2]", "C[NH2:1]", "[NH3:1]"]) == (1, 2, 3)


def test_rule_two_isotopes():
    # Rule 2 (Prelog & Helmchen 1982): higher mass number first, after Rule 1
    # is exhausted; explored hierarchically, so 13C (sphere 1) outranks 18O (sphere 2)
    ranks = rank_smiles(["[C-:1]#[O+]", "[C-:1]#[18O+]", "[13C-:1]#[O+]", "[13C-:1]#[18O+]"])
    assert ranks == (4, 3, 2, 1)


def test_symmetric_chelate_donors_tie():
    # the two O of acac- and of oxalate are constitutionally equivalent by
    # resonance (common practice); en's two N are equivalent by symmetry
    acac = "CC(=[O:1])C=C(C)[O-:2]"
    ox = "[O-:1]C(=O)C(=O)[O-:2]"
    r = rank_smiles([(acac, 1), (acac, 2), (ox, 1), (ox, 2), ("[NH2:1]CC[NH2:2]", 1), ("[NH2:1]CC[NH2:2]", 2)])
    assert r[0] == r[1] and r[2] == r[3] and r[4] == r[5]
    # oxalate O: sphere 3 C{O,O,O} beats acac O: C{C,C,...} (hand-worked)
    assert r[2] < r[0] < r[4]


def test_dense_numbering():
    # priority numbers 1, 2, 3 for distinct ranks, equal for ties (IR-9.3.5, from memory)
    assert dense_ranks([10, 30, 10, 20]) == (3, 1, 3, 2)


def test_letter_convention():
    # the documented convention for abstract ligands: a > b > c, chelate A just above a
    pr = donor_priorities(parse_abstract("M(AB)2c2"))
    assert pr == {("AB", 0): 1, ("AB", 1): 2, ("c", 0): 3}
    pr = donor_priorities(parse_abstract("M(AA)a2b2"))
    assert pr[("AA", 0)] < pr[("a", 0)] < pr[("b", 0)]


def test_kinds_with_meta_smiles():
    # LigandKind objects built by hand with catalogue-style meta (SMILES with the ligating atoms mapped :1, :2, ...)
    nh3 = LigandKind("NH3", ("N",), meta=(("smiles", "[NH3:1]"),))
    no2 = LigandKind("NO2", ("N",), meta=(("smiles", "O=[N:1][O-]"),))
    comp = Composition("[Co(NH3)3(NO2)3]", ((nh3, 3), (no2, 3)), metal="Co")
    assert donor_priorities(comp) == {("NH3", 0): 2, ("NO2", 0): 1}  # NO2 > NH3, hand-worked above


def test_missing_smiles_is_a_clear_input_error():
    a = LigandKind("X", ("N",), meta=(("smiles", "[NH3:1]"),))
    b = LigandKind("Y", ("N",), meta=(("label", "no smiles"),))
    with pytest.raises(InputError, match="no SMILES"):
        donor_priorities(Composition("[MX3Y3]", ((a, 3), (b, 3)), metal="Co"))


def test_bad_map_number_is_a_clear_input_error():
    a = LigandKind("X", ("N", "N"), meta=(("smiles", "[NH2:1]CCN"),))
    with pytest.raises(InputError, match="map number 2"):
        donor_priorities(Composition("[M(X)3]", ((a, 3),), metal="Co"))


def _fragments(smiles: str):
    """Centre atom 0 and its four substituents as mapped SMILES (the
    substituent's H counts fixed) and bond vectors from an RDKit embedding."""
    from rdkit import Chem
    from rdkit.Chem import AllChem

    mol = Chem.AddHs(Chem.MolFromSmiles(smiles))
    assert AllChem.EmbedMolecule(mol, randomSeed=7) == 0
    conf = mol.GetConformer()
    centre = np.array(conf.GetAtomPosition(0))
    out = []
    for nb in mol.GetAtomWithIdx(0).GetNeighbors():
        rw = Chem.RWMol(mol)
        for a in rw.GetAtoms():
            a.SetNoImplicit(True)
            a.SetNumExplicitHs(0)
        rw.GetAtomWithIdx(nb.GetIdx()).SetAtomMapNum(1)
        rw.RemoveBond(0, nb.GetIdx())
        frags = Chem.GetMolFrags(rw, asMols=False, sanitizeFrags=False)
        keep = next(f for f in frags if nb.GetIdx() in f)
        sub = Chem.RWMol(rw)
        for idx in sorted(set(range(rw.GetNumAtoms())) - set(keep), reverse=True):
            sub.RemoveAtom(idx)
        text = Chem.MolToSmiles(sub, allHsExplicit=True)
        out.append((text, np.array(conf.GetAtomPosition(nb.GetIdx())) - centre))
    return mol, out


@pytest.mark.parametrize(
    "smiles",
    [
        "[C@](F)(Cl)(Br)I",  # the classic halide centre
        "[C@@](O)(N)(C=O)CC",  # O > N > CHO > Et
        "[C@](C#N)(C(C)(C)C)(c1ccccc1)[2H]",  # triple-bond duplicates vs phenyl vs tert-butyl; 2H (Z = 1) last
        "[C@@](CO)(CN)(CC)[13CH3]",  # sphere-2 decisions, 13CH3 last
        "[C@](N=O)([N+](=O)[O-])(N)C",  # nitroso vs nitro vs amino
    ],
)
def test_priorities_reproduce_rdkit_cip_labels(smiles):
    """Rank the four branches of a carbon stereocentre with this module (the
    centre playing the metal), turn the ranks into R/S with rs_symbol, and
    compare with RDKit's CIP labeller (external reference)."""
    from rdkit import Chem
    from rdkit.Chem import rdCIPLabeler

    mol, subs = _fragments(smiles)
    ranks = rank_smiles([s for s, _ in subs], metal="C")
    assert sorted(ranks) == [1, 2, 3, 4]
    by_rank = [v for _, v in sorted(zip(ranks, [v for _, v in subs]), key=lambda t: t[0])]
    Chem.AssignStereochemistryFrom3D(mol)
    rdCIPLabeler.AssignCIPLabels(mol)
    assert rs_symbol(*by_rank) == mol.GetAtomWithIdx(0).GetProp("_CIPCode")


def test_priorities_follow_the_smiles_not_only_the_names():
    # The same ligand names with other SMILES (a user catalogue) must not reuse cached priorities:
    # Composition equality leaves the catalogue data out, the cache key must not (hand-worked: N > C at sphere 1).
    a1 = LigandKind("X", ("N",), meta=(("smiles", "[NH3:1]"),))
    b1 = LigandKind("Y", ("C",), meta=(("smiles", "[CH3-:1]"),))
    a2 = LigandKind("X", ("N",), meta=(("smiles", "[CH3-:1]"),))
    b2 = LigandKind("Y", ("C",), meta=(("smiles", "[NH3:1]"),))
    first = donor_priorities(Composition("[CoX3Y3]", ((a1, 3), (b1, 3)), metal="Co"))
    second = donor_priorities(Composition("[CoX3Y3]", ((a2, 3), (b2, 3)), metal="Co"))
    assert first == {("X", 0): 1, ("Y", 0): 2}
    assert second == {("X", 0): 2, ("Y", 0): 1}
