"""Names of the tool's own where no standard exists: they cannot pass for IUPAC symbols, old spellings are
read with a pointer, and the labels the tool prints are explained."""

from __future__ import annotations

import json

import pytest

from enumerator.errors import RuleError
from enumerator.rules.ruleset import RENAMED_GEOMETRIES, load_rules
from enumerator.workflow.pipeline import analyse
from tests._cli import cli

RS = load_rules()

#: IUPAC polyhedral symbols: Nomenclature of Inorganic Chemistry 2005, Table IR-9.3 (CN 3-6 read in a stored
#: copy of p. 186) and Wikipedia, "Polyhedral symbol" (CN 2-8, paraphrasing the Red Book); IC-12 from memory.
IUPAC_SYMBOLS = {
    "L-2",
    "A-2",
    "TP-3",
    "TPY-3",
    "TS-3",
    "T-4",
    "SP-4",
    "SPY-4",
    "SS-4",
    "TBPY-5",
    "SPY-5",
    "OC-6",
    "TPR-6",
    "PBPY-7",
    "OCF-7",
    "TPRS-7",
    "CU-8",
    "SAPR-8",
    "DD-8",
    "HBPY-8",
    "OCT-8",
    "TPRT-8",
    "TPRS-8",
    "IC-12",
}


def test_every_builtin_symbol_is_iupac_or_plainly_ours():
    for sym in RS.geometries:
        assert sym in IUPAC_SYMBOLS or sym[0].islower(), sym


def test_the_hexagonal_plane_has_a_name_of_our_own():
    # Table IR-9.3 lists OC-6 and TPR-6 only for six-coordination, so HP-6 was not an IUPAC symbol
    g = RS.geometry("hexplane-6")
    assert g.name == "hexagonal plane" and g.coordination_number == 6
    assert "HP-6" not in RS.geometries and "HP-6" not in IUPAC_SYMBOLS


def test_the_old_spelling_is_read_with_a_pointer():
    assert RENAMED_GEOMETRIES["HP-6"] == "hexplane-6"
    assert RS.geometry("HP-6") is RS.geometry("hexplane-6")
    assert RS.geometry_note("hp-6").startswith("hp-6 is now written hexplane-6")
    assert RS.geometry_note("OC-6") is None and RS.geometry_note(None) is None
    code, out, err = cli(["isomers", "Ma4b2", "-g", "HP-6"])
    assert code == 0 and err == ""
    assert "note: HP-6 is now written hexplane-6" in out and "Ma4b2 on hexplane-6 (hexagonal plane)" in out
    doc = json.loads(cli(["isomers", "Ma4b2", "-g", "HP-6", "--json"])[1])
    assert doc["geometry"] == "hexplane-6"
    assert any("now written hexplane-6" in n for n in doc["notes"])
    # the three Werner isomers of Ma4b2 on the hexagonal plane (Greenwood & Earnshaw, ch. 19; from memory)
    assert analyse("Ma4b2", geometry="HP-6").isomer_set.geometric_isomers == 3


def _geometry_folder(tmp_path, symbol, sites):
    d = tmp_path / "geometries"
    d.mkdir()
    (d / "mine.toml").write_text(f'symbol = "{symbol}"\nname = "mine"\nsites = {sites}\n', encoding="utf-8")
    return load_rules([tmp_path])


SIX = "[[1,0,0],[0.5,0.866,0],[-0.5,0.866,0],[-1,0,0],[-0.5,-0.866,0],[0.5,-0.866,0]]"


# PPY-6 is an IUPAC symbol (Table IR-9.3) with no built-in file; a built-in symbol such as OC-6 may be reused
# only for its own shape (DEVELOPERS.md, "Robustness"), so a hexagon under OC-6 is refused
@pytest.mark.parametrize("symbol", ["hexagon-6", "PPY-6", "XO-6"])
def test_the_symbol_check_accepts_iupac_forms_and_our_own(tmp_path, symbol):
    assert _geometry_folder(tmp_path, symbol, SIX).geometry(symbol).coordination_number == 6


@pytest.mark.parametrize(
    "symbol, words",
    [
        ("Hexplane-6", "not a polyhedral symbol"),
        ("hexplane6", "not a polyhedral symbol"),
        ("hx-6", "not a polyhedral symbol"),
        ("hexplane-5", "ends in 5 but 6 sites are listed"),
        ("OC-4", "ends in 4 but 6 sites are listed"),
    ],
)
def test_the_symbol_check_still_refuses_malformed_symbols(tmp_path, symbol, words):
    with pytest.raises(RuleError, match=words):
        _ = _geometry_folder(tmp_path, symbol, SIX).geometries


def test_a_user_geometry_with_the_old_symbol_wins_over_the_pointer(tmp_path):
    rs = _geometry_folder(tmp_path, "HP-6", SIX)
    assert rs.geometry("HP-6").name == "mine" and rs.geometry_note("HP-6") is None


def test_no_iupac_name_carries_our_own_symbol():
    # IR-9.3 has no descriptor for a shape without a polyhedral symbol: the additive name goes without one
    code, out, _ = cli(["isomers", "[PtCl2(NH3)4]2+", "-g", "hexplane-6"])
    assert code == 0 and "(hexplane-6)-" not in out and "tetraamminedichloridoplatinum(IV)" in out


def test_the_pair_matrix_explains_its_cells():
    # the cells are the tool's own abbreviations: every one is in the legend
    code, out, _ = cli(["isomers", "M(AA)2b2", "--reporter", "b=CO"])
    assert code == 0
    for words in (
        "IR = IR band counts",
        "IRp = IR told apart by the band pattern",
        "Ra = Raman",
        "-- = ",
        "en = enantiomers",
    ):
        assert words in out
