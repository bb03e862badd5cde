"""Least-squares fits of energy-factored force constants to measured bands.

Given measured wavenumbers of one reporter class on one isomer, find the
constants of the Cotton–Kraihanzel force field
(:mod:`enumerator.vibrations.model`; F. A. Cotton and C. S. Kraihanzel,
*J. Am. Chem. Soc.* 84 (1962) 4432) that reproduce them.  The GF eigenvalue
problem (Wilson's GF method, Wilson, Decius & Cross, *Molecular Vibrations*,
1955; :mod:`enumerator.vibrations.solver`) is solved at each step; F is linear
in the constants, so the Jacobian of the wavenumbers follows from first-order
perturbation theory (Hellmann–Feynman): ∂λ/∂p = yᵀ G^½ (∂F/∂p) G^½ y, and
∂ν̃/∂p = C/(2√λ) ∂λ/∂p.  A damped Gauss–Newton iteration (Levenberg–Marquardt:
K. Levenberg, *Q. Appl. Math.* 2 (1944) 164; D. W. Marquardt, *J. SIAM* 11
(1963) 431) minimises the sum of squared wavenumber residuals.
Uncertainties are the square roots of the diagonal of s²(JᵀJ)⁻¹ with
s² = RSS/(n − p), the residual variance.

A measured band is matched to a predicted band by its species and its rank
within that species ('A1(2)' = the second-highest A1 band), which stays
stable while the constants move.  Without an assignment every one-to-one
matching of the measured bands onto the IR-active bands is screened by a
linearised fit and the best :data:`SCREEN_KEEP` are fitted in full; the best
is kept (smallest residuals, then the constants nearest the defaults).

The fit refuses, with a message saying what to fix, when there are fewer
bands than free constants or when the assigned bands fix only some
combinations of them (e.g. only T1u of M(CO)6, which fixes k − kt alone).
Constants can be held (``fixed``) or tied by the Cotton–Kraihanzel
approximation kt = 2 kc (``tie_ck``).

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma3b3"), reporters=[("a", "CO")])
>>> fac = enumerate_isomers(comp, load_rules().geometry("OC-6")).isomers[0]
>>> r = fit_constants(fac, "CO", [2010.0, 1920.0], fixed={"kt": 0.6})
>>> [(n, round(v, 3)) for n, v, _, _ in r.constants]
[('k1', 15.368), ('kc', 0.476), ('kt', 0.6)]
>>> parse_bands("2045, 1980:B1")
(Observation(wavenumber=2045.0, label=None), Observation(wavenumber=1980.0, label='B1'))
"""

from __future__ import annotations

import itertools
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import field
from types import MappingProxyType
from typing import Any

import numpy as np

from enumerator.errors import InputError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.rules.ruleset import RuleSet
from enumerator.vibrations.model import Model, build_model
from enumerator.vibrations.solver import WAVENUMBER_FACTOR, Band, Mode, SymmetryBlocks, solve_modes, symmetry_blocks

__all__ = [
    "Observation",
    "FitResult",
    "fit_constants",
    "parse_bands",
    "fit_linear_model",
    "check_constants",
    "dicarbonyl_angle",
    "CONSTANT_RANGES",
    "MAX_ASSIGNMENTS",
    "SCREEN_KEEP",
]

#: At most this many one-to-one assignments are tried in full; beyond it only
#: assignments that keep the measured and predicted orders are tried.
MAX_ASSIGNMENTS = 720

#: How many assignments survive the linearised screen and get a full fit.
SCREEN_KEEP = 12

_LABEL = re.compile(r"^([A-Za-z][A-Za-z0-9'\"_+-]*?)(?:\((\d+)\))?$")

#: A band's identity while the constants move: (species, rank within the species).
BandKey = tuple[str | None, int]

#: The physical range (mdyn/Å, inclusive) of a force constant typed in (``--constants``, ``--fix``, fit
#: starts): stretching constants of the reporter bonds lie between about 8 (M-CS) and 23 (free N2, the
#: stiffest; from memory), so 2-30 leaves room without admitting nonsense; interaction constants are a few
#: tenths (Cotton & Kraihanzel, J. Am. Chem. Soc. 84 (1962) 4432), 1.0 for nitrosyls here, so -2-3.
CONSTANT_RANGES = MappingProxyType({"stretch": (2.0, 30.0), "interaction": (-2.0, 3.0)})


def check_constants(values: Mapping[str, float], option: str = "--constants") -> None:
    """Refuse a typed-in force constant outside its physical range (:data:`CONSTANT_RANGES`).

    Parameters
    ----------
    values : Mapping[str, float]
        Constant name -> value in mdyn/Å (``k``, ``k1``, ..., ``kc``, ``kt``).
    option : str
        The option the values came from, for the message.

    Raises
    ------
    InputError
        One line naming the constant, its value and the physical range.

    >>> check_constants({"k": 16.2, "kc": 0.3})
    >>> try:
    ...     check_constants({"k": 1e308})
    ... except InputError as exc:
    ...     print(exc.what)
    --constants: k = 1e+308 mdyn/Å is outside the physical range of a stretching constant, from 2 to 30 mdyn/Å
    """
    example = {"interaction": "kc=0.3", "stretch": "k=16.2"}
    for name, v in values.items():
        kind = "interaction" if name in ("kc", "kt") else "stretch"
        lo, hi = CONSTANT_RANGES[kind]
        if not (math.isfinite(v) and lo <= v <= hi):
            what = "an interaction constant" if kind == "interaction" else "a stretching constant"
            raise InputError(
                f"{option}: {name} = {v:g} mdyn/Å is outside the physical range of {what}, "
                f"from {lo:g} to {hi:g} mdyn/Å",
                f"give a value in that range, e.g. {option} {example[kind]}",
            )


def dicarbonyl_angle(i_sym: float, i_asym: float) -> float:
    """The angle between two cis oscillators from the intensities of their in-phase and out-of-phase bands.

    In the bond-dipole model (P. S. Braterman, *Metal Carbonyl Spectra*, Academic Press 1975) a cis-M(CO)2
    unit with OC-M-CO angle 2θ gives I_sym / I_asym = cot²θ, so 2θ = 2 arctan √(I_asym / I_sym).  The
    in-phase band is the higher one when the interaction constant is positive (Cotton & Kraihanzel).  The
    model's assumptions (one dipole derivative along each M-C-O axis, no other oscillators coupling) make
    the angle an estimate.

    Parameters
    ----------
    i_sym, i_asym : float
        Measured intensities of the in-phase (higher) and out-of-phase (lower) bands, any common scale.

    Returns
    -------
    float
        The angle 2θ in degrees.

    Raises
    ------
    InputError
        For an intensity that is not a positive number.

    >>> round(dicarbonyl_angle(1.0, 1.0), 6)
    90.0
    >>> round(dicarbonyl_angle(1.0, 3.0), 6)
    120.0
    """
    if not (math.isfinite(i_sym) and math.isfinite(i_asym) and i_sym > 0 and i_asym > 0):
        raise InputError("the two band intensities must be positive numbers", "give e.g. 2045 (s), 1980 (vs)")
    return math.degrees(2.0 * math.atan(math.sqrt(i_asym / i_sym)))


@frozen_dataclass
class Observation:
    """One measured band (cm-1); ``label`` optionally assigns it ('A1', 'A1(2)', 'E')."""

    wavenumber: float
    label: str | None = None


def parse_bands(text: str, option: str = "--bands") -> tuple[Observation, ...]:
    """Read measured bands with optional assignments.

    Parameters
    ----------
    text : str
        '2045,1980:B1,1932': wavenumbers in cm-1, each optionally followed by
        ':SPECIES' or ':SPECIES(n)'.
    option : str
        The option name to show in an error.

    Returns
    -------
    tuple[Observation, ...]
        Highest wavenumber first.

    Raises
    ------
    InputError
        For a part that is not a positive wavenumber or a species label, or no part at all.
    """
    out = []
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        num, _, lab = part.partition(":")
        try:
            v = float(num)
        except ValueError:
            v = float("nan")
        if not math.isfinite(v) or v <= 0:
            raise InputError(
                f"{option}: '{part}' is not a wavenumber",
                f"write e.g. {option} 2045,1980,1932 (cm-1; optionally 1980:B1)",
            )
        label = lab.strip() or None
        if label is not None and not _LABEL.match(label):
            raise InputError(f"{option}: '{label}' is not a species label", "write e.g. 1980:A1 or 1980:A1(2)")
        out.append(Observation(v, label))
    if not out:
        raise InputError(f"{option}: no wavenumbers given", f"write e.g. {option} 2045,1980,1932")
    return tuple(sorted(out, key=lambda o: (-o.wavenumber, o.label or "")))


@frozen_dataclass
class FitResult:
    """A fitted force field.

    ``constants``: (name, value, uncertainty or None, how) with how
    'fitted', 'fixed' or 'tied' (mdyn/Å); ``assignment``: (measured, band
    name, calculated, residual) in cm-1; ``rms`` in cm-1; ``dof`` = bands −
    free constants; ``tried`` the number of assignments considered.
    """

    isomer_id: str
    reporter_class: str
    constants: tuple[tuple[str, float, float | None, str], ...]
    assignment: tuple[tuple[float, str, float, float], ...]
    rms: float
    dof: int
    auto_assigned: bool
    bands: tuple[Band, ...]
    notes: tuple[str, ...] = ()
    tried: int = 1

    def value(self, name: str) -> float:
        """The value of one constant (KeyError if the model has none of that name)."""
        for n, v, _, _ in self.constants:
            if n == name:
                return v
        raise KeyError(name)

    def to_dict(self) -> dict[str, Any]:
        """The fit's JSON object (rounded for byte-stable output)."""
        return {
            "constants": [
                {"name": n, "value": round(v, 4), "uncertainty": None if s is None else round(s, 4), "status": how}
                for n, v, s, how in self.constants
            ],
            "assignment": [
                {"measured": round(m, 1), "band": b, "calculated": round(c, 1), "residual": round(r, 1)}
                for m, b, c, r in self.assignment
            ],
            "rms": round(self.rms, 2),
            "dof": self.dof,
            "auto_assigned": self.auto_assigned,
            "assignments_tried": self.tried,
            "notes": list(self.notes),
        }


# --------------------------------------------------------------------------
# the generic linear-parameter fit


@frozen_dataclass
class _Problem:
    """F = f0 + Σ v_p mats[p] on one model, with its symmetry blocks."""

    model: Model
    isomer: Isomer
    f0: np.ndarray = field(compare=False)
    names: tuple[str, ...]
    mats: tuple[np.ndarray, ...] = field(compare=False)
    blocks: SymmetryBlocks = field(compare=False)


def _modes_for(problem: _Problem, v: np.ndarray) -> tuple[Mode, ...]:
    f = problem.f0 + sum(x * m for x, m in zip(v, problem.mats))
    return solve_modes(problem.model, problem.isomer, f=f, blocks=problem.blocks).modes


def _evaluate(
    problem: _Problem, v: np.ndarray, targets: Sequence[BandKey]
) -> tuple[np.ndarray, np.ndarray, tuple[Mode, ...]] | None:
    """Calculated wavenumbers of the target bands and their Jacobian
    (Hellmann–Feynman); None when a target band does not exist."""
    modes = _modes_for(problem, v)
    index = {m.band.key: m for m in modes}
    gh = np.sqrt(problem.model.g_diag())
    calc = np.zeros(len(targets))
    jac = np.zeros((len(targets), len(problem.mats)))
    for r, t in enumerate(targets):
        m = index.get(t)
        if m is None:
            return None
        lam = m.band.eigenvalue
        calc[r] = m.band.wavenumber
        y = m.vectors
        gy = gh[:, None] * y
        d = y.shape[1]
        for c, mat in enumerate(problem.mats):
            dl = float(np.trace(gy.T @ mat @ gy)) / d
            jac[r, c] = WAVENUMBER_FACTOR / (2 * math.sqrt(lam)) * dl
    return calc, jac, modes


def _try_evaluate(problem: _Problem, v: np.ndarray, targets: Sequence[BandKey]):
    """:func:`_evaluate`, with an imaginary frequency counted as a failed step."""
    try:
        return _evaluate(problem, v, targets)
    except InputError:
        return None


def _lm(problem: _Problem, v0: np.ndarray, targets: Sequence[BandKey], observed: np.ndarray, iterations: int = 60):
    """Levenberg–Marquardt on the wavenumber residuals: (values, calculated,
    Jacobian, modes, RSS) at the end, or None if the start fails."""
    v = v0.astype(float).copy()
    got = _try_evaluate(problem, v, targets)
    if got is None:
        return None
    calc, jac, modes = got
    rss = float(np.sum((calc - observed) ** 2))
    mu = 1e-3
    for _ in range(iterations):
        r = calc - observed
        jtj = jac.T @ jac
        g = jac.T @ r
        damp = mu * np.diag(np.diag(jtj) + 1e-12)
        try:
            step = -np.linalg.solve(jtj + damp, g)
        except np.linalg.LinAlgError:
            step = -np.linalg.lstsq(jtj + damp, g, rcond=None)[0]
        trial = v + step
        got2 = _try_evaluate(problem, trial, targets)
        if got2 is not None:
            rss2 = float(np.sum((got2[0] - observed) ** 2))
            if rss2 <= rss:
                improved = rss - rss2
                v, (calc, jac, modes), rss = trial, got2, rss2
                mu = max(mu / 10, 1e-12)
                if rss < 1e-14 or improved <= 1e-9 * rss or float(np.max(np.abs(step))) < 1e-9:
                    break
                continue
        mu *= 10
        if mu > 1e10:
            break
    return v, calc, jac, modes, rss


def fit_linear_model(
    model: Model,
    isomer: Isomer,
    f0: np.ndarray,
    names: Sequence[str],
    mats: Sequence[np.ndarray],
    start: Sequence[float],
    targets: Sequence[BandKey],
    observed: Sequence[float],
) -> tuple[np.ndarray, np.ndarray, np.ndarray, float] | None:
    """Fit F = f0 + Σ v_p mats[p] to observed wavenumbers of the target bands
    by Levenberg–Marquardt, with the Hellmann–Feynman Jacobian.

    Parameters
    ----------
    model : Model
        The oscillators (G) of the problem.
    isomer : Isomer
        The isomer the model belongs to (symmetry blocks, site vectors).
    f0 : numpy.ndarray
        The part of F that is held (mdyn/Å).
    names : Sequence[str]
        Names of the free parameters.
    mats : Sequence[numpy.ndarray]
        ∂F/∂v_p for each free parameter.
    start : Sequence[float]
        Starting values.
    targets : Sequence[tuple[str | None, int]]
        (species, rank) of the band each observation belongs to.
    observed : Sequence[float]
        Measured wavenumbers (cm-1), one per target.

    Returns
    -------
    tuple or None
        (values, calculated wavenumbers, Jacobian, residual sum of squares),
        or None when the fit cannot start (a target band missing, or an
        imaginary frequency at the start).
    """
    problem = _Problem(
        model,
        isomer,
        np.asarray(f0, float),
        tuple(names),
        tuple(np.asarray(m, float) for m in mats),
        symmetry_blocks(isomer, model.sites),
    )
    got = _lm(problem, np.asarray(start, float), list(targets), np.asarray(observed, float))
    if got is None:
        return None
    v, calc, jac, _, rss = got
    return v, calc, jac, rss


# --------------------------------------------------------------------------
# assignments


def _scale(name: str) -> float:
    return 0.2 if name in ("kc", "kt") else 0.5


def _candidates_for(o: Observation, bands: Sequence[Band]) -> list[BandKey]:
    """The bands one observation may belong to: every IR-active band, or those its label names."""
    if o.label is None:
        return [b.key for b in bands if b.ir_active]
    m = _LABEL.match(o.label)
    assert m is not None
    sp, order = m.group(1), m.group(2)
    cands = [
        b.key for b in bands if (b.species or "").lower() == sp.lower() and (order is None or b.order == int(order))
    ]
    if not cands:
        names = sorted({b.name for b in bands})
        raise InputError(
            f"no predicted band '{o.label}' to assign {o.wavenumber:g} cm-1 to",
            f"bands of this isomer: {', '.join(names)}",
        )
    return cands


def _one_to_one(options: Sequence[Sequence[BandKey]]) -> list[list[BandKey]]:
    return [list(combo) for combo in itertools.product(*options) if len(set(combo)) == len(combo)]


def _order_keeping(options: Sequence[Sequence[BandKey]], bands: Sequence[Band]) -> list[list[BandKey]]:
    """Assignments of measured (descending) onto predicted (descending) bands, at most MAX_ASSIGNMENTS."""
    order = {b.key: k for k, b in enumerate(bands)}
    out = []
    for combo in itertools.product(*options):
        ks = [order[c] for c in combo]
        if all(a < b for a, b in zip(ks, ks[1:])):
            out.append(list(combo))
            if len(out) >= MAX_ASSIGNMENTS:
                break
    return out


def _assignments(obs: Sequence[Observation], bands: Sequence[Band]) -> tuple[list[list[BandKey]], bool]:
    """Candidate target lists (one band key per observation), and whether the list was cut short."""
    options = [_candidates_for(o, bands) for o in obs]
    full = math.prod(max(1, len(c)) for c in options) <= MAX_ASSIGNMENTS * 4
    out = _one_to_one(options) if full else []
    if not full or len(out) > MAX_ASSIGNMENTS:
        out = _order_keeping(options, bands)
    return out, not full or len(out) >= MAX_ASSIGNMENTS


def _screen(problem: _Problem, start: np.ndarray, cands, observed: np.ndarray, names) -> list:
    """Rank candidate assignments by a linearised fit from the starting
    constants (one Gauss–Newton step, exact to first order), and keep the
    best few for the full iteration.  The Jacobian at the start is the same
    for every assignment, so this costs one eigen-solution in all."""
    if len(cands) <= SCREEN_KEEP:
        return list(cands)
    keys = sorted({t for c in cands for t in c}, key=lambda t: (t[0] or "", t[1]))
    got = _evaluate(problem, start, keys)
    if got is None:
        return list(cands)[:SCREEN_KEEP]
    calc0, jac0, _ = got
    row = {t: k for k, t in enumerate(keys)}
    scale = np.array([_scale(n) for n in names])
    scored = []
    for c in cands:
        idx = [row[t] for t in c]
        j = jac0[idx]
        r = observed - calc0[idx]
        step = np.linalg.lstsq(j, r, rcond=None)[0]
        res = r - j @ step
        rms = math.sqrt(float(np.sum(res**2)) / len(r))
        scored.append(((round(rms, 1), float(np.sum((step / scale) ** 2))), c))
    scored.sort(key=lambda x: x[0])
    return [c for _, c in scored[:SCREEN_KEEP]]


# --------------------------------------------------------------------------
# the user-facing fit


@frozen_dataclass
class _Free:
    """The free parameters of a fit: F = f0 + Σ v_p mats[p], starting at v0."""

    f0: np.ndarray = field(compare=False)
    names: tuple[str, ...]
    mats: tuple[np.ndarray, ...] = field(compare=False)
    v0: tuple[float, ...]


def _observations(measured: Sequence[float | Observation]) -> tuple[Observation, ...]:
    obs = (m if isinstance(m, Observation) else Observation(float(m)) for m in measured)
    return tuple(sorted(obs, key=lambda o: -o.wavenumber))


def _held(model: Model, fixed: Mapping[str, float], tie_ck: bool) -> dict[str, float]:
    """The constants held at given values (``k`` holds every stretching constant)."""
    check_constants(fixed, "--fix")
    for name in fixed:
        if name not in ("k",) + model.parameter_names:
            raise InputError(
                f"cannot fix '{name}': not a constant here", f"constants: {', '.join(('k',) + model.parameter_names)}"
            )
    held: dict[str, float] = {}
    if "k" in fixed:
        for s in model.sets:
            held[s.name] = float(fixed["k"])
    held.update({k: float(v) for k, v in fixed.items() if k != "k"})
    if tie_ck and ("kt" in held) != ("kc" in held):
        raise InputError(
            "kt = 2 kc (tie) conflicts with fixing only one of kc, kt", "fix both or neither, or drop the tie"
        )
    return held


def _free(model: Model, values: Mapping[str, float], held: Mapping[str, float], tie_ck: bool) -> _Free:
    """Split F into the held part and one matrix per free constant (kc and kt
    as one parameter under the tie; an interaction with no pair of its kind
    plays no part)."""
    n = len(model.oscillators)
    f0 = np.zeros((n, n))
    names: list[str] = []
    mats: list[np.ndarray] = []
    v0: list[float] = []

    def free(name: str, mat: np.ndarray) -> None:
        names.append(name)
        mats.append(mat)
        v0.append(values[name])

    for s in model.sets:
        if s.name in held:
            f0 += held[s.name] * model.derivative(s.name)
        else:
            free(s.name, model.derivative(s.name))
    if tie_ck and "kc" in held:
        f0 += held["kc"] * model.derivative("kc") + held["kt"] * model.derivative("kt")
    elif tie_ck:
        free("kc", model.derivative("kc") + 2.0 * model.derivative("kt"))
    else:
        for name in ("kc", "kt"):
            if name in held:
                f0 += held[name] * model.derivative(name)
            elif np.any(model.derivative(name)):
                free(name, model.derivative(name))
    return _Free(f0, tuple(names), tuple(mats), tuple(v0))


def _check_count(obs: Sequence[Observation], names: Sequence[str]) -> None:
    p = len(names)
    if p == 0:
        raise InputError("every constant is fixed: nothing to fit", "free at least one constant (drop a --fix)")
    if len(obs) < p:
        raise InputError(
            f"{len(obs)} band(s) cannot determine {p} free constants ({', '.join(names)})",
            "give more bands, hold some with --fix (e.g. --fix kt=0.6) or tie kt = 2 kc with --ck",
        )


def _best(problem: _Problem, start: np.ndarray, cands, observed: np.ndarray):
    """The full fit of each screened assignment; the best by (RMS to 0.1 cm-1,
    distance from the start in units of each constant's scale)."""
    best = None
    for targets in _screen(problem, start, cands, observed, problem.names):
        got = _lm(problem, start, targets, observed)
        if got is None:
            continue
        v, calc, jac, modes, rss = got
        rms = math.sqrt(rss / len(observed))
        penalty = float(sum(((a - b) / _scale(nm)) ** 2 for a, b, nm in zip(v, start, problem.names)))
        score = (round(rms, 1), penalty)
        if best is None or score < best[0]:
            best = (score, targets, v, calc, jac, modes, rss)
    if best is None:
        raise InputError(
            "the fit did not converge for any assignment",
            "give better starting constants with --constants or assign the bands",
        )
    return best[1:]


def _check_rank(jac: np.ndarray, names: Sequence[str]) -> None:
    p = len(names)
    sv = np.linalg.svd(jac, compute_uv=False)
    rank = int(np.sum(sv > 1e-8 * max(1.0, float(sv[0]) if len(sv) else 1.0)))
    if rank < p:
        raise InputError(
            f"the assigned bands fix only {rank} combination(s) of the {p} free constants ({', '.join(names)})",
            "hold some with --fix (e.g. --fix kt=0.6), tie kt = 2 kc with --ck, "
            "or add bands of other species (e.g. Raman)",
        )


def _uncertainties(jac: np.ndarray, rss: float, dof: int) -> list[float | None]:
    """sqrt(diag(s²(JᵀJ)⁻¹)), s² = RSS/dof; None each when exactly determined."""
    if dof <= 0:
        return [None] * jac.shape[1]
    cov = rss / dof * np.linalg.inv(jac.T @ jac)
    return [math.sqrt(max(0.0, float(cov[k, k]))) for k in range(jac.shape[1])]


def _constant_rows(
    model: Model,
    fitted: Mapping[str, float],
    sigma: Mapping[str, float | None],
    held: Mapping[str, float],
    values: Mapping[str, float],
    tie_ck: bool,
) -> tuple[tuple[str, float, float | None, str], ...]:
    rows: list[tuple[str, float, float | None, str]] = []
    for name in model.parameter_names:
        if name in fitted:
            rows.append((name, float(fitted[name]), sigma[name], "fitted"))
        elif tie_ck and name == "kt" and "kc" in fitted:
            s = sigma["kc"]
            rows.append(("kt", 2.0 * float(fitted["kc"]), None if s is None else 2.0 * s, "tied"))
        else:
            rows.append((name, float(held.get(name, values[name])), None, "fixed"))
    return tuple(rows)


def fit_constants(
    isomer: Isomer,
    reporter_class: str,
    measured: Sequence[float | Observation],
    *,
    fixed: Mapping[str, float] | None = None,
    tie_ck: bool = False,
    start: Mapping[str, float] | None = None,
    rules: RuleSet | None = None,
) -> FitResult:
    """Fit the force constants of one reporter class on one isomer to measured bands.

    Parameters
    ----------
    isomer : Isomer
    reporter_class : str
        'CO', 'CN', 'NO', ...
    measured : Sequence[float | Observation]
        Measured wavenumbers (cm-1), optionally assigned (:class:`Observation`).
    fixed : Mapping[str, float], optional
        Constants held at given values (mdyn/Å); ``k`` holds every stretching constant.
    tie_ck : bool
        Tie kt = 2 kc (the Cotton–Kraihanzel approximation).
    start : Mapping[str, float], optional
        Overrides of the default starting values.
    rules : RuleSet, optional
        Where the defaults come from (default: the built-in rules).

    Returns
    -------
    FitResult

    Raises
    ------
    InputError
        With no bands, fewer bands than free constants, an assignment that
        names no predicted band, no one-to-one matching, no convergence, or
        bands that fix only some combinations of the constants.
    """
    model = build_model(isomer, reporter_class, rules)
    obs = _observations(measured)
    if not obs:
        raise InputError("no measured bands to fit", "give e.g. --fit 2045,1980,1932")
    if start:
        check_constants(start, "--constants")
    values = model.resolve(start)
    held = _held(model, fixed or {}, tie_ck)
    free = _free(model, values, held, tie_ck)
    _check_count(obs, free.names)
    base_bands = solve_modes(model, isomer, values).bands
    cands, truncated = _assignments(obs, base_bands)
    if not cands:
        ir = sum(1 for b in base_bands if b.ir_active)
        raise InputError(
            f"{len(obs)} measured bands cannot be matched one-to-one to the {ir} IR-active bands of isomer {isomer.id}",
            "give fewer bands, assign some to Raman bands (e.g. 2020:Eg), or try another isomer",
        )
    observed = np.array([o.wavenumber for o in obs])
    problem = _Problem(model, isomer, free.f0, free.names, free.mats, symmetry_blocks(isomer, model.sites))
    targets, v, calc, jac, modes, rss = _best(problem, np.array(free.v0), cands, observed)
    _check_rank(jac, free.names)
    dof = len(obs) - len(free.names)
    notes = []
    if dof <= 0:
        notes.append("exactly determined (as many bands as free constants): no uncertainties can be given")
    if truncated:
        notes.append(f"only {len(cands)} order-keeping assignments were tried (too many to try all)")
    sig = _uncertainties(jac, rss, dof)
    rows = _constant_rows(model, dict(zip(free.names, v)), dict(zip(free.names, sig)), held, values, tie_ck)
    name_of = {m.band.key: m.band.name for m in modes}
    assignment = tuple(
        (float(o.wavenumber), name_of[t], float(c), float(c - o.wavenumber)) for o, t, c in zip(obs, targets, calc)
    )
    for name, val, _, _ in rows:
        if name in ("kc", "kt") and val < 0:
            notes.append(f"{name} came out negative ({val:.3f}): the assignment or the isomer may be wrong")
    return FitResult(
        isomer_id=isomer.id,
        reporter_class=model.reporter_class,
        constants=rows,
        assignment=assignment,
        rms=math.sqrt(rss / len(obs)),
        dof=dof,
        auto_assigned=any(o.label is None or "(" not in o.label for o in obs),
        bands=tuple(m.band for m in modes),
        notes=tuple(notes),
        tried=len(cands),
    )
