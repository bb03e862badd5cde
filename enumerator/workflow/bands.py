"""From a formula to predicted or matched stretching bands: the library side of
``isosieve bands`` and ``isosieve match``.

:func:`predict_spectra` enumerates the isomers of a request, predicts the
bands of each reporter class on each (one of every enantiomer pair) and, when
measured bands are given, fits the force constants of one isomer to them;
:func:`match_spectrum` ranks the isomers against measured bands.  Each returns
one frozen result whose ``to_dict()`` is the command's JSON document; the
renderers in :mod:`enumerator.render.bands` draw the text and the plots.

>>> r = predict_spectra(Request("[Cr(CO)6]"))
>>> [(b.species, round(b.wavenumber)) for b in r.isomers[0].patterns[0].pattern.ir_bands]
[('T1u', 1985)]
>>> m = match_spectrum(Request("Ma4b2", reporters=(("a", "CO"),)), [1950.0])
>>> m.match.candidates[0].point_group
'D4h'
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType
from typing import Any

from enumerator.analyses.descriptors import describe_isomer
from enumerator.analyses.safety import cautions
from enumerator.errors import InputError, IsosieveError
from enumerator.isomers.enumeration import Isomer, IsomerSet, enumerate_isomers
from enumerator.model.composition import Composition
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.vibrations.fitting import FitResult, Observation, fit_constants
from enumerator.vibrations.matching import DEFAULT_TOLERANCE, DEFAULT_WEAK, MatchResult, match_bands
from enumerator.vibrations.model import build_model, reporter_classes
from enumerator.vibrations.pattern import BandPattern, band_pattern
from enumerator.workflow.pipeline import Request, prepare

__all__ = [
    "ClassBands",
    "IsomerBands",
    "BandsResult",
    "MatchReport",
    "predict_spectra",
    "match_spectrum",
]


@dataclass(frozen=True)
class ClassBands:
    """The bands of one reporter class on one isomer, with the fit when one was asked for.

    ``reporter_class`` is the class as it was asked for (``--class``), the
    pattern carries the rule file's spelling.
    """

    reporter_class: str
    pattern: BandPattern
    fit: FitResult | None = None

    def to_dict(self) -> dict[str, Any]:
        """The pattern's JSON object, with a ``fit`` key when there is a fit."""
        doc = self.pattern.to_dict()
        if self.fit is not None:
            doc["fit"] = self.fit.to_dict()
        return doc


@dataclass(frozen=True)
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


@dataclass(frozen=True)
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

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve bands --json``."""
        return {
            "formula": self.formula,
            "geometry": self.geometry,
            "geometry_reason": self.geometry_reason,
            "isomers": [i.to_dict() for i in self.isomers],
            "safety": list(self.safety),
        }


@dataclass(frozen=True)
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
    if measured is None:
        return ClassBands(cls, pattern)
    if len(others) > 1:
        raise InputError("--fit needs one isomer", f"add --isomer, one of {', '.join(others)}")
    fit = fit_constants(iso, cls, measured, fixed=fixed, tie_ck=tie_ck, start=constants, rules=rules)
    return ClassBands(cls, pattern, fit)


def predict_spectra(
    request: Request,
    *,
    reporter_class: str | None = None,
    isomer_id: str | None = None,
    constants: Mapping[str, float] | None = None,
    measured: Sequence[Observation] | None = None,
    fixed: Mapping[str, float] | None = None,
    tie_ck: bool = False,
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

    Returns
    -------
    BandsResult

    Raises
    ------
    InputError
        For a formula or isomer that cannot be read, no reporter, a fit over
        several isomers, or anything :func:`~enumerator.vibrations.pattern.band_pattern`
        and :func:`~enumerator.vibrations.fitting.fit_constants` refuse.
    """
    comp, iso_set, reason, rules = _load(request)
    if isomer_id:
        chosen = [iso_set.get(isomer_id)]
    else:
        chosen = [i for i in iso_set.isomers if not (i.chiral and i.id.endswith("b"))]
    classes = [reporter_class] if reporter_class else sorted({c for i in chosen for c in reporter_classes(i)})
    if not classes:
        raise InputError(f"{comp.formula} has no stretch reporter", "mark one, e.g. --reporter a=CO")
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
    return BandsResult(
        formula=comp.formula,
        geometry=iso_set.geometry.symbol,
        geometry_reason=reason,
        isomers=tuple(entries),
        safety=cautions(comp),
        measured=tuple(o.wavenumber for o in measured or ()),
    )


def match_spectrum(
    request: Request,
    measured: Sequence[float],
    intensities: Sequence[float | None] | None = None,
    *,
    reporter_class: str | None = None,
    tolerance: float = DEFAULT_TOLERANCE,
    weak: float = DEFAULT_WEAK,
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
        cm-1: bands closer than this are coincident, a match within it is good.
    weak : float
        Relative intensity below which a predicted band may go unseen.

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
    )
    return MatchReport(comp.formula, iso_set.geometry.symbol, reason, res, cautions(comp))
