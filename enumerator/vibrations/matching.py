"""Which isomer fits a measured spectrum?  Rank the candidates by how probable
the measured bands are under each one's predicted band pattern.

For each geometric isomer (enantiomers have identical spectra and are ranked
together) the bands of one reporter class are predicted by
:func:`enumerator.vibrations.pattern.band_pattern` (an energy-factored force
field solved by Wilson's GF method, intensities by the bond-dipole model on
the ideal polyhedron), each band with its uncertainty ``sigma`` (cm-1) when
the band model gives one, else the class default of
:data:`enumerator.analyses.stretch.likelihood.DEFAULT_SIGMA_CM1` (said in the
notes).  The measured bands are then scored by the likelihood of
:mod:`enumerator.analyses.stretch.likelihood`, the same one the pair verdicts
use:

1. **Positions**: Gaussian in wavenumber with each band's sigma plus the
   measurement term (``tolerance``, cm-1), after one common shift of the
   pattern whose Gaussian prior has the class's sigma (integrated out; the
   best shift is shown in cm-1 and as Δk of every stretching constant).  A
   shift beyond 3 sigma of its expected spread means the spectrum does not
   look like that candidate; when the first candidate needs one, the ranking
   is marked unreliable.
2. **Counts**: a predicted band may go unobserved, the more likely the
   weaker it is (scale ``weak``) and when it lies within about 2 sigma of a
   stronger band (never the strongest band); a band the bond-dipole model
   makes silent (:attr:`~enumerator.analyses.stretch.modes.ModeSet.weak_species`)
   is expected unobserved; every measured band left unexplained costs a fixed
   penalty.
3. **Intensities** (when the bands carry them, as written in a paper:
   ``2045 (s), 1980 (vs), 1932 (m)``): measured against predicted relative
   intensities, a factor of two being one sigma.  Words map to numbers by
   common practice: vs 1.0, s 0.75, m 0.5, w 0.25, vw 0.1 (sh alone 0.25; br
   ignored); a number is taken as it is.
4. **Rank**: by the probability of each candidate (equal priors, the
   likelihood summed over every assignment of measured to predicted bands,
   normalised over the candidates).  Below odds of 3 for the first against
   the rest the data cannot decide, from odds of 20 the evidence is strong
   (R. E. Kass and A. E. Raftery, *J. Am. Stat. Assoc.* 90 (1995) 773).

Each candidate is explained in words; when the measured bands are enough, a
full force-constant fit (kt = 2 kc) of the same assignment is added, and for
a cis-M(CO)2 unit with both intensities the OC-M-CO angle that the
bond-dipole model reads from their ratio (:func:`~enumerator.vibrations.fitting.dicarbonyl_angle`).

Measured bands outside the class's window (``ir_window_cm1`` of
rules/reporters.toml, reaching out to every candidate's predicted IR bands
± :data:`WINDOW_SIGMAS` sigma where the band model puts them outside it, as for
[Ti(CO)6]2-) are refused unless the caller widens the window on purpose
(``window``).

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma3b3"), reporters=[("a", "CO")])
>>> s = enumerate_isomers(comp, load_rules().geometry("OC-6"))
>>> m = match_bands(s, "CO", [2050.0, 1975.0, 1947.0])
>>> [(c.rank, c.isomers, c.point_group) for c in m.candidates]
[(1, ('2',), 'C2v'), (2, ('1',), 'C3v')]
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import field, replace
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

from enumerator.analyses.stretch.likelihood import (
    DECIDE_ODDS,
    MEASUREMENT_SIGMA_CM1,
    SHIFT_LIMIT,
    STRONG_ODDS,
    WEAK_SCALE,
    Interpretation,
    Observed,
    PatternScore,
    PredictedBand,
    default_sigma,
    probabilities,
    score_pattern,
)
from enumerator.analyses.stretch.modes import ModeSet, stretch_modes
from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.model.composition import Composition
from enumerator.rules.reporters import load_reporters
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.vibrations.model import reporter_classes
from enumerator.vibrations.pattern import BandPattern, band_pattern
from enumerator.vibrations.solver import WAVENUMBER_FACTOR, Band

if TYPE_CHECKING:
    from enumerator.vibrations.fitting import FitResult

__all__ = [
    "Candidate",
    "MatchResult",
    "match_bands",
    "parse_measured",
    "predicted_bands",
    "pattern_for",
    "class_window",
    "predicted_window",
    "check_window",
    "DEFAULT_TOLERANCE",
    "DEFAULT_WEAK",
    "INTENSITY_WORDS",
    "MAX_INTENSITY",
    "WINDOW_LIMITS",
    "IDEALISED_NOTE",
]

#: cm-1, the default measurement term (one standard uncertainty of a measured band position).
DEFAULT_TOLERANCE = MEASUREMENT_SIGMA_CM1
#: The default weak scale: a band of this relative intensity goes unseen with probability 1/e.
DEFAULT_WEAK = WEAK_SCALE
#: Relative intensity of the words used in papers (common practice; semi-quantitative).
INTENSITY_WORDS: Mapping[str, float] = MappingProxyType(
    {"vs": 1.0, "s": 0.75, "m": 0.5, "w": 0.25, "vw": 0.1, "sh": 0.25}
)
#: The largest intensity number accepted: relative intensities, as fractions of the strongest or in per cent.
MAX_INTENSITY = 100.0
#: cm-1: no window, however widened, reaches outside this (the mid-infrared where stretching bands lie).
WINDOW_LIMITS = (100.0, 4000.0)
#: What every output says about the predicted intensities.
IDEALISED_NOTE = (
    "predicted intensities are idealised: bond-dipole model on the ideal polyhedron (ideal angles, one dipole "
    "derivative for every oscillator)"
)


def _split_outside_parentheses(text: str) -> list[str]:
    out, depth, cur = [], 0, ""
    for ch in text:
        if ch == "(":
            depth += 1
        elif ch == ")":
            depth = max(0, depth - 1)
        if ch in ",;" and depth == 0:
            out.append(cur)
            cur = ""
        else:
            cur += ch
    out.append(cur)
    return [p.strip() for p in out if p.strip()]


def parse_measured(text: str, option: str = "--bands") -> tuple[tuple[float, float | None], ...]:
    """Measured bands as written in a paper, with optional intensities.

    Parameters
    ----------
    text : str
        '2045 (s), 1980 (vs), 1932 (m, br)', '2045(0.8),1980' or plain
        '2045,1980,1932' (cm-1; parts separated by ',' or ';').  Words map
        by :data:`INTENSITY_WORDS`; 'br' is ignored, 'sh' alone counts as weak.
    option : str
        The option name to show in an error.

    Returns
    -------
    tuple[tuple[float, float | None], ...]
        (wavenumber, relative intensity or None) in the order given.  Whether the
        wavenumbers lie in the reporter class's window is checked by :func:`match_bands`.

    Raises
    ------
    InputError
        For a part that is not a wavenumber with an optional intensity, an
        unknown word, or no part at all.

    >>> parse_measured("2045 (s), 1980 (vs), 1932 (m, br), 1900")
    ((2045.0, 0.75), (1980.0, 1.0), (1932.0, 0.5), (1900.0, None))
    """
    out = []
    for part in _split_outside_parentheses(text):
        m = re.fullmatch(r"(\d+(?:\.\d*)?)\s*(?:\(([^()]*)\)|([A-Za-z]+))?\s*(?:cm-1|cm−1)?", part)
        if not m:
            raise InputError(
                f"{option}: '{part}' is not a wavenumber with an optional intensity",
                f'write e.g. {option} "2045 (s), 1980 (vs), 1932 (m)" or {option} 2045,1980,1932',
            )
        v = float(m.group(1))
        if not math.isfinite(v) or v <= 0:
            raise InputError(f"{option}: '{part}' is not a wavenumber", f"write e.g. {option} 2045,1980,1932")
        words = m.group(2) if m.group(2) is not None else m.group(3)
        out.append((v, _intensity(words, part, option)))
    if not out:
        raise InputError(f"{option}: no wavenumbers given", f"write e.g. {option} 2045,1980,1932")
    return tuple(out)


def _intensity(words: str | None, part: str, option: str) -> float | None:
    if words is None or not words.strip():
        return None
    toks = [t for t in re.split(r"[\s,]+", words.strip().lower()) if t]
    try:
        x = float(toks[0])
    except ValueError:
        x = None
    if x is not None:
        if len(toks) > 1 or not math.isfinite(x) or not 0 < x <= MAX_INTENSITY:
            raise InputError(
                f"{option}: '{part}': the intensity must be one number in (0, {MAX_INTENSITY:g}] "
                "(relative to the strongest band, or per cent) or words",
                "write e.g. 1980 (0.8), 1980 (80) or 1980 (s)",
            )
        return x
    known = [INTENSITY_WORDS[t] for t in toks if t in INTENSITY_WORDS and t != "sh"]
    other = [t for t in toks if t not in INTENSITY_WORDS and t not in ("br", "b")]
    if other:
        raise InputError(
            f"{option}: '{part}': unknown intensity word '{other[0]}'", "use vs, s, m, w, vw (and sh, br), or a number"
        )
    if known:
        return known[0]
    return INTENSITY_WORDS["sh"] if "sh" in toks else None


# --------------------------------------------------------------------------
# the predicted bands as the likelihood reads them, and the class's window


def pattern_for(
    isomer: Isomer, reporter_class: str, *, rules: RuleSet | None, composition: Composition | None
) -> BandPattern:
    """The predicted pattern the matcher and the pair verdicts use: :func:`band_pattern` of the isomer, given
    its composition so that the band model can use the metal, the charge and the ligands.

    Parameters
    ----------
    isomer : Isomer
    reporter_class : str
    rules : RuleSet or None
    composition : Composition or None
        The isomer's composition (None: the generic constants).

    Returns
    -------
    BandPattern
    """
    return band_pattern(isomer, reporter_class, rules=rules, composition=composition)


def predicted_bands(pattern: BandPattern, modes: ModeSet) -> tuple[PredictedBand, ...]:
    """The IR-allowed bands of a pattern as the likelihood reads them, highest first.

    Parameters
    ----------
    pattern : BandPattern
        The predicted bands of one class on one isomer.
    modes : ModeSet
        The same class's stretch species (which species are predicted weak).

    Returns
    -------
    tuple[PredictedBand, ...]
        Every band symmetry allows in IR (or, without a character table, every
        band of non-zero intensity), with its sigma (the class default when the
        band model gives none) and whether its species is predicted weak.
    """
    out = []
    fallback = default_sigma(pattern.reporter_class)
    for b in pattern.bands:
        allowed = b.ir_allowed if b.ir_allowed is not None else b.ir_active
        if not allowed:
            continue
        sigma = b.sigma if b.sigma is not None and b.sigma > 0 else fallback
        out.append(
            PredictedBand(b.name, b.wavenumber, b.intensity, sigma, b.sigma is None, b.species in modes.weak_species)
        )
    return tuple(out)


def class_window(reporter_class: str, rules: RuleSet | None = None) -> tuple[tuple[float, float], str]:
    """The plausible window of a reporter class's stretch and where it comes from.

    Parameters
    ----------
    reporter_class : str
        'CO', 'CN', ...
    rules : RuleSet, optional
        The rule files in force (default: the built-in rules).

    Returns
    -------
    ((low, high), source)
        ``ir_window_cm1`` of rules/reporters.toml with its ``window_source``.

    Raises
    ------
    InputError
        For a class no reporters file defines.
    """
    reps = load_reporters(rules if rules is not None else load_rules())
    try:
        c = reps.get(reporter_class)
    except KeyError:
        raise InputError(
            f"no reporter class '{reporter_class}' in the reporter rules", f"known: {', '.join(reps.names)}"
        ) from None
    return (float(c.window[0]), float(c.window[1])), c.source


#: How many of a predicted band's sigmas the window reaches beyond it, when the band model puts a formula's bands
#: outside the class's usual window (e.g. [Ti(CO)6]2-, whose T1u band lies near 1750 cm-1).
WINDOW_SIGMAS = 4.0


def predicted_window(
    reporter_class: str, predictions: Sequence[Sequence[PredictedBand]], rules: RuleSet | None = None
) -> tuple[tuple[float, float], str]:
    """The window measured bands must lie in: the class's, reaching out to the band model's predictions.

    A formula whose bands the band model predicts outside the class's usual window (a highly charged
    carbonylate, a cationic carbonyl) keeps its measured bands: the window is widened to every predicted
    IR band ± :data:`WINDOW_SIGMAS` of its sigma, and the source says so.  Only the band model's own
    predictions widen it (bands with a sigma of their own); the generic constants never do.

    Parameters
    ----------
    reporter_class : str
    predictions : Sequence[Sequence[PredictedBand]]
        The IR-allowed predicted bands of every candidate.
    rules : RuleSet, optional

    Returns
    -------
    ((low, high), source)
    """
    (lo, hi), source = class_window(reporter_class, rules)
    bands = [b for p in predictions for b in p if not b.sigma_default]
    plo = min((b.wavenumber - WINDOW_SIGMAS * b.sigma for b in bands), default=lo)
    phi = max((b.wavenumber + WINDOW_SIGMAS * b.sigma for b in bands), default=hi)
    if plo >= lo and phi <= hi:
        return (lo, hi), source
    new = (max(min(lo, math.floor(plo)), WINDOW_LIMITS[0]), min(max(hi, math.ceil(phi)), WINDOW_LIMITS[1]))
    return new, (
        f"{source}; widened to the predicted bands of this formula ± {WINDOW_SIGMAS:g} σ, "
        f"since the band model puts some outside {lo:g}-{hi:g} cm-1"
    )


def check_window(
    values: Sequence[float], reporter_class: str, window: tuple[float, float], source: str, option: str
) -> None:
    """Refuse a measured band outside the class's window, with one line naming the band and the window.

    Parameters
    ----------
    values : Sequence[float]
        Measured wavenumbers (cm-1).
    reporter_class : str
    window : (low, high)
        cm-1.
    source : str
        Where the window comes from ('--window' when the user gave it).
    option : str
        The option the bands came from, for the message.

    Raises
    ------
    InputError
        For the first band outside the window.
    """
    lo, hi = window
    for v in values:
        if lo <= v <= hi:
            continue
        where = f"{option}: {v:g} cm-1 is outside the {reporter_class} window {lo:g}-{hi:g} cm-1 ({source})"
        if not WINDOW_LIMITS[0] <= v <= WINDOW_LIMITS[1]:
            raise InputError(
                where,
                f"check the value (a typing slip?): stretching bands lie within {WINDOW_LIMITS[0]:g}-"
                f"{WINDOW_LIMITS[1]:g} cm-1",
            )
        wide = f"{min(lo, math.floor(v / 50) * 50):g}:{max(hi, math.ceil(v / 50) * 50):g}"
        raise InputError(
            where,
            f"check the value (a typing slip?); if the band is real, widen the window on purpose, e.g. --window {wide}",
        )


# --------------------------------------------------------------------------
# the result


@frozen_dataclass
class Candidate:
    """One geometric isomer's agreement with the measured bands.

    ``predicted`` are the predicted bands (all species), ``shifted`` the same
    after the best common shift (``shift_cm1`` at the mean band, ``shift`` as
    Δk of every stretching constant in mdyn/Å, ``shift_z`` the shift the bands
    ask for in standard deviations of its expected spread); ``assignment``
    pairs measured bands with shifted predicted ones; ``unobserved`` lists the
    predicted IR bands not seen with the reason and probability; ``missing``
    are those a strong band would have shown (``excused`` the others, with
    the reason); ``problems`` counts missing bands and unexplained measured
    bands; ``probability`` is the candidate's share of the evidence (equal
    priors) and ``log_evidence`` its natural log; ``oc_angle`` the OC-M-CO
    angle read from a cis-dicarbonyl's intensity ratio; ``fit`` the full
    force-constant fit (kt = 2 kc) of the same assignment when the bands
    allow one, else ``fit_note`` says why not.
    """

    rank: int
    isomers: tuple[str, ...]
    point_group: str
    descriptor: str | None
    species: str | None
    predicted: tuple[Band, ...]
    shift: float
    rms: float
    max_residual: float
    #: (measured, band name, predicted after the shift, residual)
    assignment: tuple[tuple[float, str, float, float], ...]
    extra_measured: tuple[float, ...]
    missing: tuple[str, ...]
    excused: tuple[tuple[str, str], ...]
    problems: int
    fit: FitResult | None
    fit_note: str | None
    explanation: str
    #: mean |measured - predicted| relative intensity over the assigned bands (None: not given)
    intensity_misfit: float | None = None
    #: (measured, measured relative intensity, predicted relative intensity) per assigned band
    intensities: tuple[tuple[float, float, float], ...] = ()
    score: float = 0.0
    #: every predicted band after the common shift (what a plot of the candidate draws)
    shifted: tuple[Band, ...] = field(default=(), compare=False)
    probability: float = 0.0
    log_evidence: float = 0.0
    shift_cm1: float = 0.0
    shift_sigma: float = 0.0
    shift_z: float | None = None
    sigma_default: bool = True
    #: (band name, reason, probability of going unobserved)
    unobserved: tuple[tuple[str, str, float], ...] = ()
    modes: ModeSet | None = field(default=None, compare=False)
    #: (term, natural-log likelihood) of the best assignment
    terms: tuple[tuple[str, float], ...] = ()
    swapped: bool = False
    oc_angle: float | None = None
    assignments_scored: int = 0
    #: which model predicted the positions: 'additive' (the fitted ligand-effect model) or 'generic'
    band_model: str = "generic"
    #: ligands the band model has no parameters of its own for (their sigma is widened)
    fallbacks: tuple[str, ...] = ()
    #: what the band model says about this prediction (fallbacks, why the generic constants were used)
    model_notes: tuple[str, ...] = ()

    @property
    def ir_bands(self) -> tuple[Band, ...]:
        """The IR-allowed predicted bands (predicted-weak ones included)."""
        return tuple(b for b in self.predicted if (b.ir_allowed if b.ir_allowed is not None else b.ir_active))

    @property
    def ir_weak(self) -> int:
        """How many of them are predicted weak (bond-dipole intensity zero by symmetry)."""
        return self.modes.ir_weak if self.modes is not None else 0

    def _weak_band(self, b: Band) -> bool:
        return self.modes is not None and b.species in self.modes.weak_species

    def to_dict(self) -> dict[str, Any]:
        """The candidate's JSON object (rounded for byte-stable output)."""
        return {
            "rank": self.rank,
            "isomers": list(self.isomers),
            "point_group": self.point_group,
            "descriptor": self.descriptor,
            "species": self.species,
            "ir_count": len(self.ir_bands),
            "ir_predicted_weak": self.ir_weak,
            "predicted": [
                {
                    "band": b.name,
                    "wavenumber": round(b.wavenumber, 1),
                    "intensity": round(b.intensity, 4),
                    "species": b.species,
                    "predicted_weak": self._weak_band(b),
                }
                for b in self.ir_bands
            ],
            "shift_k": round(self.shift, 4),
            "shift_cm1": round(self.shift_cm1, 1),
            "shift_sigma_cm1": round(self.shift_sigma, 1),
            "shift_z": None if self.shift_z is None else round(self.shift_z, 2),
            "sigma_default": self.sigma_default,
            "band_model": self.band_model,
            "fallbacks": list(self.fallbacks),
            "model_notes": list(self.model_notes),
            "rms": round(self.rms, 2) if math.isfinite(self.rms) else None,
            "max_residual": round(self.max_residual, 1) if math.isfinite(self.max_residual) else None,
            "assignment": [
                {"measured": round(m, 1), "band": n, "predicted": round(p, 1), "residual": round(r, 1)}
                for m, n, p, r in self.assignment
            ],
            "assigned_out_of_order": self.swapped,
            "extra_measured": [round(x, 1) for x in self.extra_measured],
            "missing": list(self.missing),
            "excused": [{"band": b, "reason": r} for b, r in self.excused],
            "unobserved": [{"band": b, "reason": r, "probability": round(q, 4)} for b, r, q in self.unobserved],
            "count_problems": self.problems,
            "fit": None if self.fit is None else self.fit.to_dict(),
            "fit_note": self.fit_note,
            "intensity_misfit": None if self.intensity_misfit is None else round(self.intensity_misfit, 3),
            "intensities": [
                {"measured": round(m, 1), "measured_relative": round(a, 3), "predicted_relative": round(b, 3)}
                for m, a, b in self.intensities
            ],
            "oc_angle_deg": None if self.oc_angle is None else round(self.oc_angle, 1),
            "probability": round(self.probability, 4),
            "log_likelihood": {k: round(v, 3) for k, v in self.terms},
            "log_evidence": round(self.log_evidence, 3),
            "assignments_scored": self.assignments_scored,
            "score": round(self.score, 3),
            "explanation": self.explanation,
        }


@frozen_dataclass
class MatchResult:
    """The ranked candidates for one set of measured bands of one reporter class.

    ``measured`` highest first (cm-1), with ``measured_intensity`` in the same
    order (None where not given); ``tolerance`` the measurement term in cm-1,
    ``weak`` the weak scale; ``window`` the class's window and where it comes
    from; ``decision`` 'strong', 'favoured' or 'undecided' (odds of the first
    candidate against the rest, Kass & Raftery 1995); ``reliable`` is False
    when the first candidate needs a shift beyond 3 sigma; ``notes`` say how
    to read the ranking.
    """

    reporter_class: str
    measured: tuple[float, ...]
    tolerance: float
    weak: float
    candidates: tuple[Candidate, ...]
    notes: tuple[str, ...] = ()
    measured_intensity: tuple[float | None, ...] = ()
    window: tuple[float, float] = (0.0, 0.0)
    window_source: str = ""
    decision: str = "undecided"
    odds: float | None = None
    reliable: bool = True
    looks_like_none: bool = False

    def to_dict(self) -> dict[str, Any]:
        """The match's JSON keys (rounded for byte-stable output)."""
        return {
            "reporter_class": self.reporter_class,
            "measured": [round(x, 1) for x in self.measured],
            "measured_intensity": [None if x is None else round(x, 3) for x in self.measured_intensity]
            or [None] * len(self.measured),
            "tolerance": self.tolerance,
            "weak_threshold": self.weak,
            "window_cm1": list(self.window),
            "window_source": self.window_source,
            "decision": self.decision,
            "odds": None if self.odds is None else float(f"{self.odds:.4g}"),
            "reliable": self.reliable,
            "looks_like_no_candidate": self.looks_like_none,
            "candidates": [c.to_dict() for c in self.candidates],
            "match_notes": list(self.notes),
        }


# --------------------------------------------------------------------------
# one candidate


def _shift_k(pattern: BandPattern, reference: float, shift_cm1: float) -> float:
    """Δk (mdyn/Å) of every stretching constant that moves a band at ``reference`` by ``shift_cm1``:
    ν̃ = C √(λ + ḡ Δk) with ḡ the mean inverse reduced mass (exact when the oscillators share their masses)."""
    g = [o.g for o in pattern.model.oscillators]
    gbar = sum(g) / len(g) if g else 0.0
    if gbar <= 0 or reference <= 0:
        return 0.0
    return ((reference + shift_cm1) ** 2 - reference**2) / (WAVENUMBER_FACTOR**2 * gbar)


def _shifted(bands: Sequence[Band], reference: float, shift_cm1: float) -> tuple[Band, ...]:
    """Every band moved by the common shift (h = reference / ν̃ of each band)."""
    return tuple(replace(b, wavenumber=b.wavenumber + shift_cm1 * reference / b.wavenumber) for b in bands)


_REASONS = MappingProxyType(
    {
        "weak": "weak ({pct:.0f}% of the strongest)",
        "hidden": "hidden under {host} (within the model's uncertainty of a stronger band)",
        "predicted weak": "predicted weak (bond-dipole intensity ~0: trans oscillators in phase)",
        "missing": "missing",
    }
)


def _unobserved_rows(it: Interpretation, pred: Sequence[PredictedBand]) -> tuple[tuple[str, str, float], ...]:
    hosts = dict(it.hidden_under)
    out = []
    for k, why, q in it.unobserved:
        host = pred[hosts[k]].name if k in hosts else ""
        out.append((pred[k].name, _REASONS[why].format(pct=100 * pred[k].intensity, host=host), q))
    return tuple(out)


def _cis_pair_angle(iso: Isomer, pattern: BandPattern) -> float | None:
    """The angle (degrees) between the class's two oscillators when there are exactly two and they are cis."""
    osc = pattern.model.oscillators
    if len(osc) != 2:
        return None
    ang = float(iso.geometry.angles[osc[0].site, osc[1].site])
    return ang if ang < 170.0 else None


def _oc_angle(iso, pattern, it: Interpretation, obs: Observed, pred) -> float | None:
    """The OC-M-CO angle read from the measured intensities of a cis pair's two bands (higher = in phase)."""
    if _cis_pair_angle(iso, pattern) is None or len(it.pairs) != 2:
        return None
    by_pred = sorted(it.pairs, key=lambda jk: -pred[jk[1]].wavenumber)
    i_sym, i_asym = obs.intensity(by_pred[0][0]), obs.intensity(by_pred[1][0])
    if i_sym is None or i_asym is None:
        return None
    from enumerator.vibrations.fitting import dicarbonyl_angle  # the fit: only where bands are matched

    return dicarbonyl_angle(i_sym, i_asym)


def _full_fit(iso: Isomer, reporter_class: str, it: Interpretation, obs: Observed, pred, rules):
    """The full force-constant fit (kt = 2 kc) of the same assignment, or why there is none."""
    if it.extra or not it.pairs:
        return None, None
    from enumerator.vibrations.fitting import Observation, fit_constants  # only where bands are matched

    labels = [
        Observation(obs.wavenumbers[j], pred[k].name if not pred[k].name.startswith("mode") else None)
        for j, k in it.pairs
    ]
    try:
        return fit_constants(iso, reporter_class, labels, tie_ck=True, rules=rules), None
    except InputError as exc:
        return None, f"no full fit: {exc.what}"


@frozen_dataclass
class _Settings:
    reporter_class: str
    tolerance: float
    weak: float
    window_width: float
    composition: Composition | None = None


@frozen_dataclass
class _Prediction:
    """One geometric isomer's predicted pattern, its stretch species and the bands as the likelihood reads them."""

    pattern: BandPattern
    modes: ModeSet
    bands: tuple[PredictedBand, ...]


def _predict(iso: Isomer, reporter_class: str, composition: Composition | None, rules: RuleSet) -> _Prediction:
    pattern = pattern_for(iso, reporter_class, rules=rules, composition=composition)
    modes = stretch_modes(iso, pattern.reporter_class)
    return _Prediction(pattern, modes, predicted_bands(pattern, modes))


def _model_notes(pattern: BandPattern) -> tuple[str, ...]:
    """What the band model says about its own prediction: which model, and the ligands that fell back."""
    if pattern.model_name == "additive":
        keep = ("parameters", "sigma", "band model", "base value")
        return tuple(n for n in pattern.notes if any(k in n for k in keep))
    return tuple(n for n in pattern.notes if "generic constants" in n or "band model" in n)


def _evaluate(
    isomers: Sequence[Isomer], obs: Observed, cfg: _Settings, descriptor, rules, prediction: _Prediction
) -> Candidate:
    """The likelihood of one geometric isomer (its enantiomers share the spectrum), with what it assigns."""
    iso = isomers[0]
    pattern, modes, pred = prediction.pattern, prediction.modes, prediction.bands
    sc: PatternScore = score_pattern(
        obs, pred, window_width=cfg.window_width, measurement_sigma=cfg.tolerance, weak=cfg.weak
    )
    it = sc.best
    ref = sc.reference
    shifted = _shifted(pattern.bands, ref, it.shift)
    assignment = tuple(
        (obs.wavenumbers[j], pred[k].name, obs.wavenumbers[j] - r, r) for (j, k), r in zip(it.pairs, it.residuals)
    )
    unobserved = _unobserved_rows(it, pred)
    missing = tuple(name for name, why, _ in unobserved if why == "missing")
    excused = tuple((name, why) for name, why, _ in unobserved if why != "missing")
    res = [a[3] for a in assignment]
    rows = tuple((obs.wavenumbers[j], a, p) for j, a, p in it.intensity_rows)
    fit, fit_note = _full_fit(iso, cfg.reporter_class, it, obs, pred, rules)
    t = it.terms
    return Candidate(
        rank=0,
        isomers=tuple(i.id for i in isomers),
        point_group=iso.point_group,
        descriptor=descriptor,
        species=pattern.species,
        predicted=pattern.bands,
        shift=_shift_k(pattern, ref, it.shift),
        rms=math.sqrt(sum(r * r for r in res) / len(res)) if res else float("inf"),
        max_residual=max((abs(r) for r in res), default=float("inf")),
        assignment=assignment,
        extra_measured=tuple(obs.wavenumbers[j] for j in it.extra),
        missing=missing,
        excused=excused,
        problems=len(missing) + len(it.extra),
        fit=fit,
        fit_note=fit_note,
        explanation="",
        intensity_misfit=sum(abs(a - p) for _, a, p in rows) / len(rows) if len(rows) >= 2 else None,
        intensities=rows if len(rows) >= 2 else (),
        score=-sc.log_evidence,
        shifted=shifted,
        log_evidence=sc.log_evidence,
        shift_cm1=it.shift,
        shift_sigma=sc.shift_sigma,
        shift_z=it.shift_z,
        sigma_default=any(b.sigma_default for b in pred),
        unobserved=unobserved,
        modes=modes,
        terms=(("positions", t.position), ("count", t.count), ("unexplained", t.extra), ("intensities", t.intensity)),
        swapped=it.swapped,
        oc_angle=_oc_angle(iso, pattern, it, obs, pred),
        assignments_scored=sc.tried,
        band_model=pattern.model_name,
        fallbacks=pattern.fallbacks,
        model_notes=_model_notes(pattern),
    )


# --------------------------------------------------------------------------
# the explanation, sentence by sentence


def _plural(n: int, one: str, many: str) -> str:
    return one if n == 1 else many


def _ir_species(c: Candidate) -> str | None:
    """The IR-allowed species with their counts, in the order of the full representation."""
    ir = c.ir_bands
    if not ir or not all(b.species for b in ir):
        return None
    counts: dict[str, int] = {}
    for b in ir:
        counts[b.species or ""] = counts.get(b.species or "", 0) + 1
    order = [t.lstrip("0123456789") for t in (c.species or "").split(" + ")]
    labs = sorted(counts, key=lambda x: order.index(x) if x in order else len(order))
    return " + ".join(x if counts[x] == 1 else f"{counts[x]}{x}" for x in labs)


def _headline(c: Candidate, reporter_class: str, n_measured: int, n_candidates: int) -> str:
    tag = ", ".join(x for x in (c.descriptor, c.point_group) if x)
    n_ir = len(c.ir_bands)
    species = _ir_species(c)
    weak = [b.name for b in c.ir_bands if c._weak_band(b)]
    text = (
        f"#{c.rank} isomer {'/'.join(c.isomers)} ({tag}): probability {c.probability:.2f} "
        f"(equal priors over {n_candidates} candidate{_plural(n_candidates, '', 's')}). "
        f"IR: {n_ir} {reporter_class} band{_plural(n_ir, '', 's')}"
    )
    if weak:
        text += f" ({n_ir - len(weak)} with bond-dipole intensity, {len(weak)} predicted weak: {', '.join(weak)})"
    if c.species and species:
        text += f" ({c.species} in all; IR-allowed: {species})"
    return text + f"; {n_measured} measured."


def _signed(x: float, places: int) -> str:
    """'+4', '-0.07', and '0' rather than '-0' for a value that rounds to zero."""
    text = f"{x:+.{places}f}"
    return text[1:] if float(text) == 0 else text


def _shift_sentences(c: Candidate, reporter_class: str) -> list[str]:
    if not c.assignment:
        return ["No measured band is explained by this isomer's pattern."]
    if c.sigma_default:
        where = f"default for {reporter_class}: positions from the generic constants, the band model gives no sigma"
    else:
        where = "additive band model" + (f"; widened for {', '.join(c.fallbacks)}" if c.fallbacks else "")
    out = [
        f"Common shift {_signed(c.shift_cm1, 0)} cm-1 (Δk = {_signed(c.shift, 2)} mdyn/Å of every stretching "
        "constant); "
        f"the bands ask for {c.shift_z:.1f} σ of the {c.shift_sigma:.0f} cm-1 position uncertainty ({where})."
    ]
    if c.shift_z is not None and c.shift_z > SHIFT_LIMIT:
        out.append(f"That is beyond {SHIFT_LIMIT:g} σ: these positions do not look like this isomer's pattern.")
    pairs = ", ".join(f"{m:g} → {n} ({p:.0f}, {r:+.0f})" for m, n, p, r in c.assignment)
    out.append(
        f"Assigned (predicted after the shift, residual): {pairs}; RMS {c.rms:.1f} cm-1"
        + (" (out of predicted order: near-degenerate bands, as the intensities favour)." if c.swapped else ".")
    )
    return out


def _count_sentences(c: Candidate) -> list[str]:
    out = [f"{name} not seen: {why} (p = {q:.2g})." for name, why, q in c.unobserved if why != "missing"]
    if c.missing:
        k = len(c.missing)
        out.append(
            f"Strong band{_plural(k, '', 's')} {', '.join(c.missing)} would be expected but "
            f"{_plural(k, 'is', 'are')} not among the measured bands."
        )
    if c.extra_measured:
        k = len(c.extra_measured)
        xs = ", ".join(f"{x:g}" for x in c.extra_measured)
        out.append(
            f"Measured band{_plural(k, '', 's')} {xs} cm-1 {_plural(k, 'is', 'are')} not explained by this "
            "isomer (an impurity, an overtone, a 13CO satellite or another species?)."
        )
    return out


def _intensity_sentences(c: Candidate) -> list[str]:
    out = []
    if c.intensity_misfit is not None:
        rel = ", ".join(f"{m:g} {a:.2f}/{b:.2f}" for m, a, b in c.intensities)
        out.append(f"Relative intensities, measured/predicted (strongest = 1): {rel}.")
    if c.oc_angle is not None:
        out.append(
            f"OC-M-CO angle from the intensity ratio: {c.oc_angle:.0f}° (I_sym/I_asym = cot²θ, 2θ the angle; "
            "bond-dipole model)."
        )
    return out


def _verdict_sentences(c: Candidate) -> list[str]:
    terms = ", ".join(f"{k} {v:.1f}" for k, v in c.terms)
    if c.problems == 0:
        out = ["Count: consistent (every measured band explained; every predicted band seen or plausibly unseen)."]
    else:
        out = [f"Count: {c.problems} problem{_plural(c.problems, '', 's')} (strong bands unseen, bands unexplained)."]
    out.append(f"ln L of the best assignment: {terms}.")
    if c.fit is not None:
        # from the JSON values (rounded to 4 places), so text and JSON agree
        fit = c.fit.to_dict()
        consts = ", ".join(
            f"{k['name']} = {k['value']:.2f}" + (f" ± {k['uncertainty']:.2f}" if k["uncertainty"] is not None else "")
            for k in fit["constants"]
        )
        out.append(f"Full fit of this assignment (kt = 2 kc): {consts} mdyn/Å, RMS {fit['rms']:.1f} cm-1.")
    elif c.fit_note:
        out.append(c.fit_note[0].upper() + c.fit_note[1:] + ".")
    return out


def _explain(c: Candidate, reporter_class: str, n_measured: int, n_candidates: int) -> str:
    """The ranking of one candidate in words."""
    parts = [
        _headline(c, reporter_class, n_measured, n_candidates),
        *_shift_sentences(c, reporter_class),
        *(f"Band model: {n}." for n in c.model_notes),
        *_count_sentences(c),
        *_intensity_sentences(c),
        *_verdict_sentences(c),
    ]
    return " ".join(parts)


# --------------------------------------------------------------------------
# the ranking


def _check_settings(measured: Sequence[float], tolerance: float, weak: float) -> None:
    if not measured:
        raise InputError("no measured bands", "give e.g. --bands 2045,1980,1932")
    if not 0.1 <= tolerance <= 50:
        raise InputError(
            f"measurement term {tolerance:g} cm-1 is outside 0.1-50 cm-1",
            "give e.g. --tolerance 5 (one standard uncertainty of a measured band position, cm-1)",
        )
    if not 0 <= weak < 1:
        raise InputError(f"weak scale {weak:g} is not in [0, 1)", "give e.g. --weak 0.05")


def _check_window_arg(window: tuple[float, float] | None) -> None:
    if window is None:
        return
    lo, hi = window
    if not (math.isfinite(lo) and math.isfinite(hi) and 100 <= lo < hi <= 4000):
        raise InputError(
            f"window {lo:g}:{hi:g} cm-1 is not a range inside 100-4000 cm-1 (the mid-infrared of stretching bands)",
            "give e.g. --window 1500:2300",
        )


def _reporter_class(isomer_set: IsomerSet, reporter_class: str | None) -> str:
    """The class the bands belong to: the one asked for, or the only one present."""
    formula = isomer_set.composition.formula
    classes = sorted({c for i in isomer_set.isomers for c in reporter_classes(i)})
    if reporter_class is None:
        if not classes:
            raise InputError(f"{formula} has no stretch reporter", "mark one, e.g. --reporter a=CO")
        if len(classes) > 1:
            raise InputError(
                f"{formula} has several reporter classes ({', '.join(classes)})",
                f"say which the bands belong to, e.g. --class {classes[0]}",
            )
        return classes[0]
    if reporter_class not in classes:
        raise InputError(
            f"{formula} has no {reporter_class} reporter", f"reporters here: {', '.join(classes) or 'none'}"
        )
    return reporter_class


def _sorted_measured(
    measured: Sequence[float], intensities: Sequence[float | None] | None
) -> tuple[tuple[float, ...], tuple[float | None, ...]]:
    """Measured wavenumbers highest first, each with its intensity."""
    if intensities is not None and len(intensities) != len(measured):
        raise InputError(
            f"{len(intensities)} intensities for {len(measured)} bands", "give one intensity (or none) per band"
        )
    pairs = sorted(zip((float(x) for x in measured), intensities or [None] * len(measured)), key=lambda p: -p[0])
    meas = tuple(p[0] for p in pairs)
    meas_int = tuple(None if p[1] is None else float(p[1]) for p in pairs)
    if any(not math.isfinite(x) or x <= 0 for x in meas):
        raise InputError("a measured band is not a positive wavenumber", "give e.g. --bands 2045,1980,1932")
    if any(x is not None and (not math.isfinite(x) or not 0 < x <= MAX_INTENSITY) for x in meas_int):
        raise InputError(
            f"a measured intensity is not a number in (0, {MAX_INTENSITY:g}]", "give e.g. 2045 (s) or 2045 (0.8)"
        )
    return meas, meas_int


def _ranked(cands: Sequence[Candidate], reporter_class: str, n_measured: int) -> tuple[Candidate, ...]:
    """Candidates by probability (ties keep isomer order), each ranked and explained."""
    probs = probabilities([c.log_evidence for c in cands])
    cands = [replace(c, probability=p) for c, p in zip(cands, probs)]
    order = sorted(range(len(cands)), key=lambda k: (-round(cands[k].probability, 9), k))
    ranked = []
    for r, k in enumerate(order, start=1):
        c = replace(cands[k], rank=r)
        ranked.append(replace(c, explanation=_explain(c, reporter_class, n_measured, len(cands))))
    return tuple(ranked)


def _decision(ranked: Sequence[Candidate]) -> tuple[str, float | None]:
    """('strong' | 'favoured' | 'undecided', odds of the first against the rest), the odds from the log
    evidences (finite however lopsided)."""
    if len(ranked) < 2:
        return "single", None
    top = ranked[0].log_evidence
    rest = [c.log_evidence for c in ranked[1:]]
    m = max(rest)
    log_rest = m + math.log(sum(math.exp(x - m) for x in rest))
    odds = math.exp(min(top - log_rest, 690.0))
    if odds >= STRONG_ODDS:
        return "strong", odds
    if odds >= DECIDE_ODDS:
        return "favoured", odds
    return "undecided", odds


def _decision_note(ranked: Sequence[Candidate], decision: str, odds: float | None, intensities: bool) -> str | None:
    if decision == "single":
        return "only one candidate: the ranking says how well it explains the bands, not which isomer it is"
    top = "/".join(ranked[0].isomers)
    shown = "-" if odds is None else f"{odds:.3g}"
    if decision == "strong":
        return f"isomer {top} is strongly favoured (odds {shown} : 1 against the rest; strong from 20, Kass & Raftery)"
    if decision == "favoured":
        return f"isomer {top} is favoured (odds {shown} : 1 against the rest; strong evidence needs 20)"
    second = "/".join(ranked[1].isomers)
    hint = (
        "other reporters, Raman or NMR may decide"
        if intensities
        else 'the measured intensities (e.g. --bands "2045 (s), 1980 (vs)"), other reporters, Raman or NMR may decide'
    )
    return (
        f"the data cannot decide: isomer {top} has probability {ranked[0].probability:.2f} "
        f"(odds {shown} : 1, below {DECIDE_ODDS:g}); {second} is close: {hint}"
    )


def _reliability(ranked: Sequence[Candidate]) -> tuple[bool, bool, str | None]:
    """(reliable, looks like no candidate, the note)."""
    far = [c for c in ranked if c.shift_z is None or c.shift_z > SHIFT_LIMIT]
    if ranked and len(far) == len(ranked):
        return (
            False,
            True,
            f"this spectrum does not look like any candidate of this formula: every candidate needs a shift beyond "
            f"{SHIFT_LIMIT:g} σ of the model's position uncertainty (check the formula, the reporter class and the "
            "bands); the ranking is unreliable",
        )
    if ranked and (ranked[0].shift_z is None or ranked[0].shift_z > SHIFT_LIMIT):
        return (
            False,
            False,
            f"the first candidate needs a shift beyond {SHIFT_LIMIT:g} σ of the model's position uncertainty: "
            "the ranking is unreliable",
        )
    return True, False, None


def _sigma_note(ranked: Sequence[Candidate], reporter_class: str) -> str:
    if any(c.sigma_default for c in ranked):
        return (
            f"position uncertainty: the default {default_sigma(reporter_class):g} cm-1 for {reporter_class} "
            "(a tool convention, wider than the band model's; the positions come from the generic constants "
            "and the band model gives no sigma for these bands), plus the measurement term"
        )
    widened = sorted({x for c in ranked for x in c.fallbacks})
    return (
        "position uncertainty: each band's sigma from the additive band model"
        + (f" (widened where it falls back for {', '.join(widened)})" if widened else "")
        + ", plus the measurement term"
    )


def match_bands(
    isomer_set: IsomerSet,
    reporter_class: str | None,
    measured: Sequence[float],
    *,
    tolerance: float = DEFAULT_TOLERANCE,
    weak: float = DEFAULT_WEAK,
    rules: RuleSet | None = None,
    descriptors: Mapping[str, str] | None = None,
    intensities: Sequence[float | None] | None = None,
    window: tuple[float, float] | None = None,
) -> MatchResult:
    """Rank the geometric isomers of a set against measured bands of one reporter class.

    Parameters
    ----------
    isomer_set : IsomerSet
        The candidates; enantiomers are ranked together.
    reporter_class : str or None
        The class the bands belong to (None: the only class present).
    measured : Sequence[float]
        Measured wavenumbers (cm-1).
    tolerance : float
        cm-1: the measurement term, one standard uncertainty of a measured position (0.1-50).
    weak : float
        The weak scale in [0, 1): a predicted band of this relative intensity goes unseen with probability 1/e.
    rules : RuleSet, optional
        Where the predictions and the class's window come from (default: the built-in rules).
    descriptors : Mapping[str, str], optional
        A descriptor to show per isomer id.
    intensities : Sequence[float | None], optional
        Each measured band's relative intensity (None where unknown), in the
        order of ``measured``.
    window : (low, high), optional
        cm-1: accept measured bands in this window instead of the class's
        ``ir_window_cm1`` (widen it on purpose only).

    Returns
    -------
    MatchResult
        Candidates ranked as the module docstring says, each explained.

    Raises
    ------
    InputError
        For no bands, a band outside the window, a bad measurement term, weak
        scale, window or intensity, or a class that is absent (or several
        classes and none chosen).
    """
    _check_settings(measured, tolerance, weak)
    _check_window_arg(window)
    reporter_class = _reporter_class(isomer_set, reporter_class)
    rules = rules if rules is not None else load_rules()
    meas, meas_int = _sorted_measured(measured, intensities)
    groups: dict[int, list[Isomer]] = {}
    for iso in isomer_set.isomers:
        groups.setdefault(iso.number, []).append(iso)
    preds = {n: _predict(groups[n][0], reporter_class, isomer_set.composition, rules) for n in sorted(groups)}
    if window is not None:
        win, source = (float(window[0]), float(window[1])), "widened on purpose with --window"
    else:
        win, source = predicted_window(reporter_class, [p.bands for p in preds.values()], rules)
    check_window(meas, reporter_class, win, source, "--bands")
    obs = Observed(meas, meas_int if any(x is not None for x in meas_int) else ())
    cfg = _Settings(reporter_class, float(tolerance), float(weak), win[1] - win[0], isomer_set.composition)
    cands = [
        _evaluate(groups[n], obs, cfg, (descriptors or {}).get(groups[n][0].id), rules, preds[n])
        for n in sorted(groups)
    ]
    ranked = _ranked(cands, reporter_class, len(meas))
    decision, odds = _decision(ranked)
    reliable, none_like, rel_note = _reliability(ranked)
    notes = [n for n in (rel_note, _decision_note(ranked, decision, odds, bool(obs.intensities))) if n]
    notes += [_sigma_note(ranked, reporter_class), IDEALISED_NOTE]
    if any(c.assignments_scored and c.problems and c.missing for c in ranked[:1]):
        notes.append("the first candidate leaves a strong predicted band unseen: check for a band you did not list")
    return MatchResult(
        reporter_class,
        meas,
        float(tolerance),
        float(weak),
        ranked,
        tuple(notes),
        meas_int,
        win,
        source,
        decision,
        odds,
        reliable,
        none_like,
    )
