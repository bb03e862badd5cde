"""The spelling index of the ligand catalogue: longest match, hapticity readings, and the load-time
checks on spellings that entries share (one ligand at two hapticities, one of them the default)."""

from __future__ import annotations

import pytest

from enumerator.errors import InputError, RuleError
from enumerator.parse.condensed import parse_condensed
from enumerator.rules.ligands import all_spellings, find_ligand, load_ligands, spelling_index
from enumerator.rules.ruleset import load_rules

RS = load_rules()
INDEX = spelling_index(RS)
BARE = sorted(INDEX.bare, key=lambda s: (-len(s), s))


def _brute_longest(text, start, end):
    """The old parser's scan: every spelling, longest first (the behaviour the index must keep)."""
    for s in BARE:
        if start + len(s) <= end and text.startswith(s, start):
            return start + len(s)
    return start


def test_index_matches_the_scan_on_every_spelling():
    # each spelling alone, followed by each character that ends or continues a formula
    for s in INDEX.bare:
        for tail in ("", "2", "(", "Cl", "Me", "x", "*", ")"):
            text = s + tail
            for start in range(len(text)):
                assert INDEX.longest(text, start, len(text)) == _brute_longest(text, start, len(text)), (text, start)


def test_index_respects_the_end():
    text = "NH3)"
    assert INDEX.longest(text, 0, 2) == _brute_longest(text, 0, 2) == 1  # 'NH3' is cut: nitrido 'N'
    assert INDEX.longest(text, 0, 3) == 3


def test_prefix_only_spellings_need_their_prefix():
    # 'H2' stands for dihydrogen only as η2-H2 (common practice writes it so), so RuH2 keeps two hydrides
    assert INDEX.longest("H2", 0, 2) == 1  # bare: the hydride 'H'
    assert INDEX.longest("H2", 0, 2, prefixed=True) == 2
    assert INDEX.resolve("H2", 2) == "dihydrogen" and INDEX.resolve("H2", None) is None
    assert "H2" not in all_spellings(RS) and all_spellings(RS)["η2-H2"] == "dihydrogen"


@pytest.mark.parametrize(
    "text, name",
    [
        ("C3H5", "allyl"),
        ("allyl", "allyl"),
        ("η3-C3H5", "allyl"),
        ("η1-C3H5", "eta1-allyl"),
        ("eta1-allyl", "eta1-allyl"),
        ("C8H8", "cot"),
        ("η8-cot", "cot"),
        ("η4-C8H8", "eta4-cot"),
        ("h4-COT", "eta4-cot"),
        ("η2-H2", "dihydrogen"),
        ("eta2-H2", "dihydrogen"),
        ("dihydrogen", "dihydrogen"),
        ("η5-Cp", "Cp"),
    ],
)
def test_find_ligand_reads_the_hapticity(text, name):
    assert find_ligand(RS, text).name == name


@pytest.mark.parametrize(
    "text, words",
    [
        ("η6-cot", "η6-cot is not in the catalogue (cot is catalogued as η8 (cot), η4 (eta4-cot))"),
        ("H2", None),  # not a spelling without its prefix: an unknown ligand with the nearest names
        ("η3-Cp", "η3-Cp is not in the catalogue (Cp is catalogued as η5 (Cp))"),
    ],
)
def test_find_ligand_refusals(text, words):
    with pytest.raises(InputError) as exc:
        find_ligand(RS, text)
    if words:
        assert words in exc.value.line()


def test_shared_spellings_map_to_the_default():
    spell = all_spellings(RS)
    assert spell["C3H5"] == spell["allyl"] == "allyl" and spell["C8H8"] == spell["COT"] == "cot"


# ---------------------------------------------------------------- load-time checks on user files

ETA6_COT = """
[[ligand]]
name = "eta6-cot"
aliases = ["cot", "C8H8"]
label = "eta6-cyclooctatetraene"
smiles = "[CH:1]1=[CH:2][CH:3]=[CH:4][CH:5]=[CH:6]C=C1"
donors = ["C", "C", "C"]
denticity = 3
hapticity = 6
charge = 0
electrons_covalent = 6
electrons_ionic = 6
"""


def _user(tmp_path, body):
    (tmp_path / "ligands.toml").write_text(body, encoding="utf-8")
    return load_rules([tmp_path])


def test_a_user_entry_adds_a_hapticity(tmp_path):
    # (η6-C8H8)Cr(CO)3: cot as a triene on three sites, Cr(0) d6 + 6 + 6 = 18 (from memory)
    rs = _user(tmp_path, ETA6_COT)
    c = parse_condensed("[Cr(CO)3(η6-C8H8)]", rs)
    assert [(k.name, n) for k, n in c.parts] == [("CO", 3), ("eta6-cot", 1)]
    assert [(k.name, n) for k, n in parse_condensed("[U(C8H8)2]", rs).parts] == [("cot", 2)]  # default kept


@pytest.mark.parametrize(
    "change, words",
    [
        # a second default among the entries that share 'cot'
        (("charge = 0", "charge = 0\nhapto_default = true"), "2 of them carry hapto_default"),
        # a spelling shared with a different molecule
        (('aliases = ["cot", "C8H8"]', 'aliases = ["cot", "C8H8", "C4H6"]'), "a different molecule"),
        # a prefix that contradicts the entry's own hapticity
        (('aliases = ["cot", "C8H8"]', 'aliases = ["cot", "η4-C8H8"]'), "says η4 but the ligand binds through 6"),
        # hapto_default must be true or false
        (("charge = 0", 'charge = 0\nhapto_default = "yes"'), "'hapto_default' must be true or false"),
    ],
)
def test_shared_spelling_errors(tmp_path, change, words):
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, ETA6_COT.replace(*change)))
    assert words in exc.value.line() and "ligands.toml" in exc.value.line()


def test_same_spelling_at_the_same_hapticity_is_refused(tmp_path):
    # a second eta4 entry spelled C8H8: the built-in eta4-cot already is
    body = (
        '[[ligand]]\nname = "cot-diene"\naliases = ["C8H8"]\nlabel = "x"\n'
        'smiles = "[CH:1]1=[CH:2][CH:3]=[CH:4]C=CC=C1"\ndonors = ["C", "C"]\ndenticity = 2\nhapticity = 4\n'
        "charge = 0\nelectrons_covalent = 4\nelectrons_ionic = 4\n"
    )
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, body))
    assert "spelling 'C8H8' is already the name or an alias of" in exc.value.line()
    assert "binds through as many atoms (4)" in exc.value.line()


def test_default_on_an_unshared_entry_is_refused(tmp_path):
    body = ETA6_COT.replace('aliases = ["cot", "C8H8"]', 'aliases = ["C8H8x"]').replace(
        "charge = 0", "charge = 0\nhapto_default = true"
    )
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, body))
    assert "shares no spelling" in exc.value.line()


def test_shared_spelling_without_a_default_is_refused(tmp_path):
    # a user file replacing the built-in allyl by an entry without hapto_default leaves C3H5 two-way
    body = """
[[ligand]]
name = "allyl"
aliases = ["C3H5"]
label = "eta3-allyl"
smiles = "[CH2-:1][CH:2]=[CH2:3]"
donors = ["C", "C"]
denticity = 2
hapticity = 3
charge = -1
electrons_covalent = 3
electrons_ionic = 4
"""
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, body))
    assert "0 of them carry hapto_default" in exc.value.line()


def test_alias_clash_names_both_entries(tmp_path):
    body = (
        '[[ligand]]\nname = "Zq"\naliases = ["CO"]\nlabel = "x"\nsmiles = "[Cl-:1]"\ndonors = ["Cl"]\n'
        "denticity = 1\ncharge = -1\nelectrons_covalent = 1\nelectrons_ionic = 2\n"
    )
    with pytest.raises(RuleError) as exc:
        load_ligands(_user(tmp_path, body))
    assert "spelling 'CO' is already the name or an alias of 'CO'" in exc.value.line() and "(Zq)" in exc.value.line()
