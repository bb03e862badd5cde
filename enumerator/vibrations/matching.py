"""Which isomer fits a measured spectrum?  Rank candidates by their band
count and by the shape of their predicted band pattern.

For each geometric isomer (enantiomers have identical spectra and are
ranked together) the bands of one reporter class are predicted with the
default energy-factored force field (:mod:`enumerator.vibrations.model`,
Cotton & Kraihanzel, *J. Am. Chem. Soc.* 84 (1962) 4432; Wilson's GF
method, :mod:`enumerator.vibrations.solver`; intensities by the bond-dipole
model).  Then:

1. **Pattern.**  The measured bands are matched one-to-one to IR-active
   predicted bands, allowing one common shift Δk of every stretching
   constant (the overall electron richness of the metal moves all bands
   together; the pattern's shape is what tells isomers apart).  The
   matching with the smallest residuals wins (least squares, GF eigenvalues
   recomputed at each step, Levenberg–Marquardt;
   :func:`enumerator.vibrations.fitting.fit_linear_model`).
2. **Count.**  Predicted bands left unmatched are excused when they are
   *weak* (relative intensity below ``weak``, default 0.05) or *coincident*
   (within ``tolerance`` of a matched band, so the two would appear as
   one).  Each strong, separate predicted band that is not seen, and each
   measured band with no predicted partner, is a count problem.
3. **Intensities** (when the measured bands carry them, as written in a
   paper: ``2045 (s), 1980 (vs), 1932 (m)``).  Over the assigned bands, the
   measured and the predicted (bond-dipole) intensities are each scaled to
   their strongest band, and the misfit is the mean absolute difference.
   Words map to numbers by common practice: vs 1.0, s 0.75, m 0.5, w 0.25,
   vw 0.1 (sh alone 0.25; br ignored); a number is taken as it is.
4. **Rank.**  Candidates sort by count problems, then by the score
   RMS/tolerance + misfit/0.25 (without intensities: the RMS alone), so a
   difference of 0.25 in relative intensity weighs as much as one
   tolerance of position residual (a tool convention: solution IR
   intensities are semi-quantitative); ties keep isomer order.  Each ranking
   is explained in words, and when the bands are enough a full
   force-constant fit (kt = 2 kc) is added.

The default constants are typical values, so the absolute positions are
rough; the explanation says how large a shift was needed.

>>> from enumerator.rules.ruleset import load_rules
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

import itertools
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import Any

import numpy as np

from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer, IsomerSet
from enumerator.rules.ruleset import RuleSet
from enumerator.vibrations.fitting import FitResult, fit_constants, fit_linear_model
from enumerator.vibrations.model import reporter_classes
from enumerator.vibrations.pattern import BandPattern, band_pattern
from enumerator.vibrations.solver import WAVENUMBER_FACTOR, Band, solve_modes

__all__ = [
    "Candidate",
    "MatchResult",
    "match_bands",
    "parse_measured",
    "DEFAULT_TOLERANCE",
    "DEFAULT_WEAK",
    "INTENSITY_WORDS",
    "INTENSITY_WEIGHT",
]

#: cm^-1: bands closer than this are taken as coincident, and a match within it as good
#: (common practice: solution IR bands of carbonyls are some 5-15 cm-1 wide).
DEFAULT_TOLERANCE = 10.0
#: Relative intensity below which a predicted band may go unseen (a tool convention).
DEFAULT_WEAK = 0.05

#: At most this many (subset, permutation) matchings are screened per isomer.
_MAX_TRIES = 5040
#: Relative intensity of the words used in papers (common practice; semi-quantitative).
INTENSITY_WORDS: Mapping[str, float] = MappingProxyType(
    {"vs": 1.0, "s": 0.75, "m": 0.5, "w": 0.25, "vw": 0.1, "sh": 0.25}
)
#: A difference of this much in relative intensity weighs as one tolerance of residual.
INTENSITY_WEIGHT = 0.25


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
        (wavenumber, relative intensity or None) in the order given.

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
        if len(toks) > 1 or not math.isfinite(x) or x <= 0:
            raise InputError(
                f"{option}: '{part}': the intensity must be one positive number or words",
                "write e.g. 1980 (0.8) or 1980 (s)",
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


@dataclass(frozen=True)
class Candidate:
    """One geometric isomer's agreement with the measured bands.

    ``predicted`` are the bands with the default constants, ``shifted`` the
    same after the common shift ``shift`` (mdyn/Å) of every stretching
    constant; ``assignment`` pairs measured bands with shifted predicted ones;
    ``problems`` counts strong predicted bands not seen plus measured bands
    without a partner; ``fit`` is the full force-constant fit (kt = 2 kc)
    when the bands allow one, else ``fit_note`` says why not.
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

    @property
    def ir_bands(self) -> tuple[Band, ...]:
        """The predicted bands with non-zero bond-dipole intensity."""
        return tuple(b for b in self.predicted if b.ir_active)

    def to_dict(self) -> dict[str, Any]:
        """The candidate's JSON object (rounded for byte-stable output)."""
        return {
            "rank": self.rank,
            "isomers": list(self.isomers),
            "point_group": self.point_group,
            "descriptor": self.descriptor,
            "species": self.species,
            "ir_count": len(self.ir_bands),
            "predicted": [
                {
                    "band": b.name,
                    "wavenumber": round(b.wavenumber, 1),
                    "intensity": round(b.intensity, 4),
                    "species": b.species,
                }
                for b in self.ir_bands
            ],
            "shift_k": round(self.shift, 4),
            "rms": round(self.rms, 2),
            "max_residual": round(self.max_residual, 1),
            "assignment": [
                {"measured": round(m, 1), "band": n, "predicted": round(p, 1), "residual": round(r, 1)}
                for m, n, p, r in self.assignment
            ],
            "extra_measured": [round(x, 1) for x in self.extra_measured],
            "missing": list(self.missing),
            "excused": [{"band": b, "reason": r} for b, r in self.excused],
            "count_problems": self.problems,
            "fit": None if self.fit is None else self.fit.to_dict(),
            "fit_note": self.fit_note,
            "intensity_misfit": None if self.intensity_misfit is None else round(self.intensity_misfit, 3),
            "intensities": [
                {"measured": round(m, 1), "measured_relative": round(a, 3), "predicted_relative": round(b, 3)}
                for m, a, b in self.intensities
            ],
            "score": round(self.score, 3),
            "explanation": self.explanation,
        }


@dataclass(frozen=True)
class MatchResult:
    """The ranked candidates for one set of measured bands of one reporter class.

    ``measured`` highest first (cm-1), with ``measured_intensity`` in the same
    order (None where not given); ``tolerance`` in cm-1, ``weak`` a relative
    intensity; ``notes`` say how to read the ranking.
    """

    reporter_class: str
    measured: tuple[float, ...]
    tolerance: float
    weak: float
    candidates: tuple[Candidate, ...]
    notes: tuple[str, ...] = ()
    measured_intensity: tuple[float | None, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """The match's JSON keys (rounded for byte-stable output)."""
        return {
            "reporter_class": self.reporter_class,
            "measured": [round(x, 1) for x in self.measured],
            "measured_intensity": [None if x is None else round(x, 3) for x in self.measured_intensity]
            or [None] * len(self.measured),
            "tolerance": self.tolerance,
            "weak_threshold": self.weak,
            "candidates": [c.to_dict() for c in self.candidates],
            "match_notes": list(self.notes),
        }


# --------------------------------------------------------------------------
# step 1: the pattern, with one common shift of the stretching constants


def _shift_slopes(pattern: BandPattern, isomer: Isomer, keys: Sequence[tuple[str | None, int]]):
    """∂ν̃/∂Δk of each band for a uniform shift of every stretching constant
    (Hellmann–Feynman: C g / (2 √λ) summed over the mode), and each band's position."""
    model = pattern.model
    modes = {md.band.key: md for md in solve_modes(model, isomer, dict(pattern.constants)).modes}
    g = model.g_diag()
    slope = {}
    for k in keys:
        md = modes[k]
        y = md.vectors
        dl = float(np.trace(y.T @ (g[:, None] * y))) / y.shape[1]
        slope[k] = WAVENUMBER_FACTOR / (2 * math.sqrt(md.band.eigenvalue)) * dl
    pos = {k: md.band.wavenumber for k, md in modes.items()}
    return slope, pos


def _linear_shift_screen(measured: Sequence[float], keys, slope, pos) -> list:
    """Every (subset of measured, ordered targets) matching scored by the
    linearised shift fit: (RSS, |Δk|, subset, targets), best first."""
    n, m = len(measured), len(keys)
    subsets = list(itertools.combinations(range(n), m)) if n > m else [tuple(range(n))]
    scored = []
    tries = 0
    for sub in subsets:
        obs = [measured[i] for i in sub]
        for targets in itertools.permutations(keys, len(obs)):
            tries += 1
            if tries > _MAX_TRIES:
                break
            j = np.array([slope[t] for t in targets])
            r = np.array(obs) - np.array([pos[t] for t in targets])
            dk = float(j @ r / (j @ j))
            res = r - j * dk
            scored.append((float(np.sum(res**2)), abs(dk), sub, targets))
    scored.sort(key=lambda x: (round(x[0], 6), x[1], x[2], x[3]))
    return scored


def _shift_fit(pattern: BandPattern, isomer: Isomer, measured: Sequence[float], ir: Sequence[Band]):
    """Best one-to-one matching of measured bands to IR bands with a common
    stretching-constant shift.  Returns (assigned measured indices, targets,
    shift, calculated) or None."""
    model = pattern.model
    n = len(model.oscillators)
    f0 = model.f_matrix(dict(pattern.constants))
    shift_mat = sum((model.derivative(s.name) for s in model.sets), np.zeros((n, n)))
    keys = [b.key for b in ir]
    slope, pos = _shift_slopes(pattern, isomer, keys)
    best = None
    for _, _, sub, targets in _linear_shift_screen(measured, keys, slope, pos)[:8]:
        obs = [measured[i] for i in sub]
        got = fit_linear_model(model, isomer, f0, ["dk"], [shift_mat], [0.0], list(targets), obs)
        if got is None:
            continue
        v, calc_arr, _, rss = got
        key = (round(rss, 6), abs(float(v[0])))
        if best is None or key < best[0]:
            best = (key, sub, targets, float(v[0]), [float(c) for c in calc_arr])
    if best is None:
        return None
    _, sub, targets, dk, calc = best
    return sub, targets, dk, calc


# --------------------------------------------------------------------------
# step 2: the count


def _unmatched(
    ir: Sequence[Band],
    assigned: set[str],
    shifted: Mapping[str, Band],
    matched_pos: Sequence[float],
    tolerance: float,
    weak: float,
) -> tuple[tuple[str, ...], tuple[tuple[str, str], ...]]:
    """Predicted IR bands left unmatched: (missing, excused with the reason)."""
    missing, excused = [], []
    for b in ir:
        if b.name in assigned:
            continue
        sb = shifted.get(b.name, b)
        near = [p for p in matched_pos if abs(p - sb.wavenumber) <= tolerance]
        if b.intensity < weak:
            excused.append((b.name, f"weak ({100 * b.intensity:.0f}% of the strongest)"))
        elif near:
            excused.append((b.name, f"within {tolerance:g} cm-1 of a matched band (coincident)"))
        else:
            missing.append(b.name)
    return tuple(missing), tuple(excused)


def _full_fit(
    iso: Isomer, reporter_class: str, measured: Sequence[float], rules: RuleSet | None
) -> tuple[FitResult | None, str | None]:
    """The full force-constant fit (kt = 2 kc) of the assigned bands, or why there is none."""
    try:
        return fit_constants(iso, reporter_class, measured, tie_ck=True, rules=rules), None
    except InputError as exc:
        return None, f"no full fit: {exc.what}"


def _evaluate_candidate(
    isomers: Sequence[Isomer],
    reporter_class: str,
    measured: Sequence[float],
    tolerance: float,
    weak: float,
    descriptor: str | None,
    rules: RuleSet | None,
) -> Candidate:
    """Steps 1-2 of the module docstring for one geometric isomer (its enantiomers share the spectrum)."""
    iso = isomers[0]
    pattern = band_pattern(iso, reporter_class, rules=rules)
    ir = pattern.ir_bands
    got = _shift_fit(pattern, iso, measured, ir) if ir else None
    sub, targets, dk, calc = got if got is not None else ((), (), 0.0, [])
    name_of = {b.key: b for b in ir}
    assignment = tuple(
        (float(measured[i]), name_of[t].name, float(c), float(c - measured[i])) for i, t, c in zip(sub, targets, calc)
    )
    extra = tuple(float(measured[i]) for i in range(len(measured)) if i not in sub)
    shifted = band_pattern(iso, reporter_class, pattern.shifted_constants(dk), rules=rules).bands
    missing, excused = _unmatched(ir, {a[1] for a in assignment}, {b.name: b for b in shifted}, calc, tolerance, weak)
    res = [a[3] for a in assignment]
    fit, fit_note = (None, None)
    if not extra and assignment:
        fit, fit_note = _full_fit(iso, reporter_class, [a[0] for a in assignment], rules)
    return Candidate(
        rank=0,
        isomers=tuple(i.id for i in isomers),
        point_group=iso.point_group,
        descriptor=descriptor,
        species=pattern.species,
        predicted=pattern.bands,
        shift=dk,
        rms=math.sqrt(sum(r * r for r in res) / len(res)) if res else float("inf"),
        max_residual=max((abs(r) for r in res), default=float("inf")),
        assignment=assignment,
        extra_measured=extra,
        missing=missing,
        excused=excused,
        problems=len(missing) + len(extra),
        fit=fit,
        fit_note=fit_note,
        explanation="",
        shifted=shifted,
    )


# --------------------------------------------------------------------------
# steps 3-4: intensities and the score


def _with_intensities(
    c: Candidate, meas: Sequence[float], meas_int: Sequence[float | None], tolerance: float
) -> Candidate:
    """The candidate with its intensity misfit and ranking score (module docstring, steps 3-4)."""
    pool: dict[float, list[float | None]] = {}
    for v, x in zip(meas, meas_int):
        pool.setdefault(v, []).append(x)
    pred = {b.name: b.intensity for b in c.predicted}
    rows: list[tuple[float, float, float]] = []
    for m, name, _, _ in c.assignment:
        x = pool.get(m, [None]).pop(0) if pool.get(m) else None
        if x is not None and pred.get(name) is not None:
            rows.append((m, x, float(pred[name])))
    misfit: float | None = None
    shown: tuple[tuple[float, float, float], ...] = ()
    if len(rows) >= 2 and max(r[2] for r in rows) > 0:
        top_m, top_p = max(r[1] for r in rows), max(r[2] for r in rows)
        shown = tuple((m, a / top_m, b / top_p) for m, a, b in rows)
        misfit = sum(abs(a - b) for _, a, b in shown) / len(shown)
    score = c.rms / tolerance + (misfit / INTENSITY_WEIGHT if misfit is not None else 0.0)
    return replace(c, intensity_misfit=misfit, intensities=shown, score=score)


# --------------------------------------------------------------------------
# the explanation, sentence by sentence


def _plural(n: int, one: str, many: str) -> str:
    return one if n == 1 else many


def _ir_species(c: Candidate) -> str | None:
    """The IR-active species with their counts, in the order of the full representation."""
    ir = c.ir_bands
    if not ir or not all(b.species for b in ir):
        return None
    counts: dict[str, int] = {}
    for b in ir:
        counts[b.species or ""] = counts.get(b.species or "", 0) + 1
    order = [t.lstrip("0123456789") for t in (c.species or "").split(" + ")]
    labs = sorted(counts, key=lambda x: order.index(x) if x in order else len(order))
    return " + ".join(x if counts[x] == 1 else f"{counts[x]}{x}" for x in labs)


def _headline(c: Candidate, reporter_class: str, n_measured: int) -> str:
    tag = ", ".join(x for x in (c.descriptor, c.point_group) if x)
    n_ir = len(c.ir_bands)
    species = _ir_species(c)
    return (
        f"#{c.rank} isomer {'/'.join(c.isomers)} ({tag}): {n_ir} IR-active {reporter_class} "
        f"band{_plural(n_ir, '', 's')} predicted"
        + (f" ({c.species} in all; IR: {species})" if c.species and species else "")
        + f", {n_measured} measured."
    )


def _shift_sentences(c: Candidate, tolerance: float) -> list[str]:
    if not c.assignment:
        return []
    within = (
        ", all within the tolerance)."
        if c.max_residual <= tolerance
        else f", beyond the {tolerance:g} cm-1 tolerance)."
    )
    out = [
        f"After a common shift of the stretching constants by {c.shift:+.2f} mdyn/Å the measured bands match "
        f"{', '.join(a[1] for a in c.assignment)} with RMS {c.rms:.1f} cm-1 (largest {c.max_residual:.1f} cm-1" + within
    ]
    if abs(c.shift) > 1.0:
        out.append(
            "That shift is large: the default constants sit far from this compound, "
            "so weigh the pattern, not the positions."
        )
    return out


def _count_sentences(c: Candidate) -> list[str]:
    out = [f"The unmatched {name} band is {why} and may be unseen." for name, why in c.excused]
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
            f"Measured band{_plural(k, '', 's')} {xs} cm-1 {_plural(k, 'has', 'have')} no partner: this isomer has "
            f"too few IR-active bands (unless {_plural(k, 'it is', 'they are')} from an impurity, an overtone, "
            "a 13CO satellite or another species)."
        )
    return out


def _intensity_sentence(c: Candidate) -> list[str]:
    if c.intensity_misfit is None:
        return []
    rel = ", ".join(f"{m:g} {a:.2f}/{b:.2f}" for m, a, b in c.intensities)
    return [
        f"Relative intensities, measured/predicted (strongest = 1): {rel}; mean difference {c.intensity_misfit:.2f}"
        f" (adds {c.intensity_misfit / INTENSITY_WEIGHT:.1f} to the score)."
    ]


def _verdict_sentences(c: Candidate) -> list[str]:
    if c.problems == 0:
        out = ["Count: consistent."]
    else:
        out = [
            f"Count: {c.problems} problem{_plural(c.problems, '', 's')}, "
            "so it ranks below every count-consistent isomer."
        ]
    if c.fit is not None:
        # from the JSON values (rounded to 4 places), so text and JSON agree
        fit = c.fit.to_dict()
        consts = ", ".join(
            f"{k['name']} = {k['value']:.2f}" + (f" ± {k['uncertainty']:.2f}" if k["uncertainty"] is not None else "")
            for k in fit["constants"]
        )
        out.append(f"Full fit (kt = 2 kc): {consts} mdyn/Å, RMS {fit['rms']:.1f} cm-1.")
    elif c.fit_note:
        out.append(c.fit_note[0].upper() + c.fit_note[1:] + ".")
    return out


def _explain(c: Candidate, reporter_class: str, n_measured: int, tolerance: float) -> str:
    """The ranking of one candidate in words."""
    parts = [
        _headline(c, reporter_class, n_measured),
        *_shift_sentences(c, tolerance),
        *_count_sentences(c),
        *_intensity_sentence(c),
        *_verdict_sentences(c),
    ]
    return " ".join(parts)


# --------------------------------------------------------------------------
# the ranking


def _check_settings(measured: Sequence[float], tolerance: float, weak: float) -> None:
    if not measured:
        raise InputError("no measured bands", "give e.g. --bands 2045,1980,1932")
    if tolerance <= 0:
        raise InputError(f"tolerance {tolerance:g} is not positive", "give e.g. --tolerance 10 (cm-1)")
    if not 0 <= weak < 1:
        raise InputError(f"weak threshold {weak:g} is not in [0, 1)", "give e.g. --weak 0.05")


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
    if any(x is not None and (not math.isfinite(x) or x <= 0) for x in meas_int):
        raise InputError("a measured intensity is not a positive number", "give e.g. 2045 (s) or 2045 (0.8)")
    return meas, meas_int


def _ranked(
    cands: Sequence[Candidate], reporter_class: str, n_measured: int, tolerance: float
) -> tuple[Candidate, ...]:
    """Candidates by count problems, then score (ties keep isomer order), each ranked and explained."""
    order = sorted(range(len(cands)), key=lambda k: (cands[k].problems, round(cands[k].score, 3), k))
    ranked = []
    for r, k in enumerate(order, start=1):
        c = replace(cands[k], rank=r)
        ranked.append(replace(c, explanation=_explain(c, reporter_class, n_measured, tolerance)))
    return tuple(ranked)


def _match_notes(ranked: Sequence[Candidate], intensities_given: bool) -> tuple[str, ...]:
    notes = []
    if len(ranked) > 1 and ranked[0].problems == ranked[1].problems and abs(ranked[0].score - ranked[1].score) < 0.5:
        notes.append(
            f"the top two candidates ({'/'.join(ranked[0].isomers)} and {'/'.join(ranked[1].isomers)}) "
            "agree about equally well"
            + (
                " (intensities included): other reporters, Raman or NMR may decide"
                if intensities_given
                else ': the measured intensities (e.g. --bands "2045 (s), 1980 (vs)"), '
                "other reporters, Raman or NMR may decide"
            )
        )
    notes.append(
        "positions come from typical default constants (rules/forcefields.toml); "
        "the common shift absorbs the overall level"
    )
    return tuple(notes)


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
        cm-1: bands closer than this are coincident, a match within it is good.
    weak : float
        Relative intensity below which a predicted band may go unseen, in [0, 1).
    rules : RuleSet, optional
        Where the default constants come from (default: the built-in rules).
    descriptors : Mapping[str, str], optional
        A descriptor to show per isomer id.
    intensities : Sequence[float | None], optional
        Each measured band's relative intensity (None where unknown), in the
        order of ``measured``.

    Returns
    -------
    MatchResult
        Candidates ranked as the module docstring says, each explained.

    Raises
    ------
    InputError
        For no bands, a bad tolerance or weak threshold, a class that is
        absent (or several classes and none chosen), or bad intensities.
    """
    _check_settings(measured, tolerance, weak)
    reporter_class = _reporter_class(isomer_set, reporter_class)
    meas, meas_int = _sorted_measured(measured, intensities)
    groups: dict[int, list[Isomer]] = {}
    for iso in isomer_set.isomers:
        groups.setdefault(iso.number, []).append(iso)
    cands = []
    for number in sorted(groups):
        isos = groups[number]
        desc = (descriptors or {}).get(isos[0].id)
        cand = _evaluate_candidate(isos, reporter_class, meas, tolerance, weak, desc, rules)
        cands.append(_with_intensities(cand, meas, meas_int, tolerance))
    ranked = _ranked(cands, reporter_class, len(meas), tolerance)
    notes = _match_notes(ranked, any(x is not None for x in meas_int))
    return MatchResult(reporter_class, meas, float(tolerance), float(weak), ranked, notes, meas_int)
