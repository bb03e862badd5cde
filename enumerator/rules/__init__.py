"""Rule files: every loader for the data under ``rules/`` (geometries,
ligands, reporter classes, force fields, substitution rules), each validated
once at load into typed objects."""

from enumerator.rules.ruleset import BUILTIN_RULES, RuleSet, check_keys, closest_names, load_rules, read_toml

__all__ = ["BUILTIN_RULES", "RuleSet", "load_rules", "read_toml", "check_keys", "closest_names"]
