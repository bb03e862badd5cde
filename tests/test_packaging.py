"""Packaging: a wheel carries the built-in rules (common practice: a
non-editable install must work outside the source tree)."""

from __future__ import annotations

import fnmatch
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_builtin_rules_link_and_package_data_cover_every_rule_file():
    link = ROOT / "enumerator" / "builtin_rules"
    assert link.is_symlink() and link.resolve() == (ROOT / "rules").resolve()
    data = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["package-data"]["enumerator"]
    for f in (ROOT / "rules").rglob("*"):
        if f.is_file():
            rel = "builtin_rules/" + f.relative_to(ROOT / "rules").as_posix()
            assert any(fnmatch.fnmatchcase(rel, pat) and rel.count("/") == pat.count("/") for pat in data), rel
