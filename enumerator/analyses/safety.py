"""Safety cautions for carbonyl, cyanide and nitrosyl chemistry.

Every output that involves CO, CN or NO ligands (by reporter class or by
catalogue name, isotopologues included) carries these cautions.  They are
the usual ones of the trade, not a risk assessment: the user's local
regulations and institutional safety officers decide.

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.condensed import parse_condensed
>>> c = cautions(parse_condensed("[Fe(CN)5(NO)]2-", load_rules()))
>>> any("HCN" in line for line in c)
True
>>> cautions(parse_condensed("[Co(NH3)4Cl2]+", load_rules()))
()
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType
from typing import Any

from enumerator.analyses.views import RequestView, ResultView
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition

__all__ = ["cautions", "hazard_classes", "SafetyAnalysis", "stage", "GENERAL", "TEXT", "README_TEXT"]

#: One caution per hazard class.
TEXT: Mapping[str, str] = MappingProxyType(
    {
        "CO": (
            "Carbon monoxide is a toxic, odourless gas, and metal carbonyls can release it (some, e.g. Ni(CO)4, "
            "are volatile and highly toxic themselves): handle them in a well-ventilated fume hood with a CO detector."
        ),
        "CN": (
            "Cyanides are highly toxic, and acids release hydrogen cyanide (HCN) gas from them: keep cyanide away "
            "from acids, work in a fume hood, and have your institution's cyanide emergency procedure in place "
            "before you start."
        ),
        "NO": (
            "Nitric oxide and nitrogen dioxide are toxic gases, and nitrosyl, nitro and nitrito complexes can "
            "release them: work in a fume hood."
        ),
        "CNR": "Isocyanides are toxic and have a strong, persistent odour: handle them in a fume hood.",
        "CS": "Thiocarbonyl precursors (e.g. CS2) are toxic and highly flammable: work in a fume hood.",
    }
)

#: Closes every list of cautions.
GENERAL = (
    "These are general cautions, not a risk assessment: follow your local regulations and your institution's "
    "safety officers."
)

#: For the README and report footers.
README_TEXT = (
    "Safety: carbonyl, cyanide and nitrosyl chemistry is dangerous. "
    + TEXT["CO"]
    + " "
    + TEXT["CN"]
    + " "
    + TEXT["NO"]
    + " "
    + GENERAL
)

#: Catalogue ligand name -> hazard class (isotopologues included).
_BY_NAME: Mapping[str, str] = MappingProxyType(
    {
        "CO": "CO",
        "13CO": "CO",
        "C18O": "CO",
        "13C18O": "CO",
        "CN": "CN",
        "13CN": "CN",
        "C15N": "CN",
        "NC": "CN",
        "NO": "NO",
        "NObent": "NO",
        "15NO": "NO",
        "NO2": "NO",
        "ONO": "NO",
        "CNtBu": "CNR",
        "CNMe": "CNR",
        "CNXyl": "CNR",
        "CNR": "CNR",
        "CS": "CS",
    }
)
_ORDER = ("CO", "CN", "NO", "CNR", "CS")


def hazard_classes(comp: Composition) -> tuple[str, ...]:
    """The hazard classes present (CO, CN, NO, CNR, CS, in that order), from reporter classes and catalogue names.

    Parameters
    ----------
    comp : Composition
        The ligands on the centre.

    Returns
    -------
    tuple of str
    """
    found = set()
    for k in comp.kinds:
        if k.reporter in TEXT:
            found.add(k.reporter)
        if k.name in _BY_NAME:
            found.add(_BY_NAME[k.name])
    return tuple(c for c in _ORDER if c in found)


def cautions(comp: Composition) -> tuple[str, ...]:
    """The caution lines for a composition: one per hazard class, then :data:`GENERAL`; empty when none applies.

    Parameters
    ----------
    comp : Composition
        The ligands on the centre.

    Returns
    -------
    tuple of str
    """
    classes = hazard_classes(comp)
    if not classes:
        return ()
    return tuple(TEXT[c] for c in classes) + (GENERAL,)


@frozen_dataclass
class SafetyAnalysis:
    """The caution lines of a result; adds top-level JSON ``"safety": [str]``."""

    lines: tuple[str, ...]

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """Nothing per isomer."""
        return {}

    def top_json(self) -> Mapping[str, Any]:
        """``safety``: the caution lines."""
        return {"safety": list(self.lines)}


def stage(res: ResultView, req: RequestView) -> SafetyAnalysis | None:
    """Pipeline stage: cautions whenever CO, CN or NO (or CNR, CS) are present.

    Parameters
    ----------
    res : Result
        The result so far.
    req : Request
        Its request (unused: the cautions depend on the ligands only).

    Returns
    -------
    SafetyAnalysis or None
        None when no caution applies.
    """
    lines = cautions(res.composition)
    return SafetyAnalysis(lines) if lines else None
