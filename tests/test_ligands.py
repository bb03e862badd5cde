"""The ligand catalogue: coverage, RDKit sanity of every SMILES, counts, errors."""

from __future__ import annotations

import pytest
from rdkit import Chem
from rdkit.Chem.rdMolDescriptors import CalcMolFormula

from enumerator.errors import InputError, RuleError
from enumerator.rules.ligands import find_ligand, load_ligands
from enumerator.rules.ruleset import load_rules

RS = load_rules()
CAT = load_ligands(RS)

# The ligands named in issue 4 (common practice: the usual abbreviations of the trade).
ISSUE_LIST = [
    "CO",
    "CN",
    "NO",
    "Cl",
    "Br",
    "I",
    "F",
    "H",
    "Me",
    "Ph",
    "NH3",
    "H2O",
    "py",
    "MeCN",
    "PPh3",
    "PMe3",
    "PMe2Ph",
    "PCy3",
    "P(OMe)3",
    "CNtBu",
    "en",
    "bpy",
    "phen",
    "acac",
    "ox",
    "dppe",
    "dppm",
    "dmpe",
    "tacn",
    "terpy",
    "dien",
    "Cp",
    "Cp*",
    "C6H6",
    "p-cymene",
]


def test_size_and_issue_list():
    assert len(CAT) >= 60
    for name in ISSUE_LIST + [
        "13CO",
        "C18O",
        "13C18O",
        "NObent",
        "N2",
        "CS",
        "C2H4",
        "NO2",
        "ONO",
        "SCN",
        "NCS",
        "NCMe",
    ]:
        find_ligand(RS, name)


@pytest.mark.parametrize("name", sorted(CAT))
def test_rdkit_sanity(name):
    """Every SMILES parses and sanitises in RDKit (reference library), its formal
    charge is the ionic-model charge, and map numbers 1..n sit on donor atoms."""
    e = CAT[name]
    mol = Chem.MolFromSmiles(e.smiles)
    assert mol is not None
    assert Chem.GetFormalCharge(mol) == e.charge
    maps = {a.GetAtomMapNum(): a.GetSymbol() for a in mol.GetAtoms() if a.GetAtomMapNum()}
    assert sorted(maps) == list(range(1, e.bound_atoms + 1))
    assert set(maps.values()) <= set(e.donors)
    assert e.electrons_ionic - e.electrons_covalent == -e.charge  # Crabtree, ch. 2: X ligands 1e covalent / 2e ionic


@pytest.mark.parametrize(
    "name, formula",
    [
        ("PPh3", "C18H15P"),  # triphenylphosphine, common practice
        ("Cp", "C5H5-"),  # cyclopentadienide
        ("acac", "C5H7O2-"),  # acetylacetonate
        ("bpy", "C10H8N2"),
        ("phen", "C12H8N2"),
        ("terpy", "C15H11N3"),
        ("dppe", "C26H24P2"),
        ("p-cymene", "C10H14"),
        ("Tp", "C9H10BN6-"),  # hydrotris(pyrazolyl)borate, from memory
        ("ox", "C2O4-2"),
    ],
)
def test_molecular_formulas(name, formula):
    """Hill formulas from RDKit match the textbook formula of the free ligand."""
    assert CalcMolFormula(Chem.MolFromSmiles(CAT[name].smiles)) == formula


def test_isotopologues_carry_isotopes():
    def iso(name):
        m = Chem.MolFromSmiles(CAT[name].smiles)
        return {a.GetSymbol(): a.GetIsotope() for a in m.GetAtoms()}

    assert iso("13CO") == {"C": 13, "O": 0}
    assert iso("C18O") == {"C": 0, "O": 18}
    assert iso("13C18O") == {"C": 13, "O": 18}
    assert all(CAT[n].reporter == "CO" for n in ("CO", "13CO", "C18O", "13C18O"))


def test_nitrosyl_counts():
    # Crabtree, The Organometallic Chemistry of the Transition Metals, ch. 4: linear NO is a
    # 3-electron (covalent) / NO+ 2-electron (ionic) ligand, bent NO 1-electron / NO- 2-electron.
    lin, bent = CAT["NO"], CAT["NObent"]
    assert (lin.charge, lin.electrons_covalent, lin.electrons_ionic, lin.nitrosyl) == (1, 3, 2, "linear")
    assert (bent.charge, bent.electrons_covalent, bent.electrons_ionic, bent.nitrosyl) == (-1, 1, 2, "bent")
    # Cp: 5-electron covalent, 6-electron Cp- ionic (Crabtree, ch. 2)
    assert (CAT["Cp"].electrons_covalent, CAT["Cp"].electrons_ionic, CAT["Cp"].hapticity) == (5, 6, 5)


def test_kinds():
    k = CAT["Cp"].kind()
    assert k.ring and k.donors == ("C", "C", "C") and dict(k.meta)["hapticity"] == 5
    assert CAT["tacn"].kind().arrangements == frozenset({"fac"})  # common practice: tacn binds facially
    assert CAT["terpy"].kind().arrangements == frozenset({"mer"})  # planar terpy binds meridionally
    assert CAT["dien"].kind().arrangements == frozenset()  # either
    assert CAT["gly"].kind().donors == ("N", "O")


def test_lookup_and_errors():
    assert find_ligand(RS, "C5H5").name == "Cp"
    assert find_ligand(RS, "pph3").name == "PPh3"
    with pytest.raises(InputError) as exc:
        find_ligand(RS, "PPh4")
    assert "PPh3" in exc.value.line()


def _user(tmp_path, body):
    (tmp_path / "ligands.toml").write_text(body, encoding="utf-8")
    return load_rules([tmp_path])


GOOD = """[[ligand]]
name = "PPh3"
label = "triphenylphosphine (user)"
smiles = "[P:1](c1ccccc1)(c1ccccc1)c1ccccc1"
donors = ["P"]
denticity = 1
charge = 0
electrons_covalent = 2
electrons_ionic = 2
"""


def test_user_file_overrides(tmp_path):
    rs = _user(tmp_path, GOOD)
    assert load_ligands(rs)["PPh3"].label == "triphenylphosphine (user)"


@pytest.mark.parametrize(
    "change, words",
    [
        (("[P:1](c1", "[P:1](c9"), "RDKit cannot parse"),
        (("charge = 0", "charge = -1"), "must equal -charge"),
        (("[P:1]", "[P]"), "marks atoms"),
        (('donors = ["P"]', 'donors = ["N"]'), "donor 1"),
        (("denticity = 1", 'denticity = 1\nreporters = "CO"'), "unknown key"),
    ],
)
def test_user_file_errors(tmp_path, change, words):
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, GOOD.replace(*change)))
    assert words in exc.value.line() and "ligands.toml" in exc.value.line()
