"""The substitution rule-file loader (enumerator.rules.substitution).

Rule files are data: these tests check that every malformed file is refused
with one line naming file and key, and how a rule set is chosen.  The
built-in series ranks come from the files' own sources (trans effect:
Basolo & Pearson; cis-labilisation: Atwood & Brown), quoted beside each check.
"""

from __future__ import annotations

import pytest

from enumerator.errors import InputError, RuleError
from enumerator.rules.ruleset import load_rules
from enumerator.rules.substitution import (
    choose_rule_set,
    choose_rule_set_for_step,
    load_substitution_rules,
)

LETTERS_TRANS = """
name = "letters-trans"
title = "letters ordered for a test"
source = "invented for a test (demo data)"
geometries = ["SP-4"]
labilises = "trans"
series = ["c", "a", "b"]
ties = "statistical"
"""


def _write(folder, name, body):
    d = folder / "substitution"
    d.mkdir(parents=True, exist_ok=True)
    (d / f"{name}.toml").write_text(body, encoding="utf-8")
    return str(folder)


def test_built_in_sets_and_ranks():
    sets = load_substitution_rules(load_rules())
    assert sorted(sets) == ["cis-labilisation", "statistical", "trans-effect"]
    te = sets["trans-effect"]
    # Basolo & Pearson, Mechanisms of Inorganic Reactions, ch. 5: NO2- > Cl- > NH3 in trans effect
    assert te.rank("NO2") < te.rank("Cl") < te.rank("NH3")
    assert te.rank("nitro") == te.rank("NO2")  # catalogue alias of NO2 (rules/ligands.toml)
    assert te.rank("b") is None and te.unranked(["b", "Cl"]) == ["b"]
    assert sets["statistical"].statistical and sets["statistical"].unranked(["b"]) == []


def test_loaded_sets_are_read_only():
    # project rule: caches return immutable data
    sets = load_substitution_rules(load_rules())
    with pytest.raises(TypeError):
        sets["mine"] = sets["statistical"]  # type: ignore[index]


@pytest.mark.parametrize(
    "name, body, expect",
    [
        ("bad-mode", LETTERS_TRANS.replace('labilises = "trans"', 'labilises = "sideways"'), "labilises"),
        ("bad-geo", LETTERS_TRANS.replace('["SP-4"]', '["SP-5"]'), "SP-5"),
        ("twice", LETTERS_TRANS.replace('["c", "a", "b"]', '["c", "a", "c"]'), "twice"),
        ("missing", LETTERS_TRANS.replace('ties = "statistical"', ""), "ties"),
        ("typo", LETTERS_TRANS + "priorty = 3\n", "priority"),
        ("bad-name", LETTERS_TRANS.replace('name = "letters-trans"', 'name = "two words"'), "plain name"),
        ("no-source", LETTERS_TRANS.replace('"invented for a test (demo data)"', '""'), "source"),
        ("bad-ties", LETTERS_TRANS.replace('ties = "statistical"', 'ties = "coin"'), "ties"),
        ("empty-geo", LETTERS_TRANS.replace('["SP-4"]', "[]"), "geometries"),
        ("bad-series", LETTERS_TRANS.replace('["c", "a", "b"]', '["c", 3]'), "series[1]"),
        ("no-series", LETTERS_TRANS.replace('series = ["c", "a", "b"]', ""), "needs a series"),
        ("stat-series", LETTERS_TRANS.replace('labilises = "trans"', 'labilises = "none"'), "has no series"),
        ("bad-priority", LETTERS_TRANS + 'priority = "high"\n', "priority"),
        ("bad-note", LETTERS_TRANS + "note = 3\n", "note"),
        ("bad-leaving", LETTERS_TRANS + 'leaving = "CO"\n', "leaving"),
    ],
)
def test_bad_rule_files_name_file_and_key(tmp_path, name, body, expect):
    folder = _write(tmp_path / name, "r", body)
    with pytest.raises(RuleError) as exc:
        load_substitution_rules(load_rules([folder]))
    message = str(exc.value)
    assert folder in message and expect in message and "\n" not in message  # one line


def test_same_name_twice_in_one_folder_is_an_error(tmp_path):
    _write(tmp_path, "one", LETTERS_TRANS)
    _write(tmp_path, "two", LETTERS_TRANS)
    with pytest.raises(RuleError, match="is also used by"):
        load_substitution_rules(load_rules([str(tmp_path)]))


def test_user_file_replaces_a_built_in_set(tmp_path):
    body = LETTERS_TRANS.replace('name = "letters-trans"', 'name = "trans-effect"')
    sets = load_substitution_rules(load_rules([_write(tmp_path, "te", body)]))
    assert sets["trans-effect"].series == (("c",), ("a",), ("b",))


def test_broken_user_catalogue_is_reported_not_ignored(tmp_path):
    # a series matches catalogue spellings; a catalogue that cannot be read must say so
    folder = _write(tmp_path, "letters", LETTERS_TRANS)
    (tmp_path / "ligands.toml").write_text('[[ligand]]\nname = "X"\n', encoding="utf-8")
    with pytest.raises(RuleError, match="ligands.toml"):
        load_substitution_rules(load_rules([folder]))


def test_choice_by_priority_and_by_name():
    sets = load_substitution_rules(load_rules())
    rule, why = choose_rule_set(sets, "SP-4", ["Cl", "NH3"], ["Cl"])
    assert rule.name == "trans-effect" and "ranks every ligand" in why
    rule, why = choose_rule_set(sets, "SP-4", ["a", "b"], ["a"])
    assert rule.name == "statistical" and "trans-effect does not rank a, b" in why
    rule, why = choose_rule_set(sets, "SP-4", ["Cl", "NH3"], ["Cl"], "statistical")
    assert rule.name == "statistical" and why == "statistical as requested"
    with pytest.raises(InputError, match="did you mean trans-effect"):
        choose_rule_set(sets, "SP-4", ["Cl"], ["Cl"], "trans-efect")
    with pytest.raises(InputError, match="applies to OC-6, not SP-4"):
        choose_rule_set(sets, "SP-4", ["Cl"], ["Cl"], "cis-labilisation")


def test_choice_for_a_step_uses_a_set_that_names_its_leaving_ligand():
    # Atwood & Brown, J. Am. Chem. Soc. 98 (1976) 3160: in [MnBr(CO)5] the CO cis to Br leave
    sets = load_substitution_rules(load_rules())
    rule, _ = choose_rule_set_for_step(sets, "OC-6", ["Br", "CO", "PPh3"], ["Br", "CO"])
    assert rule.name == "cis-labilisation"
    rule, _ = choose_rule_set_for_step(sets, "OC-6", ["a", "b"], ["a"])
    assert rule.name == "statistical"
