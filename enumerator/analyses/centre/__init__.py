"""Chemistry of the metal centre: oxidation state, d-electron count,
valence-electron count (the 18-electron rule), the Enemark–Feltham number
of nitrosyls, and the default geometry.

One job per module:

* :mod:`.electrons`: both textbook electron counts from the ligands'
  catalogue data (:func:`count_electrons`);
* :mod:`.departures`: the count judged against the 18-electron rule and its
  usual exceptions, with a warning and the nearest formulas that count 18 for
  a departure (:func:`check_count`);
* :mod:`.geometry`: the default polyhedron by the rules of
  ``rules/geometry_choice.toml`` (site count, d-count, the textbook
  exceptions, piano stools), and the choice when one is requested
  (:func:`choose_geometry`);
* :mod:`.analysis`: the pipeline stage and :class:`CentreAnalysis`.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> rs = load_rules()
>>> ec = count_electrons(parse_condensed("[Fe(CN)5(NO)]2-", rs))
>>> ec.oxidation_state, ec.d_electrons, ec.valence_electrons, ec.enemark_feltham
(2, 6, 18, '{FeNO}6')
>>> choose_geometry(parse_condensed("[PtCl2(NH3)2]", rs), rs, None)[0]
'SP-4'
"""

from enumerator.analyses.centre.analysis import CentreAnalysis, centre_notes, stage
from enumerator.analyses.centre.departures import CountCheck, Suggestion, check_count
from enumerator.analyses.centre.electrons import ElectronCount, LigandCount, NitrosylBinding, count_electrons, roman
from enumerator.analyses.centre.geometry import GeometryDecision, choose_geometry, default_geometry, geometry_decision

__all__ = [
    "ElectronCount",
    "LigandCount",
    "NitrosylBinding",
    "CentreAnalysis",
    "CountCheck",
    "Suggestion",
    "check_count",
    "count_electrons",
    "choose_geometry",
    "default_geometry",
    "geometry_decision",
    "GeometryDecision",
    "centre_notes",
    "roman",
    "stage",
]
