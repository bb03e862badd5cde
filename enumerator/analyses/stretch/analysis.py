"""The stretch stage: modes per isomer and reporter class, NMR environments
per ligand, and which isomer pairs IR (counts or pattern), Raman or NMR tell
apart.

:func:`stage` checks the reporter classes the ligands name against the rule
files (:mod:`enumerator.rules.reporters`) and returns a
:class:`StretchAnalysis` with the counts.  Every ligand's environments are
counted; the nucleus is the reporter's (13C for CO), else the donor
element's from ``[nuclei]`` (31P for a phosphine); a catalogue ligand with
neither is listed but not counted in the NMR signature, and an abstract
letter is counted with no nucleus named.

The pattern tier of the pair verdicts needs the predicted band patterns,
which the band model (a layer above this one) computes: the pipeline's stage
(:func:`enumerator.workflow.bands.stretch_stage`) calls :func:`stage` and
hands the patterns to :func:`with_patterns`; the verdicts themselves are
judged here (:mod:`.pairs`, :mod:`.likelihood`), for up to
:data:`PATTERN_MAX_ISOMERS` isomers.

>>> from enumerator.workflow.pipeline import analyse
>>> a = analyse("Ma4b2", geometry="OC-6", reporters=(("a", "CO"),)).analysis(StretchAnalysis)
>>> a.pair_tally(), a.pairs()[0].cheapest
({'IR': 1}, 'IR')
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import replace
from functools import cached_property
from typing import Any

from enumerator.analyses.stretch.likelihood import PredictedBand, own_and_cross
from enumerator.analyses.stretch.modes import ModeSet, environments, stretch_modes
from enumerator.analyses.stretch.pairs import (
    COST_ORDER,
    Pair,
    Signatures,
    counts_tell_ir,
    list_pairs,
    pair_tally,
    signature_ids,
)
from enumerator.analyses.views import RequestView, ResultView
from enumerator.caches import cached
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.isomers.tables import table_for_isomer
from enumerator.model.composition import Composition, LigandKind
from enumerator.rules.reporters import ReporterClass, Reporters, load_reporters
from enumerator.rules.ruleset import load_rules

__all__ = [
    "LigandNMR",
    "StretchAnalysis",
    "stage",
    "with_patterns",
    "PATTERN_MAX_ISOMERS",
    "VERDICT_RULE",
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
#: Above this many listed isomers the IR pattern tier is not judged (the pairs grow with the square).
PATTERN_MAX_ISOMERS = 40
#: How the pair verdicts are reached, in words (JSON ``pair_verdict_rule``).
VERDICT_RULE = (
    "cheapest first: IR (counts) when the IR band counts differ and so do the numbers of bands with bond-dipole "
    "intensity (a difference resting only on bands predicted weak is not used); IR (pattern) when the predicted "
    "patterns differ beyond the model's uncertainty (each isomer's predicted spectrum gives it a probability of "
    "at least 0.95 against the other); then Raman counts, then NMR counts"
)
#: The axes note of a linear centre (its group is infinite).
LINEAR_AXES = "linear: z along the molecular axis; D∞h / C∞v species by correlation from the finite D2h / C2v proxy"


@frozen_dataclass
class LigandNMR:
    """One ligand's environments in one isomer; ``observable``: counted in the NMR signature."""

    ligand: str
    nucleus: str | None
    environments: int
    observable: bool


@frozen_dataclass
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
    #: per isomer, the predicted IR bands of each class (None: no prediction); None: not predicted at all
    patterns: tuple[tuple[tuple[PredictedBand, ...], ...] | None, ...] | None = None
    #: why the pattern tier was not judged, when it was not
    pattern_note: str | None = None

    @cached_property
    def _position(self) -> Mapping[str, int]:
        # the first position of each id, as tuple.index finds it
        out: dict[str, int] = {}
        for k, i in enumerate(self.ids):
            out.setdefault(i, k)
        return out

    def signatures(self) -> Signatures:
        """Each isomer's IR, bond-dipole IR, Raman and NMR count signature, numbered."""
        ir = [tuple(m.ir for m in ms) for ms in self.modes]
        dip = [tuple(m.ir_dipole for m in ms) for ms in self.modes]
        ra = [tuple(m.raman for m in ms) for ms in self.modes]
        nm = [tuple(x.environments for x in ls if x.observable) for ls in self.nmr]
        return signature_ids(ir), signature_ids(dip), signature_ids(ra), signature_ids(nm)

    def _pattern_pairs(self, sig: Signatures) -> tuple[frozenset[tuple[int, int]], frozenset[tuple[int, int]]]:
        """(judged, distinct): the index pairs the IR counts leave open, and those the patterns tell apart."""
        if self.patterns is None or len(self.ids) > PATTERN_MAX_ISOMERS:
            return frozenset(), frozenset()
        ir, dip = sig[0], sig[1]
        todo = []
        for i in range(len(self.ids)):
            for j in range(i + 1, len(self.ids)):
                if self.enantiomer[i] == self.ids[j] or counts_tell_ir(ir[i], ir[j], dip[i], dip[j]):
                    continue
                if self.patterns[i] is not None and self.patterns[j] is not None:
                    todo.append((i, j))
        widths = tuple(c.window[1] - c.window[0] for c in self.info)
        distinct = _distinct_patterns(self.patterns, widths, tuple(todo))
        return frozenset(todo), distinct

    def pairs(self) -> list[Pair]:
        """Every unordered pair of listed isomers, in listing order."""
        sig = self.signatures()
        judged, distinct = self._pattern_pairs(sig)
        return list_pairs(self.ids, self.enantiomer, sig, judged, distinct)

    def pair_tally(self) -> dict[str, int]:
        """How many pairs each verdict tells apart first ('IR', 'IR (pattern)', 'Raman', 'NMR', '--', 'en')."""
        sig = self.signatures()
        judged, distinct = self._pattern_pairs(sig)
        if not judged:
            return pair_tally(self.ids, self.enantiomer, sig)
        tally: dict[str, int] = {}
        for p in list_pairs(self.ids, self.enantiomer, sig, judged, distinct):
            tally[p.tally_key] = tally.get(p.tally_key, 0) + 1
        return dict(sorted(tally.items()))

    def pattern_status(self) -> str:
        """Whether and how the IR pattern tier was judged, in words."""
        if self.pattern_note:
            return self.pattern_note
        if self.patterns is None:
            return "IR patterns not judged: no band patterns were predicted"
        if len(self.ids) > PATTERN_MAX_ISOMERS:
            return f"IR patterns not judged: more than {PATTERN_MAX_ISOMERS} isomers (use --limit or --pick)"
        sigma = {b.sigma_default for p in self.patterns if p for ps in p for b in ps}
        where = (
            "the class default sigma (positions from the generic constants; the band model gives no sigma)"
            if True in sigma
            else "the additive band model's positions and sigma"
        )
        return f"IR patterns judged with {where}; predicted intensities idealised (bond-dipole model, ideal angles)"

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
            "pair_verdict_rule": VERDICT_RULE,
            "pair_pattern_status": self.pattern_status(),
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
            ir, dipole, raman, nmr = self.signatures()
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
                    "apart by a technique when their numbers differ, and by IR counts only when both their 'ir' "
                    "and their 'ir_bond_dipole' numbers differ (a difference resting on bands predicted weak does "
                    "not count); enantiomers never are; the IR pattern tier is not judged at this size"
                ),
                "ir": list(ir),
                "ir_bond_dipole": list(dipole),
                "raman": list(raman),
                "nmr": list(nmr),
            }
        else:
            doc["pairs"] = [p.to_dict() for p in self.pairs()]
            doc["pairs_listed"] = True
        return doc


@cached(maxsize=64)
def _distinct_patterns(
    patterns: tuple[tuple[tuple[PredictedBand, ...], ...] | None, ...],
    widths: tuple[float, ...],
    todo: tuple[tuple[int, int], ...],
) -> frozenset[tuple[int, int]]:
    """The index pairs of ``todo`` whose IR patterns tell them apart
    (:func:`~enumerator.analyses.stretch.likelihood.patterns_distinct`, each isomer's own evidence computed once)."""
    own: dict[int, float] = {}
    out = set()
    for i, j in todo:
        pi, pj = patterns[i], patterns[j]
        assert pi is not None and pj is not None
        if pi == pj:
            continue
        if own_and_cross(pi, pj, widths, own, i) and own_and_cross(pj, pi, widths, own, j):
            out.add((i, j))
    return frozenset(out)


def with_patterns(
    analysis: StretchAnalysis,
    patterns: Sequence[tuple[tuple[PredictedBand, ...], ...] | None] | None,
    note: str | None = None,
) -> StretchAnalysis:
    """The analysis with the predicted IR bands of every isomer, so the pairs get their pattern tier.

    Parameters
    ----------
    analysis : StretchAnalysis
    patterns : sequence or None
        Per listed isomer, one tuple of predicted IR bands per reporter class (in ``analysis.classes``
        order), or None for an isomer without a prediction; None: no patterns.
    note : str, optional
        Why the patterns are missing, when they are.

    Returns
    -------
    StretchAnalysis
    """
    return replace(analysis, patterns=None if patterns is None else tuple(patterns), pattern_note=note)


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
