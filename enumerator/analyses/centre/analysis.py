"""The centre stage: electron counts and the geometry choice of a real centre, with notes.

:func:`stage` (listed in :data:`enumerator.workflow.pipeline.STAGES`) returns
a :class:`CentreAnalysis` for a catalogue formula (none for abstract
letters).  Its count check (:mod:`.departures`) says whether the
valence-electron count obeys the 18-electron rule or one of its usual
exceptions, and gives a departure its own warning with the likely cause and
the nearest formulas that count 18.  Its notes warn where the site
idealisation or the nitrosyl binding may mislead: an η-ring as one site
(the piano-stool idealisation), and {MNO}n with n >= 7 on an octahedron, usually bent
(Enemark–Feltham, *Coord. Chem. Rev.* 13 (1974) 339), or a count above 18
with a linear NO.

>>> from enumerator.workflow.pipeline import analyse
>>> a = analyse("[Fe(CN)5(NO)]2-").analysis(CentreAnalysis)
>>> a.count.label, a.geometry, a.alternatives
('Fe(II), d6', 'OC-6', ('TPR-6',))
>>> analyse("[Ni(CO)5]").analysis(CentreAnalysis).warnings[0][:40]
'20 valence electrons, 2 above 18, and no'
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import field
from typing import Any

from enumerator.analyses.centre.departures import CountCheck, check_count
from enumerator.analyses.centre.electrons import ElectronCount, count_electrons
from enumerator.analyses.centre.geometry import geometry_decision
from enumerator.analyses.views import RequestView, ResultView
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.model.composition import Composition
from enumerator.rules.ruleset import load_rules

__all__ = ["CentreAnalysis", "centre_notes", "stage"]


@frozen_dataclass
class CentreAnalysis:
    """The centre's electron counts, their check against the 18-electron rule and its usual exceptions,
    and the geometry choice; adds the top-level JSON ``centre``."""

    count: ElectronCount
    geometry: str
    geometry_reason: str
    alternatives: tuple[str, ...] = ()
    sites: int = 0
    notes: tuple[str, ...] = field(default=())
    check: CountCheck | None = None

    @property
    def warnings(self) -> tuple[str, ...]:
        """The departures from the electron-count rules, one line each (empty when the count is usual)."""
        return self.check.warnings if self.check else ()

    #: the geometry-choice rule behind the default and its source ('' where none matched)
    geometry_rule: str = ""
    geometry_source: str = ""

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """Nothing per isomer."""
        return {}

    def top_json(self) -> Mapping[str, Any]:
        """``centre``: the element, both counts worked out per ligand, nitrosyls, the geometry choice, notes."""
        c = self.count
        return {
            "centre": {
                "metal": c.metal,
                "atomic_number": c.atomic_number,
                "group": c.group,
                "block": c.block,
                "charge": c.charge,
                "oxidation_state": c.oxidation_state,
                "d_electrons": c.d_electrons,
                "valence_electrons": c.valence_electrons,
                "valence_electrons_covalent": c.valence_electrons,
                "valence_electrons_ionic": c.valence_electrons_ionic,
                "electron_count": [
                    {
                        "ligand": name,
                        "count": n,
                        "charge": q,
                        "electrons_covalent": ec,
                        "electrons_ionic": ei,
                        **({"hapticity": h} if h else {}),
                    }
                    for name, n, q, ec, ei, h in c.ligands
                ],
                "nitrosyls": [{"ligand": name, "count": n, "binding": b} for name, n, b in c.nitrosyls],
                "enemark_feltham": c.enemark_feltham,
                "coordination_sites": self.sites,
                "geometry": self.geometry,
                "geometry_reason": self.geometry_reason,
                "geometry_alternatives": list(self.alternatives),
                "geometry_rule": self.geometry_rule or None,
                "geometry_source": self.geometry_source or None,
                "notes": list(self.notes),
                "count_check": self.check.to_dict() if self.check else None,
                "count_warnings": list(self.warnings),
            }
        }


def centre_notes(comp: Composition, c: ElectronCount, geometry: str) -> tuple[str, ...]:
    """The count's own notes, then the cautions on the site idealisation and the nitrosyl binding.

    Parameters
    ----------
    comp : Composition
        The ligands on the centre.
    c : ElectronCount
        Its electron count.
    geometry : str
        The polyhedral symbol in use.

    Returns
    -------
    tuple of str
    """
    notes = list(c.notes)
    if any(k.ring for k in comp.kinds):
        notes.append(
            "point groups are those of the site idealisation (an η-ring as one site whose axis carries the "
            "ring's symmetry); the full molecular symmetry of the ring is not represented"
        )
    linear = [name for name, _, b in c.nitrosyls if b == "linear"]
    if linear and c.enemark_feltham and geometry == "OC-6":
        n = int(c.enemark_feltham.rpartition("}")[2])
        if n >= 7 and len(c.nitrosyls) == 1:
            notes.append(
                f"Enemark–Feltham: six-coordinate {c.enemark_feltham} nitrosyls are usually bent; "
                f"if this one is, write NObent for {linear[0]} (the isomers are the same, the counts change)"
            )
    if c.valence_electrons is not None and c.valence_electrons > 18 and linear:
        notes.append(
            "more than 18 valence electrons with a linear nitrosyl: a bent NO (NObent) may be the better description"
        )
    return tuple(notes)


def stage(res: ResultView, req: RequestView) -> CentreAnalysis | None:
    """Pipeline stage: the centre of a real (catalogue) composition; None for abstract letters.

    Parameters
    ----------
    res : Result
        The result so far.
    req : Request
        Its request (rule folders, for the alternatives).

    Returns
    -------
    CentreAnalysis or None
    """
    comp = res.composition
    if comp.metal == "M":
        return None
    c = count_electrons(comp)
    rules = load_rules(req.rules)
    try:
        d = geometry_decision(comp, rules, c)
        alts, rule, source = d.alternatives, d.rule, d.source
    except InputError:
        alts, rule, source = (), "", ""
    check = check_count(comp, c, rules)
    return CentreAnalysis(
        count=c,
        geometry=res.geometry.symbol,
        geometry_reason=res.geometry_reason,
        alternatives=alts,
        sites=comp.donor_count,
        notes=centre_notes(comp, c, res.geometry.symbol) + check.notes,
        check=check,
        geometry_rule=rule,
        geometry_source=source,
    )
