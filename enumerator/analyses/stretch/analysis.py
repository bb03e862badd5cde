"""The stretch stage: modes per isomer and reporter class, NMR environments
per ligand, and which isomer pairs the counts tell apart.

:func:`stage` (listed in :data:`enumerator.workflow.pipeline.STAGES`) checks
the reporter classes the ligands name against the rule files
(:mod:`enumerator.rules.reporters`) and returns a :class:`StretchAnalysis`.
Every ligand's environments are counted; the nucleus is the reporter's
(13C for CO), else the donor element's from ``[nuclei]`` (31P for a
phosphine); a catalogue ligand with neither is listed but not counted in the
NMR signature, and an abstract letter is counted with no nucleus named.

>>> from enumerator.workflow.pipeline import analyse
>>> a = analyse("Ma4b2", geometry="OC-6", reporters=(("a", "CO"),)).analysis(StretchAnalysis)
>>> a.pair_tally(), a.pairs()[0].cheapest
({'IR': 1}, 'IR')
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property
from typing import Any

from enumerator.analyses.stretch.modes import ModeSet, environments, stretch_modes
from enumerator.analyses.stretch.pairs import COST_ORDER, Pair, Signatures, list_pairs, pair_tally, signature_ids
from enumerator.analyses.views import RequestView, ResultView
from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer
from enumerator.isomers.tables import table_for_isomer
from enumerator.model.composition import Composition, LigandKind
from enumerator.rules.reporters import ReporterClass, Reporters, load_reporters
from enumerator.rules.ruleset import load_rules

__all__ = [
    "LigandNMR",
    "StretchAnalysis",
    "stage",
    "nucleus_for",
    "MAX_LISTED_PAIRS",
    "FLUXIONAL_NOTE",
    "ENANTIOMER_NOTE",
]

#: Above this many isomer pairs the JSON gives the tally and each isomer's
#: signature numbers (``pair_signatures``, linear in the isomers), not the
#: list: 20,000 pairs is 200 isomers and about 4 MB of JSON; the list grows
#: with the square of the isomers (1,680 isomers: 1.4 million pairs, 230 MB).
MAX_LISTED_PAIRS = 20_000
#: The NMR caution for geometries marked fluxional (``{geo}``: the polyhedral symbol).
FLUXIONAL_NOTE = (
    "{geo} centres are often fluxional (e.g. Berry pseudorotation): NMR may show averaged signals, "
    "fewer than the environments listed"
)
#: Why enantiomer pairs are never marked distinct.
ENANTIOMER_NOTE = (
    "enantiomers have the same IR, Raman and NMR counts in achiral media; "
    "pairs of enantiomers are never marked distinct"
)
#: The axes note of a linear centre (its group is infinite).
LINEAR_AXES = "linear: z along the molecular axis; D∞h / C∞v species by correlation from the finite D2h / C2v proxy"


@dataclass(frozen=True)
class LigandNMR:
    """One ligand's environments in one isomer; ``observable``: counted in the NMR signature."""

    ligand: str
    nucleus: str | None
    environments: int
    observable: bool


@dataclass(frozen=True)
class StretchAnalysis:
    """Stretch modes per isomer and class, NMR environments per ligand, and the pairwise
    distinguishability; adds JSON ``modes``, ``nmr_environments`` and ``axes`` per isomer and the pairs,
    their tally, the reporter classes and notes at the top."""

    classes: tuple[str, ...]
    info: tuple[ReporterClass, ...]
    ids: tuple[str, ...]
    enantiomer: tuple[str | None, ...]
    modes: tuple[tuple[ModeSet, ...], ...]
    nmr: tuple[tuple[LigandNMR, ...], ...]
    groups: tuple[str, ...]
    axes: tuple[str, ...]
    fluxional: bool
    geometry: str
    reporter_ligands: tuple[str, ...] = ()

    @cached_property
    def _position(self) -> Mapping[str, int]:
        # the first position of each id, as tuple.index finds it
        out: dict[str, int] = {}
        for k, i in enumerate(self.ids):
            out.setdefault(i, k)
        return out

    def signatures(self) -> Signatures:
        """Each isomer's IR, Raman and NMR count signature, numbered."""
        ir = [tuple(m.ir for m in ms) for ms in self.modes]
        ra = [tuple(m.raman for m in ms) for ms in self.modes]
        nm = [tuple(x.environments for x in ls if x.observable) for ls in self.nmr]
        return signature_ids(ir), signature_ids(ra), signature_ids(nm)

    def pairs(self) -> list[Pair]:
        """Every unordered pair of listed isomers, in listing order."""
        return list_pairs(self.ids, self.enantiomer, self.signatures())

    def pair_tally(self) -> dict[str, int]:
        """How many pairs each technique tells apart first ('IR', 'Raman', 'NMR', '--', 'en')."""
        return pair_tally(self.ids, self.enantiomer, self.signatures())

    def fluxional_note(self) -> str | None:
        """The NMR caution for a geometry marked fluxional, else None."""
        return FLUXIONAL_NOTE.format(geo=self.geometry) if self.fluxional else None

    def isomer_json(self, isomer_id: str) -> Mapping[str, Any]:
        """``modes`` (per reporter class), ``nmr_environments`` (per ligand) and ``axes``."""
        k = self._position[isomer_id]
        return {
            "modes": {m.reporter: m.to_dict() for m in self.modes[k]},
            "nmr_environments": {
                x.ligand: {"nucleus": x.nucleus, "environments": x.environments, "counted": x.observable}
                for x in self.nmr[k]
            },
            "axes": self.axes[k],
        }

    def top_json(self) -> Mapping[str, Any]:
        """The pairs (or why they are not listed) and their tally, the reporter classes, the technique cost
        order and the spectroscopy notes."""
        flux = self.fluxional_note()
        notes = [flux, ENANTIOMER_NOTE] if flux else [ENANTIOMER_NOTE]
        return {
            **self._pairs_json(),
            "reporter_classes": {
                c.key: {
                    "name": c.name,
                    "bond": c.bond,
                    "nucleus": c.nucleus,
                    "ir_window_cm1": list(c.window),
                    "window_source": c.source,
                }
                for c in self.info
            },
            "technique_cost_order": list(COST_ORDER),
            "spectroscopy_notes": notes,
        }

    def _pairs_json(self) -> dict[str, Any]:
        n = len(self.ids)
        total = n * (n - 1) // 2
        doc: dict[str, Any] = {"pair_tally": self.pair_tally()}
        if total > MAX_LISTED_PAIRS:
            ir, raman, nmr = self.signatures()
            doc["pairs"] = []
            doc["pairs_listed"] = False
            doc["pairs_note"] = (
                f"{total} pairs are too many to list (more than {MAX_LISTED_PAIRS}); "
                "'pair_tally' counts them and 'pair_signatures' decides any pair; "
                "use --limit or --pick to list the pairs of fewer isomers"
            )
            doc["pair_signatures"] = {
                "about": (
                    "one number per listed isomer, in listing order, for each technique: two isomers are told "
                    "apart by a technique when their numbers differ; enantiomers never are"
                ),
                "ir": list(ir),
                "raman": list(raman),
                "nmr": list(nmr),
            }
        else:
            doc["pairs"] = [p.to_dict() for p in self.pairs()]
            doc["pairs_listed"] = True
        return doc


def nucleus_for(kind: LigandKind, reporters: Reporters) -> tuple[str | None, bool]:
    """(nucleus, counted) for a ligand kind: a reporter's nucleus; a catalogue
    ligand's donor-element nucleus ([nuclei]); an abstract letter counts its
    environments with no nucleus named.

    Parameters
    ----------
    kind : LigandKind
        A ligand kind.
    reporters : Reporters
        The reporter classes and donor-element nuclei in force.

    Returns
    -------
    (str or None, bool)
    """
    if kind.reporter:
        return reporters.get(kind.reporter).nucleus, True
    if not kind.info_dict():  # abstract letter
        return None, True
    for el in kind.donors:
        nuc = reporters.nucleus_of(el)
        if nuc:
            return nuc, True
    return None, False


def _reporter_classes(comp: Composition, reporters: Reporters) -> tuple[str, ...]:
    """The classes the ligands name, in formula order, each checked against the rule files."""
    classes: list[str] = []
    for kind in comp.kinds:
        if kind.reporter is None:
            continue
        if kind.reporter not in reporters.names:
            raise InputError(
                f"unknown reporter class '{kind.reporter}' for ligand '{kind.name}'",
                f"known classes: {', '.join(reporters.names)} (or add one in reporters.toml via --rules DIR)",
            )
        if kind.reporter not in classes:
            classes.append(kind.reporter)
    return tuple(classes)


def _ligand_nmr(iso: Isomer, comp: Composition, reporters: Reporters) -> tuple[LigandNMR, ...]:
    out = []
    for kind in comp.kinds:
        nuc, counted = nucleus_for(kind, reporters)
        out.append(LigandNMR(kind.name, nuc, len(environments(iso, iso.sites_of(kind.name))), counted))
    return tuple(out)


def stage(res: ResultView, req: RequestView) -> StretchAnalysis:
    """Pipeline stage: validate the reporter classes and analyse every isomer.

    Raises
    ------
    InputError
        A ligand names a reporter class no rule file defines.

    Parameters
    ----------
    res : Result
        The result so far.
    req : Request
        Its request (rule folders for the reporter classes).

    Returns
    -------
    StretchAnalysis
    """
    reporters = load_reporters(load_rules(req.rules))
    comp = res.composition
    classes = _reporter_classes(comp, reporters)
    isomers = res.isomers
    return StretchAnalysis(
        classes=classes,
        info=tuple(reporters.get(c) for c in classes),
        ids=tuple(i.id for i in isomers),
        enantiomer=tuple(i.enantiomer for i in isomers),
        modes=tuple(tuple(stretch_modes(iso, c) for c in classes) for iso in isomers),
        nmr=tuple(_ligand_nmr(iso, comp, reporters) for iso in isomers),
        groups=tuple(iso.point_group for iso in isomers),
        axes=tuple(LINEAR_AXES if iso.geometry.linear else table_for_isomer(iso).axes_note for iso in isomers),
        fluxional=bool(res.geometry.fluxional),
        geometry=res.geometry.symbol,
        reporter_ligands=tuple(k.name for k in comp.kinds if k.reporter),
    )
