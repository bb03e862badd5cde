"""The parsed twin of the built-in rule files (``rules/parsed.twin``) answers exactly as the TOML parser does.

The reference is Python's own :mod:`tomllib` (TOML 1.0.0): every document in
the twin must equal its parse, types included, and every built-in rule file
must have one (else: ``python -m enumerator.rules.parsed``).  A file whose
bytes differ from the twin's key is parsed as TOML, so an edited or a user's
file never gets a stale answer.
"""

from __future__ import annotations

import json
import shutil
import tomllib
from pathlib import Path

import pytest

from enumerator.errors import RuleError
from enumerator.rules.checks import read_toml
from enumerator.rules.ligands import load_ligands
from enumerator.rules.parsed import TWIN_NAME, _same, build, documents, lookup
from enumerator.rules.ruleset import BUILTIN_RULES, load_rules

TWIN = BUILTIN_RULES / TWIN_NAME


def _twin() -> list[tuple[str, str, str]]:
    with open(TWIN, encoding="utf-8", newline="") as fh:
        return documents(fh.read())


def test_every_builtin_rule_file_has_a_current_twin():
    texts = {source for _, source, _ in _twin()}
    stale = [
        p.relative_to(BUILTIN_RULES).as_posix()
        for p in sorted(BUILTIN_RULES.rglob("*.toml"))
        if p.read_bytes().decode("utf-8") not in texts
    ]
    assert not stale, f"rules/{TWIN_NAME} is stale for {stale}: run python -m enumerator.rules.parsed"


def test_every_twin_document_is_tomllibs_parse_types_included():
    # reference: tomllib (Python's TOML 1.0.0 parser), the parser read_toml uses
    entries = _twin()
    assert len(entries) == len(list(BUILTIN_RULES.rglob("*.toml")))
    for rel, source, doc in entries:
        raw = (BUILTIN_RULES / rel).read_bytes()
        assert raw.decode("utf-8") == source, rel
        want = tomllib.loads(raw.decode("utf-8-sig"))
        assert _same(json.loads(doc), want), rel
        assert _same(lookup(raw), want), rel


def test_twin_rebuilds_to_the_committed_one():
    with open(TWIN, encoding="utf-8", newline="") as fh:
        assert build(BUILTIN_RULES) == fh.read()


def test_a_malformed_twin_is_no_twin():
    assert documents("isosieve-parsed-rules 0\n") == []
    assert documents("isosieve-parsed-rules 1\nx.toml\t5\t2\nab") == []


def test_same_tells_types_apart():
    assert _same({"a": [1, 2.0, True]}, {"a": [1, 2.0, True]})
    assert not _same(1, 1.0) and not _same(True, 1) and not _same({"a": 1, "b": 2}, {"b": 2, "a": 1})


def test_lookup_gives_a_fresh_document_each_time():
    raw = (BUILTIN_RULES / "reporters.toml").read_bytes()
    a = lookup(raw)
    assert a is not None
    a.clear()
    assert lookup(raw)


def test_edited_or_unknown_bytes_are_parsed_as_toml(tmp_path: Path):
    raw = (BUILTIN_RULES / "reporters.toml").read_bytes()
    assert lookup(raw + b"\n# edited\n") is None
    f = tmp_path / "x.toml"
    f.write_bytes(b"a = 1\nb = [1.5, 'x']\n")
    assert lookup(f.read_bytes()) is None
    assert read_toml(f) == {"a": 1, "b": [1.5, "x"]}


def test_a_users_broken_rule_file_still_fails_at_load(tmp_path: Path):
    user = tmp_path / "rules"
    user.mkdir()
    (user / "ligands.toml").write_text("[[ligand]\nname = 'x'\n", encoding="utf-8")
    with pytest.raises(RuleError, match="TOML syntax error"):
        load_ligands(load_rules([user]))


def test_a_user_copy_of_a_builtin_file_reads_the_same(tmp_path: Path):
    user = tmp_path / "rules"
    user.mkdir()
    shutil.copy(BUILTIN_RULES / "reporters.toml", user / "reporters.toml")
    assert read_toml(user / "reporters.toml") == tomllib.loads((BUILTIN_RULES / "reporters.toml").read_text("utf-8"))
