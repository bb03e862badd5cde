"""IUPAC additive names (enumerator.analyses.names) against printed names.

Sources: Nomenclature of Inorganic Chemistry, IUPAC Recommendations 2005
("Red Book"), read in a stored copy of the printed book, cited by section
and example; Wikipedia, "Polyhedral symbol" (a secondary source that
paraphrases the Red Book); and names recalled from the Red Book and the
textbooks, marked 'from memory'.
"""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner

from enumerator.analyses.descriptors import DescriptorAnalysis
from enumerator.analyses.names import additive_name, ligand_sort_key
from enumerator.cli import cli as main_cli
from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse

R = load_rules()


def _names(formula: str, geometry: str | None = None) -> dict[str, str]:
    res = analyse(formula, geometry=geometry)
    a = res.analysis(DescriptorAnalysis)
    return {a.get(k).text: v for k, v in a.names}


def _name(formula: str, descriptor: str | None = None) -> str:
    n = additive_name(parse_condensed(formula, R), R, descriptor)
    assert n.name, n.reason
    return n.name


def test_printed_trinitro_triammine_names():
    # Red Book IR-9.3.3.4, Examples 2 and 3 (book p. 183):
    # mer-[Co(NH3)3(NO2)3] is (OC-6-21)-triamminetrinitrito-κN-cobalt(III)
    names = _names("[Co(NH3)3(NO2)3]")
    assert names["OC-6-21"] == "(OC-6-21)-triamminetrinitrito-κN-cobalt(III)"
    assert names["OC-6-22"] == "(OC-6-22)-triamminetrinitrito-κN-cobalt(III)"


def test_printed_trichlorido_triammine_name():
    # Red Book p. 35 (italic capitals in polyhedral symbols), Example 4:
    # [CoCl3(NH3)3] (OC-6-22)-triamminetrichloridocobalt(III)
    assert _names("[CoCl3(NH3)3]")["OC-6-22"] == "(OC-6-22)-triamminetrichloridocobalt(III)"


def test_printed_bis_glycinato_platinum():
    # Red Book p. 35, item (d), Example 3: cis-bis(glycinato-κN,κO)platinum
    # (printed without the oxidation number, which the tool always gives)
    names = _names("[Pt(gly)2]", "SP-4")
    assert all("bis(glycinato-κN,κO)platinum(II)" in n for n in names.values())


def test_acetonitrile_pyridine_platinum():
    # Wikipedia, "Polyhedral symbol" (paraphrasing IR-9.3.3.3):
    # (SP-4-1)-(acetonitrile)dichlorido(pyridine)platinum(II); organic ligand
    # names are enclosed even when single
    assert _names("[PtCl2(NCMe)(py)]", "SP-4")["SP-4-1"] == "(SP-4-1)-(acetonitrile)dichlorido(pyridine)platinum(II)"


@pytest.mark.parametrize(
    "formula, name",
    [
        # all from memory (Red Book IR-9.2 style; Housecroft & Sharpe, ch. 19-24)
        ("[Fe(CN)6]4-", "hexacyanidoferrate(II)"),
        ("[Fe(CN)6]3-", "hexacyanidoferrate(III)"),
        ("[Ni(CO)4]", "tetracarbonylnickel(0)"),
        ("[Cr(CO)6]", "hexacarbonylchromium(0)"),
        ("[V(CO)6]-", "hexacarbonylvanadate(−I)"),
        ("[Co(NH3)5Cl]2+", "pentaamminechloridocobalt(III)"),
        ("[Co(NH3)6]3+", "hexaamminecobalt(III)"),
        ("[Cu(H2O)6]2+", "hexaaquacopper(II)"),
        ("[PtCl4]2-", "tetrachloridoplatinate(II)"),
        ("[Ag(CN)2]-", "dicyanidoargentate(I)"),
        ("[AuCl4]-", "tetrachloridoaurate(III)"),
        ("[Fe(Cp)2]", "bis(η5-cyclopentadienyl)iron(II)"),
        ("[Mn(Cp)(CO)3]", "tricarbonyl(η5-cyclopentadienyl)manganese(I)"),
        ("[Cr(C6H6)(CO)3]", "(η6-benzene)tricarbonylchromium(0)"),
        # nitrosyl: charge number (Ewens-Bassett), oxidation state left open
        ("[Fe(CN)5(NO)]2-", "pentacyanidonitrosylferrate(2−)"),
        ("[Co(NO)(CO)3]", "tricarbonylnitrosylcobalt"),
    ],
)
def test_textbook_names(formula, name):
    assert _name(formula) == name


def test_ordering_ignores_multiplying_prefixes_and_front_designators():
    # IR-9.2.2: alphanumerical order of the ligand names; the prefixes of the
    # complex (di, bis) do not count, but a ligand's own (tri in
    # triphenylphosphane) does; η and locants at the front are ignored (common practice)
    assert _name("[RuCl2(CO)2(PPh3)2]") == "dicarbonyldichloridobis(triphenylphosphane)ruthenium(II)"
    assert ligand_sort_key("η5-cyclopentadienyl") == "cyclopentadienyl"
    assert ligand_sort_key("2,2′-bipyridine") == "bipyridine"
    assert ligand_sort_key("N,N,N′,N′-tetramethylethane-1,2-diamine") == "tetramethylethanediamine"
    assert ligand_sort_key("tri-tert-butylphosphane").startswith("tri")


def test_enclosing_marks_nest():
    # IR-9.2.2.3 / P-16.5: ( ), then [ ( ) ], then { [ ( ) ] } (common practice)
    assert _name("[Co(dien)2]3+") == "bis[N-(2-aminoethyl)ethane-1,2-diamine]cobalt(III)"
    assert _name("[Mo(CO)4(dppe)]") == "tetracarbonyl[ethane-1,2-diylbis(diphenylphosphane)]molybdenum(0)"
    n = _name("[Mo(CO)3(triphos)]")
    assert n.startswith("tricarbonyl({2-[(diphenylphosphanyl)methyl]") and n.endswith(")molybdenum(0)")


def test_brackets_of_a_von_baeyer_name_are_not_enclosing_marks():
    # IUPAC 2005 IR-2.2 and P-16.5 (from memory): the brackets of bicyclo[2.2.1] belong to the ring name, so
    # nbd is enclosed in parentheses like any organic ligand name without enclosing marks of its own
    assert _name("[Mo(CO)4(nbd)]") == "(η4-bicyclo[2.2.1]hepta-2,5-diene)tetracarbonylmolybdenum(0)"
    assert "[η4-bicyclo" not in _name("[RhCl(nbd)(PPh3)]")


def test_descriptor_in_front_with_typographic_primes():
    # the descriptor goes in parentheses before the name (IR-9.3.2.1); primes
    # print as ′ (Red Book typography)
    names = _names("[Co(dien)2]3+")
    assert names["OC-6-1'2"] == "(OC-6-1′2)-bis[N-(2-aminoethyl)ethane-1,2-diamine]cobalt(III)"
    # one stereoisomer: no descriptor needed
    assert list(_names("[Ni(CO)4]").values()) == ["tetracarbonylnickel(0)"]


def test_no_name_is_explained():
    res = analyse("[Fe(CO)4(13CO)]", geometry="TBPY-5")
    a = res.analysis(DescriptorAnalysis)
    assert not a.names and "13CO" in a.name_note
    assert "names" in a.top_json()["descriptor_rules"]
    assert additive_name(analyse("Ma4b2").composition, R, None).name is None


def test_json_and_tables():
    runner = CliRunner()
    out = runner.invoke(main_cli, ["isomers", "[Co(NH3)3(NO2)3]", "--json"])
    assert out.exit_code == 0, out.output
    doc = json.loads(out.output)
    assert {i["name"] for i in doc["isomers"]} == {
        "(OC-6-21)-triamminetrinitrito-κN-cobalt(III)",
        "(OC-6-22)-triamminetrinitrito-κN-cobalt(III)",
    }
    # abstract letters: the key is there, null
    doc = json.loads(runner.invoke(main_cli, ["isomers", "Ma4b2", "--json"]).output)
    assert all(i["name"] is None for i in doc["isomers"])
    # the terminal table leaves the wide column out and lists the names below it
    text = runner.invoke(main_cli, ["isomers", "[Co(NH3)3(NO2)3]"]).output
    table_head = next(line for line in text.splitlines() if line.startswith("isomer"))
    assert "IUPAC name" not in table_head
    assert "IUPAC names" in text and "triamminetrinitrito-κN-cobalt(III)" in text


def test_element_names_are_read_only_and_checked(tmp_path):
    import pytest

    from enumerator.errors import RuleError
    from enumerator.rules.element_names import element_names

    names = element_names(R)
    assert names["Co"] == (
        "cobalt",
        "cobaltate",
    )  # anionic complexes take the -ate form (IUPAC 2005, IR-9.2.2; from memory)
    with pytest.raises(TypeError):
        names["Co"] = ("x", "y")  # type: ignore[index]
    (tmp_path / "element_names.toml").write_text('[[element]]\nsymbol = "Zz"\nname = "z1"\n', encoding="utf-8")
    with pytest.raises(RuleError) as exc:
        element_names(load_rules([tmp_path]))
    assert "element_names.toml" in exc.value.line()
