"""From a formula to predicted or matched stretching bands: the library side of
``isosieve bands`` and ``isosieve match``, and the pipeline's stretch stage.

:func:`predict_spectra` enumerates the isomers of a request, predicts the
bands of each reporter class on each (one of every enantiomer pair) and, when
measured bands are given, fits the force constants of one isomer to them;
:func:`match_spectrum` ranks the isomers against measured bands.  Each returns
one frozen result whose ``to_dict()`` is the command's JSON document; the
renderers in :mod:`enumerator.render.bands` draw the text and the plots.

:func:`stretch_stage` is the stretch stage of the pipeline
(:data:`enumerator.workflow.pipeline.STAGES`): the counts of
:func:`enumerator.analyses.stretch.analysis.stage` plus every isomer's
predicted IR bands, so the pair verdicts get their IR pattern tier.  It sits
here because the band model is a layer above the analyses.

An IR band means one thing in every output: a band symmetry allows, counted
in the IR count, and flagged "predicted weak" when the bond-dipole model
gives its species zero intensity
(:attr:`enumerator.analyses.stretch.modes.ModeSet.weak_species`).

>>> r = predict_spectra(Request("[Cr(CO)6]"))
>>> [(b.species, round(b.wavenumber)) for b in r.isomers[0].patterns[0].pattern.ir_bands]
[('T1u', 1986)]
>>> m = match_spectrum(Request("Ma4b2", reporters=(("a", "CO"),)), [1950.0])
>>> m.match.candidates[0].point_group
'D4h'
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from enumerator.analyses.descriptors import describe_isomer
from enumerator.analyses.safety import cautions
from enumerator.analyses.stretch.likelihood import default_sigma
from enumerator.analyses.stretch.modes import ModeSet, stretch_modes
from enumerator.errors import InputError, IsosieveError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, IsomerSet, enumerate_isomers
from enumerator.model.composition import Composition
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.vibrations.matching import (
    DEFAULT_TOLERANCE,
    DEFAULT_WEAK,
    IDEALISED_NOTE,
    MatchResult,
    check_window,
    match_bands,
    pattern_for,
    predicted_bands,
    predicted_window,
)
from enumerator.vibrations.model import build_model, reporter_classes
from enumerator.vibrations.pattern import BandPattern, band_pattern
from enumerator.workflow.bands_stage import stretch_stage
from enumerator.workflow.pipeline import Request, prepare

if TYPE_CHECKING:
    import pandas as pd

    from enumerator.vibrations.fitting import FitResult, Observation

__all__ = [
    "ClassBands",
    "IsomerBands",
    "BandsResult",
    "MatchReport",
    "predict_spectra",
    "match_spectrum",
    "stretch_stage",
]


@frozen_dataclass
class ClassBands:
    """The bands of one reporter class on one isomer, with the fit when one was asked for.

    ``reporter_class`` is the class as it was asked for (``--class``), the
    pattern carries the rule file's spelling; ``modes`` are the class's stretch
    species (which bands are predicted weak).
    """

    reporter_class: str
    pattern: BandPattern
    fit: FitResult | None = None
    modes: ModeSet | None = None

    def predicted_weak(self, band: Any) -> bool:
        """Whether a band's species is predicted weak (bond-dipole intensity zero by symmetry)."""
        return self.modes is not None and band.species in self.modes.weak_species

    @property
    def ir_allowed(self) -> int:
        """The number of IR bands symmetry allows (the ``isomers`` count)."""
        if self.modes is not None:
            return self.modes.ir
        return len(self.pattern.ir_bands)

    @property
    def sigma(self) -> tuple[float, bool]:
        """(the position uncertainty shown, cm-1; whether it is the class default)."""
        given = [b.sigma for b in self.pattern.bands if b.sigma is not None]
        if given:
            return max(given), False
        return default_sigma(self.pattern.reporter_class), True

    def to_dict(self) -> dict[str, Any]:
        """The pattern's JSON object, with the IR count as ``isomers`` counts it (symmetry-allowed bands;
        ``ir_predicted_weak`` of them with bond-dipole intensity ~0, flagged ``predicted_weak`` per band),
        the position uncertainty, and a ``fit`` key when there is a fit."""
        doc = self.pattern.to_dict()
        for entry, b in zip(doc.get("bands", []), self.pattern.bands):
            entry["predicted_weak"] = self.predicted_weak(b)
        doc["ir_count"] = self.ir_allowed
        doc["ir_predicted_weak"] = self.modes.ir_weak if self.modes is not None else 0
        doc["ir_bond_dipole"] = self.ir_allowed - doc["ir_predicted_weak"]
        sigma, default = self.sigma
        doc["position_sigma_cm1"] = round(sigma, 1)
        doc["position_sigma_default"] = default
        if self.fit is not None:
            doc["fit"] = self.fit.to_dict()
        return doc


@frozen_dataclass
class IsomerBands:
    """The predicted bands of one isomer.

    ``label`` names what the entry stands for: the isomer id, or both
    enantiomers ('3a/3b') when one entry shows the pair.
    """

    isomer_id: str
    label: str
    point_group: str
    descriptor: str | None
    patterns: tuple[ClassBands, ...]

    def to_dict(self) -> dict[str, Any]:
        """The isomer's JSON object."""
        return {
            "id": self.isomer_id,
            "point_group": self.point_group,
            "descriptor": self.descriptor,
            "patterns": [p.to_dict() for p in self.patterns],
        }


@frozen_dataclass
class BandsResult:
    """The answer of ``isosieve bands``: every isomer's predicted bands.

    ``measured`` holds the wavenumbers the constants were fitted to (empty
    without a fit); ``safety`` the caution lines for the composition.
    """

    formula: str
    geometry: str
    geometry_reason: str
    isomers: tuple[IsomerBands, ...]
    safety: tuple[str, ...] = ()
    measured: tuple[float, ...] = ()
    notes: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve bands --json``."""
        return {
            "formula": self.formula,
            "geometry": self.geometry,
            "geometry_reason": self.geometry_reason,
            "isomers": [i.to_dict() for i in self.isomers],
            "notes": list(self.notes),
            "safety": list(self.safety),
        }

    def to_dataframe(self) -> pd.DataFrame:
        """One row per predicted band: formula, isomer (both enantiomers where one entry shows the pair),
        point group, descriptor, reporter class, wavenumber (cm-1), species, degeneracy, relative IR
        intensity, IR and Raman activity.

        Returns
        -------
        pandas.DataFrame
        """
        import pandas as pd

        rows = [
            {
                "formula": self.formula,
                "isomer": e.label,
                "point group": e.point_group,
                "descriptor": e.descriptor,
                "class": cb.reporter_class,
                "wavenumber": round(b.wavenumber, 1),
                "species": b.species,
                "degeneracy": b.degeneracy,
                "rel. IR intensity": round(b.intensity, 3),
                "IR": b.ir_active,
                "Raman": bool(b.raman_allowed),
            }
            for e in self.isomers
            for cb in e.patterns
            for b in cb.pattern.bands
        ]
        return pd.DataFrame(rows, columns=_BAND_COLUMNS)

    def __repr__(self) -> str:
        n = sum(len(cb.pattern.bands) for e in self.isomers for cb in e.patterns)
        return f"<BandsResult {self.formula} on {self.geometry}: {len(self.isomers)} isomer(s), {n} band(s)>"

    def _repr_html_(self) -> str:
        """The band table (:meth:`to_dataframe`) under a one-line heading, the cautions below."""
        return _html(f"{self.formula} on {self.geometry}: predicted bands", self.to_dataframe(), self.safety)


@frozen_dataclass
class MatchReport:
    """The answer of ``isosieve match``: the ranking with the formula it is for."""

    formula: str
    geometry: str
    geometry_reason: str
    match: MatchResult
    safety: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve match --json``."""
        doc: dict[str, Any] = {
            "formula": self.formula,
            "geometry": self.geometry,
            "geometry_reason": self.geometry_reason,
        }
        doc.update(self.match.to_dict())
        doc["safety"] = list(self.safety)
        return doc

    def to_dataframe(self) -> pd.DataFrame:
        """One row per candidate, best first: rank, isomers, point group, descriptor, species, IR band count,
        probability (equal priors), common shift (cm-1 at the mean band, and mdyn/Å), RMS and largest residual
        (cm-1), problems (strong bands unseen plus measured bands unassigned).

        Returns
        -------
        pandas.DataFrame
        """
        import pandas as pd

        rows = [
            {
                "rank": c.rank,
                "isomers": "/".join(c.isomers),
                "point group": c.point_group,
                "descriptor": c.descriptor,
                "species": c.species,
                "IR bands": len(c.ir_bands),
                "probability": round(c.probability, 4),
                "shift (cm-1)": round(c.shift_cm1, 1),
                "shift": round(c.shift, 3),
                "RMS": round(c.rms, 2),
                "max residual": round(c.max_residual, 2),
                "problems": c.problems,
            }
            for c in self.match.candidates
        ]
        return pd.DataFrame(rows, columns=_MATCH_COLUMNS)

    def __repr__(self) -> str:
        m = self.match
        best = m.candidates[0].isomers if m.candidates else ()
        return (
            f"<MatchReport {self.formula}: {len(m.candidates)} candidate(s) for {len(m.measured)} "
            f"{m.reporter_class} band(s), best {'/'.join(best) or '-'}>"
        )

    def _repr_html_(self) -> str:
        """The ranking (:meth:`to_dataframe`) under a heading naming the measured bands, the cautions below."""
        bands = ", ".join(f"{v:g}" for v in self.match.measured)
        head = (
            f"{self.formula}: candidates for {self.match.reporter_class} bands at {bands} cm-1 "
            f"(decision: {self.match.decision})"
        )
        return _html(head, self.to_dataframe(), self.safety)


_BAND_COLUMNS = (
    "formula",
    "isomer",
    "point group",
    "descriptor",
    "class",
    "wavenumber",
    "species",
    "degeneracy",
    "rel. IR intensity",
    "IR",
    "Raman",
)
_MATCH_COLUMNS = (
    "rank",
    "isomers",
    "point group",
    "descriptor",
    "species",
    "IR bands",
    "probability",
    "shift (cm-1)",
    "shift",
    "RMS",
    "max residual",
    "problems",
)


def _html(heading: str, df: pd.DataFrame, cautions: Sequence[str]) -> str:
    import html

    tail = "".join(f"<p><b>Safety:</b> {html.escape(x)}</p>" for x in cautions)
    return f"<p><b>{html.escape(heading)}</b></p>" + df.to_html(index=False, escape=True, na_rep="") + tail


def _load(request: Request) -> tuple[Composition, IsomerSet, str, RuleSet]:
    comp, geo, reason = prepare(request)
    return comp, enumerate_isomers(comp, geo), reason, load_rules(request.rules)


def _descriptors(comp: Composition, iso_set: IsomerSet) -> Mapping[str, str]:
    """Descriptor text by isomer id; an isomer that cannot be described is left out."""
    out = {}
    for i in iso_set.isomers:
        try:
            d = describe_isomer(i, comp)
        except IsosieveError:
            continue
        out[i.id] = " ".join(x for x in (d.prefix, d.text) if x)
    return MappingProxyType(out)


def _constants_for(isomer: Isomer, reporter_class: str, constants: Mapping[str, float], rules: RuleSet):
    """The overrides that apply to one isomer: set names k1, k2, ... differ
    between isomers, so a numbered constant the isomer lacks is dropped."""
    names = set(build_model(isomer, reporter_class, rules).parameter_names) | {"k", "kc", "kt"}
    return {n: v for n, v in constants.items() if n in names or not (n[:1] == "k" and n[1:].isdigit())}


def _class_bands(
    iso: Isomer,
    cls: str,
    *,
    constants: Mapping[str, float] | None,
    per_isomer: bool,
    measured: Sequence[Observation] | None,
    fixed: Mapping[str, float] | None,
    tie_ck: bool,
    others: Sequence[str],
    rules: RuleSet,
    composition: Composition | None = None,
) -> ClassBands:
    """One class on one isomer; ``others`` are the ids of every isomer shown (a fit needs exactly one)."""
    use = _constants_for(iso, cls, constants, rules) if constants and per_isomer else constants
    pattern = band_pattern(iso, cls, use, rules=rules, composition=composition)
    modes = stretch_modes(iso, pattern.reporter_class)
    if measured is None:
        return ClassBands(cls, pattern, None, modes)
    if len(others) > 1:
        raise InputError("--fit needs one isomer", f"add --isomer, one of {', '.join(others)}")
    from enumerator.vibrations.fitting import fit_constants  # only when bands are fitted

    fit = fit_constants(iso, cls, measured, fixed=fixed, tie_ck=tie_ck, start=constants, rules=rules)
    return ClassBands(cls, pattern, fit, modes)


def _bands_notes(entries: Sequence[IsomerBands]) -> tuple[str, ...]:
    """The notes of a ``bands`` answer: the position uncertainty used, and that intensities are idealised."""
    notes = []
    defaults = sorted({cb.pattern.reporter_class for e in entries for cb in e.patterns if cb.sigma[1]})
    if defaults:
        shown = ", ".join(f"{c} {default_sigma(c):g} cm-1" for c in defaults)
        notes.append(
            f"position uncertainty: the class default ({shown}; a tool convention, wider than the band model's), "
            "where the positions come from the generic constants or typed constants and the band model gives no sigma"
        )
    notes.append(IDEALISED_NOTE)
    notes.append(
        "IR counts bands symmetry allows; 'predicted weak' marks those the bond-dipole model gives zero intensity "
        "(trans oscillators in phase): expect them weak or absent"
    )
    return tuple(notes)


def _check_fit_inputs(
    comp: Composition,
    chosen: Sequence[Isomer],
    classes: Sequence[str],
    constants: Mapping[str, float] | None,
    measured: Sequence[Observation] | None,
    window: tuple[float, float] | None,
    rules: RuleSet,
) -> None:
    """Bound what was typed: the constants to their physical ranges, fitted bands to the class's window (reaching
    out to the band model's predictions for the isomers shown)."""
    if constants:
        from enumerator.vibrations.fitting import check_constants  # the fit's module: only with typed-in constants

        check_constants(constants, "--constants")
    if not measured:
        return
    if len(classes) != 1:
        raise InputError(
            f"{comp.formula} has several reporter classes ({', '.join(classes)})",
            f"say which the --fit bands belong to, e.g. --class {classes[0]}",
        )
    if window is not None:
        win, source = window, "widened on purpose with --window"
    else:
        preds = [
            predicted_bands(pattern_for(i, classes[0], rules=rules, composition=comp), stretch_modes(i, classes[0]))
            for i in chosen
        ]
        win, source = predicted_window(classes[0], preds, rules)
    check_window([o.wavenumber for o in measured], classes[0], win, source, "--fit")


def predict_spectra(
    request: Request,
    *,
    reporter_class: str | None = None,
    isomer_id: str | None = None,
    constants: Mapping[str, float] | None = None,
    measured: Sequence[Observation] | None = None,
    fixed: Mapping[str, float] | None = None,
    tie_ck: bool = False,
    window: tuple[float, float] | None = None,
    progress: Callable[[str, int, int], None] | None = None,
) -> BandsResult:
    """Predict the stretching bands of every isomer of a formula, optionally fitting the constants.

    Parameters
    ----------
    request : Request
        Formula, geometry, reporter settings and rule folders.
    reporter_class : str, optional
        Only this class (default: every class present).
    isomer_id : str, optional
        Only this isomer (default: every isomer, one of each enantiomer pair).
    constants : Mapping[str, float], optional
        Overrides of the default constants (mdyn/Å; ``k`` sets every
        stretching constant).  Over several isomers a numbered constant
        (``k2``) applies to those that have it.
    measured : Sequence[Observation], optional
        Bands to fit the constants to (one isomer only).
    fixed : Mapping[str, float], optional
        Constants held during the fit.
    tie_ck : bool
        During the fit tie kt = 2 kc (the Cotton–Kraihanzel approximation).
    window : (low, high), optional
        cm-1: accept fitted bands in this window instead of the class's ``ir_window_cm1``.
    progress : callable, optional
        Called as ``progress(isomer id, done, total)`` after each isomer is predicted (and fitted).

    Returns
    -------
    BandsResult

    Raises
    ------
    InputError
        For a formula or isomer that cannot be read, no reporter, a fit over
        several isomers or classes, a constant outside its physical range, a
        fitted band outside the class's window, or anything
        :func:`~enumerator.vibrations.pattern.band_pattern` and
        :func:`~enumerator.vibrations.fitting.fit_constants` refuse.
    """
    comp, iso_set, reason, rules = _load(request)
    if isomer_id:
        chosen = [iso_set.get(isomer_id)]
    else:
        chosen = [i for i in iso_set.isomers if not (i.chiral and i.id.endswith("b"))]
    classes = [reporter_class] if reporter_class else sorted({c for i in chosen for c in reporter_classes(i)})
    if not classes:
        raise InputError(f"{comp.formula} has no stretch reporter", "mark one, e.g. --reporter a=CO")
    _check_fit_inputs(comp, chosen, classes, constants, measured, window, rules)
    desc = _descriptors(comp, iso_set)
    ids = [i.id for i in chosen]
    entries = []
    for iso in chosen:
        patterns = tuple(
            _class_bands(
                iso,
                cls,
                constants=constants,
                per_isomer=not isomer_id,
                measured=measured,
                fixed=fixed,
                tie_ck=tie_ck,
                others=ids,
                rules=rules,
                composition=comp,
            )
            for cls in classes
        )
        label = iso.id + (f"/{iso.enantiomer}" if iso.enantiomer and not isomer_id else "")
        entries.append(IsomerBands(iso.id, label, iso.point_group, desc.get(iso.id), patterns))
        if progress is not None:
            progress(iso.id, len(entries), len(chosen))
    return BandsResult(
        formula=comp.formula,
        geometry=iso_set.geometry.symbol,
        geometry_reason=reason,
        isomers=tuple(entries),
        safety=cautions(comp),
        measured=tuple(o.wavenumber for o in measured or ()),
        notes=_bands_notes(entries),
    )


def match_spectrum(
    request: Request,
    measured: Sequence[float],
    intensities: Sequence[float | None] | None = None,
    *,
    reporter_class: str | None = None,
    tolerance: float = DEFAULT_TOLERANCE,
    weak: float = DEFAULT_WEAK,
    window: tuple[float, float] | None = None,
) -> MatchReport:
    """Rank the isomers of a formula against measured stretching bands.

    Parameters
    ----------
    request : Request
        Formula, geometry, reporter settings and rule folders.
    measured : Sequence[float]
        Measured wavenumbers (cm-1).
    intensities : Sequence[float | None], optional
        Each band's relative intensity (None where unknown), in the order of ``measured``.
    reporter_class : str, optional
        The class the bands belong to (needed when several are present).
    tolerance : float
        cm-1: the measurement term (one standard uncertainty of a measured band position).
    weak : float
        The weak scale: a predicted band of this relative intensity goes unseen with probability 1/e.
    window : (low, high), optional
        cm-1: accept measured bands in this window instead of the class's ``ir_window_cm1``.

    Returns
    -------
    MatchReport

    Raises
    ------
    InputError
        For a formula that cannot be read or anything
        :func:`~enumerator.vibrations.matching.match_bands` refuses.
    """
    comp, iso_set, reason, rules = _load(request)
    res = match_bands(
        iso_set,
        reporter_class,
        measured,
        tolerance=tolerance,
        weak=weak,
        rules=rules,
        descriptors=_descriptors(comp, iso_set),
        intensities=intensities,
        window=window,
    )
    return MatchReport(comp.formula, iso_set.geometry.symbol, reason, res, cautions(comp))
