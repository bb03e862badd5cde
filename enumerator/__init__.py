"""isosieve: isomers, point groups and stretching-band counts for ligand substitution on metal centres.

The import package is ``enumerator``; the console command is ``isosieve``.
For a notebook or a script, two calls cover the common cases:

* :func:`analyse` -- every isomer of a formula with every analysis (point
  groups, descriptors and names, centre chemistry, cautions, stretch species
  and which isomer pairs IR, Raman or NMR tell apart), as one
  :class:`~enumerator.workflow.result.Result` whose ``to_dict()`` is the
  JSON of ``isosieve isomers --json``;
* :func:`iter_isomers` -- the isomers one at a time, each with its point
  group, for cases too large to hold at once.

Both take the same keyword options, checked against one table
(:data:`enumerator.parse.request.OPTIONS`); an unknown one is refused with
the nearest names.  The building blocks stay at hand: :func:`load_rules`,
:func:`parse_abstract`, :func:`enumerate_isomers`, :func:`generate`.

>>> from enumerator import analyse, iter_isomers
>>> [i.point_group for i in analyse("Ma3b3", geometry="OC-6").isomers]
['C3v', 'C2v']
>>> next(iter_isomers("Mabcdef")).point_group
'C1'
>>> from enumerator import load_rules, parse_abstract, enumerate_isomers
>>> s = enumerate_isomers(parse_abstract("Ma3b3"), load_rules().geometry("OC-6"))
>>> [i.point_group for i in s.isomers]
['C3v', 'C2v']

Answers are memoised by value; :func:`clear_caches` empties every cache at
once (for instance after editing a rule file in a long-lived notebook).

Every name but the errors loads on first use, so that ``import enumerator``
(and the command line's start) stays fast.
"""

from __future__ import annotations

from enumerator.errors import CapacityError, InputError, IsosieveError, RuleError
from enumerator.lazy import lazy_names

__version__ = "0.1.0"

__all__ = [
    "__version__",
    "IsosieveError",
    "InputError",
    "RuleError",
    "CapacityError",
    "analyse",
    "iter_isomers",
    "Request",
    "Result",
    "load_rules",
    "parse_abstract",
    "enumerate_isomers",
    "generate",
    "Isomer",
    "IsomerSet",
    "clear_caches",
]

#: Public name -> the module (under ``enumerator``) it is loaded from on first use.
_LAZY = {
    "analyse": "workflow.pipeline",
    "iter_isomers": "workflow.pipeline",
    "Request": "parse.request",
    "Result": "workflow.result",
    "load_rules": "rules.ruleset",
    "parse_abstract": "parse.abstract",
    "enumerate_isomers": "isomers.enumeration",
    "generate": "isomers.enumeration",
    "Isomer": "isomers.enumeration",
    "IsomerSet": "isomers.enumeration",
    "clear_caches": "caches",
}


__getattr__, __dir__ = lazy_names(__name__, _LAZY, globals())
