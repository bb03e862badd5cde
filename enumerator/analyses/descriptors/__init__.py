"""IUPAC stereodescriptors of coordination centres: polyhedral symbol,
configuration index and chirality symbol (Nomenclature of Inorganic
Chemistry, IUPAC Recommendations 2005, the "Red Book", section IR-9.3).

A descriptor is computed, never looked up.  :func:`describe_isomer` ranks
the ligating atoms (:mod:`enumerator.analyses.cip`: CIP rules for catalogue
ligands, letter order a > b > c ... for abstract ones), then applies the
rule of the polyhedron.  Priority numbers are written 1, 2, 3 ...; primed
numbers (1', 1'') come from the priming convention and rank 1 > 1' > 1'' > 2.

One job per module:

* :mod:`.ranks`: ranks, the choices a rule returns, reading C/A round a ring;
* :mod:`.rules`: the configuration-index rule of each polyhedron (IR-9.3.3)
  with its C/A reading (IR-9.3.4), and which polyhedra have one;
* :mod:`.chirality`: R/S on T-4 and Δ/Λ by the skew-lines convention;
* :mod:`.priming`: site ranks and the priming convention (IR-9.3.5.1);
* :mod:`.prefixes`: the everyday cis/trans/fac/mer;
* :mod:`.describe`: one isomer's :class:`Descriptor`;
* :mod:`.select`: finding isomers by a typed descriptor (``--pick``);
* :mod:`.analysis`: the pipeline stage and :class:`DescriptorAnalysis`.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = parse_abstract("Ma3b3")
>>> s = enumerate_isomers(comp, load_rules().geometry("OC-6"))
>>> [(describe_isomer(i, comp).text, describe_isomer(i, comp).prefix) for i in s.isomers]
[('OC-6-22', 'fac'), ('OC-6-21', 'mer')]
"""

from enumerator.analyses.descriptors.analysis import (
    DescriptorAnalysis,
    descriptor_analysis,
    descriptor_stage,
    select_isomers,
)
from enumerator.analyses.descriptors.chirality import rs_symbol, skew_lines_sense
from enumerator.analyses.descriptors.describe import Descriptor, describe_isomer, describe_set
from enumerator.analyses.descriptors.rules import SUPPORTED
from enumerator.analyses.descriptors.select import find_by_descriptor

__all__ = [
    "Descriptor",
    "DescriptorAnalysis",
    "describe_isomer",
    "describe_set",
    "descriptor_analysis",
    "find_by_descriptor",
    "select_isomers",
    "descriptor_stage",
    "skew_lines_sense",
    "rs_symbol",
    "SUPPORTED",
]
