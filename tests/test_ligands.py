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

# Ligands every user will type: the usual abbreviations of the trade (common practice).
EVERYDAY_ABBREVIATIONS = [
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


def test_size_and_everyday_abbreviations():
    assert len(CAT) >= 170  # the standard tables: see EVERYDAY below
    for name in EVERYDAY_ABBREVIATIONS + [
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
    if e.hapticity is None:  # one bound atom per site: the map numbers follow the donors in chain order
        assert [maps[k] for k in range(1, e.denticity + 1)] == list(e.donors)
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
    assert k.ring and k.donors == ("C",) and k.denticity == 1 and dict(k.meta)["hapticity"] == 5
    # common practice: tacn, Tp and triphos bind facially, their three arms alike (tripods, not chains)
    for name in ("tacn", "Me3tacn", "Tp", "Tp*", "Tp^Ph", "tpm", "triphos"):
        assert CAT[name].kind().topology == "tripod" and CAT[name].kind().arrangements == frozenset(), name
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


# ---------------------------------------------------------------- the standard tables
# Everyday ligands of the standard tables (Crabtree, The Organometallic Chemistry of the Transition
# Metals, ch. 2-5; Housecroft & Sharpe, Inorganic Chemistry): each spelling must be found.
EVERYDAY = [
    # phosphines, phosphites, heavier pnictogens
    "PBu3", "PnBu3", "P(n-Bu)3", "tri-n-butylphosphine", "PEt2Ph", "PEtPh2", "P(o-tol)3", "P(p-tol)3", "PPh2H", "PH3",
    "P(C6F5)3", "P(OEt)3", "P(OiPr)3", "P(O-o-tol)3", "PCl3", "P(NMe2)3", "AsMe3", "SbPh3", "SbMe3", "BiPh3",
    # amines, pyridines, nitriles, isocyanides
    "NMe3", "NEt3", "NHEt2", "NH2Me", "NHMe2", "4-Mepy", "4-picoline", "2,6-lutidine", "dmap", "EtCN", "tBuCN",
    "CNPh", "CNCy", "CNEt", "CNiPr", "CNAd", "CNBn", "CNMes", "CN-p-Tol",
    # ethers and thioethers
    "Et2O", "OEt2", "dme", "SEt2", "tht",
    # eta2, eta3, eta4, eta5, eta6, eta8
    "C2F4", "coe", "C2H2", "PhC2Ph", "allyl", "C3H5", "methallyl", "butadiene", "C4H6", "nbd", "chd", "C4H4", "C4Ph4",
    "Cp'", "C5H4Me", "Ind", "C6H5Me", "toluene", "mesitylene", "cht", "cot", "dihydrogen",
    # chelates and tripods
    "dppb", "dppf", "dcpe", "dmpm", "diars", "dmbpy", "dtbbpy", "bpm", "dpa", "mal", "cat", "Et2dtc",
    "S2CNEt2", "kappa2-OAc", "salen", "Tp*", "Tp^Ph", "tpm", "pybox",
    # anions and sigma-bonded groups
    "OCN", "NCSe", "OEt", "OPh", "NO3", "ClO4", "OTf", "SO4", "CH2Ph", "Bn", "CH2SiMe3", "C6F5", "SiMe3", "SiCl3",
    "GeCl3", "SnPh3", "NMe2",
    # N-heterocyclic carbenes
    "IMes", "IPr", "SIMes", "SIPr",
]  # fmt: skip


def test_everyday_ligands_found():
    for spelling in EVERYDAY:
        find_ligand(RS, spelling)


@pytest.mark.parametrize(
    "name, formula",
    [
        ("PBu3", "C12H27P"),  # common practice
        ("P(OEt)3", "C6H15O3P"),  # triethyl phosphite, common practice
        ("SbPh3", "C18H15Sb"),
        ("NEt3", "C6H15N"),
        ("CNPh", "C7H5N"),
        ("allyl", "C3H5-"),  # allyl anion of the ionic model, common practice
        ("nbd", "C7H8"),  # norbornadiene
        ("Cp'", "C6H7-"),  # methylcyclopentadienide
        ("Ind", "C9H7-"),  # indenide
        ("Tp*", "C15H22BN6-"),  # Tp with six methyls, from memory
        ("salen", "C16H14N2O2-2"),  # H2salen less two protons, from memory
        ("dppf", "C34H28FeP2"),  # common practice
        ("IMes", "C21H24N2"),  # the free carbene, from memory
        ("cot", "C8H8-2"),  # cyclooctatetraene dianion of the ionic model, from memory
    ],
)
def test_new_molecular_formulas(name, formula):
    """Hill formulas of new entries from RDKit match the free ligand of the ionic model."""
    assert CalcMolFormula(Chem.MolFromSmiles(CAT[name].smiles)) == formula


def test_site_conventions():
    """Hapto ligands occupy sites as the existing C2H4, cod and Cp entries do: an eta2 ligand one
    site, an eta3-allyl and an eta4-diene two, an eta-ring one site of its own (piano stool)."""
    for n in ("C2H4", "C2F4", "coe", "C2H2", "PhC2Ph", "dihydrogen"):
        assert (CAT[n].denticity, CAT[n].hapticity, CAT[n].ring) == (1, 2, False), n
    for n in ("allyl", "methallyl"):
        assert (CAT[n].denticity, CAT[n].hapticity, CAT[n].ring, CAT[n].charge) == (2, 3, False, -1), n
    for n in ("cod", "butadiene", "nbd", "chd"):
        assert (CAT[n].denticity, CAT[n].hapticity, CAT[n].ring) == (2, 4, False), n
    for n, eta in (("C4H4", 4), ("C4Ph4", 4), ("Cp", 5), ("Cp'", 5), ("Ind", 5), ("C6H5Me", 6), ("cht", 6), ("cot", 8)):
        assert (CAT[n].denticity, CAT[n].hapticity, CAT[n].ring) == (1, eta, True), n
    # Crabtree, ch. 2 conventions: allyl 3e covalent / 4e ionic (C3H5-); cot 8e / 10e (C8H8 2-), from memory
    assert (CAT["allyl"].electrons_covalent, CAT["allyl"].electrons_ionic) == (3, 4)
    assert (CAT["cot"].electrons_covalent, CAT["cot"].electrons_ionic) == (8, 10)
    assert all(CAT[n].reporter == "CNR" for n in CAT if n.startswith("CN") and n not in ("CN",))


def _parts(text):
    from enumerator.parse.condensed import parse_condensed

    c = parse_condensed(text, RS)
    return [(k.name, n) for k, n in c.parts], c


@pytest.mark.parametrize(
    "formula, ligands, os_, d, ve, source",
    [
        ("[Mo(CO)5(PBu3)]", [("CO", 5), ("PBu3", 1)], 0, 6, 18, "from memory"),
        ("[Ni(CO)3(P(OEt)3)]", [("CO", 3), ("P(OEt)3", 1)], 0, 10, 18, "Crabtree, ch. 4: Tolman's LNi(CO)3 series"),
        ("[W(CO)5(SbPh3)]", [("CO", 5), ("SbPh3", 1)], 0, 6, 18, "from memory"),
        ("[Cr(CO)5(NMe3)]", [("CO", 5), ("NMe3", 1)], 0, 6, 18, "from memory"),
        ("[Cr(CNPh)6]", [("CNPh", 6)], 0, 6, 18, "from memory: homoleptic aryl isocyanide of Cr(0)"),
        ("[Mn(CO)4(allyl)]", [("CO", 4), ("allyl", 1)], 1, 6, 18, "from memory: (eta3-allyl)Mn(CO)4"),
        ("[Mn(CO)4(η3-C3H5)]", [("CO", 4), ("allyl", 1)], 1, 6, 18, "from memory: (eta3-allyl)Mn(CO)4"),
        ("[Fe(CO)3(butadiene)]", [("CO", 3), ("butadiene", 1)], 0, 8, 18, "from memory: (eta4-C4H6)Fe(CO)3"),
        ("[Mo(CO)4(nbd)]", [("CO", 4), ("nbd", 1)], 0, 6, 18, "from memory"),
        ("[Fe(CO)4(CNMe)]", [("CO", 4), ("CNMe", 1)], 0, 8, 18, "from memory"),
        ("[W(CO)5(CS)]", [("CO", 5), ("CS", 1)], 0, 6, 18, "from memory"),
        ("[Fe(CO)3(η4-C4H4)]", [("CO", 3), ("C4H4", 1)], 0, 8, 18, "from memory: Pettit's (cyclobutadiene)Fe(CO)3"),
        ("[Cr(CO)3(C6H5Me)]", [("CO", 3), ("C6H5Me", 1)], 0, 6, 18, "from memory: as (benzene)Cr(CO)3"),
        ("[Cr(CO)3(cht)]", [("CO", 3), ("cht", 1)], 0, 6, 18, "from memory: (eta6-C7H8)Cr(CO)3"),
        ("[Cp'Mn(CO)3]", [("Cp'", 1), ("CO", 3)], 1, 6, 18, "from memory: methylcymantrene, as CpMn(CO)3"),
        ("[Mn(CO)3(Ind)]", [("CO", 3), ("Ind", 1)], 1, 6, 18, "from memory"),
        ("[W(CO)3(PiPr3)2(η2-dihydrogen)]", [("CO", 3), ("PiPr3", 2), ("dihydrogen", 1)], 0, 6, 18,
         "from memory: Kubas' dihydrogen complex"),
        ("[RuH2(CO)(PPh3)3]", [("H", 2), ("CO", 1), ("PPh3", 3)], 2, 6, 18, "from memory: two hydrides, not H2"),
        ("[Ti(NMe2)4]", [("NMe2", 4)], 4, 0, 8, "from memory: amides counted as X (pi donation left out)"),
        ("[Pd(allyl)Cl(PPh3)]", [("allyl", 1), ("Cl", 1), ("PPh3", 1)], 2, 8, 16, "from memory: 16e Pd(II) allyl"),
        ("[Ir(Cp*)Cl2(IMes)]", [("Cp*", 1), ("Cl", 2), ("IMes", 1)], 3, 6, 18, "from memory: NHC as a 2e L ligand"),
    ],
)  # fmt: skip
def test_formulas_with_new_ligands(formula, ligands, os_, d, ve, source):
    from enumerator.analyses.centre import count_electrons

    parts, comp = _parts(formula)
    assert parts == ligands, source
    c = count_electrons(comp)
    assert (c.oxidation_state, c.d_electrons, c.valence_electrons) == (os_, d, ve), source
    assert c.valence_electrons_ionic == c.valence_electrons  # the two methods agree (Crabtree, ch. 2)


def test_wrong_hapticity_is_refused():
    # cot is catalogued at eta8 and eta4 only: an eta6-cot (as in Cr(CO)3(C8H8), from memory) is
    # refused with the hapticities the catalogue has, rather than misread
    with pytest.raises(InputError) as exc:
        _parts("[Cr(CO)3(η6-cot)]")
    assert "η6-cot" in exc.value.line() and "η8 (cot), η4 (eta4-cot)" in exc.value.line()


def test_names_with_new_ligands():
    # assembled by IUPAC 2005 IR-9.2.2 (alphanumerical order, bis/tris for enclosed names); from memory
    from enumerator.analyses.names import additive_name

    def name(f):
        return additive_name(_parts(f)[1], RS, None).name

    assert name("[Ni(CO)3(P(OEt)3)]") == "tricarbonyl(triethyl phosphite)nickel(0)"
    assert name("[Cr(CNPh)6]") == "hexakis(phenyl isocyanide)chromium(0)"
    assert name("[Fe(CO)3(butadiene)]") == "(η4-buta-1,3-diene)tricarbonyliron(0)"
    assert name("[Pt(PH3)4]") == "tetrakis(phosphane)platinum(0)"


# ---------------------------------------------------------------- spellings and the formula parser
def _spellings():
    from enumerator.rules.ligands import all_spellings

    return all_spellings(RS)


def test_no_spelling_is_a_metal_symbol():
    """A spelling equal to a metal symbol would turn the metal into a ligand; the only spellings that
    are element symbols are the halides, hydride, nitride and oxide, which name that atom as a ligand."""
    from enumerator.model.elements import element_symbols

    symbols = set(element_symbols())
    assert {s for s in _spellings() if s in symbols} == {"F", "Cl", "Br", "I", "H", "N", "O"}


def test_metals_whose_symbol_starts_a_spelling_still_parse():
    # 'Ind', 'SnCl3', 'BiPh3' start with a metal symbol: the metal is read where no longer spelling fits
    for formula, metal in (("[InCl3(py)3]", "In"), ("[SnCl4(py)2]", "Sn"), ("[BiCl3(THF)3]", "Bi")):
        assert _parts(formula)[1].metal == metal


def test_case_insensitive_lookup_clashes():
    """Lookup falls back to a unique case-insensitive match; the only clash is the carbene IPr against
    the isopropyl group iPr, both found when written exactly."""
    low: dict[str, set[str]] = {}
    for s, n in _spellings().items():
        low.setdefault(s.lower(), set()).add(n)
    assert {k for k, v in low.items() if len(v) > 1} == {"ipr"}
    assert find_ligand(RS, "IPr").name == "IPr" and find_ligand(RS, "iPr").name == "iPr"


# Spellings that the greedy parser reads as one ligand where, without them, the text would read as
# several other ligands ("NMe3" rather than nitrido + three methyls).  Each is the trade's spelling
# of that ligand; a new one must be added here on purpose.  Spellings whose other reading is a
# plausible pair of sigma ligands (PhMe in PtPhMe, Me2bpy in PtMe2bpy, C2Ph2, CpMe, H2 for
# dihydrogen, which would swallow the two hydrides of RuH2) are deliberately not catalogued.
SHADOWING = {
    "BnNC", "C2H5CN", "C5H5N", "C6H5Me", "CH3CN", "CH3NH2", "CNBn", "CNBut", "CNC2H5", "CNC6H5", "CNCH2Ph", "CNCH3",
    "CNCHMe2", "CNCMe3", "CNEt", "CNMe", "CNPh", "CNiPr", "CNtBu", "CO3", "COMe", "ClO4", "Et2NH", "Et2O", "Et2dtc",
    "Et3N", "EtCN", "EtNC", "H2O", "IMes", "Me2NCHO", "Me2NH", "Me2SO", "Me3N", "Me3TACN", "Me3tacn", "MeCN", "MeCp",
    "MeNC", "MeNH2", "MeOH", "MesNC", "N2", "N3", "NCCH3", "NCCMe3", "NCEt", "NCMe", "NCO", "NCPh", "NCtBu", "NEt2",
    "NEt3", "NH2", "NH2Me", "NH3", "NHEt2", "NHMe2", "NMe2", "NMe3", "NO", "NO2", "NO3", "OBut", "OC2H5", "OC6H5",
    "OCH3", "OCHMe2", "OCMe3", "OCN", "OCOCH3", "OCOPh", "OClO3", "OEt", "OEt2", "OH", "OH2", "OMe", "ONO", "ONO2",
    "OP(C6H5)3", "OPPh3", "OPh", "OiPr", "OtBu", "PhC2Ph", "PhCCPh", "PhCN", "PhNC", "iPrNC", "phenoxido", "tBuCN",
    "tBuNC",
}  # fmt: skip


def _greedy(text, spellings):
    """The parser's reading of a bare run of ligands: longest spelling first, counts skipped."""
    import re

    order = sorted(spellings, key=lambda s: (-len(s), s))
    i, out = 0, []
    while i < len(text):
        hit = next((s for s in order if text.startswith(s, i)), None)
        if hit is None:
            return None
        out.append(hit)
        i += len(hit)
        m = re.match(r"\d+", text[i:])
        i += len(m.group(0)) if m else 0
    return out


def test_shadowing_spellings_are_deliberate():
    spell = _spellings()
    found = {s for s in spell if _greedy(s, {o for o, n in spell.items() if n != spell[s]})}
    assert found == SHADOWING


def test_no_h2_spelling():
    # 'H2' must stay two hydrides: dihydrogen is spelled out (common practice writes it eta2-H2)
    assert "H2" not in _spellings()
    assert _parts("[RuH2(CO)(PPh3)3]")[0][0] == ("H", 2)


def _end_ranks(smiles, n):
    """Symmetry classes (RDKit canonical ranks without tie-breaking) of bound atoms :1 and :n on the
    bare skeleton: bond orders, charges and hydrogens are dropped, so resonance forms of one
    delocalised chelate (acac, the [O:1]=/[O-:2] pair) compare equal."""
    mol = Chem.RWMol(Chem.MolFromSmiles(smiles, sanitize=False))
    where = {}
    for a in mol.GetAtoms():
        if a.GetAtomMapNum():
            where[a.GetAtomMapNum()] = a.GetIdx()
        a.SetAtomMapNum(0)
        a.SetFormalCharge(0)
        a.SetIsAromatic(False)
        a.SetNoImplicit(True)
        a.SetNumExplicitHs(0)
        a.SetIsotope(0)
    for b in mol.GetBonds():
        b.SetBondType(Chem.BondType.SINGLE)
        b.SetIsAromatic(False)
    mol.UpdatePropertyCache(strict=False)
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False, includeChirality=False))
    return ranks[where[1]], ranks[where[n]]


@pytest.mark.parametrize(
    "name",
    sorted(
        n for n, e in CAT.items() if e.denticity >= 2 and not e.ring and not e.hapticity and e.donors == e.donors[::-1]
    ),
)
def test_palindromic_chains_are_symmetric(name):
    """The enumerator takes a chain whose donor elements read the same both ways as symmetric
    (one placement whichever way round).  Its two ends must then be equivalent in the ligand
    itself; an unsymmetrical O,O or N,N chelate (tfac, propane-1,2-diamine) would lose its fac/mer
    isomers (e.g. fac- and mer-[Cr(tfac)3], common practice), so such ligands stay out of the catalogue."""
    e = CAT[name]
    first, last = _end_ranks(e.smiles, e.denticity)
    assert first == last
