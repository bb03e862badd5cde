"""The force-field rule file (enumerator.rules.forcefields): loading, user overrides, one-line errors."""

import pytest

from enumerator.errors import InputError, RuleError
from enumerator.rules.forcefields import atom_mass, class_field, load_forcefields
from enumerator.rules.ruleset import load_rules

GOOD = """
[class.CO]
label = "terminal carbonyl (user)"
atoms = ["13C", "O"]
k_trans_same = 16.0
k_trans_other = 15.0
k_no_trans = 15.5
kc = 0.25
kt = 0.5
source = "test values"
"""


def _folder(tmp_path, text):
    (tmp_path / "forcefields.toml").write_text(text, encoding="utf-8")
    return load_rules([str(tmp_path)])


def test_builtin_classes_and_read_only_cache():
    fields = load_forcefields(load_rules())
    assert {"CO", "CN", "NO", "NObent", "CNR", "N2", "CS"} <= set(fields)
    with pytest.raises(TypeError):
        fields["XX"] = fields["CO"]  # the cached mapping is read-only
    assert class_field("co").name == "CO"  # case-insensitive look-up


def test_user_class_replaces_builtin(tmp_path):
    co = class_field("CO", _folder(tmp_path, GOOD))
    assert co.label.endswith("(user)") and co.default_k("other") == 15.0
    assert class_field("CO").label == "terminal carbonyl"  # the built-in rule set is untouched


def test_isotope_masses():
    # 13C: 13.003355 u, 18O: 17.999160 u (IUPAC/AME atomic masses, from memory)
    assert atom_mass("13C") == pytest.approx(13.003355, abs=1e-5)
    assert atom_mass("18O") == pytest.approx(17.99916, abs=1e-4)


@pytest.mark.parametrize(
    "change,words",
    [
        (("k_no_trans = 15.5", "k_no_trans = -1"), "k_no_trans"),
        (("kc = 0.25", 'kc = "x"'), "kc"),
        (('atoms = ["13C", "O"]', 'atoms = ["C"]'), "atoms"),
        (('atoms = ["13C", "O"]', 'atoms = ["Xx", "O"]'), "unknown element 'Xx'"),
        (("kt = 0.5", "kt = 0.5\nrange = [2100, 1900]"), "range"),
        (("kt = 0.5", "kt = 0.5\nk_trans = 1"), "unknown key 'k_trans'"),
        (('source = "test values"', ""), "missing key 'source'"),
    ],
)
def test_bad_file_names_file_table_and_key(tmp_path, change, words):
    old, new = change
    rules = _folder(tmp_path, GOOD.replace(old, new))
    with pytest.raises(RuleError) as exc:
        load_forcefields(rules)
    line = exc.value.line()
    assert "\n" not in line and "forcefields.toml" in line and words in line
    if "missing" not in words and "unknown key" not in words:
        assert "[class.CO]" in line


def test_unknown_class_suggests_a_name():
    # common practice: a near miss gets the nearest names (CO among them; CS and CN are as near to 'C0')
    with pytest.raises(InputError, match=r"did you mean (\w+ or )*CO\b"):
        class_field("C0")
