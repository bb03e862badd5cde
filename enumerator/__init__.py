"""isosieve: isomers, point groups and stretching-band counts for ligand
substitution on metal centres.

The import package is ``enumerator``; the console command is ``isosieve``.
The core (geometry, group, isomers, spectroscopy) is pure: it never prints,
reads files behind the caller's back, or exits.

>>> from enumerator import load_rules, parse_abstract, enumerate_isomers
>>> s = enumerate_isomers(parse_abstract("Ma3b3"), load_rules().geometry("OC-6"))
>>> [i.point_group for i in s.isomers]
['C3v', 'C2v']
"""

from __future__ import annotations

__version__ = "0.1.0"

from enumerator.errors import CapacityError, InputError, IsosieveError, RuleError

# The rest loads on first use, so that the command line starts fast.
_LAZY = {
    "load_rules": "rules.ruleset",
    "parse_abstract": "parse.abstract",
    "enumerate_isomers": "isomers.enumeration",
    "generate": "isomers.enumeration",
    "Isomer": "isomers.enumeration",
    "IsomerSet": "isomers.enumeration",
    "analyse": "workflow.pipeline",
}


def __getattr__(name: str):
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(f".{_LAZY[name]}", __name__), name)
    raise AttributeError(f"module 'enumerator' has no attribute {name!r}")


__all__ = [
    "__version__",
    "IsosieveError",
    "InputError",
    "RuleError",
    "CapacityError",
    "load_rules",
    "parse_abstract",
    "enumerate_isomers",
    "generate",
    "Isomer",
    "IsomerSet",
    "analyse",
]
