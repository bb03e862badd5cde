"""Departures from the electron-count rules get a warning line of their own, with the likely cause and the
nearest formulas that count 18; the usual exceptions do not."""

from __future__ import annotations

import json

import pytest

from enumerator.analyses.centre import CentreAnalysis, check_count, count_electrons
from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse
from tests._cli import cli

RS = load_rules()


def check(formula):
    comp = parse_condensed(formula, RS)
    return check_count(comp, count_electrons(comp), RS)


@pytest.mark.parametrize(
    "formula, ve, nearest, source",
    [
        (
            "[RuCl3(CO)2(PPh3)2]",
            19,
            "[RuCl2(CO)2(PPh3)2]",
            "from memory: [RuCl2(CO)2(PPh3)2] is the known 18-electron Ru(II) dicarbonyl (examples/ruthenium)",
        ),
        ("[Ni(CO)5]", 20, "[Ni(CO)4]", "Crabtree, The Organometallic Chemistry of the Transition Metals, ch. 2"),
        ("[W(CO)2(NMe3)]", 12, "[W(CO)5(NMe3)]", "from memory: W(CO)5(amine) complexes count 18"),
        ("[Fe(CO)4]", 16, "[Fe(CO)5]", "Crabtree, ch. 2: Fe(CO)4 is the 16-electron fragment of Fe(CO)5"),
    ],
)
def test_departures_are_warned_with_the_nearest_18_electron_formula(formula, ve, nearest, source):
    chk = check(formula)
    assert chk.verdict == "departure" and chk.valence_electrons == ve and chk.expected == 18, source
    assert len(chk.warnings) == 1 and chk.warnings[0].startswith(f"{ve} valence electrons"), source
    assert nearest in [s.formula for s in chk.suggestions], source
    assert nearest in chk.warnings[0]


def test_causes_are_named():
    # common practice: an odd count points at a charge or a count, an excess at a typo or a
    # dissociating ligand, a shortfall at a missing ligand
    assert "wrong charge" in check("[RuCl3(CO)2(PPh3)2]").warnings[0]
    assert "[RuCl3(CO)2(PPh3)2]+ (charge 0 -> 1+)" in check("[RuCl3(CO)2(PPh3)2]").warnings[0]
    assert "dissociates" in check("[Ni(CO)5]").warnings[0]
    assert "missing ligand" in check("[W(CO)2(NMe3)]").warnings[0]
    assert "(CO 5 -> 4)" in check("[Ni(CO)5]").warnings[0]


def test_a_linear_nitrosyl_over_18_points_at_the_bent_one():
    # Enemark & Feltham, Coord. Chem. Rev. 13 (1974) 339: {CoNO}8 six-coordinate nitrosyls are bent;
    # written with a linear NO, [Co(NH3)5(NO)]2+ counts 20
    chk = check("[Co(NH3)5(NO)]2+")
    assert chk.verdict == "departure" and chk.valence_electrons == 20
    assert "[Co(NH3)5(NObent)]2+" in [s.formula for s in chk.suggestions]
    assert "bent nitrosyl written as linear NO" in chk.warnings[0]


@pytest.mark.parametrize(
    "formula, ve, verdict, source",
    [
        ("[Cr(CO)6]", 18, "obeyed", "Crabtree, ch. 2"),
        ("[PtCl2(NH3)2]", 16, "usual", "Housecroft & Sharpe: square-planar Pt(II) d8, 16 electrons"),
        ("[IrCl(CO)(PPh3)2]", 16, "usual", "Crabtree, ch. 2: Vaska's complex, 16e Ir(I)"),
        ("[Cp2TiCl2]", 16, "usual", "Crabtree, ch. 2: early-metal d0 complexes below 18"),
        ("[AuCl(PPh3)]", 14, "usual", "from memory: linear two-coordinate Au(I), 14 electrons"),
        ("[Ag(CN)2]-", 14, "usual", "from memory: linear [Ag(CN)2]-, d10, 14 electrons"),
        ("[Cp2Co]", 19, "usual", "Crabtree, metallocenes: cobaltocene 19 electrons (from memory)"),
        ("[Cp2Ni]", 20, "usual", "Crabtree, metallocenes: nickelocene 20 electrons (from memory)"),
        ("[V(CO)6]", 17, "radical", "Housecroft & Sharpe: V(CO)6, a stable 17-electron radical (from memory)"),
        ("[Cr(NH3)6]3+", 15, "not judged", "Crabtree, ch. 2: Werner complexes need not obey the rule"),
        ("[Fe(CN)6]3-", 17, "not judged", "Housecroft & Sharpe: low-spin d5 [Fe(CN)6]3-, 17 electrons"),
    ],
)
def test_usual_counts_are_not_warned(formula, ve, verdict, source):
    chk = check(formula)
    assert (chk.valence_electrons, chk.verdict, chk.warnings) == (ve, verdict, ()), source


def test_a_radical_is_noted_with_its_closed_shell_neighbour():
    # Housecroft & Sharpe (from memory): [V(CO)6] is a 17-electron radical; [V(CO)6]- counts 18
    chk = check("[V(CO)6]")
    assert "radical" in chk.notes[0] and "[V(CO)6]-" in chk.notes[0]


def test_text_output_has_a_warning_line():
    code, out, _ = cli(["isomers", "[Ni(CO)5]"])
    assert code == 0
    lines = out.splitlines()
    k = lines.index("valence electrons: 20 (+2 from 18)")
    assert lines[k + 1].startswith("warning: 20 valence electrons, 2 above 18")
    code, out, _ = cli(["isomers", "[Cr(CO)6]"])
    assert "warning:" not in out and "valence electrons: 18 (18-electron rule obeyed)" in out


def test_json_carries_the_check_and_the_warnings():
    code, out, _ = cli(["isomers", "[RuCl3(CO)2(PPh3)2]", "--json"])
    centre = json.loads(out)["centre"]
    assert code == 0 and centre["count_check"]["verdict"] == "departure"
    assert centre["count_check"]["departure"] == 1
    assert [s["formula"] for s in centre["count_check"]["suggestions"]] == [
        "[RuCl2(CO)2(PPh3)2]",
        "[RuCl3(CO)2(PPh3)2]+",
    ]
    assert len(centre["count_warnings"]) == 1
    assert json.loads(cli(["isomers", "[Cr(CO)6]", "--json"])[1])["centre"]["count_warnings"] == []


def test_every_suggestion_parses_back_and_counts_18():
    for formula in ("[RuCl3(CO)2(PPh3)2]", "[Ni(CO)5]", "[W(CO)2(NMe3)]", "[Fe(CO)4]", "[Co(NH3)5(NO)]2+"):
        for s in check(formula).suggestions:
            assert count_electrons(parse_condensed(s.formula, RS)).valence_electrons == 18, s


def test_the_stage_carries_the_check():
    a = analyse("[Ni(CO)5]").analysis(CentreAnalysis)
    assert a.check is not None and a.warnings == a.check.warnings
