"""Calibration of the additive band model: fit to the measured set, cross-validate, write ``rules/bandmodel.toml``.

Run ``python -m enumerator.vibrations.calibrate [--date YYYY-MM-DD] [--out FILE] [--no-cv]``.  The same data and
arguments give the same bytes.  ``--summary`` prints instead the computed size, count and coverage block of
``rules/measured/README.md`` (:func:`summary`; a test holds the README to it).

* **Data.**  Every row of ``rules/measured`` (:func:`enumerator.rules.measured.load_measured`) is resolved to one
  geometric isomer (:func:`resolve_row`): the formula is parsed, the geometry chosen as ``isosieve`` chooses it
  (or the row's own), and the row's ``isomer`` picked: '' needs a formula with one geometric isomer; 'axial' /
  'equatorial' picks the trigonal bipyramid with the non-reporter ligand(s) on the axis or the equator; anything
  else goes to the descriptor picker, and when that is ambiguous because a chelate is present, again as
  'fac(CO)'-style prefix of the reporter class.  A row that cannot be resolved is excluded with its reason
  (:func:`resolved_dataset` lists them); rows with ``fit = false`` are never fitted.
* **Assignment.**  Measured bands of one class and technique are matched to the predicted bands allowed in that
  technique (IR: species IR-allowed; Raman: Raman-allowed) keeping both orders (highest to highest), the
  matching with the least squared error among those that pair min(m, n) bands (:func:`assign`).  The same rule
  serves the new model and the generic constants.
* **Fit.**  Weighted least squares in wavenumber (residuals scaled by :data:`SCALE` cm-1 and the row's weight)
  plus ridge terms (p − μ)²/s² per parameter (:data:`PRIORS`: the ligand terms toward zero, i.e. toward the
  ligand's group), minimised by Levenberg–Marquardt (K. Levenberg, *Q. Appl. Math.* 2 (1944) 164;
  D. W. Marquardt, *J. SIAM* 11 (1963) 431).  The Jacobian is analytic: ∂λ/∂p = yᵀ G^½ (∂F/∂p) G^½ y for a
  mode y of G^½ F G^½ (first-order perturbation theory), ∂ν̃/∂p = C/(2√λ) ∂λ/∂p.
* **Cross-validation.**  Leave one complex out: every row of one formula and isomer (all its media) is held out,
  the parameters that only it touches are reset to their prior centre (no leakage), the rest refitted to
  convergence from the full fit, and the held-out bands predicted.  Per category the number of bands, MAE and
  maximum error are reported for this model and for the generic constants of ``rules/forcefields.toml``, with the
  in-sample figures of the full fit beside them (:func:`in_sample`), so that overfitting shows as a gap.
* **Uncertainty.** sigma of a category is the RMS of its cross-validated residuals over complexes all of whose
  parameters were seen elsewhere (categories with fewer than :data:`MIN_SIGMA_BANDS` such bands take the pooled
  value, or the RMS of all their cross-validated residuals where that is larger, so a class the model predicts badly
  never borrows the carbonyls' sigma). The widening factors are measured in the same validation: the RMS of the
  complexes that needed a ligand's group (their own ligand terms were reset) or the generic value (a group, d count,
  row or class term was reset), over the pooled RMS; with too few such bands an assumed factor is written and marked
  so.
"""

from __future__ import annotations

import argparse
import hashlib
import math
import sys
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from enumerator.analyses.centre.geometry import choose_geometry
from enumerator.analyses.descriptors.describe import describe_isomer
from enumerator.analyses.descriptors.select import find_by_descriptor
from enumerator.errors import IsosieveError
from enumerator.isomers.enumeration import Isomer, enumerate_isomers
from enumerator.model.composition import Composition
from enumerator.model.elements import atomic_number, group_of
from enumerator.parse.formula import parse_formula
from enumerator.rules.bandmodel import BANDMODEL_FILE, load_families, load_groups, load_substituents
from enumerator.rules.measured import MEASURED_FOLDER, MeasuredComplex, load_measured
from enumerator.rules.ruleset import RuleSet, load_rules
from enumerator.vibrations.additive import Centre, Design, build_design, category, centre_of, is_ligand_term
from enumerator.vibrations.model import Model, build_model, reporter_classes
from enumerator.vibrations.solver import WAVENUMBER_FACTOR, Band, SymmetryBlocks, solve_modes, symmetry_blocks

__all__ = [
    "Sample",
    "ClassData",
    "resolve_row",
    "resolved_dataset",
    "assign",
    "Problem",
    "fit",
    "cross_validate",
    "generic_residuals",
    "calibrate",
    "summary",
    "REFERENCE_K",
    "PRIORS",
    "SCALE",
]

#: Residual scale of the fit (cm-1): a band off by SCALE costs as much as a parameter one prior width from its centre.
SCALE = 10.0
#: Categories with fewer cross-validated bands than this take the pooled sigma.
MIN_SIGMA_BANDS = 5
#: Reference stretching constant of each parameter class (mdyn/Å): the start and prior centre of k0 and the centre
#: of the interaction relation.  Chosen near the middle of each class's usual range (common practice values).
REFERENCE_K = {"CO": 16.0, "CN": 17.0, "NO": 14.0, "NObent": 12.0, "CS": 8.0, "CNR": 16.5, "N2": 16.0}
#: (centre, width) of the ridge term of each parameter kind; width None = unregularised.
PRIORS: Mapping[str, tuple[float, float | None]] = {
    "k0": (0.0, 3.0),  # centre replaced by REFERENCE_K of the class
    "d": (0.0, 1.0),
    "q": (0.0, 3.0),
    "q2": (0.0, 1.0),
    "qd": (0.0, 1.0),
    "ox": (0.0, 1.0),
    "row": (0.0, 0.5),
    "phase": (0.0, 0.5),
    "sd": (0.0, 0.5),
    "sa": (0.0, 0.3),
    "sb": (0.0, 0.3),
    "fa": (0.0, 1.0),
    "fb": (0.0, 1.0),
    "ea": (0.0, 0.5),
    "eb": (0.0, 0.5),
    "la": (0.0, 0.15),
    "lb": (0.0, 0.15),
    "ia": (0.3, 0.5),
    "ib": (0.0, 0.5),
    "ig": (0.0, 0.2),
    "ir": (0.0, 0.3),
    "iq": (0.0, 0.2),
    "io": (0.0, 0.2),  # as iq: the interaction's term in the oxidation state
}
#: Widening factors written when the validation has too few bands to measure them.
ASSUMED_WIDEN = {"group": 1.5, "generic": 2.0}


# --------------------------------------------------------------------------
# the data set, resolved


@dataclass(frozen=True)
class ClassData:
    """One reporter class of one measured row: its design, the plain model (masses, generic constants), the
    symmetry blocks and the measured wavenumbers per technique (highest first)."""

    design: Design
    model: Model
    isomer: Isomer
    blocks: SymmetryBlocks = field(compare=False)
    measured: tuple[tuple[str, tuple[float, ...]], ...]

    @property
    def category(self) -> str:
        """The validation category of the class's bands."""
        return category(self.design.pclass, self.design.charge)


@dataclass(frozen=True)
class Sample:
    """A measured row resolved to one isomer; ``complex_key`` groups the media of one complex for the validation."""

    row: MeasuredComplex
    complex_key: str
    isomer: Isomer
    centre: Centre
    classes: tuple[ClassData, ...]


def _tbpy_axis(isomer: Isomer, where: str) -> list[int]:
    vec = isomer.geometry.vectors
    axial = {i for i, v in enumerate(vec) if abs(abs(v[2]) - 1.0) < 1e-6}
    others = [s.index for s in isomer.sites if s.reporter is None]
    if not others:
        return []
    if where == "axial":
        return others if all(i in axial for i in others) else []
    return others if all(i not in axial for i in others) else []


def _pick(iso_set, comp: Composition, text: str) -> list[Isomer]:
    if text in ("axial", "equatorial"):
        return [i for i in iso_set.isomers if _tbpy_axis(i, text)]
    try:
        found = find_by_descriptor(iso_set, comp, text)
    except IsosieveError:
        found = []
    if len({i.number for i in found}) != 1:
        # with a chelate present the prefix reads e.g. 'fac(CO),cis(bpy/N)': take the reporter's own part
        reps = {s.ligand for i in iso_set.isomers for s in i.sites if s.reporter}
        alt = []
        for i in iso_set.isomers:
            try:
                pre = describe_isomer(i, comp).prefixes
            except IsosieveError:
                continue
            if any(what in reps and word == text for what, word in pre):
                alt.append(i)
        if len({i.number for i in alt}) == 1:
            return alt
        if text in ("cis", "trans"):
            alt = [i for i in iso_set.isomers if _reporters_relate(i, text)]
            if len({i.number for i in alt}) == 1:
                return alt
    return found


def _reporters_relate(isomer: Isomer, relation: str) -> bool:
    """Whether every reporter site is ``relation`` ('cis'/'trans') to every monodentate non-reporter site
    ('trans-[Ru(NO)(dmgH)2Cl]': the nitrosyl trans to the chloride, the chelates in the plane)."""
    mono = [
        s.index for s in isomer.sites if s.reporter is None and not any(s.index in (a, b) for a, b, _ in isomer.links())
    ]
    reps = [s.index for s in isomer.sites if s.reporter]
    geo = isomer.geometry
    return bool(mono and reps) and all(geo.relation(r, m) == relation for r in reps for m in mono)


def _phase(text: str) -> str:
    return text if text in ("gas", "matrix") else "condensed"


def _solver_class(isomer: Isomer, band_class: str) -> str | None:
    present = reporter_classes(isomer)
    if band_class == "NO":
        return next((c for c in ("NO", "NObent") if c in present), None)
    return band_class if band_class in present else None


def resolve_row(row: MeasuredComplex, rules: RuleSet | None = None) -> Sample | str:
    """One measured row as a :class:`Sample`, or the reason it cannot be used.

    Parameters
    ----------
    row : MeasuredComplex
    rules : RuleSet, optional
        Catalogue and geometries (default: the built-in rules).

    Returns
    -------
    Sample or str
        The reason is one line ('formula ...: unknown ligand ...', 'isomer ... matches 2 geometric isomers').
    """
    rules = rules or load_rules()
    try:
        comp = parse_formula(row.formula, rules)
        symbol, _ = choose_geometry(comp, rules, row.geometry or None)
        iso_set = enumerate_isomers(comp, rules.geometry(symbol))
    except IsosieveError as exc:
        return exc.line()
    chosen = _pick(iso_set, comp, row.isomer) if row.isomer else list(iso_set.isomers)
    numbers = {i.number for i in chosen}
    if len(numbers) != 1:
        what = f"isomer '{row.isomer}'" if row.isomer else "no isomer given"
        return f"{what}: {len(numbers)} geometric isomers of {row.formula} match; write the isomer"
    isomer = chosen[0]
    centre = centre_of(comp)
    if centre is None:
        return f"{row.formula}: no metal centre the band model can read"
    groups, families, subs = load_groups()[0], load_families(), load_substituents()
    out = []
    for bc in sorted({b.reporter for b in row.bands}):
        cls = _solver_class(isomer, bc)
        if cls is None:
            return f"{row.formula}: bands of class {bc} but no {bc} ligand"
        design = build_design(
            isomer,
            centre,
            cls,
            nitrosyl=row.nitrosyl,
            phase=_phase(row.phase),
            groups=groups,
            families=families,
            substituents=subs,
        )
        model = build_model(isomer, cls, rules)
        meas = tuple(
            (t, tuple(sorted((b.cm1 for b in row.bands if b.reporter == bc and b.technique == t), reverse=True)))
            for t in ("IR", "Raman")
            if any(b.reporter == bc and b.technique == t for b in row.bands)
        )
        out.append(ClassData(design, model, isomer, symmetry_blocks(isomer, model.sites), meas))
    return Sample(row, f"{row.formula}|{row.isomer}", isomer, centre, tuple(out))


def resolved_dataset(folder: Path | str | None = None) -> tuple[tuple[Sample, ...], tuple[tuple[str, str], ...]]:
    """Every row of the measured set resolved: (samples, (row key, reason) of the rows that cannot be used).

    Parameters
    ----------
    folder : Path or str, optional
        The data-set folder (default: ``rules/measured``).

    Returns
    -------
    (tuple[Sample, ...], tuple[tuple[str, str], ...])
    """
    samples, excluded = [], []
    for row in load_measured(folder):
        got = resolve_row(row)
        if isinstance(got, str):
            excluded.append((row.key, got))
        else:
            samples.append(got)
    return tuple(samples), tuple(excluded)


# --------------------------------------------------------------------------
# assignment


def assign(predicted: Sequence[float], measured: Sequence[float]) -> list[tuple[int, int]]:
    """Order-keeping assignment of measured to predicted wavenumbers with the least squared error.

    Both lists are taken highest first; min(m, n) pairs (measured index, predicted index) are formed, each
    list's order kept.

    Parameters
    ----------
    predicted, measured : sequence of float
        Highest first.

    Returns
    -------
    list of (int, int)

    >>> assign([2100.0, 2000.0, 1950.0], [2010.0, 1940.0])
    [(0, 1), (1, 2)]
    """
    swap = len(measured) > len(predicted)
    a, b = (predicted, measured) if swap else (measured, predicted)
    m, n = len(a), len(b)
    cost = np.full((m + 1, n + 1), np.inf)
    cost[0, :] = 0.0
    for i in range(1, m + 1):
        for j in range(i, n + 1):
            cost[i, j] = min(cost[i, j - 1], cost[i - 1, j - 1] + (a[i - 1] - b[j - 1]) ** 2)
    pairs = []
    i, j = m, n
    while i > 0:
        if j > i and cost[i, j] == cost[i, j - 1]:
            j -= 1
        else:
            pairs.append((i - 1, j - 1))
            i, j = i - 1, j - 1
    pairs.reverse()
    return [(q, p) for p, q in pairs] if swap else pairs


def _candidates(bands: Sequence[Band], technique: str) -> list[int]:
    if technique == "IR":
        return [k for k, b in enumerate(bands) if b.ir_allowed or (b.ir_allowed is None and b.ir_active)]
    return [k for k, b in enumerate(bands) if b.raman_allowed or b.raman_allowed is None]


# --------------------------------------------------------------------------
# the least-squares problem


@dataclass(frozen=True)
class _Block:
    """One ClassData in index form: k = D p; pairs (a, b, cos)."""

    data: ClassData
    weight: float
    d: np.ndarray = field(compare=False)
    pairs: tuple[tuple[int, int, float], ...]
    iabg: tuple[int, int, int]
    k_ref: float
    extra: tuple[tuple[int, float], ...] = ()
    #: the ligand-effect part of ``d`` (scaled by 1 + p[scale]) and the index of the scale (-1: none)
    lig: np.ndarray | None = field(default=None, compare=False)
    scale: int = -1


class Problem:
    """The fit's parameters (names, index, prior centres and widths) and the samples in index form."""

    def __init__(self, samples: Sequence[Sample]) -> None:
        names = sorted({n for s in samples for c in s.classes for n in c.design.names})
        families = load_families()
        self.names: tuple[str, ...] = tuple(names)
        self.index = {n: k for k, n in enumerate(names)}
        mu, width = [], []
        for n in names:
            kind, rest = n.split(":", 1)
            m, w = PRIORS[kind]
            if kind == "k0":
                m = REFERENCE_K[rest]
            elif kind in ("ea", "eb") and rest.split(":")[1] not in families:
                w = PRIORS["fa"][1]  # a group without a family is regularised as a family is
            mu.append(m)
            width.append(np.inf if w is None else w)
        self.mu = np.array(mu)
        self.width = np.array(width)
        self.samples = tuple(samples)
        self.blocks = tuple(tuple(self._block(s, c) for c in s.classes) for s in samples)

    def _block(self, s: Sample, c: ClassData) -> _Block:
        d = np.zeros((len(c.design.terms), len(self.names)))
        lig = np.zeros_like(d)
        for a, t in enumerate(c.design.terms):
            for n, v in t:
                (lig if is_ligand_term(n) else d)[a, self.index[n]] += v
        p = c.design.pclass
        iabg = tuple(self.index.get(f"{x}:{p}", -1) for x in ("ia", "ib", "ig"))
        extra = tuple((self.index[n], v) for n, v in c.design.pair_terms)
        scale = self.index[c.design.scale] if c.design.scale else -1
        return _Block(
            c, s.row.weight, d, c.design.pairs, (iabg[0], iabg[1], iabg[2]), REFERENCE_K[p], extra, lig, scale
        )

    def touched(self, k: int) -> set[int]:
        """Parameter indices sample ``k`` depends on."""
        out: set[int] = set()
        for b in self.blocks[k]:
            out |= set(np.nonzero(np.any(b.d != 0, axis=0))[0].tolist())
            if b.lig is not None:
                out |= set(np.nonzero(np.any(b.lig != 0, axis=0))[0].tolist())
            if b.scale >= 0:
                out.add(b.scale)
            if b.pairs:
                out |= {i for i in b.iabg if i >= 0} | {i for i, _ in b.extra}
        return out


def _k(b: _Block, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The stretching constants k (n) and their derivatives ∂k/∂p (n x parameters)."""
    if b.lig is None:
        return b.d @ p, b.d
    g = 1.0 + (p[b.scale] if b.scale >= 0 else 0.0)
    e = b.lig @ p
    dk = b.d + g * b.lig
    if b.scale >= 0:
        dk = dk.copy()
        dk[:, b.scale] += e
    return b.d @ p + g * e, dk


def _f(b: _Block, p: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    k, dk = _k(b, p)
    f = np.diag(k)
    ia, ib, ig = (p[i] if i >= 0 else 0.0 for i in b.iabg)
    extra = sum(p[i] * v for i, v in b.extra)
    for a, c, cos in b.pairs:
        f[a, c] = f[c, a] = ia + ib * cos + extra + ig * (b.k_ref - 0.5 * (k[a] + k[c]))
    return f, k, dk


def _dlam(b: _Block, p: np.ndarray, k: np.ndarray, dk: np.ndarray, gy: np.ndarray) -> np.ndarray:
    """∂λ/∂p of one mode, gy = G^½ y (n x d); dk = ∂k/∂p."""
    m = gy @ gy.T / gy.shape[1]
    out = np.diag(m) @ dk
    ia, ib, ig = b.iabg
    pig = p[ig] if ig >= 0 else 0.0
    for a, c, cos in b.pairs:
        w = 2.0 * m[a, c]
        if ia >= 0:
            out[ia] += w
            out[ib] += w * cos
            out[ig] += w * (b.k_ref - 0.5 * (k[a] + k[c]))
            for i, v in b.extra:
                out[i] += w * v
        out -= w * 0.5 * pig * (dk[a] + dk[c])
    return out


def _block_residuals(b: _Block, p: np.ndarray, jac: bool) -> list[tuple[float, float, np.ndarray | None]]:
    """(measured, predicted, ∂ν̃/∂p or None) of every assigned band of one block."""
    f, k, dk = _f(b, p)
    try:
        modes = solve_modes(b.data.model, b.data.isomer, f=f, blocks=b.data.blocks)
    except IsosieveError:
        return []
    bands = [md.band for md in modes.modes]
    gh = np.sqrt(b.data.model.g_diag())
    out = []
    for tech, meas in b.data.measured:
        cand = _candidates(bands, tech)
        for i, j in assign([bands[c].wavenumber for c in cand], meas):
            md = modes.modes[cand[j]]
            der = None
            if jac:
                lam = md.band.eigenvalue
                der = WAVENUMBER_FACTOR / (2.0 * math.sqrt(lam)) * _dlam(b, p, k, dk, gh[:, None] * md.vectors)
            out.append((meas[i], md.band.wavenumber, der))
    return out


def _cost(problem: Problem, p: np.ndarray, use: Sequence[int]) -> float:
    c = 0.0
    for k in use:
        for b in problem.blocks[k]:
            for m, pr, _ in _block_residuals(b, p, False):
                c += b.weight * ((pr - m) / SCALE) ** 2
    return c + float(np.sum(((p - problem.mu) / problem.width) ** 2))


def _normal_equations(problem: Problem, p: np.ndarray, use: Sequence[int]) -> tuple[np.ndarray, np.ndarray, float]:
    n = len(p)
    jtj = np.zeros((n, n))
    jtr = np.zeros(n)
    cost = 0.0
    for k in use:
        for b in problem.blocks[k]:
            for m, pr, der in _block_residuals(b, p, True):
                assert der is not None
                r = (pr - m) / SCALE
                j = der / SCALE
                jtj += b.weight * np.outer(j, j)
                jtr += b.weight * j * r
                cost += b.weight * r * r
    inv = 1.0 / problem.width**2
    jtj[np.diag_indices(n)] += inv
    jtr += (p - problem.mu) * inv
    return jtj, jtr, cost + float(np.sum((p - problem.mu) ** 2 * inv))


def fit(
    problem: Problem, start: np.ndarray | None = None, use: Sequence[int] | None = None, *, max_iter: int = 50
) -> np.ndarray:
    """Levenberg–Marquardt fit of the parameters to the samples ``use`` (default: every sample).

    Parameters
    ----------
    problem : Problem
    start : numpy.ndarray, optional
        Starting values (default: the prior centres).
    use : sequence of int, optional
        Indices of the samples fitted.
    max_iter : int
        Iteration limit.

    Returns
    -------
    numpy.ndarray
        The parameters (a parameter no fitted sample touches stays at its start).
    """
    p = (problem.mu if start is None else start).astype(float).copy()
    idx = list(range(len(problem.samples))) if use is None else list(use)
    lam = 1e-3
    for _ in range(max_iter):
        jtj, jtr, c0 = _normal_equations(problem, p, idx)
        improved = False
        while lam < 1e8:
            a = jtj + lam * np.diag(np.diag(jtj))
            step = np.linalg.solve(a, -jtr)
            c1 = _cost(problem, p + step, idx)
            if c1 < c0:
                p = p + step
                lam = max(lam / 5.0, 1e-7)
                improved = True
                break
            lam *= 4.0
        if not improved or c0 - c1 < 1e-7 * max(c0, 1.0):
            break
    return p


def _residuals(problem: Problem, p: np.ndarray, k: int) -> list[tuple[str, float, float]]:
    out = []
    for b in problem.blocks[k]:
        cat = b.data.category
        out += [(cat, m, pr) for m, pr, _ in _block_residuals(b, p, False)]
    return out


def generic_residuals(sample: Sample) -> list[tuple[str, float, float]]:
    """(category, measured, predicted) of a sample's bands with the generic constants of ``forcefields.toml``.

    Parameters
    ----------
    sample : Sample

    Returns
    -------
    list of (str, float, float)
    """
    out = []
    for c in sample.classes:
        bands = list(solve_modes(c.model, c.isomer, dict(c.model.defaults), blocks=c.blocks).bands)
        for tech, meas in c.measured:
            cand = _candidates(bands, tech)
            out += [
                (c.category, meas[i], bands[cand[j]].wavenumber)
                for i, j in assign([bands[x].wavenumber for x in cand], meas)
            ]
    return out


@dataclass(frozen=True)
class Validation:
    """Leave-one-complex-out results: per band (category, measured, predicted, fallback level, complex key)
    with fallback 'none', 'group' or 'generic'; and the generic constants' residuals."""

    additive: tuple[tuple[str, float, float, str, str], ...]
    generic: tuple[tuple[str, float, float, str], ...]


def _fallback(problem: Problem, reset: set[int]) -> str:
    kinds = {problem.names[i].split(":", 1)[0] for i in reset}
    own = {"la", "lb", "sa", "sb"}  # a ligand's own terms and its substituents': the group is what remains
    if kinds - own - {"phase"}:
        return "generic"
    return "group" if kinds & own else "none"


def cross_validate(problem: Problem, p_full: np.ndarray, *, log=None) -> Validation:
    """Leave-one-complex-out validation of the fit (every medium of the held-out complex left out together).

    Parameters
    ----------
    problem : Problem
        Only samples with ``fit`` enabled should be in it.
    p_full : numpy.ndarray
        The fit to every sample (the warm start).
    log : callable, optional
        Called with a progress line per complex.

    Returns
    -------
    Validation
    """
    touched = [problem.touched(k) for k in range(len(problem.samples))]
    keys = sorted({s.complex_key for s in problem.samples})
    add: list[tuple[str, float, float, str, str]] = []
    gen: list[tuple[str, float, float, str]] = []
    for n, key in enumerate(keys):
        held = [k for k, s in enumerate(problem.samples) if s.complex_key == key]
        rest = [k for k in range(len(problem.samples)) if problem.samples[k].complex_key != key]
        seen = set().union(*(touched[k] for k in rest)) if rest else set()
        reset = set().union(*(touched[k] for k in held)) - seen
        start = p_full.copy()
        for i in reset:
            start[i] = problem.mu[i]
        q = fit(problem, start, rest)
        level = _fallback(problem, reset)
        for k in held:
            add += [(c, m, pr, level, key) for c, m, pr in _residuals(problem, q, k)]
            gen += [(c, m, pr, key) for c, m, pr in generic_residuals(problem.samples[k])]
        if log:
            log(f"[{n + 1}/{len(keys)}] {key} ({level})")
    return Validation(tuple(add), tuple(gen))


# --------------------------------------------------------------------------
# figures and the rule file

CATEGORIES = ("CO neutral", "CO charged", "CN", "NO linear", "NO bent", "CS", "CNR", "N2")


def _stats(errors: Sequence[float]) -> dict[str, float | int]:
    if not errors:
        return {"n": 0}
    e = np.abs(np.array(errors))
    return {
        "n": len(e),
        "mae": round(float(np.mean(e)), 1),
        "max": round(float(np.max(e)), 1),
        "rms": round(float(np.sqrt(np.mean(e**2))), 1),
    }


def figures(v: Validation) -> dict[str, dict[str, dict[str, float | int]]]:
    """Per category: n, MAE, max and RMS (cm-1) of the cross-validated additive model and of the generic constants.

    Parameters
    ----------
    v : Validation

    Returns
    -------
    dict
        {'additive': {category: stats}, 'generic': {...}}
    """
    out: dict[str, dict[str, dict[str, float | int]]] = {"additive": {}, "generic": {}}
    for cat in CATEGORIES:
        out["additive"][cat] = _stats([pr - m for c, m, pr, _, _ in v.additive if c == cat])
        out["generic"][cat] = _stats([pr - m for c, m, pr, _ in v.generic if c == cat])
    return out


def in_sample(problem: Problem, p: np.ndarray) -> dict[str, dict[str, float | int]]:
    """Per category: n, MAE, max and RMS (cm-1) of the fit to every sample (no complex held out).

    Printed beside the cross-validated figures so that a gap between the two (overfitting) is seen.

    Parameters
    ----------
    problem : Problem
    p : numpy.ndarray
        The fit to every sample.

    Returns
    -------
    dict
        {category: stats}
    """
    res = [r for k in range(len(problem.samples)) for r in _residuals(problem, p, k)]
    return {cat: _stats([pr - m for c, m, pr in res if c == cat]) for cat in CATEGORIES}


def _rms(x: Sequence[float]) -> float:
    return float(np.sqrt(np.mean(np.square(x)))) if len(x) else float("nan")


def uncertainty(v: Validation) -> tuple[dict[str, float], dict[str, float], dict[str, str]]:
    """sigma per category, the widening factors, and how each factor was obtained (module docstring).

    Parameters
    ----------
    v : Validation

    Returns
    -------
    (dict, dict, dict)
    """
    clean = [(c, pr - m) for c, m, pr, lvl, _ in v.additive if lvl == "none"]
    pooled = _rms([e for _, e in clean])
    sigma = {"pooled": round(pooled, 1)}
    for cat in CATEGORIES:
        e = [x for c, x in clean if c == cat]
        every = [pr - m for c, m, pr, _, _ in v.additive if c == cat]
        if len(e) >= MIN_SIGMA_BANDS:
            sigma[cat] = round(_rms(e), 1)
        elif every and _rms(every) > pooled:
            sigma[cat] = round(_rms(every), 1)  # too few clean bands, but those there are say: worse than pooled
    widen, how = {}, {}
    for level in ("group", "generic"):
        e = [pr - m for _, m, pr, lvl, _ in v.additive if lvl == level]
        if len(e) >= MIN_SIGMA_BANDS:
            widen[level] = round(max(1.0, _rms(e) / pooled), 2)
            how[level] = f"measured: RMS of {len(e)} cross-validated bands needing it / pooled RMS"
        else:
            widen[level] = ASSUMED_WIDEN[level]
            how[level] = f"assumed: only {len(e)} cross-validated band(s) needed it"
    widen["generic"] = max(widen["generic"], widen["group"])
    return sigma, widen, how


def _digest(folder: Path) -> str:
    h = hashlib.sha256()
    for f in sorted(folder.glob("*.toml")):
        h.update(f.name.encode())
        h.update(f.read_bytes())
    return h.hexdigest()[:16]


def _q(s: str) -> str:
    return '"' + s.replace("\\", "\\\\").replace('"', '\\"') + '"'


def _num(x: float) -> str:
    return f"{x:.6f}".rstrip("0").rstrip(".") if "." in f"{x:.6f}" else f"{x:.6f}"


def render_toml(problem: Problem, p: np.ndarray, meta: Mapping[str, str], cv: Mapping, sigma, widen, how) -> str:
    """The text of ``rules/bandmodel.toml`` (deterministic: sorted keys, fixed float format)."""
    lines = [
        "# The additive band model: fitted parameters. WRITTEN BY `python -m enumerator.vibrations.calibrate`;",
        "# do not edit by hand (edit rules/measured or rules/bandgroups.toml and run it again).",
        "#",
        "# Method: J. A. Timney, Inorg. Chem. 18 (1979) 2502 (additive ligand effects on energy-factored force",
        "# constants), extended to CN, linear and bent NO, CS, CNR and N2; see enumerator/vibrations/additive.py.",
        f"# Fitted on: {meta['dataset']}",
        f"# Fitted: {meta['fitted']}. Regularisation: {meta['ridge']}",
        "# Leave-one-complex-out cross-validation (cm-1; n bands, MAE, max) of this model | the generic constants"
        " | this model in-sample:",
    ]
    for cat in CATEGORIES:
        a, g = cv["additive"][cat], cv["generic"][cat]
        i = cv.get("insample", {}).get(cat, {})
        if a.get("n"):
            lines.append(
                f"#   {cat:<11} n={a['n']:<4} MAE {a['mae']:>6} max {a['max']:>6}   |   "
                f"MAE {g['mae']:>6} max {g['max']:>6}   |   MAE {i.get('mae', '-'):>6} max {i.get('max', '-'):>6}"
            )
        else:
            lines.append(f"#   {cat:<11} no measured bands in the fit")
    for level in ("group", "generic"):
        lines.append(f"# sigma widening '{level}': {how[level]}")
    lines += ["", "[model]"]
    for key in ("name", "method", "dataset", "fitted", "command", "ridge"):
        lines.append(f"{key} = {_q(meta[key])}")
    lines.append("reference_k = { " + ", ".join(f"{k} = {_num(v)}" for k, v in sorted(REFERENCE_K.items())) + " }")
    lines += ["", "[sigma]"] + [f"{_q(k)} = {_num(v)}" for k, v in sorted(sigma.items())]
    lines += ["", "[widen]"] + [f"{k} = {_num(v)}" for k, v in sorted(widen.items())]
    for model in ("additive", "generic", "insample"):
        for cat in CATEGORIES:
            st = cv.get(model, {}).get(cat)
            if st is None:
                continue
            lines += ["", f"[cv.{model}.{_q(cat)}]"] + [
                f"{k} = {_num(float(v)) if k != 'n' else v}" for k, v in st.items()
            ]
    lines += ["", "[parameters]"]
    lines += [f"{_q(n)} = {_num(float(v))}" for n, v in zip(problem.names, p)]
    return "\n".join(lines) + "\n"


def dataset_figures(samples: Sequence[Sample], excluded: Sequence[tuple[str, str]]) -> dict[str, Any]:
    """Size and coverage of the data set: rows, bands, complexes, charges, groups, geometries, provenance.

    Parameters
    ----------
    samples : sequence of Sample
    excluded : sequence of (row key, reason)

    Returns
    -------
    dict
    """
    fit_s = [s for s in samples if s.row.fit]
    bands = [b for s in fit_s for b in s.row.bands]
    return {
        "rows": len(samples) + len(excluded),
        "excluded": len(excluded),
        "fit_rows": len(fit_s),
        "fit_complexes": len({s.complex_key for s in fit_s}),
        "fit_bands": len(bands),
        "fit_bands_ir": sum(b.technique == "IR" for b in bands),
        "fit_bands_raman": sum(b.technique == "Raman" for b in bands),
        "fit_bands_from_memory": sum(len(s.row.bands) for s in fit_s if s.row.from_memory),
        "fit_bands_seen": sum(len(s.row.bands) for s in fit_s if not s.row.from_memory),
        "charges": sorted({s.centre.charge for s in fit_s}),
        "groups": sorted({g for s in fit_s if (g := group_of(atomic_number(s.centre.metal))[0]) is not None}),
        "geometries": sorted({s.isomer.geometry.symbol for s in fit_s}),
    }


#: What the data set was asked to reach (fitted bands, fitted complexes); the summary says whether it is reached.
REQUESTED_SIZE = (250, 120)
#: The markers around the computed block of ``rules/measured/README.md``.
SUMMARY_BEGIN = "<!-- BEGIN computed: python -m enumerator.vibrations.calibrate --summary (do not edit by hand) -->"
SUMMARY_END = "<!-- END computed -->"


def _tally(items: Sequence[Any]) -> str:
    out: dict[Any, int] = {}
    for x in items:
        out[x] = out.get(x, 0) + 1
    return ", ".join(f"{k}: {v}" for k, v in sorted(out.items()))


def _metal_of(formula: str) -> str | None:
    try:
        return parse_formula(formula, load_rules()).metal
    except IsosieveError:
        return None


def _counts_table() -> list[str]:
    from enumerator.rules.measured import file_counts

    def cls(c) -> str:
        inner = ", ".join(f"{n + r} {k}" for k, n, r in c.classes)
        return inner if len(c.classes) > 1 else f"({c.classes[0][0]})"

    lines = [
        "| file | rows | bands | IR | Raman | seen rows / bands | from memory rows / bands "
        "| fit = false rows / bands |",
        "|---|---|---|---|---|---|---|---|",
    ]
    counts = file_counts()
    for c in counts:
        b = (lambda x: f"**{x}**") if c.file == "total" else str
        what = "" if c.file == "total" else (f" ({cls(c)})" if len(c.classes) > 1 else f" {cls(c)}")
        lines.append(
            f"| {b(c.file)} | {b(c.rows)} | {b(str(c.bands) + what) if not what else str(c.bands) + what} | "
            f"{b(c.ir)} | {b(c.raman)} | {b(f'{c.seen[0]} / {c.seen[1]}')} | {b(f'{c.memory[0]} / {c.memory[1]}')} | "
            f"{b(f'{c.off[0]} / {c.off[1]}')} |"
        )
    tot = counts[-1]
    lines += [
        "",
        "By class: "
        + ", ".join(f"{k} {n + r}" + (f" ({n} IR, {r} Raman)" if r else "") for k, n, r in tot.classes)
        + ".",
    ]
    return lines


def _size_paragraph(samples: Sequence[Sample], excluded: Sequence[tuple[str, str]]) -> str:
    rows = load_measured()
    ds = dataset_figures(samples, excluded)
    n_off = sum(not r.fit for r in rows)
    by_key = {r.key: r for r in rows}
    unres_fit = [by_key[k].formula for k, _ in excluded if by_key[k].fit]
    want_b, want_c = REQUESTED_SIZE
    reached = ds["fit_bands"] >= want_b and ds["fit_complexes"] >= want_c
    bands = [b for r in rows for b in r.bands]
    seen = sum(len(r.bands) for r in rows if not r.from_memory)
    ir = sum(b.technique == "IR" for b in bands)
    return (
        f"**Size: {len(rows)} rows (one complex in one medium each), {len(bands)} bands** "
        f"({ir} IR, {len(bands) - ir} Raman); {seen} bands seen in a source, {len(bands) - seen} from memory. "
        f"The fit uses **{ds['fit_rows']} rows of {ds['fit_complexes']} complexes, {ds['fit_bands']} bands** "
        f"({ds['fit_bands_seen']} seen, {ds['fit_bands_from_memory']} from memory): {n_off} rows are `fit = false` "
        f"(reason in each note) and {len(excluded)} cannot be resolved to one isomer ({len(unres_fit)} of them with "
        f"fit enabled: {', '.join(unres_fit) or 'none'}). The requested {want_b} fitted bands from {want_c} "
        "complexes are " + ("reached." if reached else "**not reached**.")
    )


def _category_line(fit_s: Sequence[Sample]) -> str:
    cats: dict[str, list[int]] = {}
    for s in fit_s:
        for c in s.classes:
            cats.setdefault(c.category, []).extend([s.centre.charge] * sum(len(m) for _, m in c.measured))
    parts = []
    for cat in (c for c in CATEGORIES if c in cats):
        z = cats[cat]
        sign = [("neutral", sum(x == 0 for x in z)), ("anionic", sum(x < 0 for x in z))]
        sign.append(("cationic", sum(x > 0 for x in z)))
        words = "" if cat.startswith("CO") else " (" + ", ".join(f"{n} {w}" for w, n in sign if n) + ")"
        parts.append(f"{cat} {len(z)}{words}")
    absent = [c for c in CATEGORIES if c not in cats]
    few = [c for c in CATEGORIES if 0 < len(cats.get(c, [])) < MIN_SIGMA_BANDS]
    return (
        "Bands by category (charge of the complex): "
        + ", ".join(parts)
        + (f"; none: {', '.join(absent)}" if absent else "")
        + (
            f". Fewer than {MIN_SIGMA_BANDS} bands (too few to judge a model of them): {', '.join(few)}."
            if few
            else "."
        )
    )


def _coverage_lines(fit_s: Sequence[Sample]) -> list[str]:
    keys = {s.complex_key: s for s in fit_s}
    metals = [s.centre.metal for s in keys.values()]
    outside = {m for r in load_measured() if (m := _metal_of(r.formula)) and m not in set(metals) and m != "M"}
    groups = [g for m in metals if (g := group_of(atomic_number(m))[0]) is not None]
    geos = [s.isomer.geometry.symbol for s in keys.values()]
    by_geo = sorted({g: geos.count(g) for g in geos}.items(), key=lambda kv: (-kv[1], kv[0]))
    return [
        "Charges (complexes): " + _tally([s.centre.charge for s in keys.values()]) + ".",
        "",
        "Groups (complexes): "
        + _tally(groups)
        + ". Metals: "
        + ", ".join(f"{m} {metals.count(m)}" for m in sorted(set(metals), key=atomic_number))
        + (f"; {', '.join(sorted(outside, key=atomic_number))} only in rows outside the fit." if outside else "."),
        "",
        "Geometries (complexes, as resolved by the tool): " + ", ".join(f"{g} {n}" for g, n in by_geo) + ".",
    ]


def summary(samples: Sequence[Sample] | None = None, excluded: Sequence[tuple[str, str]] | None = None) -> str:
    """The computed Markdown block of ``rules/measured/README.md``: size, counts per file and class, coverage.

    Parameters
    ----------
    samples, excluded : optional
        The resolved data set (default: :func:`resolved_dataset`).

    Returns
    -------
    str
        Between :data:`SUMMARY_BEGIN` and :data:`SUMMARY_END`, both included; tests/test_bandmodel.py holds the
        README to it.
    """
    if samples is None or excluded is None:
        samples, excluded = resolved_dataset()
    fit_s = [s for s in samples if s.row.fit]
    n_c = len({s.complex_key for s in fit_s})
    n_b = sum(len(s.row.bands) for s in fit_s)
    out = [
        SUMMARY_BEGIN,
        _size_paragraph(samples, excluded),
        "",
        "## Counts",
        "",
        *_counts_table(),
        "",
        f"### Coverage of the fitted rows ({n_c} complexes, {n_b} bands)",
        "",
        _category_line(fit_s),
        "",
        *_coverage_lines(fit_s),
        SUMMARY_END,
    ]
    return "\n".join(out) + "\n"


def calibrate(date: str = "not recorded", cv: bool = True, log=None) -> str:
    """Fit the band model to the measured set (and cross-validate it); return the text of ``bandmodel.toml``.

    Parameters
    ----------
    date : str
        What the header says under 'fitted'.
    cv : bool
        Run the cross-validation (without it, sigma and the figures are left from nothing: only for trials).
    log : callable, optional
        Progress lines.

    Returns
    -------
    str
    """
    say = log or (lambda _s: None)
    samples, excluded = resolved_dataset()
    for key, why in excluded:
        say(f"excluded {key}: {why}")
    fit_samples = [s for s in samples if s.row.fit]
    problem = Problem(fit_samples)
    say(f"{len(fit_samples)} rows, {len(problem.names)} parameters")
    p = fit(problem)
    if cv:
        v = cross_validate(problem, p, log=say)
    else:
        v = Validation((), ())
    figs = figures(v)
    figs["insample"] = in_sample(problem, p)
    sigma, widen, how = (
        uncertainty(v)
        if cv
        else ({"pooled": 10.0}, dict(ASSUMED_WIDEN), {k: "assumed: no validation run" for k in ASSUMED_WIDEN})
    )
    ds = dataset_figures(samples, excluded)
    meta = {
        "name": "additive ligand-effect force field (Timney 1979, extended)",
        "method": "weighted least squares in wavenumber with ridge priors, Levenberg-Marquardt, analytic Jacobian; "
        "order-keeping band assignment; leave-one-complex-out cross-validation",
        "dataset": f"rules/measured (sha256 {_digest(MEASURED_FOLDER)}): {ds['fit_rows']} rows of "
        f"{ds['fit_complexes']} complexes, {ds['fit_bands']} bands ({ds['fit_bands_ir']} IR, "
        f"{ds['fit_bands_raman']} Raman; {ds['fit_bands_from_memory']} from memory, {ds['fit_bands_seen']} seen "
        f"in a source); {ds['excluded']} rows excluded, "
        f"{ds['rows'] - ds['excluded'] - ds['fit_rows']} with fit = false",
        "fitted": date,
        "command": "python -m enumerator.vibrations.calibrate" + (f" --date {date}" if date != "not recorded" else ""),
        "ridge": ", ".join(f"{k} {w}" for k, (_, w) in PRIORS.items())
        + f" (ea, eb of a group without a family: {PRIORS['fa'][1]})"
        + f" (prior widths; residual scale {SCALE} cm-1)",
    }
    return render_toml(problem, p, meta, figs, sigma, widen, how)


def main(argv: Sequence[str] | None = None) -> int:
    """Command line: write ``rules/bandmodel.toml`` (or ``--out``); progress on stderr."""
    ap = argparse.ArgumentParser(prog="python -m enumerator.vibrations.calibrate", description=__doc__.split("\n")[0])
    ap.add_argument("--date", default="not recorded", help="the date written in the header (YYYY-MM-DD)")
    ap.add_argument("--out", default=str(BANDMODEL_FILE), help="where to write (default: rules/bandmodel.toml)")
    ap.add_argument("--no-cv", action="store_true", help="skip the cross-validation (trial runs only)")
    ap.add_argument(
        "--summary", action="store_true", help="print the computed block of rules/measured/README.md and stop"
    )
    args = ap.parse_args(argv)
    if args.summary:
        print(summary(), end="")
        return 0
    text = calibrate(args.date, not args.no_cv, log=lambda s: print(s, file=sys.stderr))
    Path(args.out).write_text(text, encoding="utf-8")
    print(f"wrote {args.out}", file=sys.stderr)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
