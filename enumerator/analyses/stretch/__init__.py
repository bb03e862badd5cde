"""Stretching modes of reporter ligands, NMR environments, and which isomer
pairs IR, Raman or NMR can tell apart.

One job per module:

* :mod:`.modes`: the stretch species and band counts of one reporter class
  in one isomer (reduction formula in the isomer's character table; linear
  centres by correlation), and the orbits of sites (NMR environments);
* :mod:`.pairs`: count signatures, the pair verdicts and their tally;
* :mod:`.analysis`: the pipeline stage and :class:`StretchAnalysis`.

The reporter classes themselves (CO, CN, NO, ...) are rule data:
:mod:`enumerator.rules.reporters`.

>>> from enumerator.workflow.pipeline import analyse
>>> r = analyse("Ma3b3", geometry="OC-6", reporters=(("a", "CO"),))
>>> [(stretch_modes(i, "CO").species, stretch_modes(i, "CO").ir) for i in r.isomers]
[('A1 + E', 2), ('2A1 + B1', 3)]
"""

from enumerator.analyses.stretch.analysis import (
    ENANTIOMER_NOTE,
    FLUXIONAL_NOTE,
    MAX_LISTED_PAIRS,
    LigandNMR,
    StretchAnalysis,
    nucleus_for,
    stage,
)
from enumerator.analyses.stretch.modes import ModeSet, environments, stretch_modes
from enumerator.analyses.stretch.pairs import COST_ORDER, Pair, list_pairs, pair_tally

__all__ = [
    "ModeSet",
    "stretch_modes",
    "environments",
    "Pair",
    "list_pairs",
    "pair_tally",
    "LigandNMR",
    "StretchAnalysis",
    "nucleus_for",
    "stage",
    "COST_ORDER",
    "MAX_LISTED_PAIRS",
    "FLUXIONAL_NOTE",
    "ENANTIOMER_NOTE",
]
