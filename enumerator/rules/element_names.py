"""Names of central atoms for additive names: ``rules/element_names.toml``
(plus any user ``element_names.toml`` given with ``--rules DIR``).

Each ``[[element]]`` gives ``symbol``, ``name`` (``cobalt``) and ``anion``,
the -ate form used in an anionic complex (``cobaltate``; IUPAC 2005,
IR-9.2).  A later file's entry replaces an earlier one.

>>> from enumerator.rules.ruleset import load_rules
>>> element_names(load_rules())["Fe"]
('iron', 'ferrate')
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from types import MappingProxyType
from typing import Any

from enumerator.caches import cached
from enumerator.rules.checks import check_keys, read_toml, rule_error
from enumerator.rules.ruleset import RuleSet

__all__ = ["element_names"]


def element_names(ruleset: RuleSet) -> Mapping[str, tuple[str, str]]:
    """Symbol -> (name, anion name) from every ``element_names.toml`` in force.

    Parameters
    ----------
    ruleset : RuleSet
        The rule folders in force (built-in first).

    Returns
    -------
    Mapping[str, tuple[str, str]]
        Read-only; validated once per set of files and cached.

    Raises
    ------
    RuleError
        An entry is not a table, or a key is missing or not a word of letters.
    """
    return _element_names(ruleset)


def _entry(e: Any, where: str) -> tuple[str, str, str]:
    if not isinstance(e, dict):
        raise rule_error(where, "not a table", "write [[element]] with symbol, name, anion")
    check_keys(e, where, ("symbol", "name", "anion"), ())
    for key in ("symbol", "name", "anion"):
        if not isinstance(e[key], str) or not re.fullmatch(r"[A-Za-z]+", e[key]):
            raise rule_error(where, f"{key} must be a word of letters, not {e[key]!r}", f'write e.g. {key} = "cobalt"')
    return e["symbol"], e["name"], e["anion"]


@cached(maxsize=16)
def _element_names(ruleset: RuleSet) -> Mapping[str, tuple[str, str]]:
    out: dict[str, tuple[str, str]] = {}
    for path in ruleset.files("element_names.toml"):
        data = read_toml(path)
        check_keys(data, str(path), (), ("element",))
        entries = data.get("element") or []
        if not isinstance(entries, list):
            raise rule_error(path, "'element' must be an array of tables", "write [[element]] before each entry")
        for k, e in enumerate(entries, 1):
            symbol, name, anion = _entry(e, f"{path}: [[element]] #{k}")
            out[symbol] = (name, anion)
    return MappingProxyType(out)
