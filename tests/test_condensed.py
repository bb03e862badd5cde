"""The condensed-formula parser: what it reads, what it refuses, and how it says so.

Sources: the formulas are the trade's own condensed notation (common practice;
IUPAC 2005 IR-4.4.3 writes polyatomic ligands with a multiplier in enclosing
marks, ``[Co(NH3)6]3+``, single atoms bare, ``Cl2``).  Electron counts follow
Crabtree, The Organometallic Chemistry of the Transition Metals (Wiley), ch. 2.
"""

from __future__ import annotations

import pytest

from enumerator.analyses.centre import count_electrons
from enumerator.errors import InputError
from enumerator.parse.condensed import parse_condensed, read_condensed
from enumerator.parse.formula import parse_formula
from enumerator.rules.ligands import load_ligands
from enumerator.rules.ruleset import load_rules

RS = load_rules()


def parts(text, rules=RS):
    c = parse_condensed(text, rules)
    return c.metal, c.charge, [(k.name, n) for k, n in c.parts]


def refusal(text, rules=RS):
    with pytest.raises(InputError) as exc:
        parse_condensed(text, rules)
    line = exc.value.line()
    assert len(line.splitlines()) == 1
    return line


@pytest.mark.parametrize(
    "text, want",
    [
        ("[Fe(CN)5(NO)]2-", ("Fe", -2, [("CN", 5), ("NO", 1)])),
        ("[Co(NH3)4Cl2]+", ("Co", 1, [("NH3", 4), ("Cl", 2)])),
        ("[RuCl2(CO)2(PPh3)2]", ("Ru", 0, [("Cl", 2), ("CO", 2), ("PPh3", 2)])),
        ("Ni(CO)4", ("Ni", 0, [("CO", 4)])),
        ("[CpMn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(η5-C5H5)Mn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(eta5-Cp)Mn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),
        ("[(h5-Cp*)Rh(CO)2]", ("Rh", 0, [("Cp*", 1), ("CO", 2)])),
        ("[(η5- Cp)Mn(CO)3]", ("Mn", 0, [("Cp", 1), ("CO", 3)])),  # a space after the prefix
        ("[Cr(η⁶-C6H6)(CO)3]", ("Cr", 0, [("C6H6", 1), ("CO", 3)])),
        ("[IrCl(CO)(PPh3)2]", ("Ir", 0, [("Cl", 1), ("CO", 1), ("PPh3", 2)])),
        ("[Mo(CO)3(P(OMe)3)3]", ("Mo", 0, [("CO", 3), ("P(OMe)3", 3)])),
        ("[Fe(CO)5]−", ("Fe", -1, [("CO", 5)])),
        ("[Co(en)2Cl2]+", ("Co", 1, [("en", 2), ("Cl", 2)])),
        ("[Mn(CO)5(13CO)]+", ("Mn", 1, [("CO", 5), ("13CO", 1)])),
        ("[Fe(CO)2(NO)2]", ("Fe", 0, [("CO", 2), ("NO", 2)])),
        ("[Co(NH3)5(NO2)]2+", ("Co", 2, [("NH3", 5), ("NO2", 1)])),  # nitro, N-bound
        ("[PtCl2(η2-C2H4)(NH3)]", ("Pt", 0, [("Cl", 2), ("C2H4", 1), ("NH3", 1)])),
        ("[Ru(NH3)5(N2)]2+", ("Ru", 2, [("NH3", 5), ("N2", 1)])),
        ("[W(CO)5(CNtBu)]", ("W", 0, [("CO", 5), ("CNtBu", 1)])),
        ("[Co(NH3)3Cl3]", ("Co", 0, [("NH3", 3), ("Cl", 3)])),
        ("[Cr(CO)2(CO)4]", ("Cr", 0, [("CO", 6)])),  # repeated ligands merge
    ],
)
def test_parse(text, want):
    # common practice (condensed formulas as papers write them)
    assert parts(text) == want


def test_ring_sites():
    c = parse_condensed("[CpMn(CO)3]", RS)
    assert c.donor_count == 4 and c.kinds[0].ring  # the ring holds one site (piano-stool idealisation)


@pytest.mark.parametrize(
    "text, pos, words",
    [
        ("[RuCl2(CO)2(PPh4)2]", 13, "unknown ligand 'PPh4'"),
        ("[RuCl2(CO)2(PPh3)2", 1, "never closed"),
        ("K4[Fe(CN)6]", 1, "text before '['"),
        ("[Fe(CN)6]4x", 10, "charge"),
        ("[FeRu(CO)9]", 4, "second metal"),
        ("[(CO)4]", None, "no metal"),
        ("[Fe(CO)0]", 8, "count of 0"),
        ("[η3-CpMn(CO)3]", 2, "η3-Cp"),
        ("[Fe(CO)5", 1, "never closed"),
        ("[Fe(CO5]", 4, "never closed"),
        ("[Fe(CO)4()]", 9, "empty parentheses"),
        ("[Fe(CO)4(η5-)]", 13, "no ligand after the hapticity prefix"),
    ],
)
def test_errors_point_at_character(text, pos, words):
    line = refusal(text)
    assert words in line
    if pos is not None:
        assert f"at position {pos}" in line


def test_unknown_suggests():
    with pytest.raises(InputError) as exc:
        parse_condensed("[RuCl2(CO)2(PPh4)2]", RS)
    assert "PPh3" in exc.value.fix


# ---------------------------------------------------------------- rule 1: a group is one ligand

# Ligands not in the catalogue, written as chemists write them (tripropylamine,
# chloroethane, dichlorophenylphosphine, ethyl methyl sulfide, phenylphosphine,
# chloromethane, dimethyl ether, ethylamine; common practice).  Before, the
# parser split such a group into catalogue pieces ((ClEt)2 was two chlorido and
# two ethyl, making W(CO)4(ClEt)2 an 8-coordinate W(IV)); each is refused now.
UNKNOWN_GROUPS = [
    ("[W(CO)5(NPr3)]", "NPr3", 9, None),
    ("[W(CO)4(ClEt)2]", "ClEt", 9, "Cl2Et2 for 2 Cl and 2 Et"),
    ("[Mo(CO)5(PBr2Ph)]", "PBr2Ph", 10, None),
    ("[Cr(CO)5(SMeEt)]", "SMeEt", 10, None),
    ("[Ni(CO)3(PPhMeH)]", "PPhMeH", 10, None),
    ("[W(CO)4(ClMe)2]", "ClMe", 9, "Cl2Me2 for 2 Cl and 2 Me"),
    ("[Cr(CO)5(OMe2)]", "OMe2", 10, "(OMe)2 for 2 OMe"),
    ("[W(CO)5(NEt2Me)]", "NEt2Me", 9, "(NEt2)Me for NEt2 and Me"),
    ("[Mo(CO)5(NH2Et)]", "NH2Et", 10, "(NH2)Et for NH2 and Et"),
    ("[Co(NH3)5(NH3Cl)]2+", "NH3Cl", 11, "(NH3)Cl for NH3 and Cl"),
    ("[Os(NMe)Cl4]-", "NMe", 5, "(N)Me for N and Me"),
]


@pytest.mark.parametrize("text, group, pos, split", UNKNOWN_GROUPS)
def test_unknown_group_is_refused_not_split(text, group, pos, split):
    line = refusal(text)
    assert f"unknown ligand '{group}' at position {pos} (a parenthesised group is one ligand)" in line
    assert "did you mean" in line
    assert "ligands.toml under --rules DIR" in line and "isosieve ligands" in line and "README" in line
    if split:
        # where the text reads as several catalogue ligands, the message says how to write them apart
        assert f"or write {split} as separate ligands" in line
    else:
        assert "separate ligands" not in line


@pytest.mark.parametrize(
    "separate, want",
    [
        ("[W(CO)4Cl2Et2]", [("CO", 4), ("Cl", 2), ("Et", 2)]),
        ("[W(CO)5(NEt2)Me]", [("CO", 5), ("NEt2", 1), ("Me", 1)]),
        ("[Cr(CO)5(OMe)2]", [("CO", 5), ("OMe", 2)]),
        ("[Os(N)MeCl4]-", [("N", 1), ("Me", 1), ("Cl", 4)]),
    ],
)
def test_the_separate_writing_offered_parses_as_said(separate, want):
    assert parts(separate)[2] == want


def test_known_groups_are_one_ligand_each():
    # every formula of the catalogue-growth check (common practice); each group one ligand
    for text, want in [
        ("[Cr(CNPh)6]", [("CNPh", 6)]),
        ("[W(CO)2(NMe3)]", [("CO", 2), ("NMe3", 1)]),
        ("[Mo(CO)5(PBu3)]", [("CO", 5), ("PBu3", 1)]),
        ("[Ni(CO)3(P(OEt)3)]", [("CO", 3), ("P(OEt)3", 1)]),
        ("[W(CO)5(SbPh3)]", [("CO", 5), ("SbPh3", 1)]),
        ("[Fe(CO)4(CNMe)]", [("CO", 4), ("CNMe", 1)]),
        ("[W(CO)5(CS)]", [("CO", 5), ("CS", 1)]),
    ]:
        assert parts(text)[2] == want, text


def test_twelve_electron_formula_counts_twelve():
    # W(0) d6 + 2 CO (2e each) + NMe3 (2e): 12 (Crabtree, ch. 2 counting); the count says so, it is not hidden
    c = count_electrons(parse_condensed("[W(CO)2(NMe3)]", RS))
    assert (c.oxidation_state, c.d_electrons, c.valence_electrons) == (0, 6, 12)


def test_dioxygen_group_is_not_two_oxido():
    # (O2) once read as two oxido ligands; O2 is not catalogued, so it is refused
    line = refusal("[Pt(PPh3)2(O2)]")
    assert "unknown ligand 'O2'" in line and "(O)2 for 2 O as separate ligands" in line


def test_greedy_reading_is_explained():
    # [OsNCl4]-: the longest spelling at N is NC (isocyanido), leaving 'l4'; the message says why
    line = refusal("[OsNCl4]-")
    assert "unknown ligand 'l4'" in line and "'NC' was read just before it" in line and "(N)Cl4" in line


# ---------------------------------------------------------------- rule 2: bare runs

# Condensed formulas of the trade that must keep parsing (common practice; each a textbook
# compound: Crabtree ch. 2-4, Greenwood & Earnshaw; 'from memory' for the exact formulas).
LEGITIMATE = [
    ("[Mn(CO)5Br]", ("Mn", 0, [("CO", 5), ("Br", 1)])),
    ("CpFe(CO)2Cl", ("Fe", 0, [("Cp", 1), ("CO", 2), ("Cl", 1)])),
    ("[RuHCl(CO)(PPh3)3]", ("Ru", 0, [("H", 1), ("Cl", 1), ("CO", 1), ("PPh3", 3)])),
    ("[PtCl2(NH3)2]", ("Pt", 0, [("Cl", 2), ("NH3", 2)])),
    ("[Co(NH3)5Cl]2+", ("Co", 2, [("NH3", 5), ("Cl", 1)])),
    ("[Fe(CN)5NO]2-", ("Fe", -2, [("CN", 5), ("NO", 1)])),
    ("HMn(CO)5", ("Mn", 0, [("H", 1), ("CO", 5)])),
    ("Cp2ZrCl2", ("Zr", 0, [("Cp", 2), ("Cl", 2)])),
    ("[PtMe2(cod)]", ("Pt", 0, [("Me", 2), ("cod", 1)])),
    ("Ni(CO)3PPh3", ("Ni", 0, [("CO", 3), ("PPh3", 1)])),
    # heads followed by halides only, or with a count before the organyl (from memory)
    ("[ReOCl4]-", ("Re", -1, [("O", 1), ("Cl", 4)])),
    ("[MoOCl4]", ("Mo", 0, [("O", 1), ("Cl", 4)])),
    ("[Os(N)Cl4]-", ("Os", -1, [("N", 1), ("Cl", 4)])),  # bare, NC (isocyanido) would be read first
    ("ReO3Me", ("Re", 0, [("O", 3), ("Me", 1)])),  # methyltrioxorhenium
    ("[ReOCl3(PPh3)2]", ("Re", 0, [("O", 1), ("Cl", 3), ("PPh3", 2)])),
    ("[MoO2Cl2]", ("Mo", 0, [("O", 2), ("Cl", 2)])),
    ("[VO(acac)2]", ("V", 0, [("O", 1), ("acac", 2)])),
    ("[PtClMe(cod)]", ("Pt", 0, [("Cl", 1), ("Me", 1), ("cod", 1)])),  # halides are not heads
    ("[Co(NH3)5OH2]3+", ("Co", 3, [("NH3", 5), ("H2O", 1)])),  # OH2 is the aqua spelling
    ("[Co(NH3)5OH]2+", ("Co", 2, [("NH3", 5), ("OH", 1)])),
    ("[Cr(CO)5NMe3]", ("Cr", 0, [("CO", 5), ("NMe3", 1)])),  # a catalogued amine, longest spelling
    ("CpFe(CO)2SPh", ("Fe", 0, [("Cp", 1), ("CO", 2), ("SPh", 1)])),
    ("[ReOCl2η5-Cp]", ("Re", 0, [("O", 1), ("Cl", 2), ("Cp", 1)])),  # a prefix ends the run
    ("[VO(OEt)3]", ("V", 0, [("O", 1), ("OEt", 3)])),  # an alkoxide after oxido is not an organyl
    ("[Os(N)(CH3)4]-", ("Os", -1, [("N", 1), ("Me", 4)])),  # every ligand in its own parentheses
]


@pytest.mark.parametrize("text, want", LEGITIMATE)
def test_condensed_notation_still_parses(text, want):
    assert parts(text) == want


# A head (a group 15/16 atom, alone or with hydrido/organyl groups) followed directly by hydrido or
# organyl ligands reads as one molecule as readily as several ligands: refused, with both writings.
AMBIGUOUS = [
    ("W(CO)5NPr3", "NPr3", 7, "(NPr3) for one ligand (not in the catalogue)", "(N)Pr3"),
    ("W(CO)5NEt2Me", "NEt2Me", 7, "(NEt2Me) for one ligand (not in the catalogue)", "(NEt2)Me"),
    ("[Mo(CO)5NH2Et]", "NH2Et", 9, "(NH2Et) for one ligand (not in the catalogue)", "(NH2)Et"),
    ("[OsNMe4]-", "NMe4", 4, "(NMe4) for one ligand (not in the catalogue)", "(N)Me4"),
    ("[W(CO)5 NEt2Me]", "NEt2Me", 9, "(NEt2Me) for one ligand", "(NEt2)Me"),
    ("[ReOCl3Me]", "OCl3Me", 4, "(OCl3Me) for one ligand", "(O)Cl3Me"),
    # parenthesised organyls after a bare head: N(CH3)3 is how trimethylamine is often written
    ("[Cr(CO)5N(CH3)3]", "N(CH3)3", 9, "(N(CH3)3) for one ligand (not in the catalogue)", "(N)(CH3)3"),
    ("[ReO(Me)4]", "O(Me)4", 4, "(O(Me)4) for one ligand", "(O)(Me)4"),
]


@pytest.mark.parametrize("text, word, pos, one, split", AMBIGUOUS)
def test_head_followed_by_organyls_is_refused(text, word, pos, one, split):
    line = refusal(text)
    assert f"'{word}' at position {pos} reads as one ligand {word} or as" in line
    assert one in line and f"or {split} for " in line and "ligands.toml under --rules DIR" in line


@pytest.mark.parametrize(
    "separate, want",
    [
        ("[Os(N)Me4]-", [("N", 1), ("Me", 4)]),
        ("W(CO)5(NEt2)Me", [("CO", 5), ("NEt2", 1), ("Me", 1)]),
        ("[Re(O)Cl3Me]", [("O", 1), ("Cl", 3), ("Me", 1)]),
    ],
)
def test_parentheses_make_the_separate_reading_explicit(separate, want):
    # the writing each refusal offers for separate ligands: a parenthesised head is explicit
    assert parts(separate)[2] == want


@pytest.mark.parametrize(
    "text, word, n, head",
    [("Cr(CO)5OMe2", "OMe2", 2, "OMe"), ("[ReOMe4]", "OMe4", 4, "OMe"), ("CpFe(CO)SPh2", "SPh2", 2, "SPh")],
)
def test_multi_atom_head_with_a_count_is_refused(text, word, n, head):
    # OMe2: two methoxido, or dimethyl ether (OEt2 is the catalogue's diethyl ether); ReOMe4: (OMe)4 or O + 4 Me
    line = refusal(text)
    assert f"'{word}'" in line and f"reads as {n} {head}" in line
    assert f"({head}){n} for {n} {head} or ({word}) for one ligand" in line
    assert parts(text.replace(word, f"({head}){n}"))[2][-1] == (head, n)


def _with_atom_ligands(tmp_path):
    """A user catalogue with phosphido P3- and sulfido S2- (ionic model, common practice), so that
    P and S are single-atom ligands as N and O are in the built-in catalogue."""
    (tmp_path / "ligands.toml").write_text(
        '[[ligand]]\nname = "P"\nlabel = "phosphido"\nsmiles = "[P-3:1]"\ndonors = ["P"]\ndenticity = 1\n'
        "charge = -3\nelectrons_covalent = 3\nelectrons_ionic = 6\n\n"
        '[[ligand]]\nname = "S"\nlabel = "sulfido"\nsmiles = "[S-2:1]"\ndonors = ["S"]\ndenticity = 1\n'
        "charge = -2\nelectrons_covalent = 2\nelectrons_ionic = 4\n",
        encoding="utf-8",
    )
    return load_rules([tmp_path])


def test_heads_from_a_user_catalogue(tmp_path):
    rs = _with_atom_ligands(tmp_path)
    # PBr2Ph: P then a halide and an organyl; SMeEt: S then two organyls: each one molecule as readily
    line = refusal("Mo(CO)5PBr2Ph", rs)
    assert "'PBr2Ph' at position 8 reads as one ligand PBr2Ph or as P (phosphido) followed by Br2Ph" in line
    assert "(P)Br2Ph for P and Br2Ph as separate ligands" in line
    assert "'SMeEt'" in refusal("Cr(CO)5SMeEt", rs)
    # a head followed by halides only stays a head plus halides; parenthesised, P is explicit
    assert parts("[MoSCl4]", rs)[2] == [("S", 1), ("Cl", 4)]
    assert parts("[Mo(P)Cl2Ph(CO)2]", rs)[2] == [("P", 1), ("Cl", 2), ("Ph", 1), ("CO", 2)]


def test_mn_mo_mg_heads_with_a_catalogue_group_are_real_formulas():
    # 'Mo(CO)3(PPP)' once read as the letter notation (M, a ligand 'o', a chelate 'CO', a chelate 'PPP')
    with pytest.raises(InputError) as exc:
        parse_formula("Mo(CO)3(PPP)", RS)
    assert "unknown ligand 'PPP'" in exc.value.line()
    assert parse_formula("Mn(AA)2b2", RS).metal == "M"  # the letter notation where no group is a ligand


# ---------------------------------------------------------------- rule 3: hapticity picks the entry


@pytest.mark.parametrize(
    "text, ligands, os_, ve, source",
    [
        ("[RuH2(η2-H2)(PPh3)3]", [("H", 2), ("dihydrogen", 1), ("PPh3", 3)], 2, 18,
         "from memory: RuH2(H2)(PPh3)3, a dihydrogen complex of Ru(II)"),
        ("[W(CO)3(PiPr3)2(eta2-H2)]", [("CO", 3), ("PiPr3", 2), ("dihydrogen", 1)], 0, 18,
         "from memory: Kubas' dihydrogen complex"),
        ("[RuH2(CO)(PPh3)3]", [("H", 2), ("CO", 1), ("PPh3", 3)], 2, 18, "from memory: two hydrides, not H2"),
        ("[Co(η3-C3H5)(CO)3]", [("allyl", 1), ("CO", 3)], 1, 18, "from memory: (eta3-allyl)Co(CO)3"),
        ("[Co(C3H5)(CO)3]", [("allyl", 1), ("CO", 3)], 1, 18, "bare C3H5: the hapto_default entry, eta3"),
        ("[Mn(η1-C3H5)(CO)5]", [("eta1-allyl", 1), ("CO", 5)], 1, 18,
         "from memory: sigma-allyl Mn(CO)5, Crabtree ch. 5"),
        ("[Fe(η4-C8H8)(CO)3]", [("eta4-cot", 1), ("CO", 3)], 0, 18, "from memory: (eta4-cot)Fe(CO)3"),
        ("[U(η8-C8H8)2]", [("cot", 2)], 4, None, "from memory: uranocene, U(IV); f-block, no 18e count"),
        ("[U(cot)2]", [("cot", 2)], 4, None, "bare cot: the hapto_default entry, eta8"),
    ],
)  # fmt: skip
def test_hapticity_picks_the_entry(text, ligands, os_, ve, source):
    _, _, got = parts(text)
    assert got == ligands, source
    c = count_electrons(parse_condensed(text, RS))
    assert (c.oxidation_state, c.valence_electrons) == (os_, ve), source


@pytest.mark.parametrize(
    "text, words",
    [
        ("[Mn(CO)5(η2-C3H5)]", "η2-C3H5 is not in the catalogue (C3H5 is catalogued as η3 (allyl), η1 (eta1-allyl))"),
        ("[Cr(CO)3(η6-C8H8)]", "η6-C8H8 is not in the catalogue (C8H8 is catalogued as η8 (cot), η4 (eta4-cot))"),
        ("[Fe(CO)4(η1-Cp)]", "η1-Cp is not in the catalogue (Cp is catalogued as η5 (Cp))"),
        ("[RuH2(H2)(PPh3)3]", "H2 is catalogued only with its hapticity: η2 (dihydrogen)"),
    ],
)
def test_missing_hapticity_is_refused_with_the_ones_there_are(text, words):
    line = refusal(text)
    assert words in line


def test_h2_without_prefix_says_both_writings():
    line = refusal("[RuH2(H2)(PPh3)3]")
    assert "write η2-H2, or H2 for 2 H as separate ligands" in line


# ---------------------------------------------------------------- spans


def test_spans_record_what_was_written():
    text = "[(η5-C5H5)Fe(CO)2Cl]"
    r = read_condensed(text, RS)
    assert r.metal == "Fe" and text[slice(*r.metal_span)] == "Fe"
    got = [(s.name, text[s.start : s.end], s.count, s.hapticity, s.group) for s in r.ligands]
    assert got == [("Cp", "C5H5", 1, 5, (1, 10)), ("CO", "CO", 2, None, (12, 16)), ("Cl", "Cl", 1, None, None)]
    assert text[r.ligands[0].prefix_start : r.ligands[0].start] == "η5-"


def test_entries_added_for_hapticity_are_complete():
    cat = load_ligands(RS)
    # sigma allyl: X ligand, 1e covalent / 2e ionic; eta4-cot: neutral diene, 4e (Crabtree, ch. 2)
    e1, e4 = cat["eta1-allyl"], cat["eta4-cot"]
    assert (e1.denticity, e1.hapticity, e1.charge, e1.electrons_covalent, e1.electrons_ionic) == (1, None, -1, 1, 2)
    assert (e4.denticity, e4.hapticity, e4.charge, e4.electrons_covalent, e4.electrons_ionic) == (2, 4, 0, 4, 4)
    assert cat["allyl"].hapto_default and cat["cot"].hapto_default


def test_the_readme_example_adds_the_refused_amine(tmp_path):
    # README, Ligand catalogue: tripropylamine as a user ligand; W(0) d6 + 5 CO + NR3 = 18 (Crabtree, ch. 2)
    import re
    from pathlib import Path

    readme = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    block = re.search(r"\n    \[\[ligand\]\]\n    name = \"NPr3\"\n(?:    .*\n)+", readme)
    assert block is not None
    (tmp_path / "ligands.toml").write_text("\n".join(line[4:] for line in block.group(0).splitlines()), "utf-8")
    rs = load_rules([tmp_path])
    comp = parse_condensed("[W(CO)5(NPr3)]", rs)
    assert [(k.name, n) for k, n in comp.parts] == [("CO", 5), ("NPr3", 1)]
    assert count_electrons(comp).valence_electrons == 18
    assert parse_condensed("W(CO)5NPr3", rs).parts == comp.parts  # now a catalogue spelling, read whole
