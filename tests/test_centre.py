"""Oxidation states, d counts, electron counts and geometry choice of textbook complexes."""

from __future__ import annotations

import pytest

from enumerator.analyses.centre import choose_geometry, count_electrons
from enumerator.model.elements import group_of
from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import Request, run

RS = load_rules()


def ec(text):
    return count_electrons(parse_condensed(text, RS))


@pytest.mark.parametrize(
    "formula, os_, d, ve, source",
    [
        ("[Fe(CN)5(NO)]2-", 2, 6, 18, "Housecroft & Sharpe, Inorganic Chemistry: nitroprusside, Fe(II) with NO+"),
        ("Ni(CO)4", 0, 10, 18, "Crabtree, The Organometallic Chemistry of the Transition Metals, ch. 2"),
        ("[Fe(CO)5]", 0, 8, 18, "Crabtree, ch. 2 (18-electron carbonyls)"),
        ("[Cr(CO)6]", 0, 6, 18, "Crabtree, ch. 2"),
        ("[CpMn(CO)3]", 1, 6, 18, "Crabtree, ch. 2: CpMn(CO)3, Mn(I) d6 18e (ionic model)"),
        ("[Cp2Fe]", 2, 6, 18, "Crabtree, ch. 2: ferrocene Fe(II) d6 18e"),
        ("[Cr(η6-C6H6)(CO)3]", 0, 6, 18, "Spessard & Miessler, Organometallic Chemistry: (benzene)Cr(CO)3"),
        ("[IrCl(CO)(PPh3)2]", 1, 8, 16, "Crabtree, ch. 2: Vaska's complex, 16e Ir(I)"),
        ("[PtCl2(NH3)2]", 2, 8, 16, "Housecroft & Sharpe: cisplatin, square-planar Pt(II) d8"),
        ("[Mn(CO)5(Me)]", 1, 6, 18, "Crabtree, ch. 2: MeMn(CO)5"),
        ("[Fe(CN)6]4-", 2, 6, 18, "Housecroft & Sharpe: hexacyanidoferrate(II), low-spin d6"),
        ("[Fe(CN)6]3-", 3, 5, 17, "Housecroft & Sharpe: hexacyanidoferrate(III), d5"),
        ("[Co(NH3)5(NObent)]2+", 3, 6, 18, "from memory: bent {CoNO}8 nitrosyl of pentaammine cobalt"),
        ("[MnO4]-", 7, 0, 16, "Housecroft & Sharpe: permanganate Mn(VII) d0; oxo counted as X2 (Crabtree, ch. 2)"),
        ("[Fe(CO)4]2-", -2, 10, 18, "Crabtree, ch. 2 / Collman's reagent anion Fe(-II) d10"),
        ("[RhCl(PPh3)3]", 1, 8, 16, "Crabtree: Wilkinson's catalyst, 16e Rh(I)"),
    ],
)
def test_textbook_counts(formula, os_, d, ve, source):
    c = ec(formula)
    assert (c.oxidation_state, c.d_electrons, c.valence_electrons) == (os_, d, ve), source
    assert c.valence_electrons_ionic == c.valence_electrons  # the two counting methods agree (Crabtree, ch. 2)


def test_enemark_feltham():
    # Enemark & Feltham, Coord. Chem. Rev. 13 (1974) 339: nitroprusside is {FeNO}6;
    # the notation does not depend on the linear/bent formalism.
    assert ec("[Fe(CN)5(NO)]2-").enemark_feltham == "{FeNO}6"
    assert ec("[Co(NH3)5(NO)]2+").enemark_feltham == ec("[Co(NH3)5(NObent)]2+").enemark_feltham == "{CoNO}8"
    assert ec("[Fe(CO)2(NO)2]").enemark_feltham == "{Fe(NO)2}10"  # from memory: tetrahedral {Fe(NO)2}10


def test_group_numbers_against_pymatgen():
    """Group numbers computed from Z agree with pymatgen (reference library) outside the f-block."""
    from pymatgen.core.periodic_table import Element

    for z in range(1, 104):
        g, block = group_of(z)
        if block == "f":
            continue
        assert g == Element.from_Z(z).group, z


@pytest.mark.parametrize(
    "formula, sym, alt, why",
    [
        ("[PtCl2(NH3)2]", "SP-4", "T-4", "d8"),  # Housecroft & Sharpe: four-coordinate d8 square planar
        ("Ni(CO)4", "T-4", "SP-4", "d10"),  # Crabtree: Ni(CO)4 tetrahedral
        ("[Fe(CO)5]", "TBPY-5", "SPY-5", "trigonal bipyramid"),  # Fe(CO)5 is D3h (Housecroft & Sharpe)
        ("[Cr(CO)6]", "OC-6", "TPR-6", "octahedral"),
        ("[CpMn(CO)3]", "T-4", None, "three-legged piano stool"),  # Housecroft & Sharpe: CpMn(CO)3 half-sandwich
    ],
)
def test_default_geometry(formula, sym, alt, why):
    from enumerator.analyses.centre import default_geometry

    s, reason, alts = default_geometry(parse_condensed(formula, RS), RS)
    assert s == sym and (alt is None or alt in alts) and why in reason


def test_override_and_json():
    comp = parse_condensed("[Fe(CO)5]", RS)
    s, reason = choose_geometry(comp, RS, "SPY-5")
    assert s == "SPY-5" and "as requested" in reason and "TBPY-5" in reason
    res = run(Request("[RuCl2(CO)2(PPh3)2]"))
    c = res.to_dict()["centre"]
    assert (c["metal"], c["oxidation_state"], c["d_electrons"], c["valence_electrons"]) == ("Ru", 2, 6, 18)
    assert isinstance(c["geometry_reason"], str) and c["geometry_reason"]


@pytest.mark.parametrize(
    "formula, geo, geometric, stereo, source",
    [
        ("[Co(NH3)4Cl2]+", 2, 2, 2, "Werner's praseo/violeo salts; Housecroft & Sharpe: cis and trans"),
        ("[Co(en)2Cl2]+", 2, 2, 3, "Werner 1911: trans plus the resolved cis enantiomers; Housecroft & Sharpe"),
        ("[RuCl2(CO)2(PPh3)2]", 5, 5, 6, "from memory: five geometric isomers of MA2B2C2, one of them chiral"),
        ("[Co(NH3)3Cl3]", 2, 2, 2, "Housecroft & Sharpe: fac and mer"),
        ("[Fe(CN)5(NO)]2-", 1, 1, 1, "common practice: one MA5B isomer"),
    ],
)
def test_isomer_counts_of_real_complexes(formula, geo, geometric, stereo, source):
    r = run(Request(formula))
    assert (r.isomer_set.geometric_isomers, r.isomer_set.stereoisomers) == (geometric, stereo), source
    assert r.geometry.symbol == "OC-6"


def test_point_groups_real():
    # Housecroft & Sharpe, character-table examples: trans-[Co(NH3)4Cl2]+ D4h, cis C2v (NH3 as points)
    r = run(Request("[Co(NH3)4Cl2]+"))
    assert sorted(i.point_group for i in r.isomers) == ["C2v", "D4h"]
    r = run(Request("[CpMn(CO)3]"))
    assert [i.point_group for i in r.isomers] == ["C3v"]  # piano-stool local symmetry, common practice
