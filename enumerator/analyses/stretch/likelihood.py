"""How probable are measured stretching bands under one predicted band pattern?

One likelihood serves both the matcher (``isosieve match``, which ranks the
isomers of a formula against a measured spectrum) and the pair verdicts
(which isomer pairs IR tells apart by their band pattern), so the two never
disagree about what a band pattern shows.  It works on plain numbers: a
predicted pattern is a tuple of :class:`PredictedBand` (position, one
standard uncertainty, bond-dipole intensity), a measured spectrum an
:class:`Observed` (positions, optional relative intensities).

The model (a generative one; every number below is a declared constant):

* **Positions.**  A predicted band k that is observed appears at
  p_k + h_k s + e_k: ``s`` is one common shift of the whole pattern (the
  overall level, e.g. how electron-rich the metal is), h_k its relative
  effect on band k (ν̄/ν_k, from ν̃ ∝ √λ with every stretching constant moved
  together), e_k ~ N(0, σ_k² + σ_m²) with σ_k the band's uncertainty and
  σ_m the measurement term.  The shift has the prior s ~ N(0, σ_s²), σ_s
  the class's uncertainty (root mean square of the bands' sigma), so it is
  bounded by the model's own uncertainty.  The shift is integrated out
  analytically (a Gaussian marginal, rank-one update by Sherman-Morrison);
  the best (maximum a posteriori) shift is reported, and the shift the
  bands ask for on their own is compared with its expected spread: beyond
  :data:`SHIFT_LIMIT` sigma the spectrum does not look like the pattern.
* **Counts.**  A predicted band goes unobserved with probability
  q = 1 - (1 - q_weak)(1 - q_hidden), kept within [:data:`Q_MIN`,
  :data:`Q_MAX`]: q_weak = exp(-I/w) grows as its relative intensity I falls
  (w the weak scale, default :data:`WEAK_SCALE`); q_hidden =
  :data:`HIDE_MAX` (1 - I/I_h) exp(-Δ²/2σ²) when a strictly stronger band h
  lies Δ away and is observed (the two appear as one band; the strongest band
  is never hidden, and two equally strong bands never hide each other).  A
  band predicted weak by symmetry and the bond-dipole model (I = 0) is
  unobserved with probability :data:`Q_MAX`.  Each measured band left
  unexplained costs a fixed density :data:`SPURIOUS_PROBABILITY` / W, W the
  width of the class's window (an impurity, an overtone, a 13CO satellite,
  another species).
* **Intensities** (when measured intensities are given).  Over the assigned
  bands, measured and predicted intensities are each scaled to their
  strongest; a hidden band adds its intensity to the band it hides under.
  d = ln((a + ε)/(I + ε)) is normal with σ = :data:`INTENSITY_SIGMA` (a
  factor of two; semi-quantitative words against an idealised bond-dipole
  model), ε = :data:`INTENSITY_FLOOR` ('very weak').  An unexplained band is
  more likely weak than strong: its intensity x, relative to the strongest
  measured band, has the density exp(-x/:data:`SPURIOUS_SCALE`) on the same
  logarithmic scale.
* **Evidence.**  The likelihood of the measured set sums over every
  assignment of measured to predicted bands (any order: near-degenerate
  bands may swap when the intensities favour it; a band may be left
  unobserved, a measured band unexplained).  With equal priors the
  probabilities of the candidates are their evidences normalised
  (:func:`probabilities`).  The odds of the first against the rest are read
  on the scale of R. E. Kass and A. E. Raftery, *J. Am. Stat. Assoc.* 90
  (1995) 773: below :data:`DECIDE_ODDS` (3) the data cannot decide, from
  :data:`STRONG_ODDS` (20) the evidence is strong.

Until the band model gives each band a sigma, :data:`DEFAULT_SIGMA_CM1`
gives one per reporter class (a declared table of tool conventions), and
every output says when it was used.

**Pattern tier of the pair verdicts** (:func:`patterns_distinct`).  The
spectrum an isomer's pattern predicts (:func:`ideal_spectrum`: every IR band
of at least :data:`IDEAL_FLOOR` relative intensity, at its predicted
position and intensity, each resolved) is given to this likelihood with the
two isomers as the only candidates.  Two isomers are told apart by IR
(pattern) when each one's predicted spectrum gives it a probability of at
least :data:`PATTERN_PROBABILITY` (odds of 20: strong evidence).

>>> co = [PredictedBand("A1(1)", 2040.0, 0.05, 30.0), PredictedBand("E(1)", 1971.0, 1.0, 30.0),
...       PredictedBand("A1(2)", 1946.0, 0.29, 30.0)]
>>> s = score_pattern(Observed((2052.0, 1979.0, 1947.0), (0.5, 0.5, 1.0)), co, window_width=275.0)
>>> [co[k].name for _, k in s.best.pairs]
['A1(1)', 'A1(2)', 'E(1)']
>>> fac = [PredictedBand("A'(1)", 1996.4, 1.0, 30.0), PredictedBand("A'(2)", 1939.8, 1.0, 30.0),
...        PredictedBand("A''(1)", 1939.8, 1.0, 30.0)]
>>> mer = [PredictedBand("A'(1)", 2058.2, 0.032, 30.0), PredictedBand("A''(1)", 1977.7, 1.0, 30.0),
...        PredictedBand("A'(2)", 1951.8, 0.468, 30.0)]
>>> patterns_distinct([fac], [mer], [275.0]), patterns_distinct([fac], [fac], [275.0])
(True, False)
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping, Sequence
from dataclasses import field
from types import MappingProxyType

import numpy as np

from enumerator.caches import cached
from enumerator.frozen import frozen_dataclass

__all__ = [
    "DEFAULT_SIGMA_CM1",
    "FALLBACK_SIGMA_CM1",
    "MEASUREMENT_SIGMA_CM1",
    "WEAK_SCALE",
    "Q_MIN",
    "Q_MAX",
    "HIDE_MAX",
    "SPURIOUS_PROBABILITY",
    "INTENSITY_SIGMA",
    "INTENSITY_FLOOR",
    "SPURIOUS_SCALE",
    "IDEAL_FLOOR",
    "DECIDE_ODDS",
    "STRONG_ODDS",
    "PATTERN_PROBABILITY",
    "SHIFT_LIMIT",
    "MAX_ASSIGNMENTS",
    "PredictedBand",
    "Observed",
    "Terms",
    "Interpretation",
    "PatternScore",
    "default_sigma",
    "score_pattern",
    "probabilities",
    "ideal_spectrum",
    "patterns_distinct",
    "own_and_cross",
]

#: cm-1, one standard uncertainty of a predicted band position per reporter class, used when the band model
#: gives none.  Tool conventions (not measured figures): 30 for CO and CN, 40 for the classes with fewer
#: reference spectra behind their constants (rules/forcefields.toml says which are rough).
DEFAULT_SIGMA_CM1: Mapping[str, float] = MappingProxyType(
    {"CO": 30.0, "CN": 30.0, "NO": 40.0, "NObent": 40.0, "CS": 40.0, "CNR": 40.0, "N2": 40.0}
)
#: cm-1, the default for a class the table does not list (a user's own class).
FALLBACK_SIGMA_CM1 = 40.0
#: cm-1, the default measurement term: band maxima of solution IR spectra are read to a few cm-1 and the bands
#: are some 5-15 cm-1 wide (common practice).
MEASUREMENT_SIGMA_CM1 = 5.0
#: Relative intensity scale of q_weak = exp(-I / w): a band of 5 % of the strongest goes unseen with
#: probability 0.37, one of 20 % with 0.02 (a tool convention).
WEAK_SCALE = 0.05
#: Bounds of the probability that a predicted band goes unobserved: even the strongest band may be lost (e.g.
#: under a solvent band) with 1e-4; a band the bond-dipole model makes silent is still seen with 0.1.
Q_MIN = 1e-4
Q_MAX = 0.9
#: Probability that a band coinciding with a much stronger one is hidden under it.
HIDE_MAX = 0.5
#: Probability of one unexplained measured band, spread evenly over the class's window.
SPURIOUS_PROBABILITY = 0.05
#: Spread of ln(measured / predicted relative intensity): a factor of two (semi-quantitative).
INTENSITY_SIGMA = math.log(2.0)
#: Relative intensity added to both sides before the logarithm: 'very weak' (vw) is 0.1 in the words of
#: papers, so differences below it are not read.
INTENSITY_FLOOR = 0.1
#: An unexplained band is more likely weak than strong (impurities, 13CO satellites, overtones): its
#: relative intensity x has the density exp(-x / SPURIOUS_SCALE) on the logarithmic scale of the intensities.
SPURIOUS_SCALE = 0.25
#: A band of a predicted spectrum (pattern tier) is taken as seen from this relative intensity.
IDEAL_FLOOR = 0.01
#: Odds of the first candidate against the rest below which the data cannot decide (Kass & Raftery 1995).
DECIDE_ODDS = 3.0
#: Odds from which the evidence is strong (Kass & Raftery 1995).
STRONG_ODDS = 20.0
#: A pair is told apart by its IR pattern when each isomer's predicted spectrum gives it at least this.
PATTERN_PROBABILITY = STRONG_ODDS / (1.0 + STRONG_ODDS)
#: Sigma of the shift beyond which a spectrum does not look like a pattern.
SHIFT_LIMIT = 3.0
#: Above this many assignments each measured band is paired only with its three closest predicted bands.
MAX_ASSIGNMENTS = 200_000
#: A measured band is paired only with predicted bands within this many total sigma (the rest are negligible).
_PRUNE_SIGMA = 6.0
_LOG_2PI = math.log(2.0 * math.pi)


@frozen_dataclass
class PredictedBand:
    """One IR-allowed predicted band: ``wavenumber`` and ``sigma`` in cm-1, ``intensity`` relative to the
    strongest (bond-dipole model); ``weak`` marks a band of a species the bond-dipole model makes silent;
    ``sigma_default`` says the sigma is the class default, not the band model's."""

    name: str
    wavenumber: float
    intensity: float
    sigma: float
    sigma_default: bool = True
    weak: bool = False


@frozen_dataclass
class Observed:
    """Measured bands: ``wavenumbers`` (cm-1, highest first) and ``intensities`` (relative, None where not
    given; empty: none given)."""

    wavenumbers: tuple[float, ...]
    intensities: tuple[float | None, ...] = ()

    def intensity(self, j: int) -> float | None:
        """The intensity of measured band ``j`` (None if not given)."""
        return self.intensities[j] if self.intensities else None


@frozen_dataclass
class Terms:
    """The natural-log likelihood of one assignment, term by term."""

    position: float
    count: float
    extra: float
    intensity: float

    @property
    def total(self) -> float:
        """The sum of the terms."""
        return self.position + self.count + self.extra + self.intensity


@frozen_dataclass
class Interpretation:
    """The best assignment of measured to predicted bands, as the likelihood reads it.

    ``pairs`` (measured index, predicted index); ``unobserved`` (predicted index, reason, probability of
    going unobserved) with reason 'weak', 'hidden', 'predicted weak' or 'missing'; ``extra`` the measured
    indices left unexplained; ``shift`` the best common shift (cm-1 at the mean band, maximum a posteriori),
    ``shift_asked`` the shift the assigned bands ask for on their own and ``shift_z`` its size in standard
    deviations of its expected spread (None without an assigned band); ``residuals`` measured minus predicted
    after the shift; ``intensity_rows`` (measured index, measured relative, predicted relative) over the
    bands with a measured intensity; ``hidden_under`` (predicted index, host index) of hidden bands.
    """

    pairs: tuple[tuple[int, int], ...]
    unobserved: tuple[tuple[int, str, float], ...]
    extra: tuple[int, ...]
    shift: float
    shift_asked: float | None
    shift_z: float | None
    residuals: tuple[float, ...]
    intensity_rows: tuple[tuple[int, float, float], ...]
    hidden_under: tuple[tuple[int, int], ...]
    terms: Terms

    @property
    def swapped(self) -> bool:
        """Whether the assignment pairs bands out of their predicted order."""
        ks = [k for _, k in sorted(self.pairs)]
        return any(a > b for a, b in zip(ks, ks[1:]))


@frozen_dataclass
class PatternScore:
    """The evidence of one predicted pattern for a measured spectrum: ``log_evidence`` (natural log, summed
    over assignments), the ``best`` assignment, the shift prior ``shift_sigma`` (cm-1), how many assignments
    were scored (``tried``) and whether the search was cut off (``truncated``)."""

    log_evidence: float
    best: Interpretation
    shift_sigma: float
    tried: int
    truncated: bool = False
    reference: float = field(default=0.0, compare=False)


@cached(maxsize=None)
def _spurious_norm() -> float:
    """ln of the normaliser of the unexplained bands' intensity density over u = ln(x + ε), x in [0, 1]."""
    steps = 4000
    lo, hi = INTENSITY_FLOOR, 1.0 + INTENSITY_FLOOR
    h = (hi - lo) / steps
    total = 0.0
    for i in range(steps):
        v = lo + (i + 0.5) * h
        total += math.exp(-(v - INTENSITY_FLOOR) / SPURIOUS_SCALE) / v * h
    return math.log(total)  # worked out on first use (a 4000-step sum), not at import


def _spurious_intensity(x: float) -> float:
    """ln density of an unexplained band of relative intensity ``x`` (module docstring)."""
    return -min(max(x, 0.0), 1.0) / SPURIOUS_SCALE - _spurious_norm()


def default_sigma(reporter_class: str) -> float:
    """The declared default sigma of a reporter class (cm-1; :data:`DEFAULT_SIGMA_CM1`, else the fallback).

    Parameters
    ----------
    reporter_class : str

    Returns
    -------
    float
    """
    return DEFAULT_SIGMA_CM1.get(reporter_class, FALLBACK_SIGMA_CM1)


# --------------------------------------------------------------------------
# what does not depend on the assignment


@frozen_dataclass
class _Setup:
    """Per-pattern quantities: slopes, variances, weak probabilities, hosts, hiding probabilities and which
    unobserved bands add their intensity to their host."""

    slope: np.ndarray = field(compare=False)
    var: np.ndarray = field(compare=False)
    q_weak: np.ndarray = field(compare=False)
    host: tuple[int | None, ...]
    q_hide: np.ndarray = field(compare=False)
    merge: tuple[bool, ...]
    shift_var: float
    reference: float


def _host(k: int, pattern: Sequence[PredictedBand]) -> int | None:
    """The nearest strictly stronger band, which band ``k`` could hide under (None for the strongest)."""
    b = pattern[k]
    stronger = [h for h, x in enumerate(pattern) if x.intensity > b.intensity]
    if not stronger:
        return None
    return min(stronger, key=lambda h: (abs(pattern[h].wavenumber - b.wavenumber), h))


def _setup(pattern: Sequence[PredictedBand], measurement_sigma: float, weak: float) -> _Setup:
    ref = sum(b.wavenumber for b in pattern) / len(pattern)
    hosts = tuple(_host(k, pattern) for k in range(len(pattern)))
    q_hide = np.zeros(len(pattern))
    for k, h in enumerate(hosts):
        if h is not None:
            b, x = pattern[k], pattern[h]
            near = math.exp(-0.5 * ((b.wavenumber - x.wavenumber) / max(b.sigma, x.sigma)) ** 2)
            q_hide[k] = HIDE_MAX * (1.0 - b.intensity / x.intensity) * near
    inten = np.array([b.intensity for b in pattern])
    q_weak = np.exp(-inten / weak) if weak > 0 else np.zeros(len(pattern))
    return _Setup(
        slope=np.array([ref / b.wavenumber for b in pattern]),
        var=np.array([b.sigma**2 + measurement_sigma**2 for b in pattern]),
        q_weak=q_weak,
        host=hosts,
        q_hide=q_hide,
        merge=tuple(h is not None and q_hide[k] > max(q_weak[k], 0.01) for k, h in enumerate(hosts)),
        shift_var=sum(b.sigma**2 for b in pattern) / len(pattern),
        reference=ref,
    )


# --------------------------------------------------------------------------
# the assignments, as one integer table


def _table_size(n: int, k: int) -> int:
    return sum(math.comb(n, j) * math.perm(k, j) for j in range(min(n, k) + 1))


@cached(maxsize=64)
def _assignment_table(n: int, k: int) -> np.ndarray:
    """Every partial one-to-one assignment of n measured to k predicted bands: one row per assignment, the
    predicted index of each measured band or -1 (unexplained); read-only."""
    rows = []
    for j in range(min(n, k) + 1):
        for sub in itertools.combinations(range(n), j):
            for perm in itertools.permutations(range(k), j):
                row = [-1] * n
                for a, b in zip(sub, perm):
                    row[a] = b
                rows.append(row)
    out = np.array(rows, dtype=np.int64).reshape(-1, n)
    out.setflags(write=False)
    return out


def _limited_table(options: Sequence[Sequence[int]], n: int) -> np.ndarray:
    """The assignments that pair each measured band only with its listed options (closest first)."""
    rows: list[list[int]] = []
    row = [-1] * n
    used: set[int] = set()

    def walk(j: int) -> None:
        if len(rows) >= MAX_ASSIGNMENTS:
            return
        if j == n:
            rows.append(list(row))
            return
        for k in options[j]:
            if k not in used:
                used.add(k)
                row[j] = k
                walk(j + 1)
                used.discard(k)
        row[j] = -1
        walk(j + 1)

    walk(0)
    return np.array(rows, dtype=np.int64).reshape(-1, n)


def _assignments(obs: Observed, pattern, st: _Setup) -> tuple[np.ndarray, bool]:
    """The assignments to score, without pairs more than :data:`_PRUNE_SIGMA` total sigma apart, and whether
    the list was cut short."""
    n, k = len(obs.wavenumbers), len(pattern)
    m = np.array(obs.wavenumbers)
    p = np.array([b.wavenumber for b in pattern])
    width = np.sqrt(st.var + st.shift_var)
    z = np.abs(m[:, None] - p[None, :]) / width[None, :]
    allowed = z <= _PRUNE_SIGMA
    if _table_size(n, k) <= MAX_ASSIGNMENTS:
        table = _assignment_table(n, k)
        ok = np.ones(len(table), dtype=bool)
        for j in range(n):
            col = table[:, j]
            ok &= (col < 0) | allowed[j, np.where(col < 0, 0, col)]
        return table[ok], False
    options = [sorted((int(x) for x in np.flatnonzero(allowed[j])), key=lambda x: (z[j, x], x))[:3] for j in range(n)]
    table = _limited_table(options, n)
    return table, True


# --------------------------------------------------------------------------
# the likelihood of every assignment at once


def _totals(obs: Observed, pattern, st: _Setup, table: np.ndarray, extra_log: float) -> np.ndarray:
    """The log likelihood of each assignment (row of ``table``): positions with the shift integrated out,
    counts, unexplained bands, intensities."""
    n_rows, n = table.shape
    k = len(pattern)
    m = np.array(obs.wavenumbers)
    p = np.array([b.wavenumber for b in pattern])
    mask = table >= 0
    idx = np.where(mask, table, 0)
    r = np.where(mask, m[None, :] - p[idx], 0.0)
    h = st.slope[idx]
    w = mask / st.var[idx]
    a = np.sum(w * h * h, axis=1)
    b = np.sum(w * h * r, axis=1)
    c = np.sum(w * r * r, axis=1)
    logv = np.sum(np.where(mask, np.log(st.var[idx]), 0.0), axis=1)
    t = st.shift_var
    pos = -0.5 * (c - t * b * b / (1.0 + t * a) + logv + np.log1p(t * a) + mask.sum(axis=1) * _LOG_2PI)
    seen = np.zeros((n_rows, k), dtype=bool)
    rows = np.arange(n_rows)
    for j in range(n):
        sel = mask[:, j]
        seen[rows[sel], table[sel, j]] = True
    host_seen = np.zeros((n_rows, k), dtype=bool)
    for kk, hst in enumerate(st.host):
        if hst is not None:
            host_seen[:, kk] = seen[:, hst]
    q = 1.0 - (1.0 - st.q_weak[None, :]) * (1.0 - st.q_hide[None, :] * host_seen)
    q = np.clip(q, Q_MIN, Q_MAX)
    count = np.sum(np.where(seen, np.log1p(-q), np.log(q)), axis=1)
    total = pos + count + (~mask).sum(axis=1) * extra_log
    if obs.intensities:
        total = total + _intensity_terms(obs, pattern, st, table, mask, idx, seen)
    return total


def _intensity_terms(obs: Observed, pattern, st: _Setup, table, mask, idx, seen) -> np.ndarray:
    inten = np.array([b.intensity for b in pattern])
    eff = seen * inten[None, :]
    for kk, hst in enumerate(st.host):
        if st.merge[kk] and hst is not None:
            eff[:, hst] += (~seen[:, kk] & seen[:, hst]) * inten[kk]
    given = np.array([x is not None for x in obs.intensities])
    meas = np.array([x if x is not None else 0.0 for x in obs.intensities])
    use = mask & given[None, :]
    pe = np.take_along_axis(eff, idx, axis=1)
    top_m = np.max(np.where(use, meas[None, :], 0.0), axis=1)
    top_p = np.max(np.where(use, pe, 0.0), axis=1)
    am = np.where(use, meas[None, :] / np.where(top_m > 0, top_m, 1.0)[:, None], 0.0)
    pr = np.where(use, pe / np.where(top_p > 0, top_p, 1.0)[:, None], 0.0)
    d = np.log((am + INTENSITY_FLOOR) / (pr + INTENSITY_FLOOR))
    norm = -math.log(INTENSITY_SIGMA * math.sqrt(2.0 * math.pi))
    term = np.sum(np.where(use, norm - 0.5 * (d / INTENSITY_SIGMA) ** 2, 0.0), axis=1)
    top = float(np.max(meas))
    spur = np.array([_spurious_intensity(x / top) if g else 0.0 for x, g in zip(meas, given)])
    return term + np.sum(np.where(~mask, spur[None, :], 0.0), axis=1)


# --------------------------------------------------------------------------
# the best assignment, in words


def _position(obs: Observed, pattern, st: _Setup, pairs) -> tuple[float, float, float | None, float | None]:
    """(log density of the residuals with the shift integrated out, MAP shift, asked shift, its z)."""
    if not pairs:
        return 0.0, 0.0, None, None
    a = b = c = logv = 0.0
    for j, k in pairs:
        r = obs.wavenumbers[j] - pattern[k].wavenumber
        h, v = float(st.slope[k]), float(st.var[k])
        a += h * h / v
        b += h * r / v
        c += r * r / v
        logv += math.log(v)
    t = st.shift_var
    asked = b / a
    return (
        -0.5 * (c - t * b * b / (1.0 + t * a) + logv + math.log1p(t * a) + len(pairs) * _LOG_2PI),
        t * b / (1.0 + t * a),
        asked,
        abs(asked) / math.sqrt(t + 1.0 / a),
    )


def _unobserved(pattern, st: _Setup, assigned: set[int]) -> tuple[float, list[tuple[int, str, float]], list]:
    """(log probability of which predicted bands are seen, the unseen ones with reasons, hidden -> host)."""
    logp = 0.0
    unseen: list[tuple[int, str, float]] = []
    hidden: list[tuple[int, int]] = []
    for k, b in enumerate(pattern):
        h = st.host[k]
        host_seen = h is not None and h in assigned
        qh = float(st.q_hide[k]) if host_seen else 0.0
        qw = float(st.q_weak[k])
        q = min(Q_MAX, max(Q_MIN, 1.0 - (1.0 - qw) * (1.0 - qh)))
        if k in assigned:
            logp += math.log1p(-q)
            continue
        logp += math.log(q)
        if h is not None and host_seen and st.merge[k]:
            hidden.append((k, h))
        if b.weak:
            why = "predicted weak"
        elif host_seen and st.merge[k]:
            why = "hidden"
        elif qw > 0.01:
            why = "weak"
        else:
            why = "missing"
        unseen.append((k, why, q))
    return logp, unseen, hidden


def _intensity(obs: Observed, pattern, pairs, extra, hidden) -> tuple[float, tuple[tuple[int, float, float], ...]]:
    """(log density of the measured intensities, rows of measured/predicted relative intensity)."""
    if not obs.intensities:
        return 0.0, ()
    eff = {k: pattern[k].intensity for _, k in pairs}
    for k, h in hidden:
        if h in eff:
            eff[h] += pattern[k].intensity
    top_all = max(float(x) for x in obs.intensities if x is not None)
    logp = sum(_spurious_intensity(float(x) / top_all) for j in extra if (x := obs.intensity(j)) is not None)
    rows = [(j, float(a), eff[k]) for j, k in pairs if (a := obs.intensity(j)) is not None]
    if not rows:
        return logp, ()
    top_m = max(r[1] for r in rows)
    top_p = max(r[2] for r in rows)
    norm = -math.log(INTENSITY_SIGMA * math.sqrt(2.0 * math.pi))
    out = []
    for j, a, p in rows:
        am, pr = a / top_m, (p / top_p if top_p > 0 else 0.0)
        d = math.log((am + INTENSITY_FLOOR) / (pr + INTENSITY_FLOOR))
        logp += norm - 0.5 * (d / INTENSITY_SIGMA) ** 2
        out.append((j, am, pr))
    return logp, tuple(out)


def _interpret(obs: Observed, pattern, st: _Setup, row: Sequence[int], extra_log: float) -> Interpretation:
    """The assignment of one table row, term by term."""
    pairs = tuple((j, int(k)) for j, k in enumerate(row) if k >= 0)
    assigned = {k for _, k in pairs}
    extra = tuple(j for j, k in enumerate(row) if k < 0)
    pos, shift, asked, z = _position(obs, pattern, st, pairs)
    cnt, unseen, hidden = _unobserved(pattern, st, assigned)
    inten, rows = _intensity(obs, pattern, pairs, extra, hidden)
    res = tuple(obs.wavenumbers[j] - pattern[k].wavenumber - float(st.slope[k]) * shift for j, k in pairs)
    return Interpretation(
        pairs=pairs,
        unobserved=tuple(unseen),
        extra=extra,
        shift=shift,
        shift_asked=asked,
        shift_z=z,
        residuals=res,
        intensity_rows=rows,
        hidden_under=tuple(hidden),
        terms=Terms(pos, cnt, extra_log * len(extra), inten),
    )


def _logsumexp(xs: np.ndarray) -> float:
    top = float(np.max(xs))
    return top + math.log(float(np.sum(np.exp(xs - top))))


def score_pattern(
    observed: Observed,
    pattern: Sequence[PredictedBand],
    *,
    window_width: float,
    measurement_sigma: float = MEASUREMENT_SIGMA_CM1,
    weak: float = WEAK_SCALE,
) -> PatternScore:
    """The evidence of one predicted pattern for a measured spectrum (module docstring).

    Parameters
    ----------
    observed : Observed
        The measured bands, highest first.
    pattern : Sequence[PredictedBand]
        The IR-allowed predicted bands (predicted-weak ones included), highest first.
    window_width : float
        cm-1: the width of the class's window, over which an unexplained band is spread.
    measurement_sigma : float
        cm-1: the measurement term σ_m.
    weak : float
        The weak scale w of q_weak = exp(-I/w).

    Returns
    -------
    PatternScore
        With the best assignment; ``log_evidence`` sums over every assignment scored.
    """
    n = len(observed.wavenumbers)
    extra_log = math.log(SPURIOUS_PROBABILITY / max(window_width, 1.0))
    if not pattern:
        extra = tuple(range(n))
        inten, _ = _intensity(observed, pattern, (), extra, ())
        lone = Interpretation((), (), extra, 0.0, None, None, (), (), (), Terms(0.0, 0.0, extra_log * n, inten))
        return PatternScore(lone.terms.total, lone, 0.0, 1)
    st = _setup(pattern, measurement_sigma, weak)
    table, truncated = _assignments(observed, pattern, st)
    totals = _totals(observed, pattern, st, table, extra_log)
    best_row = int(np.argmax(totals))
    best = _interpret(observed, pattern, st, [int(x) for x in table[best_row]], extra_log)
    return PatternScore(_logsumexp(totals), best, math.sqrt(st.shift_var), len(table), truncated, st.reference)


def probabilities(log_evidences: Sequence[float]) -> tuple[float, ...]:
    """Posterior probabilities of the candidates under equal priors.

    Parameters
    ----------
    log_evidences : Sequence[float]
        Natural-log evidence of each candidate.

    Returns
    -------
    tuple[float, ...]
        Summing to 1, in the same order.
    """
    if not log_evidences:
        return ()
    top = max(log_evidences)
    w = [math.exp(x - top) for x in log_evidences]
    s = sum(w)
    return tuple(x / s for x in w)


# --------------------------------------------------------------------------
# the pattern tier of the pair verdicts


def ideal_spectrum(pattern: Sequence[PredictedBand]) -> Observed:
    """The spectrum a pattern predicts: every band of at least :data:`IDEAL_FLOOR` relative intensity, at
    its predicted position and intensity, each resolved.

    Parameters
    ----------
    pattern : Sequence[PredictedBand]

    Returns
    -------
    Observed
    """
    seen = sorted((b for b in pattern if b.intensity >= IDEAL_FLOOR), key=lambda b: -b.wavenumber)
    return Observed(tuple(b.wavenumber for b in seen), tuple(b.intensity for b in seen))


def patterns_distinct(
    x: Sequence[Sequence[PredictedBand]],
    y: Sequence[Sequence[PredictedBand]],
    window_widths: Sequence[float],
    *,
    measurement_sigma: float = MEASUREMENT_SIGMA_CM1,
    weak: float = WEAK_SCALE,
) -> bool:
    """Whether IR tells two isomers apart by their predicted band patterns (module docstring).

    Parameters
    ----------
    x, y : Sequence[Sequence[PredictedBand]]
        Each isomer's predicted IR bands, one pattern per reporter class (same class order).
    window_widths : Sequence[float]
        cm-1, the width of each class's window.
    measurement_sigma, weak
        As for :func:`score_pattern`.

    Returns
    -------
    bool
        True when each isomer's predicted spectrum (all classes together) gives it a probability of at
        least :data:`PATTERN_PROBABILITY` against the other.
    """

    kw = {"measurement_sigma": measurement_sigma, "weak": weak}
    return own_and_cross(x, y, window_widths, {}, 0, **kw) and own_and_cross(y, x, window_widths, {}, 1, **kw)


def _evidence(truth, other, window_widths, measurement_sigma: float, weak: float) -> float:
    """ln evidence of ``other`` for the spectrum ``truth`` predicts, all classes together."""
    total = 0.0
    for pt, po, w in zip(truth, other, window_widths):
        if not pt and not po:
            continue
        spec = ideal_spectrum(pt)
        total += score_pattern(spec, po, window_width=w, measurement_sigma=measurement_sigma, weak=weak).log_evidence
    return total


def own_and_cross(
    truth: Sequence[Sequence[PredictedBand]],
    other: Sequence[Sequence[PredictedBand]],
    window_widths: Sequence[float],
    own_cache: dict[int, float],
    key: int,
    *,
    measurement_sigma: float = MEASUREMENT_SIGMA_CM1,
    weak: float = WEAK_SCALE,
) -> bool:
    """Whether the spectrum ``truth`` predicts gives ``truth`` a probability of at least
    :data:`PATTERN_PROBABILITY` against ``other`` (one direction of :func:`patterns_distinct`).

    Parameters
    ----------
    truth, other : Sequence[Sequence[PredictedBand]]
        The two isomers' patterns, one per reporter class.
    window_widths : Sequence[float]
        cm-1 per class.
    own_cache : dict
        Holds the evidence of ``truth`` for its own spectrum under ``key`` (filled on first use; a
        caller comparing one isomer with many passes the same dict).
    key : int
        The key of ``truth`` in ``own_cache``.
    measurement_sigma, weak
        As for :func:`score_pattern`.

    Returns
    -------
    bool
    """
    if key not in own_cache:
        own_cache[key] = _evidence(truth, truth, window_widths, measurement_sigma, weak)
    alt = _evidence(truth, other, window_widths, measurement_sigma, weak)
    return probabilities([own_cache[key], alt])[0] >= PATTERN_PROBABILITY
