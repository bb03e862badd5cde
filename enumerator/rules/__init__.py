"""Rule files: every loader for the data under ``rules/`` (geometries,
ligands, reporter classes, force fields, element names, substitution rules),
each validated once per rule set into typed objects.

:mod:`~enumerator.rules.ruleset` says which folders are in force,
:mod:`~enumerator.rules.checks` holds what every loader shares (reading TOML,
checking keys, the one-line :class:`~enumerator.errors.RuleError`), and one
module per kind of file does the rest.
"""

from enumerator.rules.checks import check_keys, closest_names, read_toml, rule_error
from enumerator.rules.ruleset import BUILTIN_RULES, RuleSet, load_rules

__all__ = ["BUILTIN_RULES", "RuleSet", "load_rules", "read_toml", "check_keys", "closest_names", "rule_error"]
